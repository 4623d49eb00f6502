/* The shared trend test: Kendall tau, surrogate null, p-value, null quantiles. */
#include "trend_test.h"
#include "slowscan/significance.h"
#include "slowscan/status.h"

#include <fftw3.h>
#include <gsl/gsl_statistics_double.h>
#include <math.h>
#include <stdlib.h>

/* Kendall tau on fewer values says little and its null distribution is coarse. */
enum { MIN_TREND_VALUES = 8 };

const double trend_quantile_levels[TREND_QUANTILES] = {0.05, 0.25, 0.5, 0.75, 0.95};

/* Kendall tau of one indicator path against time; NaN with a reason when it cannot be had. */
static double trend_of(trend_tester *run, const prepared_series *ps, const double *values,
                       const char **reason)
{
    double tau = NAN;
    size_t used = 0;
    if (run->kendall_n < ps->n) {
        kendall_free(run->kendall);
        run->kendall = kendall_alloc(ps->n);
        run->kendall_n = run->kendall ? ps->n : 0;
    }
    if (!run->kendall) {
        *reason = "out of memory";
        return NAN;
    }
    int st = kendall_tau_b(run->kendall, ps->time, values, ps->n, &tau, &used);
    if (st == SLOWSCAN_ECONST)
        *reason = "the indicator does not vary";
    else if (st != SLOWSCAN_OK || used < MIN_TREND_VALUES)
        *reason = "fewer than 8 finite indicator values";
    return used < MIN_TREND_VALUES ? NAN : tau;
}

/* Everything sized by the series length is remade only when the length changes. */
static int ready_null(trend_tester *run, const cli_options *opts, size_t n)
{
    if (run->null_n == n)
        return SLOWSCAN_OK;
    surrogate_plan_free(run->plan);
    for (size_t k = 0; k < run->nthreads; k++)
        null_trend_free(run->null_ws[k]);
    run->null_n = 0;
    run->nthreads = (size_t)opts->threads;
    run->plan = surrogate_plan_alloc(n, FFTW_ESTIMATE);
    int missing = !run->plan;
    for (size_t k = 0; k < run->nthreads; k++)
        missing |= !(run->null_ws[k] = null_trend_alloc(n, opts->nindicators));
    if (!run->null)
        run->null = malloc(trend_test_count(opts) * (size_t)opts->surrogates * sizeof *run->null);
    if (!run->sorted)
        run->sorted = malloc((size_t)opts->surrogates * sizeof *run->sorted);
    if (missing || !run->null || !run->sorted)
        return SLOWSCAN_ENOMEM;
    run->null_n = n;
    return SLOWSCAN_OK;
}

/* The observed series and every surrogate share one plan per window length and time step;
 * it is made here, in the calling thread, before the surrogate threads start. */
static int ready_rolling(trend_tester *run, const cli_options *opts, const prepared_series *ps,
                         rolling_spec *spec)
{
    *spec = cli_rolling_spec(opts, ps);
    const rolling_plan *kept = run->rolling_plan;
    if (kept && rolling_plan_matches(kept, spec)) {
        spec->plan = kept;
        return EXIT_OK;
    }
    rolling_plan_free(run->rolling_plan);
    return cli_rolling_plan(opts, ps, spec, &run->rolling_plan);
}

/* Test j's alternative: the option, else the indicator's direction; the drift test looks for
 * a growing memory (a1 > 0). */
static significance_alternative alternative_of(const cli_options *opts, size_t j)
{
    if (opts->alternative >= 0)
        return (significance_alternative)opts->alternative;
    if (j >= opts->nindicators || indicator_direction(opts->indicators[j]) > 0)
        return ALTERNATIVE_INCREASING;
    return ALTERNATIVE_TWO_SIDED;
}

size_t trend_test_count(const cli_options *opts)
{
    return opts->nindicators + (opts->drift_test != 0);
}

static int by_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

/* Quantiles of the finite null values (for --json). */
static void null_quantiles(trend_tester *run, const double *null, size_t m, trend_result *row)
{
    size_t k = 0;
    for (size_t j = 0; j < m; j++)
        if (isfinite(null[j]))
            run->sorted[k++] = null[j];
    row->null_used = k;
    qsort(run->sorted, k, sizeof *run->sorted, by_double);
    for (int q = 0; q < TREND_QUANTILES && k > 0; q++)
        row->quantile[q] = gsl_stats_quantile_from_sorted_data(run->sorted, 1, k,
                                                                trend_quantile_levels[q]);
}

/* The null distribution of every indicator's tau over the surrogates of the residual, and
 * the p-values of the rows just recorded for this series. */
