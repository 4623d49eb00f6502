/* The trend test every analysing command shares (screen, robustness): Kendall tau of each
 * indicator path against time and, with surrogates, its null distribution, p-value and
 * quantiles. The tester keeps everything sized by the series length between series. */
#ifndef SLOWSCAN_CLI_TREND_TEST_H
#define SLOWSCAN_CLI_TREND_TEST_H

#include "cli.h"
#include "slowscan/kendall.h"

/* Quantiles of the null distribution reported in --json. */
enum { TREND_QUANTILES = 5 };
extern const double trend_quantile_levels[TREND_QUANTILES];

typedef struct {
    double tau, p_value;      /* NaN when not available */
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
} trend_tester;

/* results[j] for indicator j of opts (paths in values[j]). Returns an exit code. */
int trend_test(trend_tester *tester, const cli_options *opts, const prepared_series *ps,
               double *const *values, trend_result *results);
void trend_tester_free(trend_tester *tester);

#endif
