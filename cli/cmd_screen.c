/* slowscan screen: the main job. For every series: detrend, rolling indicators, Kendall tau of
 * each indicator against time; then the summary, one row per series x indicator. */
#include "cli.h"
#include "screen.h"
#include "slowscan/kendall.h"
#include "slowscan/null_trend.h"
#include "slowscan/significance.h"
#include "slowscan/status.h"
#include "slowscan/surrogates.h"

#include <fftw3.h>
#include <gsl/gsl_statistics_double.h>

#include <math.h>
#include <stdlib.h>
#include <string.h>

/* Kendall tau on fewer values says little and its null distribution is coarse. */
enum { MIN_TREND_VALUES = 8 };

static int open_outputs(const cli_options *opts, cli_outputs *outs, void *context)
{
    screen_run *run = context;
    int rc = cli_outputs_open(outs, opts, opts->output, "-o", &run->out);
    if (rc == EXIT_OK && opts->rolling_output) {
        if (!strcmp(opts->rolling_output, "-") && (!opts->output || !strcmp(opts->output, "-"))) {
            cli_error("option --rolling: the summary already goes to standard output; give a file");
            return EXIT_BAD_INPUT;
        }
        rc = cli_outputs_open(outs, opts, opts->rolling_output, "--rolling", &run->rolling);
        if (rc == EXIT_OK)
            fputs(cli_rolling_header, run->rolling);
    }
    if (rc == EXIT_OK && opts->json_output)
        rc = cli_outputs_open(outs, opts, opts->json_output, "--json", &run->json);
    return rc;
}

static screen_row *add_row(screen_run *run)
{
    if (run->nrows == run->cap) {
        size_t cap = run->cap ? 2 * run->cap : 64;
        screen_row *bigger = realloc(run->rows, cap * sizeof *bigger);
        if (!bigger)
            return NULL;
        run->rows = bigger;
        run->cap = cap;
    }
    screen_row *row = &run->rows[run->nrows++];
    memset(row, 0, sizeof *row);
    return row;
}

/* Kendall tau of one indicator path against time; NaN with a reason when it cannot be had. */
static double trend_of(screen_run *run, const prepared_series *ps, const double *values,
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
static int ready_null(screen_run *run, const cli_options *opts, size_t n)
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
        run->null = malloc(opts->nindicators * (size_t)opts->surrogates * sizeof *run->null);
    if (!run->sorted)
        run->sorted = malloc((size_t)opts->surrogates * sizeof *run->sorted);
    if (missing || !run->null || !run->sorted)
        return SLOWSCAN_ENOMEM;
    run->null_n = n;
    return SLOWSCAN_OK;
}

static significance_alternative alternative_of(const cli_options *opts, indicator_kind kind)
{
    if (opts->alternative >= 0)
        return (significance_alternative)opts->alternative;
    return indicator_direction(kind) > 0 ? ALTERNATIVE_INCREASING : ALTERNATIVE_TWO_SIDED;
}

static int by_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

/* Quantiles of the finite null values (for --json). */
static void null_quantiles(screen_run *run, const double *null, size_t m, screen_row *row)
{
    size_t k = 0;
    for (size_t j = 0; j < m; j++)
        if (isfinite(null[j]))
            run->sorted[k++] = null[j];
    row->null_used = k;
    qsort(run->sorted, k, sizeof *run->sorted, by_double);
    for (int q = 0; q < SCREEN_QUANTILES && k > 0; q++)
        row->quantile[q] = gsl_stats_quantile_from_sorted_data(run->sorted, 1, k,
                                                                screen_quantile_levels[q]);
}

/* The null distribution of every indicator's tau over the surrogates of the residual, and
 * the p-values of the rows just recorded for this series. */
