/* The trend tests of one series over a grid of methods x windows x bandwidths: the screening
 * pipeline's preparation, indicators and tests (screen.h), run once per cell. */
#include "slowscan/robustness.h"
#include "slowscan/status.h"
#include "screen_internal.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

struct robustness_workspace {
    screen_workspace *rolling; /* the rolling cells */
    screen_workspace *drift;   /* recovery_trend alone: its null is sized for one test */
    screen_prepared prepared[ROBUSTNESS_MAX_LENGTHS]; /* one per bandwidth of the method */
    size_t nprepared;
    double *paths; /* nindicators x n */
    size_t paths_cap;
};

/* One method's pass over the grid. */
typedef struct {
    robustness_workspace *ws;
    const robustness_grid *grid;
    const screen_config *cfg; /* with the method's detrend */
    const screen_input *in;
    robustness_cell_sink sink;
    void *context;
    screen_detail *detail;
    robustness_position *where;
} method_pass;

robustness_grid slowscan_robustness_grid_default(void)
{
    robustness_grid g;
    memset(&g, 0, sizeof g);
    return g;
}

robustness_workspace *slowscan_robustness_workspace_alloc(size_t threads)
{
    robustness_workspace *ws = calloc(1, sizeof *ws);
    if (!ws)
        return NULL;
    ws->rolling = slowscan_screen_workspace_alloc(threads);
    ws->drift = slowscan_screen_workspace_alloc(threads);
    if (!ws->rolling || !ws->drift) {
        slowscan_robustness_workspace_free(ws);
        return NULL;
    }
    return ws;
}

static void release_prepared(robustness_workspace *ws)
{
    for (size_t b = 0; b < ws->nprepared; b++)
        slowscan_screen_prepared_free(&ws->prepared[b]);
    ws->nprepared = 0;
}

void slowscan_robustness_workspace_free(robustness_workspace *ws)
{
    if (!ws)
        return;
    release_prepared(ws);
    slowscan_screen_workspace_free(ws->rolling);
    slowscan_screen_workspace_free(ws->drift);
    free(ws->paths);
    free(ws);
}

const screen_prepared *slowscan_robustness_workspace_prepared(const robustness_workspace *ws,
                                                              size_t b)
{
    return b < ws->nprepared ? &ws->prepared[b] : NULL;
}

static screen_length window_of(const method_pass *p, size_t w)
{
    return p->grid->nwindows ? p->grid->windows[w] : p->cfg->window;
}

static size_t bandwidth_count(const method_pass *p)
{
    if (!slowscan_detrend_uses_bandwidth(p->cfg->detrend.method))
        return 1;
    return p->grid->nbandwidths ? p->grid->nbandwidths : 1;
}

static int refuse(screen_detail *d, screen_rule rule, int status)
{
    memset(d, 0, sizeof *d);
    d->rule = rule;
    d->status = status;
    return status;
}

/* Detrending depends on the method and bandwidth only: each bandwidth's residual (and control
 * residual) is made once, with the first window, and reused for every window. */
static int prepare_bandwidths(method_pass *p)
{
    robustness_workspace *ws = p->ws;
    release_prepared(ws);
    int uses = slowscan_detrend_uses_bandwidth(p->cfg->detrend.method);
    int st = SLOWSCAN_OK;
    for (size_t b = 0; st == SLOWSCAN_OK && b < bandwidth_count(p); b++) {
        screen_config cell = *p->cfg;
        cell.window = window_of(p, 0);
        if (uses && p->grid->nbandwidths)
            cell.bandwidth = p->grid->bandwidths[b];
        *p->where = (robustness_position){p->where->method, 0, b};
        screen_prepared *ps = &ws->prepared[b];
        ws->nprepared = b + 1;
        st = slowscan_screen_prepare(&cell, p->in, ps, p->detail);
        if (st == SLOWSCAN_OK && p->in->control)
            st = slowscan_screen_attach_control(&cell, ps, p->in->control, p->detail);
    }
    return st;
}

/* A cell's tests as records, handed to the sink with its warnings (no records when the cell
 * was refused: the caller returns `status` after). */
static int deliver(method_pass *p, const screen_result *res, size_t first, size_t count,
                   int status)
{
    const robustness_position *at = p->where;
    robustness_cell cell = {at->method, at->window_index, at->bandwidth_index, 0, {{0}}, 0, {{0}}};
    for (size_t j = 0; status == SLOWSCAN_OK && j < count; j++) {
        const screen_test *t = &res->tests[j];
        int rolling = at->window_index != ROBUSTNESS_NO_WINDOW;
        cell.records[cell.nrecords++] = (robustness_record){
            t->kind, first + j, at->method, at->window_index, at->bandwidth_index,
            rolling ? res->window : NAN, res->bandwidth, t->tau, t->statistic, t->p_value,
            t->reason};
    }
    cell.nwarnings = res->nwarnings;
    memcpy(cell.warnings, res->warnings, res->nwarnings * sizeof *res->warnings);
    if (status != SLOWSCAN_OK && cell.nwarnings == 0)
        return status;
    if (p->sink(p->context, &cell) != 0 && status == SLOWSCAN_OK)
        return refuse(p->detail, SCREEN_RULE_NONE, SLOWSCAN_EINVAL);
    return status;
}

