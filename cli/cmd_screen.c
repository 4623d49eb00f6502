/* slowscan screen: the main job. For every series: detrend, rolling indicators, Kendall tau of
 * each indicator against time; then the summary, one row per series x indicator. */
#include "cli.h"
#include "slowscan/kendall.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

/* Kendall tau on fewer values says little and its null distribution is coarse. */
enum { MIN_TREND_VALUES = 8 };

typedef struct {
    char *series;
    indicator_kind indicator;
    size_t n;
    double window, bandwidth, tau, p_value, q_value;
    const char *flag;
} screen_row;

typedef struct {
    FILE *out, *rolling;
    screen_row *rows;
    size_t nrows, cap;
    kendall_workspace *kendall;
    size_t kendall_n;
} screen_run;

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
            row->flag = "untested"; /* no surrogate test was run (--surrogates 0) */
    }
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
        fprintf(run->out, "%s,%ld,%s\n", opts->surrogates > 0 ? "phase" : "none", opts->surrogates,
                row->flag);
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

static int finish(const cli_options *opts, void *context)
{
    screen_run *run = context;
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
    int rc = cli_run_series_command(opts, &cmd);
    for (size_t r = 0; r < run.nrows; r++)
        free(run.rows[r].series);
    free(run.rows);
    kendall_free(run.kendall);
    return rc;
}
