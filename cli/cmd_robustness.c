/* slowscan robustness: the trend test over a grid of detrending methods x windows x
 * bandwidths, so a claim can be shown not to hinge on one choice. CSV
 * series,indicator,detrend,window,bandwidth,tau,statistic,p_value; recovery_trend (a test of
 * the whole residual) has one row per method and bandwidth, its window NA. With --fractions
 * FILE the share of cells whose statistic is > 0 and whose p is <= 0.05, per method and, when
 * the grid has several methods, over all of them. */
#include "cli.h"
#include "trend_test.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

typedef struct {
    FILE *out, *fractions;
    trend_tester tester;       /* the rolling indicators of one (method, bandwidth, window) */
    trend_tester drift_tester; /* recovery_trend alone: its workspaces are sized for it */
    report_batch *figures;
} robustness_run;

/* The methods of the grid: --detrends, or the single --detrend in force. */
typedef struct {
    size_t count;
    detrend_spec spec[CLI_MAX_DETRENDS];
    const char *label[CLI_MAX_DETRENDS];
} method_list;

/* Statistic and p of every cell of one series, for --figures: rolling indicators at
 * [method][indicator][window][bandwidth], recovery_trend at [method][bandwidth]. Methods
 * without a bandwidth use bandwidth index 0 only. */
typedef struct {
    double *tau, *p, *drift_t, *drift_p;
    size_t nind, nw, nb;
} cell_grid;

typedef struct {
    size_t cells, with_stat, positive, with_p, significant;
} cell_counts;

/* Everything one (method, series) pass writes into. */
typedef struct {
    robustness_run *run;
    const cli_options *opts; /* with this method as its --detrend */
    const char *label;
    size_t method;
    cell_counts *counts; /* per test of the run: indicators, then recovery_trend */
    cell_grid *grid;
} method_pass;

static int same_method(const detrend_spec *a, const detrend_spec *b)
{
    return a->method == b->method && a->degree == b->degree;
}

/* Items must be non-empty, known to slowscan_detrend_parse_method, and distinct as methods. */
int cli_set_detrends(cli_options *o, const char *n, const char *v)
{
    o->ndetrends = 0;
    for (const char *item = v;;) {
        const char *comma = strchr(item, ',');
        size_t len = comma ? (size_t)(comma - item) : strlen(item);
        if (len == 0) {
            cli_error("option %s: empty item in '%s' (a comma-separated list of methods)", n, v);
            return EXIT_BAD_INPUT;
        }
        if (o->ndetrends == CLI_MAX_DETRENDS) {
            cli_error("option %s: more than %d methods", n, CLI_MAX_DETRENDS);
            return EXIT_BAD_INPUT;
        }
        char *label = o->detrend_labels[o->ndetrends];
        detrend_spec spec = o->detrend;
        int fits = len < sizeof o->detrend_labels[0]; /* longer than any method's name */
        if (fits) {
            memcpy(label, item, len);
            label[len] = '\0';
        }
        if (!fits || slowscan_detrend_parse_method(label, &spec) != SLOWSCAN_OK) {
            cli_error("option %s: unknown method '%.*s' (the methods --detrend takes)", n,
                      (int)len, item);
            return EXIT_BAD_INPUT;
        }
        for (size_t j = 0; j < o->ndetrends; j++)
            if (same_method(&o->detrends[j], &spec)) {
                cli_error("option %s: method '%s' is listed twice", n, label);
                return EXIT_BAD_INPUT;
            }
        o->detrends[o->ndetrends++] = spec;
        if (!comma)
            return EXIT_OK;
        item = comma + 1;
    }
}

static method_list grid_methods(const cli_options *opts)
{
    method_list m = {0, {{0}}, {NULL}};
    if (opts->ndetrends == 0) {
        m.count = 1;
        m.spec[0] = opts->detrend;
        m.label[0] = opts->detrend_text;
    }
    for (size_t i = 0; i < opts->ndetrends; i++) {
        m.spec[m.count] = opts->detrends[i];
        m.label[m.count++] = opts->detrend_labels[i];
    }
    return m;
}

static size_t bandwidths_of(const cli_options *opts, const detrend_spec *spec)
{
    return slowscan_detrend_uses_bandwidth(spec->method) ? opts->nbandwidths : 1;
}

