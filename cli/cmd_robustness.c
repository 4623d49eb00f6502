/* slowscan robustness: the trend test over a grid of windows x bandwidths, so a claim can be
 * shown not to hinge on one choice. CSV series,indicator,window,bandwidth,tau,p_value, and
 * with --fractions FILE the share of cells with tau > 0 and with p <= 0.05. */
#include "cli.h"
#include "trend_test.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

typedef struct {
    FILE *out, *fractions;
    trend_tester tester;
} robustness_run;

static int open_outputs(const cli_options *opts, cli_outputs *outs, void *context)
{
    robustness_run *run = context;
    int rc = cli_outputs_open(outs, opts, opts->output, "-o", &run->out);
    if (rc == EXIT_OK)
        fputs("series,indicator,window,bandwidth,tau,p_value\n", run->out);
    if (rc == EXIT_OK && opts->fractions_output) {
        rc = cli_outputs_open(outs, opts, opts->fractions_output, "--fractions", &run->fractions);
        if (rc == EXIT_OK)
            fputs("series,indicator,cells,share_tau_positive,share_p_at_most_0.05\n", run->fractions);
    }
    return rc;
}

typedef struct {
    size_t cells, with_tau, positive, with_p, significant;
} cell_counts;

/* One grid cell: the series as detrended with this cell's bandwidth, its window set. */
static int one_cell(robustness_run *run, const cli_options *cell, const prepared_series *ps,
                    cell_counts *counts)
{
    double *values[INDICATOR_COUNT] = {NULL};
    trend_result results[TREND_MAX_TESTS];
    int rc = cli_indicator_values(cell, ps, values);
    if (rc == EXIT_OK)
        rc = trend_test(&run->tester, cell, ps, values, results);
    for (size_t j = 0; rc == EXIT_OK && j < cell->nindicators; j++) {
        cli_put_field(run->out, ps->name);
        fprintf(run->out, ",%s,", indicator_name(cell->indicators[j]));
        const double cells[] = {(double)(ps->window - 1) * ps->dt, ps->bandwidth, results[j].tau,
                                results[j].p_value};
        for (size_t c = 0; c < 4; c++) {
            cli_put_number(run->out, cells[c]);
            fputc(c < 3 ? ',' : '\n', run->out);
        }
        counts[j].cells++;
        counts[j].with_tau += !isnan(results[j].tau);
        counts[j].positive += results[j].tau > 0;
        counts[j].with_p += !isnan(results[j].p_value);
        counts[j].significant += results[j].p_value <= 0.05;
    }
    cli_indicator_values_free(cell, values);
    return rc;
}

/* Detrending depends on the bandwidth only: each bandwidth's residual (and control residual)
 * is made once and reused for every window. */
static int prepare_bandwidths(const cli_options *opts, const cli_inputs *in, const series_table *t,
                              size_t k, size_t nb, prepared_series *ps)
{
    int rc = EXIT_OK;
    for (size_t b = 0; rc == EXIT_OK && b < nb; b++) {
        cli_options cell = *opts;
        cell.window = opts->windows[0];
        if (detrend_uses_bandwidth(opts->detrend.method))
            cell.bandwidth = opts->bandwidths[b];
        rc = cli_prepare_series(&cell, t, k, &ps[b]);
        if (rc == EXIT_OK && !ps[b].constant)
            rc = cli_attach_control(&cell, in, &ps[b]);
    }
    return rc;
}

static void write_fractions(robustness_run *run, const cli_options *opts, const char *name,
                            const cell_counts *counts)
{
    for (size_t j = 0; j < opts->nindicators; j++) {
        cli_put_field(run->fractions, name);
        /* Shares among the cells where the quantity exists; NA when it exists nowhere. */
        const cell_counts *c = &counts[j];
        fprintf(run->fractions, ",%s,%zu,", indicator_name(opts->indicators[j]), c->cells);
        cli_put_number(run->fractions, c->with_tau ? (double)c->positive / (double)c->with_tau : NAN);
        fputc(',', run->fractions);
        cli_put_number(run->fractions, c->with_p ? (double)c->significant / (double)c->with_p : NAN);
        fputc('\n', run->fractions);
    }
}

static int robustness_series(const cli_options *opts, const cli_inputs *in,
                             const series_table *t, size_t k, void *c)
{
    robustness_run *run = c;
    cell_counts counts[INDICATOR_COUNT] = {{0, 0, 0, 0, 0}};
    size_t nb = detrend_uses_bandwidth(opts->detrend.method) ? opts->nbandwidths : 1;
    prepared_series ps[CLI_MAX_GRID] = {{0}};
    int rc = prepare_bandwidths(opts, in, t, k, nb, ps);
    for (size_t w = 0; rc == EXIT_OK && w < opts->nwindows; w++) {
        cli_options cell = *opts;
        cell.window = opts->windows[w];
        size_t window = 0;
        rc = cli_series_window(&cell, t, &window);
        for (size_t b = 0; rc == EXIT_OK && b < nb; b++) {
            ps[b].window = window;
            rc = one_cell(run, &cell, &ps[b], counts);
        }
    }
    if (rc == EXIT_OK && run->fractions)
        write_fractions(run, opts, t->names[k], counts);
    for (size_t b = 0; b < nb; b++)
        cli_prepared_free(&ps[b]);
    return rc;
}

int cmd_robustness(const cli_options *opts)
{
    robustness_run run = {0};
    series_command cmd = {open_outputs, NULL, NULL, &run, robustness_series};
    int rc = cli_run_series_command(opts, &cmd);
    trend_tester_free(&run.tester);
    return rc;
}
