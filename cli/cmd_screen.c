/* slowscan screen: the main job, through the screening library (screen.h). For every series:
 * its paths and tests (slowscan_screen_indicators, slowscan_screen_test_series) on the series prepared by the
 * shared driver; then q-values and flags (slowscan_screen_decide) and the summary, one row per series
 * x test. This file only turns the results into rows, messages and outputs. */
#include "cli.h"
#include "screen.h"
#include "slowscan/screen_batch.h"
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

/* The window of test j in time units; NaN for a test of the whole residual. */
static double rolling_window(const screen_result *res, size_t j)
{
    return slowscan_screen_test_rolling(res->tests[j].kind) ? res->window : NAN;
}

static screen_row *add_row(screen_run *run)
{
    void *rows = run->rows;
    int st = slowscan_io_reserve(&rows, &run->cap, run->nrows, sizeof *run->rows, 64);
    run->rows = rows;
    if (st != SLOWSCAN_OK)
        return NULL;
    screen_row *row = &run->rows[run->nrows++];
    memset(row, 0, sizeof *row);
    return row;
}

/* One row per test, with the warning of each insufficient one (the figures read the
 * null's quantiles from the result). */
static int record_series(const prepared_series *ps, screen_run *run, const screen_result *res)
{
    for (size_t j = 0; j < res->ntests; j++) {
        screen_row *row = add_row(run);
        if (!row || !(row->series = strdup(ps->name))) {
            cli_error("out of memory");
            return EXIT_INTERNAL;
        }
        *row = (screen_row){row->series, res->n, rolling_window(res, j), res->bandwidth, NAN,
                            res->tests[j], SCREEN_FLAG_UNTESTED, res->harmonics, res->leakage,
                            res->leakage_tested};
        /* a constant series was warned about when its paths were made */
        if (isnan(row->result.statistic) && !ps->constant)
            cli_screen_insufficient(ps, &row->result);
    }
    return EXIT_OK;
}

/* The series of the inputs in order, as the batch driver takes them. */
typedef struct {
    const cli_inputs *in;
    size_t table, series;
    screen_input *controls; /* one per series with --null control (borrowed arrays) */
} input_source;

static int next_series(void *state, size_t index, screen_input *out, screen_detail *detail)
{
    (void)detail;
    input_source *src = state;
    while (src->table < src->in->ntables && src->series == src->in->tables[src->table].nseries) {
        src->table++;
        src->series = 0;
    }
    if (src->table == src->in->ntables)
        return SCREEN_BATCH_END;
    const series_table *t = &src->in->tables[src->table];
    size_t k = src->series++;
    *out = (screen_input){.name = t->names[k], .source = cli_source_name(t->source), .time_name = t->time_name, .time = t->time, .values = t->values[k], .n = t->n, .control = NULL, .axis = t->axis};
    if (src->controls) {
        src->controls[index] = cli_control_input(src->in, t->names[k]);
        out->control = &src->controls[index];
    }
    return SLOWSCAN_OK;
}

/* Each series in input order: its warnings, rolling paths, rows, leakage and progress. */
typedef struct {
    const cli_options *opts;
    screen_run *run;
    cli_leakage_tally leakage;
    size_t done, total;
    int rc; /* the exit code of a failed sink */
} ordered_sink;

static int put_series(void *state, const screen_batch_item *item)
{
    ordered_sink *sink = state;
    const prepared_series *ps = item->prepared;
    const screen_result *res = item->result;
    for (size_t w = 0; w < res->nwarnings; w++)
        cli_screen_warn(sink->opts, ps, &res->warnings[w]);
    if (sink->run->rolling)
        cli_write_rolling(sink->run->rolling, sink->opts, ps, (double *const *)item->paths);
    sink->rc = record_series(ps, sink->run, res);
    if (sink->rc != EXIT_OK)
        return SLOWSCAN_ENOMEM;
    cli_tally_leakage(&sink->leakage, ps->source, ps->name, &res->leakage, res->leakage_tested);
    cli_progress(sink->opts, sink->opts->command, ++sink->done, sink->total);
    return SLOWSCAN_OK;
}

/* The failure that ended a run, in the words of the per-series commands. */
static int refuse(const cli_options *opts, const screen_batch_failure *f, const ordered_sink *sink)
{
    if (sink->rc != EXIT_OK)
        return sink->rc; /* the sink's own failure, already reported */
    for (size_t w = 0; w < f->result.nwarnings; w++)
        cli_screen_warn(opts, &f->prepared, &f->result.warnings[w]);
    if (f->detail.control)
        return cli_control_refuse(opts, f->input.control, &f->prepared, &f->detail);
    return cli_screen_refuse(opts, &f->prepared, &f->detail);
}