/* The rolling indicators of one (window, bandwidth) cell and their trend tests (with the
 * configuration's own tests, of which only the indicators' are this cell's records). */
static int rolling_cell(method_pass *p, const screen_config *cell, screen_prepared *ps)
{
    robustness_workspace *ws = p->ws;
    size_t nind = cell->nindicators;
    if (ws->paths_cap < nind * ps->n) {
        free(ws->paths);
        ws->paths = malloc(nind * ps->n * sizeof *ws->paths);
        ws->paths_cap = ws->paths ? nind * ps->n : 0;
        if (!ws->paths)
            return refuse(p->detail, SCREEN_RULE_NO_MEMORY, SLOWSCAN_ENOMEM);
    }
    double *paths[INDICATOR_COUNT];
    for (size_t j = 0; j < nind; j++)
        paths[j] = ws->paths + j * ps->n;
    screen_result res;
    memset(&res, 0, sizeof res);
    int warned = 0;
    int st = slowscan_screen_indicators(ws->rolling, cell, ps, paths, &res.warnings[0], &warned,
                                        p->detail);
    if (st != SLOWSCAN_OK)
        return st;
    res.nwarnings = (size_t)warned;
    st = slowscan_screen_test_series(ws->rolling, cell, ps, paths, &res, p->detail);
    return deliver(p, &res, 0, nind, st);
}

/* recovery_trend of one bandwidth's residual: it has no window, so it is tested once. */
static int drift_cell(method_pass *p, size_t b)
{
    screen_config drift_only = screen_drift_only(p->cfg);
    *p->where = (robustness_position){p->where->method, ROBUSTNESS_NO_WINDOW, b};
    screen_result res;
    memset(&res, 0, sizeof res);
    int st = slowscan_screen_test_series(p->ws->drift, &drift_only, &p->ws->prepared[b], NULL,
                                         &res, p->detail);
    return deliver(p, &res, p->cfg->nindicators, 1, st);
}

/* Every cell of one method: windows x bandwidths for the indicators, then recovery_trend per
 * bandwidth. */
static int method_cells(method_pass *p)
{
    robustness_workspace *ws = p->ws;
    size_t nb = bandwidth_count(p), method = p->where->method;
    int st = prepare_bandwidths(p);
    size_t nw = p->grid->nwindows ? p->grid->nwindows : 1;
    for (size_t w = 0; st == SLOWSCAN_OK && p->cfg->nindicators > 0 && w < nw; w++) {
        screen_config cell = *p->cfg;
        cell.window = window_of(p, w);
        size_t window = 0;
        *p->where = (robustness_position){method, w, 0};
        st = slowscan_screen_window(&cell, p->in->n, ws->prepared[0].span, &window, p->detail);
        for (size_t b = 0; st == SLOWSCAN_OK && b < nb; b++) {
            ws->prepared[b].window = window;
            *p->where = (robustness_position){method, w, b};
            st = rolling_cell(p, &cell, &ws->prepared[b]);
        }
    }
    for (size_t b = 0; st == SLOWSCAN_OK && p->cfg->drift_test && b < nb; b++)
        st = drift_cell(p, b);
    return st;
}

/* The grid's windows and bandwidths in the axis' own unit (a refusal names the first that
 * cannot be measured on it). */
static int grid_on_axis(robustness_grid *grid, const time_axis *axis, screen_detail *d)
{
    int st = SLOWSCAN_OK;
    for (size_t w = 0; w < grid->nwindows && st == SLOWSCAN_OK; w++)
        st = screen_length_to_axis(&grid->windows[w], SCREEN_OPTION_WINDOW, axis, d);
    for (size_t b = 0; b < grid->nbandwidths && st == SLOWSCAN_OK; b++)
        st = screen_length_to_axis(&grid->bandwidths[b], SCREEN_OPTION_BANDWIDTH, axis, d);
    return st;
}