static int test_series(const cli_options *opts, const prepared_series *ps, trend_tester *run,
                       trend_result *rows)
{
    size_t block = opts->null_options.block_length;
    if (opts->null_model == SURROGATE_BLOCK && block > ps->n / 2) {
        /* With blocks longer than half the record there are too few distinct starts for a
         * null distribution (at L = n every replicate is the series itself). */
        cli_error("%s: column '%s': option --block-length %zu is more than half the %zu samples",
                  ps->source, ps->name, block, ps->n);
        return EXIT_BAD_INPUT;
    }
    rolling_spec spec;
    int rc = ready_rolling(run, opts, ps, &spec);
    if (rc != EXIT_OK)
        return rc;
    int st = ready_null(run, opts, ps->n);
    int need_level = 0;
    for (size_t j = 0; j < opts->nindicators; j++)
        need_level |= indicator_needs_level(opts->indicators[j]);
    null_trend_job job = {&spec, opts->indicators, opts->nindicators, ps->time,
                          need_level ? ps->trend : NULL, opts->seed, ps->name,
                          cli_null_name(opts), opts->drift_test ? 1 + opts->noise_trend : 0};
    size_t m = (size_t)opts->surrogates;
    cli_null_task task = {run->plan, (surrogate_kind)opts->null_model, &opts->null_options,
                          ps->null_source, &job, m, run->null, 0};
    if (st == SLOWSCAN_OK)
        st = cli_null_parallel(&task, run->null_ws, run->nthreads);
    if (task.unconverged)
        cli_warning("%s: column '%s': %zu of %zu iaaft surrogates did not converge within %d "
                    "iterations (--iaaft-iterations, --iaaft-tol)", ps->source, ps->name,
                    task.unconverged, m, opts->null_options.iaaft_max_iterations);
    if (st == SLOWSCAN_ESHORT || st == SLOWSCAN_ECONST) {
        /* This series cannot carry a null (too few samples, or none varying): its rows are
         * insufficient, the run goes on. */
        cli_warning("%s: column '%s': no surrogates can be made (%s); its p-values are NA",
                    ps->source, ps->name, slowscan_strerror(st));
        for (size_t j = 0; j < trend_test_count(opts); j++)
            rows[j].reason = "no surrogates can be made";
        return EXIT_OK;
    }
    if (st == SLOWSCAN_ENUMERIC && opts->null_model == SURROGATE_AR1) {
        cli_error("%s: column '%s': option --null ar1: the fitted AR(1) coefficient is not below 1 "
                  "(the residual is not stationary); detrend differently or choose another null",
                  ps->source, ps->name);
        return EXIT_BAD_INPUT;
    }
    if (st != SLOWSCAN_OK) {
        cli_error("%s: column '%s': surrogate null failed: %s", ps->source, ps->name,
                  slowscan_strerror(st));
        return st == SLOWSCAN_ENOMEM ? EXIT_INTERNAL : EXIT_BAD_INPUT;
    }
    for (size_t j = 0; j < trend_test_count(opts); j++) {
        if (!isnan(rows[j].statistic))
            rows[j].p_value = significance_p_value(rows[j].statistic, run->null + j * m, m,
                                                   alternative_of(opts, j), &rows[j].null_used);
        null_quantiles(run, run->null + j * m, m, &rows[j]);
    }
    return EXIT_OK;
}


/* The drift statistic of the observed residual: the t-value of a1. */
static double drift_of(trend_tester *run, const cli_options *opts, const prepared_series *ps,
                       const char **reason, double *model)
{
    if (run->drift_n != ps->n) {
        ar1_drift_free(run->drift);
        run->drift = ar1_drift_alloc(ps->n);
        run->drift_n = run->drift ? ps->n : 0;
    }
    ar1_drift_fit fit;
    if (run->drift)
        ar1_drift_set_noise_trend(run->drift, opts->noise_trend);
    int st = run->drift ? ar1_drift_estimate(run->drift, ps->residual, ps->n, &fit) : SLOWSCAN_ENOMEM;
    if (st == SLOWSCAN_OK && isfinite(fit.t_a1)) {
        *model = fit.t_a1_model;
        return fit.t_a1;
    }
    *reason = st == SLOWSCAN_ESHORT ? "fewer than 8 adjacent pairs" : "no AR(1) drift fit";
    return NAN;
}

int trend_test(trend_tester *run, const cli_options *opts, const prepared_series *ps,
               double *const *values, trend_result *results)
{
    size_t tests = trend_test_count(opts);
    for (size_t j = 0; j < tests; j++) {
        trend_result *r = &results[j];
        *r = (trend_result){.tau = NAN, .statistic = NAN, .statistic_model = NAN, .p_value = NAN,
                            .quantile = {NAN, NAN, NAN, NAN, NAN},
                            .reason = "the series has no variation"};
        if (ps->constant)
            continue;
        if (j < opts->nindicators)
            r->tau = r->statistic = trend_of(run, ps, values[j], &r->reason);
        else
            r->statistic = drift_of(run, opts, ps, &r->reason, &r->statistic_model);
    }
    int any = 0;
    for (size_t j = 0; j < tests; j++)
        any |= !isnan(results[j].statistic);
    if (opts->surrogates > 0 && any)
        return test_series(opts, ps, run, results);
    return EXIT_OK;
}

void trend_tester_free(trend_tester *run)
{
    kendall_free(run->kendall);
    surrogate_plan_free(run->plan);
    for (size_t k = 0; k < run->nthreads; k++)
        null_trend_free(run->null_ws[k]);
    free(run->null);
    free(run->sorted);
    ar1_drift_free(run->drift);
    rolling_plan_free(run->rolling_plan);
}