static int open_outputs(const cli_options *opts, cli_outputs *outs, void *context)
{
    robustness_run *run = context;
    int rc = cli_outputs_open(outs, opts, opts->output, "-o", &run->out);
    if (rc == EXIT_OK)
        fputs("series,indicator,detrend,window,bandwidth,tau,statistic,p_value\n", run->out);
    if (rc == EXIT_OK && opts->fractions_output) {
        rc = cli_outputs_open(outs, opts, opts->fractions_output, "--fractions", &run->fractions);
        if (rc == EXIT_OK)
            fputs("series,indicator,detrend,cells,share_statistic_positive,share_p_at_most_0.05\n",
                  run->fractions);
    }
    if (rc == EXIT_OK)
        rc = cli_figures_open(outs, opts, &run->figures);
    return rc;
}

/* One CSV row and its count; `window` NaN for recovery_trend. */
static void put_row(method_pass *pass, const prepared_series *ps, size_t test, double window,
                    const screen_test *r)
{
    FILE *out = pass->run->out;
    cli_put_field(out, ps->name);
    const char *name = test < pass->opts->nindicators
                           ? slowscan_indicator_name(pass->opts->indicators[test]) : "recovery_trend";
    fprintf(out, ",%s,", name);
    cli_put_field(out, pass->label);
    const double cells[] = {window, ps->bandwidth, r->tau, r->statistic, r->p_value};
    for (size_t c = 0; c < sizeof cells / sizeof cells[0]; c++) {
        fputc(',', out);
        cli_put_number(out, cells[c]);
    }
    fputc('\n', out);
    cell_counts *c = &pass->counts[test];
    c->cells++;
    c->with_stat += !isnan(r->statistic);
    c->positive += r->statistic > 0;
    c->with_p += !isnan(r->p_value);
    c->significant += r->p_value <= 0.05;
}

/* The rolling indicators of one (window, bandwidth) cell. */
static int rolling_cell(method_pass *pass, const cli_options *cell, const prepared_series *ps,
                        size_t w, size_t b)
{
    double *values[INDICATOR_COUNT] = {NULL};
    screen_result res;
    const screen_test *results = res.tests;
    int rc = cli_indicator_values(cell, ps, values);
    if (rc == EXIT_OK)
        rc = trend_test(&pass->run->tester, cell, ps, values, &res);
    cell_grid *g = pass->grid;
    for (size_t j = 0; rc == EXIT_OK && j < cell->nindicators; j++) {
        put_row(pass, ps, j, (double)(ps->window - 1) * ps->dt, &results[j]);
        if (g->tau) {
            size_t at = ((pass->method * g->nind + j) * g->nw + w) * g->nb + b;
            g->tau[at] = results[j].tau;
            g->p[at] = results[j].p_value;
        }
    }
    cli_indicator_values_free(cell, values);
    return rc;
}

/* recovery_trend of one bandwidth's residual: it has no window, so it is tested once. */
static int drift_cell(method_pass *pass, const prepared_series *ps, size_t b)
{
    cli_options drift_only = *pass->opts;
    drift_only.nindicators = 0;
    drift_only.drift_test = 1;
    screen_result res;
    const screen_test *r = &res.tests[0];
    int rc = trend_test(&pass->run->drift_tester, &drift_only, ps, NULL, &res);
    if (rc != EXIT_OK)
        return rc;
    put_row(pass, ps, pass->opts->nindicators, NAN, r);
    cell_grid *g = pass->grid;
    if (g->drift_t) {
        g->drift_t[pass->method * g->nb + b] = r->statistic;
        g->drift_p[pass->method * g->nb + b] = r->p_value;
    }
    return EXIT_OK;
}

/* Detrending depends on the method and bandwidth only: each bandwidth's residual (and control
 * residual) is made once and reused for every window. */
static int prepare_bandwidths(const cli_options *opts, const cli_inputs *in, const series_table *t,
                              size_t k, size_t nb, prepared_series *ps)
{
    int rc = EXIT_OK;
    for (size_t b = 0; rc == EXIT_OK && b < nb; b++) {
        cli_options cell = *opts;
        cell.window = opts->windows[0];
        if (slowscan_detrend_uses_bandwidth(opts->detrend.method))
            cell.bandwidth = opts->bandwidths[b];
        rc = cli_prepare_series(&cell, t, k, &ps[b]);
        if (rc == EXIT_OK && !ps[b].constant)
            rc = cli_attach_control(&cell, in, &ps[b]);
    }
    return rc;
}