int slowscan_robustness_series(robustness_workspace *ws, const robustness_grid *grid,
                               const screen_config *cfg, const screen_input *in,
                               robustness_cell_sink sink, void *context, screen_detail *detail,
                               robustness_position *where)
{
    memset(detail, 0, sizeof *detail);
    *where = (robustness_position){0, 0, 0};
    release_prepared(ws);
    if (grid->nwindows > ROBUSTNESS_MAX_LENGTHS || grid->nbandwidths > ROBUSTNESS_MAX_LENGTHS ||
        grid->nmethods > ROBUSTNESS_MAX_METHODS || in->n < 2)
        return refuse(detail, SCREEN_RULE_NONE, SLOWSCAN_EINVAL);
    /* lengths in calendar units (30y) measured on this input's axis, once */
    robustness_grid on_axis = *grid;
    screen_config base = *cfg;
    int st = grid_on_axis(&on_axis, &in->axis, detail);
    if (st == SLOWSCAN_OK)
        st = slowscan_screen_config_on_axis(&base, &in->axis, detail);
    if (st != SLOWSCAN_OK)
        return st;
    grid = &on_axis;
    cfg = &base;
    size_t nm = grid->nmethods ? grid->nmethods : 1;
    for (size_t i = 0; st == SLOWSCAN_OK && i < nm; i++) {
        screen_config method = *cfg;
        if (grid->nmethods)
            method.detrend = grid->methods[i];
        where->method = i;
        method_pass pass = {ws, grid, &method, in, sink, context, detail, where};
        st = method_cells(&pass);
    }
    return st;
}

static double length_in_time(const screen_length *len, double span)
{
    return len->percent ? len->amount / 100.0 * span : len->amount;
}

robustness_own_cell slowscan_robustness_own_cell(const robustness_grid *given,
                                                 const screen_config *given_cfg, size_t n,
                                                 double span, const time_axis *axis)
{
    robustness_own_cell own = {-1, -1, -1};
    robustness_grid on_axis = *given;
    screen_config base = *given_cfg;
    screen_detail refused = {0};
    if (grid_on_axis(&on_axis, axis, &refused) != SLOWSCAN_OK ||
        slowscan_screen_config_on_axis(&base, axis, &refused) != SLOWSCAN_OK)
        return own;
    const robustness_grid *grid = &on_axis;
    const screen_config *cfg = &base;
    for (size_t i = 0; i < grid->nmethods && own.method < 0; i++)
        if (grid->methods[i].method == cfg->detrend.method &&
            grid->methods[i].degree == cfg->detrend.degree)
            own.method = (long)i;
    if (grid->nmethods == 0)
        own.method = 0;
    size_t w_own = 0, w_cell = 0;
    screen_detail d;
    if (own.method < 0 || slowscan_screen_window(cfg, n, span, &w_own, &d) != SLOWSCAN_OK)
        return own;
    for (size_t w = 0; w < grid->nwindows && own.window < 0; w++) {
        screen_config cell = *cfg;
        cell.window = grid->windows[w];
        if (slowscan_screen_window(&cell, n, span, &w_cell, &d) == SLOWSCAN_OK && w_cell == w_own)
            own.window = (long)w;
    }
    if (grid->nwindows == 0)
        own.window = 0;
    if (!slowscan_detrend_uses_bandwidth(cfg->detrend.method) || grid->nbandwidths == 0) {
        own.bandwidth = 0;
        return own;
    }
    double want = length_in_time(&cfg->bandwidth, span);
    for (size_t b = 0; b < grid->nbandwidths && own.bandwidth < 0; b++)
        if (fabs(length_in_time(&grid->bandwidths[b], span) - want) <= 1e-9 * fabs(want))
            own.bandwidth = (long)b;
    return own;
}

robustness_counts slowscan_robustness_counts_default(void)
{
    return (robustness_counts){0, 0, 0, 0, 0};
}

void slowscan_robustness_tally(robustness_counts *counts, size_t ntests,
                               const robustness_record *records, size_t n)
{
    for (size_t i = 0; i < n; i++) {
        const robustness_record *r = &records[i];
        robustness_counts *c = &counts[r->method * ntests + r->test];
        c->cells++;
        c->with_statistic += !isnan(r->statistic);
        c->positive += r->statistic > 0;
        c->with_p += !isnan(r->p_value);
        c->significant += r->p_value <= 0.05;
    }
}

robustness_counts slowscan_robustness_total(const robustness_counts *counts, size_t nmethods,
                                            size_t ntests, size_t test)
{
    robustness_counts all = slowscan_robustness_counts_default();
    for (size_t i = 0; i < nmethods; i++) {
        const robustness_counts *c = &counts[i * ntests + test];
        all.cells += c->cells;
        all.with_statistic += c->with_statistic;
        all.positive += c->positive;
        all.with_p += c->with_p;
        all.significant += c->significant;
    }
    return all;
}

void slowscan_robustness_shares(const robustness_counts *c, double *positive, double *significant)
{
    *positive = c->with_statistic ? (double)c->positive / (double)c->with_statistic : NAN;
    *significant = c->with_p ? (double)c->significant / (double)c->with_p : NAN;
}