static int test_series(const cli_options *opts, const prepared_series *ps, screen_run *run,
                       screen_row *rows)
{
    int st = ready_null(run, opts, ps->n);
    rolling_spec spec = {ps->window, opts->min_coverage, ps->dt, opts->recovery};
    int need_level = 0;
    for (size_t j = 0; j < opts->nindicators; j++)
        need_level |= indicator_needs_level(opts->indicators[j]);
    null_trend_job job = {&spec, opts->indicators, opts->nindicators, ps->time,
                          need_level ? ps->trend : NULL, opts->seed, ps->name,
                          surrogate_name((surrogate_kind)opts->null_model)};
    size_t m = (size_t)opts->surrogates;
    cli_null_task task = {run->plan, (surrogate_kind)opts->null_model, &opts->null_options,
                          ps->residual, &job, m, run->null, 0};
    if (st == SLOWSCAN_OK)
        st = cli_null_parallel(&task, run->null_ws, run->nthreads);
    if (task.unconverged)
        cli_warning("%s: column '%s': %zu of %zu iaaft surrogates did not converge within %d "
                    "iterations (--iaaft-iterations, --iaaft-tol)", ps->source, ps->name,
                    task.unconverged, m, opts->null_options.iaaft_max_iterations);
    if (st != SLOWSCAN_OK) {
        cli_error("%s: column '%s': surrogate null failed: %s", ps->source, ps->name,
                  slowscan_strerror(st));
        return st == SLOWSCAN_ENOMEM ? EXIT_INTERNAL : EXIT_BAD_INPUT;
    }
    for (size_t j = 0; j < opts->nindicators; j++) {
        if (!isnan(rows[j].tau))
            rows[j].p_value = significance_p_value(rows[j].tau, run->null + j * m, m,
                                                   alternative_of(opts, rows[j].indicator),
                                                   &rows[j].null_used);
        null_quantiles(run, run->null + j * m, m, &rows[j]);
    }
    return EXIT_OK;
}

static int record_series(const cli_options *opts, const prepared_series *ps, screen_run *run,
                         double *const *values)
{
    for (size_t j = 0; j < opts->nindicators; j++) {
        screen_row *row = add_row(run);
        if (!row || !(row->series = strdup(ps->name))) {
            cli_error("out of memory");
            return EXIT_INTERNAL;
        }
        row->indicator = opts->indicators[j];
        row->n = ps->finite;
        row->window = (double)(ps->window - 1) * ps->dt;
        row->bandwidth = ps->bandwidth;
        row->p_value = row->q_value = NAN;
        const char *reason = NULL;
        row->tau = ps->constant ? NAN : trend_of(run, ps, values[j], &reason);
        if (ps->constant)
            row->flag = "insufficient"; /* the warning was given when the values were made */
        else if (isnan(row->tau)) {
            row->flag = "insufficient";
            cli_warning("%s: column '%s', indicator %s: %s; flagged insufficient", ps->source,
                        ps->name, indicator_name(row->indicator), reason ? reason : "no trend");
        } else
            row->flag = "untested"; /* until the test below (none with --surrogates 0) */
    }
    if (opts->surrogates > 0 && !ps->constant)
        return test_series(opts, ps, run, run->rows + run->nrows - opts->nindicators);
    return EXIT_OK;
}

static int screen_series(const cli_options *opts, const prepared_series *ps, void *context)
{
    screen_run *run = context;
    double *values[INDICATOR_COUNT];
    int rc = cli_indicator_values(opts, ps, values);
    if (rc == EXIT_OK && run->rolling)
        cli_write_rolling(run->rolling, opts, ps, values);
    if (rc == EXIT_OK)
        rc = record_series(opts, ps, run, values);
    cli_indicator_values_free(opts, values);
    return rc;
}