/* Every cell of one method: windows x bandwidths for the indicators, then recovery_trend per
 * bandwidth. */
static int method_cells(method_pass *pass, const cli_inputs *in, const series_table *t, size_t k)
{
    const cli_options *opts = pass->opts;
    size_t nb = bandwidths_of(opts, &opts->detrend);
    prepared_series ps[CLI_MAX_GRID] = {{0}};
    int rc = prepare_bandwidths(opts, in, t, k, nb, ps);
    for (size_t w = 0; rc == EXIT_OK && opts->nindicators > 0 && w < opts->nwindows; w++) {
        cli_options cell = *opts;
        cell.window = opts->windows[w];
        size_t window = 0;
        rc = cli_series_window(&cell, t, &window);
        for (size_t b = 0; rc == EXIT_OK && b < nb; b++) {
            ps[b].window = window;
            rc = rolling_cell(pass, &cell, &ps[b], w, b);
        }
    }
    for (size_t b = 0; rc == EXIT_OK && opts->drift_test && b < nb; b++)
        rc = drift_cell(pass, &ps[b], b);
    for (size_t b = 0; b < nb; b++)
        cli_prepared_free(&ps[b]);
    return rc;
}

static void put_fraction(FILE *fp, const char *series, const char *test, const char *method,
                         const cell_counts *c)
{
    cli_put_field(fp, series);
    fprintf(fp, ",%s,", test);
    cli_put_field(fp, method);
    /* Shares among the cells where the quantity exists; NA when it exists nowhere. */
    fprintf(fp, ",%zu,", c->cells);
    cli_put_number(fp, c->with_stat ? (double)c->positive / (double)c->with_stat : NAN);
    fputc(',', fp);
    cli_put_number(fp, c->with_p ? (double)c->significant / (double)c->with_p : NAN);
    fputc('\n', fp);
}

/* Per test: one row per method, then (with several methods) the row "all" over every cell. */
static void write_fractions(robustness_run *run, const cli_options *opts, const method_list *m,
                            const char *name, cell_counts (*counts)[SCREEN_MAX_TESTS])
{
    for (size_t j = 0; j < trend_test_count(opts); j++) {
        const char *test = j < opts->nindicators ? slowscan_indicator_name(opts->indicators[j])
                                                 : "recovery_trend";
        cell_counts all = {0, 0, 0, 0, 0};
        for (size_t i = 0; i < m->count; i++) {
            put_fraction(run->fractions, name, test, m->label[i], &counts[i][j]);
            all.cells += counts[i][j].cells;
            all.with_stat += counts[i][j].with_stat;
            all.positive += counts[i][j].positive;
            all.with_p += counts[i][j].with_p;
            all.significant += counts[i][j].significant;
        }
        if (m->count > 1)
            put_fraction(run->fractions, name, test, "all", &all);
    }
}

/* The cell of the grid that is the run's own choice (--detrend, --window, --bandwidth, or
 * their defaults), windows compared in samples, bandwidths in time units; -1 when it is not
 * on the grid. */
static void default_cell(const cli_options *opts, const series_table *t, const method_list *m,
                         report_robustness_data *d)
{
    size_t own = 0, w_samples = 0;
    d->default_detrend = d->default_window = d->default_bandwidth = -1;
    for (size_t i = 0; i < m->count && d->default_detrend < 0; i++)
        if (same_method(&m->spec[i], &opts->detrend))
            d->default_detrend = (long)i;
    if (d->default_detrend < 0 || cli_series_window(opts, t, &own) != EXIT_OK)
        return;
    for (size_t w = 0; w < opts->nwindows && d->default_window < 0; w++) {
        cli_options cell = *opts;
        cell.window = opts->windows[w];
        if (cli_series_window(&cell, t, &w_samples) == EXIT_OK && w_samples == own)
            d->default_window = (long)w;
    }
    if (!slowscan_detrend_uses_bandwidth(opts->detrend.method)) {
        d->default_bandwidth = 0;
        return;
    }
    /* Both sides resolved the way prepare.c does: percent of the span or time units. */
    double span = t->time[t->n - 1] - t->time[0];
    double want = opts->bandwidth.percent ? opts->bandwidth.amount / 100.0 * span
                                          : opts->bandwidth.amount;
    for (size_t b = 0; b < opts->nbandwidths && d->default_bandwidth < 0; b++) {
        const cli_length *g = &opts->bandwidths[b];
        double have = g->percent ? g->amount / 100.0 * span : g->amount;
        if (fabs(have - want) <= 1e-9 * fabs(want))
            d->default_bandwidth = (long)b;
    }
}