/* Every series through the library's batch driver: threads over whole series, or over one
 * series' surrogates when series are fewer than threads; results in input order. */
static int run_series(const cli_options *opts, const cli_inputs *in, void *context)
{
    screen_run *run = context;
    ordered_sink sink = {.opts = opts, .run = run, .total = cli_inputs_series_count(in)};
    input_source src = {in, 0, 0, NULL};
    if (in->has_control && !(src.controls = calloc(sink.total + 1, sizeof *src.controls))) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    screen_source source = {next_series, NULL, sink.total, &src};
    /* Only --rolling needs the paths handed on: the figures read the null's quantiles from
     * the results and prepare the series again once the q-values exist. */
    screen_sink ordered = {put_series, &sink, run->rolling != NULL};
    screen_batch_failure failure;
    int st = slowscan_screen_batch_run(&run->cfg, &source, &ordered, &failure);
    int rc = st == SLOWSCAN_OK ? EXIT_OK : refuse(opts, &failure, &sink);
    if (rc == EXIT_OK)
        cli_report_leakage(opts, &sink.leakage);
    free(src.controls);
    return rc;
}

static void write_csv(const cli_options *opts, const screen_run *run)
{
    fputs("series,indicator,n,window,bandwidth,tau,statistic,p_value,q_value,null,surrogates,flag\n",
          run->out);
    for (size_t r = 0; r < run->nrows; r++) {
        const screen_row *row = &run->rows[r];
        cli_put_field(run->out, row->series);
        fprintf(run->out, ",%s,%zu,", slowscan_screen_test_name(row->result.kind), row->n);
        const double cells[] = {row->window, row->bandwidth, row->result.tau, row->result.statistic,
                                row->result.p_value, row->q_value};
        for (size_t c = 0; c < sizeof cells / sizeof cells[0]; c++) {
            cli_put_number(run->out, cells[c]);
            fputc(',', run->out);
        }
        fprintf(run->out, "%s,%ld,%s\n",
                opts->surrogates > 0 ? cli_null_name(opts) : "none",
                opts->surrogates, slowscan_screen_flag_name(row->flag));
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
        fprintf(run->out, "%-*s  %-14s %9s %10s %10s  %s\n", width, row->series,
                slowscan_screen_test_name(row->result.kind),
                fixed(tau, row->result.statistic, 3, 1), fixed(p, row->result.p_value, 4, 0),
                fixed(q, row->q_value, 4, 0), slowscan_screen_flag_name(row->flag));
    }
}

/* q-values over every test of the run (Benjamini-Hochberg), then the flags. */
static int decide(const cli_options *opts, screen_run *run)
{
    const screen_test **tests = malloc((run->nrows + 1) * sizeof *tests);
    double *q = malloc((run->nrows + 1) * sizeof *q);
    screen_flag *flags = malloc((run->nrows + 1) * sizeof *flags);
    int st = tests && q && flags ? SLOWSCAN_OK : SLOWSCAN_ENOMEM;
    for (size_t r = 0; st == SLOWSCAN_OK && r < run->nrows; r++)
        tests[r] = &run->rows[r].result;
    if (st == SLOWSCAN_OK)
        st = slowscan_screen_decide(tests, run->nrows, opts->fdr, q, flags);
    for (size_t r = 0; st == SLOWSCAN_OK && r < run->nrows; r++) {
        run->rows[r].q_value = q[r];
        run->rows[r].flag = flags[r];
    }
    free(tests);
    free(q);
    free(flags);
    if (st == SLOWSCAN_OK)
        return EXIT_OK;
    cli_error("out of memory");
    return EXIT_INTERNAL;
}

static int finish(const cli_options *opts, void *context)
{
    screen_run *run = context;
    int rc = decide(opts, run);
    if (rc != EXIT_OK)
        return rc;
    if (run->json)
        cli_screen_json(run->json, opts, run);
    if (strcmp(opts->format, "table") == 0)
        write_table(run);
    else
        write_csv(opts, run);
    return EXIT_OK;
}

int cmd_screen(const cli_options *opts)
{
    screen_run run = {0};
    cli_screen_config(opts, &run.cfg);
    series_command cmd = {open_outputs, NULL, finish, &run, NULL, cli_screen_figures, run_series};
    if (opts->surrogates > 0 && opts->surrogates < 19)
        cli_warning("option --surrogates %ld: with fewer than 19 surrogates no p-value can reach "
                    "0.05 (the smallest is 1/(M+1))", opts->surrogates);
    int rc = cli_run_series_command(opts, &cmd);
    for (size_t r = 0; r < run.nrows; r++)
        free(run.rows[r].series);
    free(run.rows);
    return rc;
}
