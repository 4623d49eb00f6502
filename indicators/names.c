/* Indicator names, expected directions and inputs: the one table the CLI and the surrogate
 * test read, so a new indicator is added in one place. */
#include "slowscan/indicators.h"
#include "slowscan/status.h"

#include <string.h>

static const struct {
    const char *name;
    int direction;   /* +1 rises toward a threshold; 0 two-sided */
    int needs_level; /* needs the un-detrended series */
    int per_window;  /* computed afresh in each window from a rolling_plan */
    size_t min_window;
} table[INDICATOR_COUNT] = {
    [INDICATOR_VARIANCE] = {"variance", 1, 0, 0, 3},
    [INDICATOR_SD] = {"sd", 1, 0, 0, 3},
    [INDICATOR_CV] = {"cv", 1, 1, 0, 3},
    /* Skewness may move either way ahead of a threshold, depending on which side the
     * potential flattens: tested two-sided. */
    [INDICATOR_SKEWNESS] = {"skewness", 0, 0, 0, 3},
    [INDICATOR_KURTOSIS] = {"kurtosis", 1, 0, 0, 3},
    [INDICATOR_LAG1] = {"lag1", 1, 0, 0, 3},
    [INDICATOR_AR1] = {"ar1", 1, 0, 0, 3},
    [INDICATOR_RECOVERY] = {"recovery", 1, 0, 0, 3},
    /* Slowing down reddens the spectrum, steepens it and lengthens the correlations: all
     * three rise toward a threshold. */
    [INDICATOR_REDNESS] = {"redness", 1, 0, 1, 10},
    [INDICATOR_SPECTRAL_EXPONENT] = {"spectral_exponent", 1, 0, 1, 6},
    [INDICATOR_DFA] = {"dfa", 1, 0, 1, DFA_MIN_WINDOW},
};

static int valid(indicator_kind kind)
{
    return (unsigned)kind < (unsigned)INDICATOR_COUNT;
}

const char *slowscan_indicator_name(indicator_kind kind)
{
    return valid(kind) ? table[kind].name : NULL;
}

int slowscan_indicator_lookup(const char *name, indicator_kind *kind)
{
    if (!name || !kind)
        return SLOWSCAN_EINVAL;
    for (int k = 0; k < INDICATOR_COUNT; k++)
        if (strcmp(name, table[k].name) == 0) {
            *kind = (indicator_kind)k;
            return SLOWSCAN_OK;
        }
    return SLOWSCAN_EINVAL;
}

int slowscan_indicator_direction(indicator_kind kind)
{
    return valid(kind) ? table[kind].direction : 0;
}

int slowscan_indicator_needs_level(indicator_kind kind)
{
    return valid(kind) ? table[kind].needs_level : 0;
}

int slowscan_indicator_per_window(indicator_kind kind)
{
    return valid(kind) ? table[kind].per_window : 0;
}

size_t slowscan_indicator_min_window(indicator_kind kind)
{
    return valid(kind) ? table[kind].min_window : 0;
}

int slowscan_indicator_scale_power(indicator_kind kind)
{
    return kind == INDICATOR_VARIANCE ? 2 : kind == INDICATOR_SD ? 1 : 0;
}
