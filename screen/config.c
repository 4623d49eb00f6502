/* The screening run's defaults, its test kinds, and the run-wide decision (q-values, flags). */
#include "screen_internal.h"
#include "slowscan/significance.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>

const double screen_quantile_levels[SCREEN_QUANTILES] = {0.05, 0.25, 0.5, 0.75, 0.95};
const double screen_tail_levels[SCREEN_TAIL_QUANTILES] = {0.01, 0.99};

screen_config slowscan_screen_config_default(void)
{
    screen_config c = {0};
    slowscan_detrend_parse_method("gaussian-linear", &c.detrend); /* DESIGN §3: no lag at the ends */
    c.bandwidth = (screen_length){.amount = 10, .percent = 1};
    c.deseason = NAN;
    c.deseason_window = (screen_length){.amount = NAN, .percent = 0};
    c.window = (screen_length){.amount = 50, .percent = 1};
    c.indicators[0] = INDICATOR_VARIANCE;
    c.indicators[1] = INDICATOR_LAG1;
    c.nindicators = 2;
    c.min_coverage = 0.8;
    c.recovery = RECOVERY_LOG_AR1;
    c.drift_test = 1; /* the model-based test joins the default set */
    c.null_kind = SURROGATE_PHASE;
    c.null_options = slowscan_surrogate_default_options();
    c.surrogates = 1000;
    c.seed = 1;
    c.fdr = 0.05;
    c.alternative = -1; /* per test: rising, or two-sided for skewness */
    c.threads = 1;
    c.tail = slowscan_tail_options_default();
    return c;
}

void slowscan_screen_config_control(screen_config *cfg)
{
    cfg->null_kind = SURROGATE_PHASE; /* of the control run's residual */
    cfg->null_name = "control";      /* its own streams: not the phase null's draws */
}

size_t slowscan_screen_test_count(const screen_config *cfg)
{
    return cfg->nindicators + (cfg->drift_test != 0);
}

screen_config screen_drift_only(const screen_config *cfg)
{
    screen_config drift_only = *cfg;
    drift_only.nindicators = 0;
    drift_only.drift_test = 1;
    return drift_only;
}

int slowscan_screen_test_of(const screen_config *cfg, size_t j)
{
    return j < cfg->nindicators ? (int)cfg->indicators[j] : SCREEN_TEST_RECOVERY_TREND;
}

int slowscan_screen_test_rolling(int kind)
{
    return kind >= 0 && kind < INDICATOR_COUNT;
}

const char *slowscan_screen_test_name(int kind)
{
    return slowscan_screen_test_rolling(kind) ? slowscan_indicator_name((indicator_kind)kind) : "recovery_trend";
}

const char *slowscan_screen_flag_name(screen_flag flag)
{
    static const char *const names[] = {"untested", "none", "rising", "falling", "insufficient",
                                        "undecided"};
    return (unsigned)flag < sizeof names / sizeof names[0] ? names[flag] : "untested";
}

static screen_flag flag_before_decision(const screen_test *t)
{
    if (isnan(t->statistic))
        return SCREEN_FLAG_INSUFFICIENT;
    /* surrogates were asked for but no null could be made */
    return t->surrogates > 0 ? SCREEN_FLAG_INSUFFICIENT : SCREEN_FLAG_UNTESTED;
}

screen_flag screen_flag_of(const screen_test *t, double q, size_t tested, double fdr)
{
    if (isnan(t->p_value))
        return flag_before_decision(t);
    double decisive = tested == 1 ? t->p_value : q; /* one test: p decides itself */
    /* "falling" only arises when a decreasing or two-sided alternative is tested. */
    return decisive > fdr ? SCREEN_FLAG_NONE
           : t->statistic > 0 ? SCREEN_FLAG_RISING : SCREEN_FLAG_FALLING;
}

int slowscan_screen_decide(const screen_test *const *tests, size_t count, double fdr, double *q,
                  screen_flag *flags)
{
    double *p = calloc(count + 1, sizeof *p);
    if (!p)
        return SLOWSCAN_ENOMEM;
    size_t tested = 0;
    for (size_t r = 0; r < count; r++) {
        p[r] = tests[r]->p_value;
        tested += !isnan(p[r]);
    }
    int st = slowscan_significance_bh(p, count, q, NULL);
    for (size_t r = 0; st == SLOWSCAN_OK && r < count; r++)
        flags[r] = screen_flag_of(tests[r], q[r], tested, fdr);
    free(p);
    return st;
}

size_t slowscan_screen_test_hits(const screen_test *t)
{
    if (isnan(t->p_value))
        return 0;
    double hits = t->p_value * ((double)t->null_used + 1.0) - 1.0;
    return hits > 0 ? (size_t)llround(hits) : 0;
}
