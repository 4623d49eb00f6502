/* The trend test every analysing command shares (screen, robustness): Kendall tau of each
 * indicator path against time and, with surrogates, its null distribution, p-value and
 * quantiles. The tester keeps everything sized by the series length between series. */
#ifndef SLOWSCAN_CLI_TREND_TEST_H
#define SLOWSCAN_CLI_TREND_TEST_H

#include "cli.h"
#include "slowscan/ar1_drift.h"
#include "slowscan/kendall.h"

/* Quantiles of the null distribution reported in --json. */
enum { TREND_QUANTILES = 5 };
extern const double trend_quantile_levels[TREND_QUANTILES];

/* A run's tests: one per rolling indicator, then (with opts->drift_test) the drift test. */
#define TREND_MAX_TESTS (INDICATOR_COUNT + 1)

typedef struct {
    double tau;               /* Kendall tau of the indicator path (NaN for the drift test) */
    double statistic;         /* the tested statistic: tau, or the t-value of the drift */
    double statistic_model;   /* the drift test: t with the model-based standard error */
    double p_value;           /* NaN when not available */
    size_t null_used;         /* finite null values behind p */
    double quantile[TREND_QUANTILES];
    const char *reason;       /* why tau is NaN */
} trend_result;

typedef struct {
    kendall_workspace *kendall;
    size_t kendall_n;
    surrogate_plan *plan;                           /* plan once, draw many */
    null_trend_workspace *null_ws[CLI_MAX_THREADS]; /* one per thread */
    size_t null_n, nthreads;
    double *null;   /* nindicators x surrogates */
    double *sorted; /* surrogates: scratch for the quantiles */
    ar1_drift_workspace *drift;
    size_t drift_n;
    rolling_plan *rolling_plan; /* the per-window indicators' plan, kept while W and dt stay */
} trend_tester;

/* How many tests a run has (rolling indicators, plus the drift test when asked for). */
size_t trend_test_count(const cli_options *opts);

/* results[j] for indicator j of opts (paths in values[j]); results[nindicators] for the drift
 * test. Returns an exit code. */
int trend_test(trend_tester *tester, const cli_options *opts, const prepared_series *ps,
               double *const *values, trend_result *results);
void trend_tester_free(trend_tester *tester);

#endif
