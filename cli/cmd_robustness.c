/* slowscan robustness: the trend test over a grid of detrending methods x windows x
 * bandwidths, so a claim can be shown not to hinge on one choice. CSV
 * series,indicator,detrend,window,bandwidth,tau,statistic,p_value; recovery_trend (a test of
 * the whole residual) has one row per method and bandwidth, its window NA. With --fractions
 * FILE the share of cells whose statistic is > 0 and whose p is <= 0.05, per method and, when
 * the grid has several methods, over all of them. */
#include "cli.h"
#include "slowscan/robustness.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

typedef struct {
    FILE *out, *fractions;
    robustness_workspace *ws; /* made on first use, for --threads threads */
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

/* Everything the cells of one series write into. */
typedef struct {
    robustness_run *run;
    const cli_options *opts;
    const method_list *methods;
    const screen_prepared *named; /* the series' name and source, for warnings */
    robustness_counts counts[CLI_MAX_DETRENDS * SCREEN_MAX_TESTS]; /* [method][test] */
    cell_grid *grid;
} series_pass;

static int same_method(const detrend_spec *a, const detrend_spec *b)
{
    return a->method == b->method && a->degree == b->degree;
}

/* Items must be non-empty, known to slowscan_detrend_parse_method, and distinct as methods. */
int cli_set_detrends(cli_options *o, const char *n, const char *v)
{
    o->ndetrends = 0;
    if (cli_list_check(n, v) != EXIT_OK)
        return EXIT_BAD_INPUT;
    for (const char *item = v;;) {
        const char *comma = strchr(item, ',');
        size_t len = comma ? (size_t)(comma - item) : strlen(item);
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

static int open_outputs(const cli_options *opts, cli_outputs *outs, void *context)
{
    robustness_run *run = context;
    int rc = cli_outputs_open(outs, opts, opts->output, "-o", &run->out);
    if (rc == EXIT_OK)
        cli_put_header(run->out, opts, "series,indicator,detrend,window,bandwidth,tau,statistic,"
                       "p_value\n");
    if (rc == EXIT_OK && opts->fractions_output) {
        rc = cli_outputs_open(outs, opts, opts->fractions_output, "--fractions", &run->fractions);
        if (rc == EXIT_OK)
            cli_put_header(run->fractions, opts, "series,indicator,detrend,cells,"
                           "share_statistic_positive,share_p_at_most_0.05\n");
    }
    if (rc == EXIT_OK)
        rc = cli_figures_open(outs, opts, &run->figures);
    return rc;
}

/* One CSV row; `window` NA for recovery_trend. */
static void put_row(const series_pass *pass, const robustness_record *r)
{
    FILE *out = pass->run->out;
    cli_put_series(out, pass->opts, pass->named->source, pass->named->name);
    fprintf(out, ",%s,", slowscan_screen_test_name(r->kind));
    cli_put_field(out, pass->methods->label[r->method]);
    const double cells[] = {r->window, r->bandwidth, r->tau, r->statistic, r->p_value};
    for (size_t c = 0; c < sizeof cells / sizeof cells[0]; c++) {
        fputc(',', out);
        cli_put_number(out, cells[c]);
    }
    fputc('\n', out);
}

/* With --figures: the record's place in the heat map's grid. */
static void store_cell(cell_grid *g, const robustness_record *r)
{
    if (!g->tau)
        return;
    if (r->window_index == ROBUSTNESS_NO_WINDOW) {
        g->drift_t[r->method * g->nb + r->bandwidth_index] = r->statistic;
        g->drift_p[r->method * g->nb + r->bandwidth_index] = r->p_value;
        return;
    }
    size_t at = ((r->method * g->nind + r->test) * g->nw + r->window_index) * g->nb +
                r->bandwidth_index;
    g->tau[at] = r->tau;
    g->p[at] = r->p_value;
}

/* The library's sink: warnings, rows, counts and heat-map cells of one grid cell. */
static int take_cell(void *context, const robustness_cell *cell)
{
    series_pass *pass = context;
    for (size_t w = 0; w < cell->nwarnings; w++)
        cli_screen_warn(pass->opts, pass->named, &cell->warnings[w]);
    for (size_t i = 0; i < cell->nrecords; i++) {
        put_row(pass, &cell->records[i]);
        store_cell(pass->grid, &cell->records[i]);
    }
    slowscan_robustness_tally(pass->counts, SCREEN_MAX_TESTS, cell->records, cell->nrecords);
    return 0;
}

/* The message of a refusal, with the options of the cell it met in force. */
static int refuse_cell(const series_pass *pass, const cli_inputs *in, const screen_detail *d,
                       const robustness_position *at)
{
    const cli_options *opts = pass->opts;
    cli_options cell = *opts;
    cell.detrend = pass->methods->spec[at->method];
    cell.detrend_text = pass->methods->label[at->method];
    if (at->window_index != ROBUSTNESS_NO_WINDOW)
        cell.window = opts->windows[at->window_index];
    if (slowscan_detrend_uses_bandwidth(cell.detrend.method))
        cell.bandwidth = opts->bandwidths[at->bandwidth_index];
    const screen_prepared *ps = slowscan_robustness_workspace_prepared(pass->run->ws,
                                                                       at->bandwidth_index);
    if (!ps)
        ps = pass->named;
    if (!d->control)
        return cli_screen_refuse(&cell, ps, d);
    screen_input control = cli_control_input(in, ps->name);
    return cli_control_refuse(&cell, &control, ps, d);
}

/* The options' grid as the library takes it. */
static void grid_of(const cli_options *opts, const method_list *m, robustness_grid *g)
{
    *g = slowscan_robustness_grid_default();
    for (size_t w = 0; w < opts->nwindows; w++)
        g->windows[w] = (screen_length){.amount = opts->windows[w].amount,
                                        .percent = opts->windows[w].percent,
                                        .unit = opts->windows[w].unit};
    for (size_t b = 0; b < opts->nbandwidths; b++)
        g->bandwidths[b] = (screen_length){.amount = opts->bandwidths[b].amount,
                                           .percent = opts->bandwidths[b].percent,
                                           .unit = opts->bandwidths[b].unit};
    for (size_t i = 0; i < m->count; i++)
        g->methods[i] = m->spec[i];
    g->nwindows = opts->nwindows;
    g->nbandwidths = opts->nbandwidths;
    g->nmethods = m->count;
}

static void put_fraction(FILE *fp, const series_pass *pass, const char *test,
                         const char *method, const robustness_counts *c)
{
    double positive, significant;
    slowscan_robustness_shares(c, &positive, &significant);
    cli_put_series(fp, pass->opts, pass->named->source, pass->named->name);
    fprintf(fp, ",%s,", test);
    cli_put_field(fp, method);
    fprintf(fp, ",%zu,", c->cells);
    cli_put_number(fp, positive);
    fputc(',', fp);
    cli_put_number(fp, significant);
    fputc('\n', fp);
}

/* Per test: one row per method, then (with several methods) the row "all" over every cell. */
static void write_fractions(const series_pass *pass)
{
    const cli_options *opts = pass->opts;
    const method_list *m = pass->methods;
    screen_config cfg;
    cli_screen_config(opts, &cfg);
    for (size_t j = 0; j < slowscan_screen_test_count(&cfg); j++) {
        const char *test = slowscan_screen_test_name(slowscan_screen_test_of(&cfg, j));
        for (size_t i = 0; i < m->count; i++)
            put_fraction(pass->run->fractions, pass, test, m->label[i],
                         &pass->counts[i * SCREEN_MAX_TESTS + j]);
        robustness_counts all = slowscan_robustness_total(pass->counts, m->count,
                                                          SCREEN_MAX_TESTS, j);
        if (m->count > 1)
            put_fraction(pass->run->fractions, pass, test, "all", &all);
    }
}

/* The cell of the grid that is the run's own choice (--detrend, --window, --bandwidth, or
 * their defaults; slowscan_robustness_own_cell); -1 when it is not on the grid. */
static void default_cell(const cli_options *opts, const series_table *t, const method_list *m,
                         report_robustness_data *d)
{
    robustness_grid grid;
    grid_of(opts, m, &grid);
    screen_config cfg;
    cli_screen_config(opts, &cfg);
    robustness_own_cell own = slowscan_robustness_own_cell(&grid, &cfg, t->n,
                                                           t->time[t->n - 1] - t->time[0],
                                                           &t->axis);
    d->default_detrend = own.method;
    d->default_window = own.window;
    d->default_bandwidth = own.bandwidth;
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
    if (!run->ws && !(run->ws = slowscan_robustness_workspace_alloc((size_t)opts->threads))) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    method_list m = grid_methods(opts);
    robustness_grid grid;
    grid_of(opts, &m, &grid);
    screen_config cfg;
    cli_screen_config(opts, &cfg);
    screen_input control = {0};
    if (in->has_control)
        control = cli_control_input(in, t->names[k]);
    screen_input input = {.name = t->names[k], .source = cli_source_name(t->source), .time_name = t->time_name, .time = t->time, .values = t->values[k], .n = t->n, .control = in->has_control ? &control : NULL, .axis = t->axis};
    screen_prepared named = {.name = input.name, .source = input.source};
    cell_grid cells = {NULL, NULL, NULL, NULL, 0, 0, 0};
    int rc = run->figures ? grid_alloc(opts, &m, &cells) : EXIT_OK;
    series_pass *pass = calloc(1, sizeof *pass);
    if (rc == EXIT_OK && !pass) {
        cli_error("out of memory");
        rc = EXIT_INTERNAL;
    }
    if (rc == EXIT_OK) {
        *pass = (series_pass){run, opts, &m, &named, {{0}}, &cells};
        screen_detail d;
        robustness_position at;
        if (slowscan_robustness_series(run->ws, &grid, &cfg, &input, take_cell, pass, &d, &at) !=
            SLOWSCAN_OK)
            rc = refuse_cell(pass, in, &d, &at);
    }
    if (rc == EXIT_OK && run->fractions)
        write_fractions(pass);
    if (rc == EXIT_OK && run->figures)
        rc = draw_heat_map(run, opts, t, k, &m, &cells);
    free(pass);
    free(cells.tau);
    return rc;
}

int cmd_robustness(const cli_options *opts)
{
    robustness_run run = {0};
    series_command cmd = {open_outputs, NULL, NULL, &run, robustness_series, NULL, NULL};
    int rc = cli_run_series_command(opts, &cmd);
    slowscan_robustness_workspace_free(run.ws);
    return rc;
}
