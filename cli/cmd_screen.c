/* slowscan screen: the main job. For every series: detrend, rolling indicators and the shared
 * trend test (trend_test.c); then q-values, flags and the summary, one row per series x test. */
#include "cli.h"
#include "screen.h"
#include "slowscan/significance.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>


static int open_outputs(const cli_options *opts, cli_outputs *outs, void *context)
{
    screen_run *run = context;
    int rc = cli_outputs_open(outs, opts, opts->output, "-o", &run->out);
    if (rc == EXIT_OK && opts->rolling_output) {
        rc = cli_outputs_open(outs, opts, opts->rolling_output, "--rolling", &run->rolling);
        if (rc == EXIT_OK)
            fputs(cli_rolling_header, run->rolling);
    }
    if (rc == EXIT_OK && opts->json_output)
        rc = cli_outputs_open(outs, opts, opts->json_output, "--json", &run->json);
    if (rc == EXIT_OK)
        rc = cli_figures_open(outs, opts, &run->figures);
    return rc;
}

static screen_row *add_row(screen_run *run)
{
    void *rows = run->rows;
    int st = io_reserve(&rows, &run->cap, run->nrows, sizeof *run->rows, 64);
    run->rows = rows;
    if (st != SLOWSCAN_OK)
        return NULL;
    screen_row *row = &run->rows[run->nrows++];
    memset(row, 0, sizeof *row);
    return row;
}

static int record_series(const cli_options *opts, const prepared_series *ps, screen_run *run,
                         double *const *values)
{
    trend_result results[TREND_MAX_TESTS];
    int rc = trend_test(&run->tester, opts, ps, values, results);
    for (size_t j = 0; rc == EXIT_OK && j < trend_test_count(opts); j++) {
        screen_row *row = add_row(run);
        if (!row || !(row->series = strdup(ps->name))) {
            cli_error("out of memory");
            return EXIT_INTERNAL;
        }
        int drift = j >= opts->nindicators; /* the model-based test: no window */
        row->label = drift ? "recovery_trend" : indicator_name(opts->indicators[j]);
        row->n = ps->finite;
        row->window = drift ? NAN : (double)(ps->window - 1) * ps->dt;
        row->bandwidth = ps->bandwidth;
        row->result = results[j];
        row->q_value = NAN;
        row->harmonics = isnan(opts->deseason) ? -1 : ps->harmonics;
        row->leakage = ps->leakage;
        row->leakage_tested = ps->leakage_tested;
        if (isnan(row->result.statistic)) {
            row->flag = "insufficient";
            if (!ps->constant) /* a constant series was warned about when its values were made */
                cli_warning("%s: column '%s', indicator %s: %s; flagged insufficient", ps->source,
                            ps->name, row->label, row->result.reason);
        } else if (opts->surrogates > 0 && isnan(row->result.p_value)) {
            row->flag = "insufficient"; /* no null could be made; warned in trend_test */
        } else
            row->flag = "untested"; /* until decide() (for good with --surrogates 0) */
        /* The tester's null holds this series' draws only when some were made (null_used). */
        if (run->figures && row->result.null_used > 0 &&
            screen_keep_null(row, run->tester.null + j * (size_t)opts->surrogates,
                             (size_t)opts->surrogates) != EXIT_OK)
            return EXIT_INTERNAL;
    }
    return rc;
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
    fputs("series,indicator,n,window,bandwidth,tau,statistic,p_value,q_value,null,surrogates,flag\n",
          run->out);
    for (size_t r = 0; r < run->nrows; r++) {
        const screen_row *row = &run->rows[r];
        cli_put_field(run->out, row->series);
        fprintf(run->out, ",%s,%zu,", row->label, row->n);
        const double cells[] = {row->window, row->bandwidth, row->result.tau, row->result.statistic,
                                row->result.p_value, row->q_value};
        for (size_t c = 0; c < sizeof cells / sizeof cells[0]; c++) {
            cli_put_number(run->out, cells[c]);
            fputc(',', run->out);
        }
        fprintf(run->out, "%s,%ld,%s\n",
                opts->surrogates > 0 ? cli_null_name(opts) : "none",
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
    fprintf(run->out, "%-*s  %-14s %9s %10s %10s  %s\n", width, "series", "indicator", "statistic",
            "p", "q", "flag");
    for (size_t r = 0; r < run->nrows; r++) {
        const screen_row *row = &run->rows[r];
        char tau[32], p[32], q[32];
        fprintf(run->out, "%-*s  %-14s %9s %10s %10s  %s\n", width, row->series, row->label,
                fixed(tau, row->result.statistic, 3, 1), fixed(p, row->result.p_value, 4, 0),
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
        p[r] = run->rows[r].result.p_value;
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
        if (isnan(row->result.p_value))
            continue;
        row->q_value = q[r];
        double decisive = tests == 1 ? row->result.p_value : row->q_value;
        /* "falling" only arises when a decreasing or two-sided alternative is tested. */
        row->flag = decisive > opts->fdr ? "none" : row->result.statistic > 0 ? "rising" : "falling";
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
    series_command cmd = {open_outputs, screen_series, finish, &run, NULL, screen_figures};
    if (opts->surrogates > 0 && opts->surrogates < 19)
        cli_warning("option --surrogates %ld: with fewer than 19 surrogates no p-value can reach "
                    "0.05 (the smallest is 1/(M+1))", opts->surrogates);
    int rc = cli_run_series_command(opts, &cmd);
    for (size_t r = 0; r < run.nrows; r++) {
        free(run.rows[r].series);
        if (run.rows[r].null_hist)
            gsl_histogram_free(run.rows[r].null_hist);
    }
    free(run.rows);
    trend_tester_free(&run.tester);
    return rc;
}
