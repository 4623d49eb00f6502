/* Indicator names, expected directions and inputs: the one table the CLI and the surrogate
 * test read, so a new indicator is added in one place. */
#include "slowscan/indicators.h"
#include "slowscan/status.h"

#include <string.h>

static const struct {
    const char *name;
    int direction;   /* +1 rises toward a threshold; 0 two-sided */
    int needs_level; /* needs the un-detrended series */
} table[INDICATOR_COUNT] = {
    [INDICATOR_VARIANCE] = {"variance", 1, 0},
    [INDICATOR_SD] = {"sd", 1, 0},
    [INDICATOR_CV] = {"cv", 1, 1},
    /* Skewness may move either way ahead of a threshold, depending on which side the
     * potential flattens: tested two-sided. */
    [INDICATOR_SKEWNESS] = {"skewness", 0, 0},
    [INDICATOR_KURTOSIS] = {"kurtosis", 1, 0},
    [INDICATOR_LAG1] = {"lag1", 1, 0},
    [INDICATOR_AR1] = {"ar1", 1, 0},
    [INDICATOR_RECOVERY] = {"recovery", 1, 0},
};

static int valid(indicator_kind kind)
{
    return (unsigned)kind < (unsigned)INDICATOR_COUNT;
}

const char *indicator_name(indicator_kind kind)
{
    return valid(kind) ? table[kind].name : NULL;
}

int indicator_lookup(const char *name, indicator_kind *kind)
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

int indicator_direction(indicator_kind kind)
{
    return valid(kind) ? table[kind].direction : 0;
}

int indicator_needs_level(indicator_kind kind)
{
    return valid(kind) ? table[kind].needs_level : 0;
}