static void write_csv(const cli_options *opts, const screen_run *run)
{
    fputs("series,indicator,n,window,bandwidth,tau,p_value,q_value,null,surrogates,flag\n", run->out);
    for (size_t r = 0; r < run->nrows; r++) {
        const screen_row *row = &run->rows[r];
        cli_put_field(run->out, row->series);
        fprintf(run->out, ",%s,%zu,", indicator_name(row->indicator), row->n);
        const double cells[] = {row->window, row->bandwidth, row->tau, row->p_value, row->q_value};
        for (size_t c = 0; c < sizeof cells / sizeof cells[0]; c++) {
            cli_put_number(run->out, cells[c]);
            fputc(',', run->out);
        }
        fprintf(run->out, "%s,%ld,%s\n",
                opts->surrogates > 0 ? surrogate_name((surrogate_kind)opts->null_model) : "none",
                opts->surrogates, row->flag);
    }
}

static const char *fixed(char buf[32], double v, int digits, int sign)
{
    if (isnan(v))
        return "NA";
    snprintf(buf, 32, sign ? "%+.*f" : "%.*f", digits, v);
    return buf;
}

/* A table for people: aligned columns, the series names padded to the longest. */
static void write_table(const screen_run *run)
{
    int width = 6;
    for (size_t r = 0; r < run->nrows; r++)
        if ((int)strlen(run->rows[r].series) > width)
            width = (int)strlen(run->rows[r].series);
    fprintf(run->out, "%-*s  %-10s %8s %10s %10s  %s\n", width, "series", "indicator", "tau",
            "p", "q", "flag");
    for (size_t r = 0; r < run->nrows; r++) {
        const screen_row *row = &run->rows[r];
        char tau[32], p[32], q[32];
        fprintf(run->out, "%-*s  %-10s %8s %10s %10s  %s\n", width, row->series,
                indicator_name(row->indicator), fixed(tau, row->tau, 3, 1), fixed(p, row->p_value, 4, 0),
                fixed(q, row->q_value, 4, 0), row->flag);
    }
}

/* q-values over every test of the run (Benjamini-Hochberg), then the flags: with one test
 * the p-value itself decides. */
static int decide(const cli_options *opts, screen_run *run)
{
    double *p = malloc((run->nrows + 1) * sizeof *p), *q = malloc((run->nrows + 1) * sizeof *q);
    size_t tests = 0;
    for (size_t r = 0; p && r < run->nrows; r++) {
        p[r] = run->rows[r].p_value;
        tests += !isnan(p[r]);
    }
    if (!p || !q || significance_bh(p, run->nrows, q, NULL) != SLOWSCAN_OK) {
        free(p);
        free(q);
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    for (size_t r = 0; r < run->nrows; r++) {
        screen_row *row = &run->rows[r];
        if (isnan(row->p_value))
            continue;
        row->q_value = q[r];
        double decisive = tests == 1 ? row->p_value : row->q_value;
        /* "falling" only arises when a decreasing or two-sided alternative is tested. */
        row->flag = decisive > opts->fdr ? "none" : row->tau > 0 ? "rising" : "falling";
    }
    free(p);
    free(q);
    return EXIT_OK;
}

static int finish(const cli_options *opts, void *context)
{
    screen_run *run = context;
    int rc = decide(opts, run);
    if (rc != EXIT_OK)
        return rc;
    if (run->json)
        screen_write_json(run->json, opts, run);
    if (strcmp(opts->format, "table") == 0)
        write_table(run);
    else
        write_csv(opts, run);
    return EXIT_OK;
}

int cmd_screen(const cli_options *opts)
{
    screen_run run = {0};
    series_command cmd = {open_outputs, screen_series, finish, &run};
    if (opts->surrogates > 0 && opts->surrogates < 19)
        cli_warning("option --surrogates %ld: with fewer than 19 surrogates no p-value can reach "
                    "0.05 (the smallest is 1/(M+1))", opts->surrogates);
    int rc = cli_run_series_command(opts, &cmd);
    for (size_t r = 0; r < run.nrows; r++)
        free(run.rows[r].series);
    free(run.rows);
    kendall_free(run.kendall);
    surrogate_plan_free(run.plan);
    for (size_t k = 0; k < run.nthreads; k++)
        null_trend_free(run.null_ws[k]);
    free(run.null);
    free(run.sorted);
    return rc;
}