static int draw_heat_map(robustness_run *run, const cli_options *opts, const series_table *t,
                         size_t k, const method_list *m, const cell_grid *grid)
{
    const char *windows[CLI_MAX_GRID], *bandwidths[CLI_MAX_GRID], *names[INDICATOR_COUNT];
    int has_bandwidth[CLI_MAX_DETRENDS];
    for (size_t w = 0; w < opts->nwindows; w++)
        windows[w] = opts->windows[w].text;
    for (size_t b = 0; b < opts->nbandwidths; b++)
        bandwidths[b] = opts->bandwidths[b].text;
    for (size_t j = 0; j < opts->nindicators; j++)
        names[j] = slowscan_indicator_name(opts->indicators[j]);
    for (size_t i = 0; i < m->count; i++)
        has_bandwidth[i] = slowscan_detrend_uses_bandwidth(m->spec[i].method);
    report_robustness_data data = {t->names[k], t->time_name, opts->nwindows, opts->nbandwidths,
                                   windows, bandwidths, opts->nindicators, names, m->count,
                                   m->label, has_bandwidth, grid->tau, grid->p, opts->drift_test,
                                   grid->drift_t, grid->drift_p, -1, -1, -1, opts->surrogates > 0};
    default_cell(opts, t, m, &data);
    return cli_figure_draw(run->figures, &slowscan_report_robustness_figure, &data, "robustness", t->names[k]);
}

/* With --figures: room for every cell of the series (NaN where a method has fewer rows). */
static int grid_alloc(const cli_options *opts, const method_list *m, cell_grid *g)
{
    *g = (cell_grid){NULL, NULL, NULL, NULL, opts->nindicators, opts->nwindows, opts->nbandwidths};
    size_t rolling = m->count * g->nind * g->nw * g->nb, drift = m->count * g->nb;
    double *all = malloc(2 * (rolling + drift) * sizeof *all);
    if (!all) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    for (size_t i = 0; i < 2 * (rolling + drift); i++)
        all[i] = NAN;
    g->tau = all;
    g->p = all + rolling;
    g->drift_t = g->p + rolling;
    g->drift_p = g->drift_t + drift;
    return EXIT_OK;
}

static int robustness_series(const cli_options *opts, const cli_inputs *in,
                             const series_table *t, size_t k, void *c)
{
    robustness_run *run = c;
    method_list m = grid_methods(opts);
    cell_counts counts[CLI_MAX_DETRENDS][SCREEN_MAX_TESTS];
    memset(counts, 0, sizeof counts);
    cell_grid grid = {NULL, NULL, NULL, NULL, 0, 0, 0};
    int rc = run->figures ? grid_alloc(opts, &m, &grid) : EXIT_OK;
    for (size_t i = 0; rc == EXIT_OK && i < m.count; i++) {
        cli_options method = *opts;
        method.detrend = m.spec[i];
        method.detrend_text = m.label[i];
        method_pass pass = {run, &method, m.label[i], i, counts[i], &grid};
        rc = method_cells(&pass, in, t, k);
    }
    if (rc == EXIT_OK && run->fractions)
        write_fractions(run, opts, &m, t->names[k], counts);
    if (rc == EXIT_OK && run->figures)
        rc = draw_heat_map(run, opts, t, k, &m, &grid);
    free(grid.tau);
    return rc;
}

int cmd_robustness(const cli_options *opts)
{
    robustness_run run = {0};
    series_command cmd = {open_outputs, NULL, NULL, &run, robustness_series, NULL, NULL};
    int rc = cli_run_series_command(opts, &cmd);
    trend_tester_free(&run.tester);
    trend_tester_free(&run.drift_tester);
    return rc;
}
