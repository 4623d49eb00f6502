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
    report_batch *figures;
} robustness_run;

/* With --figures: tau and p of every cell of one series, [indicator][window][bandwidth]. */
typedef struct {
    double *tau, *p;
    size_t nb;
} cell_grid;

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
    if (rc == EXIT_OK)
        rc = cli_figures_open(outs, opts, &run->figures);
    return rc;
}

typedef struct {
    size_t cells, with_tau, positive, with_p, significant;
} cell_counts;

/* One grid cell: the series as detrended with this cell's bandwidth, its window set. */
static int one_cell(robustness_run *run, const cli_options *cell, const prepared_series *ps,
                    cell_counts *counts, cell_grid *grid, size_t w, size_t b)
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
        if (grid->tau) {
            size_t at = (j * cell->nwindows + w) * grid->nb + b;
            grid->tau[at] = results[j].tau;
            grid->p[at] = results[j].p_value;
        }
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

/* The cell of the grid that is the run's own choice (--window, --bandwidth, or their
 * defaults 50% and 10%), compared in samples and time units; -1 when it is not on the grid. */
static void default_cell(const cli_options *opts, const series_table *t, const prepared_series *ps,
                         size_t nb, long *window, long *bandwidth)
{
    size_t own = 0, w_samples = 0;
    *window = *bandwidth = -1;
    if (cli_series_window(opts, t, &own) != EXIT_OK)
        return;
    for (size_t w = 0; w < opts->nwindows && *window < 0; w++) {
        cli_options cell = *opts;
        cell.window = opts->windows[w];
        if (cli_series_window(&cell, t, &w_samples) == EXIT_OK && w_samples == own)
            *window = (long)w;
    }
    double want = opts->bandwidth.percent ? opts->bandwidth.amount / 100.0 * ps[0].span
                                          : opts->bandwidth.amount;
    for (size_t b = 0; b < nb && *bandwidth < 0; b++)
        if (nb == 1 || fabs(ps[b].bandwidth - want) <= 1e-9 * fabs(want))
            *bandwidth = (long)b;
}

static int draw_heat_map(robustness_run *run, const cli_options *opts, const series_table *t,
                         size_t k, const prepared_series *ps, const cell_grid *grid)
{
    const char *windows[CLI_MAX_GRID], *bandwidths[CLI_MAX_GRID], *names[INDICATOR_COUNT];
    for (size_t w = 0; w < opts->nwindows; w++)
        windows[w] = opts->windows[w].text;
    for (size_t b = 0; b < grid->nb; b++)
        bandwidths[b] = grid->nb == opts->nbandwidths ? opts->bandwidths[b].text : "none";
    for (size_t j = 0; j < opts->nindicators; j++)
        names[j] = indicator_name(opts->indicators[j]);
    report_robustness_data data = {t->names[k], t->time_name, opts->nwindows, grid->nb, windows,
                                   bandwidths, opts->nindicators, names, grid->tau, grid->p,
                                   -1, -1, opts->surrogates > 0};
    default_cell(opts, t, ps, grid->nb, &data.default_window, &data.default_bandwidth);
    return cli_figure_draw(run->figures, &report_robustness_figure, &data, "robustness", t->names[k]);
}

static int robustness_series(const cli_options *opts, const cli_inputs *in,
                             const series_table *t, size_t k, void *c)
{
    robustness_run *run = c;
    cell_counts counts[INDICATOR_COUNT] = {{0, 0, 0, 0, 0}};
    size_t nb = detrend_uses_bandwidth(opts->detrend.method) ? opts->nbandwidths : 1;
    size_t cells = opts->nindicators * opts->nwindows * nb;
    cell_grid grid = {NULL, NULL, nb};
    if (run->figures && !(grid.tau = malloc(2 * cells * sizeof *grid.tau))) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    grid.p = grid.tau ? grid.tau + cells : NULL;
    prepared_series ps[CLI_MAX_GRID] = {{0}};
    int rc = prepare_bandwidths(opts, in, t, k, nb, ps);
    for (size_t w = 0; rc == EXIT_OK && w < opts->nwindows; w++) {
        cli_options cell = *opts;
        cell.window = opts->windows[w];
        size_t window = 0;
        rc = cli_series_window(&cell, t, &window);
        for (size_t b = 0; rc == EXIT_OK && b < nb; b++) {
            ps[b].window = window;
            rc = one_cell(run, &cell, &ps[b], counts, &grid, w, b);
        }
    }
    if (rc == EXIT_OK && run->fractions)
        write_fractions(run, opts, t->names[k], counts);
    if (rc == EXIT_OK && run->figures)
        rc = draw_heat_map(run, opts, t, k, ps, &grid);
    for (size_t b = 0; b < nb; b++)
        cli_prepared_free(&ps[b]);
    free(grid.tau);
    return rc;
}

int cmd_robustness(const cli_options *opts)
{
    robustness_run run = {0};
    series_command cmd = {open_outputs, NULL, NULL, &run, robustness_series, NULL};
    int rc = cli_run_series_command(opts, &cmd);
    trend_tester_free(&run.tester);
    return rc;
}
