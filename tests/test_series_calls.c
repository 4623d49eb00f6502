/* The library's analyses beside screen, through their public headers: the robustness grid
 * (robustness.h) gives in every cell what slowscan_screen_series gives for that one choice;
 * the recovery analysis (recovery.h) gives the `recovery` command's fit, p and projection
 * (tests/golden/, the command's committed output) and screen's recovery_trend p; surrogate
 * replicates (slowscan_screen_replicate) are the `surrogates` command's rows. */
#include "check.h"
#include "stations_check.h"
#include "slowscan/io.h"
#include "slowscan/recovery.h"
#include "slowscan/robustness.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Formats v as the commands' CSV does (%.12g, NA). */
static void csv_cell(char *buf, double v)
{
    if (isfinite(v))
        snprintf(buf, 32, "%.12g", v == 0 ? 0.0 : v);
    else
        snprintf(buf, 32, "NA");
}

static int same(double a, double b)
{
    return (isnan(a) && isnan(b)) || a == b;
}

static screen_input station(const series_table *t, size_t k)
{
    return (screen_input){.name = t->names[k], .source = "data/stations.csv", .time_name = t->time_name, .time = t->time, .values = t->values[k], .n = t->n, .control = NULL};
}

static size_t named(const series_table *t, const char *name)
{
    size_t k = 0;
    while (k < t->nseries && strcmp(t->names[k], name) != 0)
        k++;
    CHECK(k < t->nseries, "data/stations.csv has %s", name);
    return k < t->nseries ? k : 0;
}

/* The grid of the golden robustness run, two methods. */
static robustness_grid stations_grid(void)
{
    robustness_grid g = slowscan_robustness_grid_default();
    g.windows[0] = (screen_length){.amount = 40, .percent = 1};
    g.windows[1] = (screen_length){.amount = 60, .percent = 1};
    g.nwindows = 2;
    g.bandwidths[0] = (screen_length){.amount = 5, .percent = 1};
    g.bandwidths[1] = (screen_length){.amount = 15, .percent = 1};
    g.nbandwidths = 2;
    slowscan_detrend_parse_method("gaussian-linear", &g.methods[0]);
    slowscan_detrend_parse_method("linear", &g.methods[1]);
    g.nmethods = 2;
    return g;
}

typedef struct {
    const robustness_grid *grid;
    const screen_config *cfg;
    const screen_input *in;
    screen_workspace *ws;
    size_t cells, records, mismatches;
    robustness_counts counts[ROBUSTNESS_MAX_METHODS * SCREEN_MAX_TESTS];
} grid_check;

/* Each record against slowscan_screen_series run with its cell's choices alone. */
static int check_cell(void *context, const robustness_cell *cell)
{
    grid_check *c = context;
    c->cells++;
    screen_config one = *c->cfg;
    one.detrend = c->grid->methods[cell->method];
    if (cell->window_index != ROBUSTNESS_NO_WINDOW)
        one.window = c->grid->windows[cell->window_index];
    if (slowscan_detrend_uses_bandwidth(one.detrend.method))
        one.bandwidth = c->grid->bandwidths[cell->bandwidth_index];
    screen_result r;
    screen_detail d;
    int st = slowscan_screen_series(c->ws, &one, c->in, &r, &d);
    CHECK(st == SLOWSCAN_OK && cell->nwarnings == 0, "cell %zu/%zu/%zu: status %d",
          cell->method, cell->window_index, cell->bandwidth_index, st);
    for (size_t i = 0; st == SLOWSCAN_OK && i < cell->nrecords; i++) {
        const robustness_record *rec = &cell->records[i];
        const screen_test *t = &r.tests[rec->test];
        int ok = rec->kind == t->kind && same(rec->tau, t->tau) &&
                 same(rec->statistic, t->statistic) && same(rec->p_value, t->p_value) &&
                 same(rec->bandwidth, r.bandwidth) &&
                 same(rec->window, slowscan_screen_test_rolling(t->kind) ? r.window : NAN);
        c->mismatches += !ok;
        c->records++;
        CHECK(ok, "%s cell %zu/%zu/%zu: grid %.17g p %.17g, screen %.17g p %.17g",
              slowscan_screen_test_name(rec->kind), cell->method, cell->window_index,
              cell->bandwidth_index, rec->statistic, rec->p_value, t->statistic, t->p_value);
    }
    slowscan_robustness_tally(c->counts, SCREEN_MAX_TESTS, cell->records, cell->nrecords);
    return 0;
}

/* An independent path: every cell of the grid equals a screen of that one choice. */
static void grid_equals_screen(void)
{
    series_table t;
    if (!check_read_stations(&t))
        return;
    screen_config cfg = slowscan_screen_config_default();
    cfg.deseason = 364;
    cfg.surrogates = 19;
    robustness_grid grid = stations_grid();
    screen_input in = station(&t, 0);
    grid_check c = {&grid, &cfg, &in, slowscan_screen_workspace_alloc(1), 0, 0, 0, {{0}}};
    robustness_workspace *ws = slowscan_robustness_workspace_alloc(2);
    screen_detail d;
    robustness_position at;
    cfg.threads = 2;
    int st = ws && c.ws ? slowscan_robustness_series(ws, &grid, &cfg, &in, check_cell, &c, &d, &at)
                        : SLOWSCAN_ENOMEM;
    /* gaussian-linear: 2 windows x 2 bandwidths + 2 recovery_trend; linear: 2 + 1 */
    CHECK(st == SLOWSCAN_OK && c.cells == 9 && c.records == 2 * 4 + 2 + 2 * 2 + 1 &&
              c.mismatches == 0, "grid: status %d, %zu cells, %zu records, %zu differ", st,
          c.cells, c.records, c.mismatches);
    robustness_counts all = slowscan_robustness_total(c.counts, 2, SCREEN_MAX_TESTS, 0);
    CHECK(all.cells == 6 && c.counts[0].cells == 4 && c.counts[SCREEN_MAX_TESTS].cells == 2,
          "variance cells per method 4 and 2, 6 in all (got %zu)", all.cells);
    slowscan_robustness_workspace_free(ws);
    slowscan_screen_workspace_free(c.ws);
    slowscan_series_table_free(&t);
}

/* The shares over hand-made records (common practice, no source: a share among the cells
 * where the quantity exists). */
static void shares_by_hand(void)
{
    robustness_record r[4];
    const double stat[] = {1, -1, NAN, 2}, p[] = {0.01, 0.5, NAN, 0.05};
    for (size_t i = 0; i < 4; i++)
        r[i] = (robustness_record){.kind = INDICATOR_VARIANCE, .test = 0, .method = i % 2,
                                   .statistic = stat[i], .p_value = p[i]};
    robustness_counts counts[2] = {slowscan_robustness_counts_default(),
                                   slowscan_robustness_counts_default()};
    slowscan_robustness_tally(counts, 1, r, 4);
    robustness_counts all = slowscan_robustness_total(counts, 2, 1, 0);
    double positive, significant;
    slowscan_robustness_shares(&all, &positive, &significant);
    CHECK(all.cells == 4 && all.with_statistic == 3 && all.positive == 2 && all.with_p == 3 &&
              all.significant == 2, "counts 4 cells, 3 statistics, 2 positive, 3 p, 2 at 0.05");
    CHECK_CLOSE(positive, 2.0 / 3.0, 1e-15, 0, "share positive");
    CHECK_CLOSE(significant, 2.0 / 3.0, 1e-15, 0, "share significant");
    slowscan_robustness_shares(&counts[1], &positive, &significant); /* records 1 and 3 */
    CHECK(counts[1].cells == 2 && positive == 0.5 && significant == 0.5, "method 1: 1 of 2");
    robustness_counts none = slowscan_robustness_counts_default();
    slowscan_robustness_shares(&none, &positive, &significant);
    CHECK(isnan(positive) && isnan(significant), "no cells: NaN shares");
}

static int count_cells(void *context, const robustness_cell *cell)
{
    (void)cell;
    ++*(size_t *)context;
    return 0;
}

/* A window of one time unit is two samples: refused at its place in the grid, after the
 * cells before it; the run's own cell is found on the grid. */
static void refusal_and_own_cell(void)
{
    series_table t;
    if (!check_read_stations(&t))
        return;
    screen_config cfg = slowscan_screen_config_default();
    cfg.surrogates = 0;
    cfg.drift_test = 0;
    robustness_grid grid = slowscan_robustness_grid_default();
    grid.windows[0] = (screen_length){.amount = 50, .percent = 1};
    grid.windows[1] = (screen_length){.amount = t.time[1] - t.time[0], .percent = 0};
    grid.nwindows = 2;
    screen_input in = station(&t, 1);
    robustness_workspace *ws = slowscan_robustness_workspace_alloc(1);
    size_t cells = 0;
    screen_detail d;
    robustness_position at;
    int st = ws ? slowscan_robustness_series(ws, &grid, &cfg, &in, count_cells, &cells, &d, &at)
                : SLOWSCAN_ENOMEM;
    CHECK(st == SLOWSCAN_EINVAL && d.rule == SCREEN_RULE_WINDOW_TOO_FEW && d.count == 2 &&
              at.window_index == 1 && cells == 1, "window of 2 samples: status %d rule %d, "
          "window %zu, %zu cells before", st, d.rule, at.window_index, cells);
    CHECK(ws && slowscan_robustness_workspace_prepared(ws, 0) &&
              slowscan_robustness_workspace_prepared(ws, 0)->n == t.n, "prepared series kept");
    grid.windows[1] = (screen_length){.amount = 60, .percent = 1};
    grid.windows[2] = cfg.window; /* 50% again: the first in grid order wins */
    grid.nwindows = 3;
    grid.bandwidths[0] = (screen_length){.amount = 5, .percent = 1};
    grid.bandwidths[1] = (screen_length){.amount = 10, .percent = 1};
    grid.nbandwidths = 2;
    slowscan_detrend_parse_method("linear", &grid.methods[0]);
    grid.methods[1] = cfg.detrend;
    grid.nmethods = 2;
    double span = t.time[t.n - 1] - t.time[0];
    robustness_own_cell own = slowscan_robustness_own_cell(&grid, &cfg, t.n, span, &t.axis);
    CHECK(own.method == 1 && own.window == 0 && own.bandwidth == 1, "own cell %ld/%ld/%ld",
          own.method, own.window, own.bandwidth);
    cfg.bandwidth = (screen_length){.amount = 0.1 * span, .percent = 0}; /* the same in time units */
    own = slowscan_robustness_own_cell(&grid, &cfg, t.n, span, &t.axis);
    CHECK(own.bandwidth == 1, "own bandwidth in time units: %ld", own.bandwidth);
    grid.nmethods = 1;
    own = slowscan_robustness_own_cell(&grid, &cfg, t.n, span, &t.axis);
    CHECK(own.method == -1 && own.window == -1, "method off the grid");
    slowscan_robustness_workspace_free(ws);
    slowscan_series_table_free(&t);
}

/* `"key": value` as the command's JSON writes it (%.17g). */
static int json_has(const char *json, const char *key, double v)
{
    char want[96];
    snprintf(want, sizeof want, "\"%s\": %.17g", key, v);
    return strstr(json, want) != NULL;
}

/* The golden recovery run (--deseason 364 --surrogates 19 --project, 1000 draws), reed_inlet. */
static void recovery_equals_command(void)
{
    series_table t;
    char *json = check_read_file("tests/golden/recovery.json");
    char *project = check_read_file("tests/golden/recovery.project.csv");
    CHECK(json && project, "tests/golden/recovery.json, recovery.project.csv");
    if (!json || !project || !check_read_stations(&t)) {
        free(json);
        free(project);
        return;
    }
    screen_config cfg = slowscan_screen_config_default();
    cfg.deseason = 364;
    cfg.surrogates = 19;
    recovery_config rcfg = slowscan_recovery_config_default();
    rcfg.projection_draws = 1000;
    screen_input in = station(&t, named(&t, "reed_inlet"));
    screen_prepared ps;
    screen_detail d;
    recovery_result r;
    recovery_workspace *ws = slowscan_recovery_workspace_alloc(2);
    double *path = malloc(3 * t.n * sizeof *path);
    int st = slowscan_screen_prepare(&cfg, &in, &ps, &d);
    CHECK(st == SLOWSCAN_OK && strcmp(in.name, "reed_inlet") == 0, "prepare reed_inlet");
    if (st == SLOWSCAN_OK && ws && path)
        st = slowscan_recovery_series(ws, &cfg, &rcfg, &ps, path, path + t.n, path + 2 * t.n, &r, &d);
    CHECK(st == SLOWSCAN_OK && r.fit_status == SLOWSCAN_OK && r.projected, "recovery: %d", st);
    if (st == SLOWSCAN_OK) {
        CHECK(json_has(json, "a1", r.fit.a1) && json_has(json, "t_a1", r.fit.t_a1) &&
                  json_has(json, "p_value", r.p_value), "fit and p as the command's JSON");
        CHECK(json_has(json, "crossing_time", r.crossing_time) &&
                  json_has(json, "crossing_lo", r.crossing_lo) &&
                  json_has(json, "crossing_hi", r.crossing_hi) &&
                  json_has(json, "share_crossing", r.projection.share_crossing),
              "projection as the command's JSON (the stream of the series' projection)");
        char row[160], a[32], b[32], c[32];
        csv_cell(a, r.crossing_time);
        csv_cell(b, r.crossing_lo);
        csv_cell(c, r.crossing_hi);
        snprintf(row, sizeof row, "\nreed_inlet,ahead,%s,%s,%s,closed,", a, b, c);
        CHECK(r.projection.kind == PROJECTION_AHEAD && strstr(project, row), "row %s", row + 1);
    }
    /* screen's recovery_trend of the same series and seed: the same statistic and p */
    screen_workspace *sws = slowscan_screen_workspace_alloc(1);
    screen_result sr;
    int sst = sws ? slowscan_screen_series(sws, &cfg, &in, &sr, &d) : SLOWSCAN_ENOMEM;
    CHECK(sst == SLOWSCAN_OK && st == SLOWSCAN_OK && sr.tests[2].kind == SCREEN_TEST_RECOVERY_TREND &&
              sr.tests[2].p_value == r.p_value && sr.tests[2].statistic == r.fit.t_a1,
          "screen's recovery_trend p %.17g, recovery's %.17g", sst == SLOWSCAN_OK ? sr.tests[2].p_value : NAN,
          r.p_value);
    slowscan_screen_workspace_free(sws);
    free(path);
    slowscan_screen_prepared_free(&ps);
    slowscan_recovery_workspace_free(ws);
    slowscan_series_table_free(&t);
    free(json);
    free(project);
}

/* A constant series has no fit, and that is not a refusal. */
static void recovery_without_fit(void)
{
    double time[40], values[40];
    for (size_t i = 0; i < 40; i++)
        time[i] = (double)i, values[i] = 3.0;
    screen_config cfg = slowscan_screen_config_default();
    screen_input in = {.name = "flat", .source = "memory", .time_name = "t", .time = time, .values = values, .n = 40, .control = NULL};
    screen_prepared ps;
    screen_detail d;
    recovery_result r;
    recovery_workspace *ws = slowscan_recovery_workspace_alloc(1);
    recovery_config rcfg = slowscan_recovery_config_default();
    int st = slowscan_screen_prepare(&cfg, &in, &ps, &d);
    if (st == SLOWSCAN_OK && ws)
        st = slowscan_recovery_series(ws, &cfg, &rcfg, &ps, NULL, NULL, NULL, &r, &d);
    CHECK(st == SLOWSCAN_OK && r.fit_status == SLOWSCAN_ECONST && isnan(r.p_value) && !r.projected,
          "constant: status %d, fit status %d", st, st == SLOWSCAN_OK ? r.fit_status : -1);
    slowscan_screen_prepared_free(&ps);
    slowscan_recovery_workspace_free(ws);
}

/* Replicate j of north_bay against the golden `surrogates --vars north_bay,east_shoal
 * --surrogates 3` rows; replicates asked out of order, and past a block, are the same. */
static void replicates_equal_command(void)
{
    series_table t;
    char *rows = check_read_file("tests/golden/surrogates.out");
    CHECK(rows != NULL, "tests/golden/surrogates.out");
    if (!rows || !check_read_stations(&t)) {
        free(rows);
        return;
    }
    screen_config cfg = slowscan_screen_config_default();
    screen_input in = station(&t, named(&t, "north_bay"));
    screen_prepared ps;
    screen_detail d;
    screen_replicates *reps = NULL;
    double *x = malloc(3 * t.n * sizeof *x), *y = x ? x + t.n : NULL, *z = x ? x + 2 * t.n : NULL;
    int st = x ? slowscan_screen_prepare(&cfg, &in, &ps, &d) : SLOWSCAN_ENOMEM;
    if (st == SLOWSCAN_OK)
        st = slowscan_screen_replicates_alloc(&cfg, &ps, &reps, &d);
    CHECK(st == SLOWSCAN_OK, "north_bay replicates: %d", st);
    size_t missing = 0;
    for (size_t j = 0; st == SLOWSCAN_OK && j < 3; j++) {
        st = slowscan_screen_replicate(reps, j, x);
        for (size_t i = 0; st == SLOWSCAN_OK && i < t.n; i++) {
            char row[128], tc[32], vc[32];
            csv_cell(tc, t.time[i]);
            csv_cell(vc, x[i]);
            snprintf(row, sizeof row, "\nnorth_bay,%zu,%s,%s\n", j + 1, tc, vc);
            missing += strstr(rows, row) == NULL;
        }
    }
    CHECK(st == SLOWSCAN_OK && missing == 0, "%zu samples differ from the command's rows", missing);
    /* 70 lies in the second block of NULL_TREND_BLOCK = 64: asked first, then after 0..70 */
    if (st == SLOWSCAN_OK && (st = slowscan_screen_replicate(reps, 70, y)) == SLOWSCAN_OK)
        st = slowscan_screen_replicate(reps, 1, z);
    for (size_t j = 0; st == SLOWSCAN_OK && j <= 70; j++)
        st = slowscan_screen_replicate(reps, j, x);
    CHECK(st == SLOWSCAN_OK && check_max_diff(x, y, t.n) == 0, "replicate 70 in any order");
    if (st == SLOWSCAN_OK)
        st = slowscan_screen_replicate(reps, 1, x);
    CHECK(st == SLOWSCAN_OK && check_max_diff(x, z, t.n) == 0, "replicate 1 replayed");
    slowscan_screen_replicates_free(reps);
    slowscan_screen_prepared_free(&ps);
    /* the minimum-samples rule: fewer than 8 finite samples, or none varying */
    double time[12], few[12], flat[12];
    for (size_t i = 0; i < 12; i++)
        time[i] = (double)i, few[i] = i < 7 ? (double)(i * i % 5) : NAN, flat[i] = 1.0;
    screen_config lin = cfg;
    slowscan_detrend_parse_method("linear", &lin.detrend);
    const double *values[] = {few, flat};
    const int want[] = {SLOWSCAN_ESHORT, SLOWSCAN_ECONST};
    for (int c = 0; c < 2; c++) {
        screen_input small = {.name = "small", .source = "memory", .time_name = "t", .time = time, .values = values[c], .n = 12, .control = NULL};
        st = slowscan_screen_prepare(&lin, &small, &ps, &d);
        if (st == SLOWSCAN_OK)
            st = slowscan_screen_replicates_alloc(&lin, &ps, &reps, &d);
        CHECK(st == want[c] && d.rule == SCREEN_RULE_NULL_TOO_LITTLE && !reps,
              "case %d: status %d rule %d", c, st, d.rule);
        slowscan_screen_prepared_free(&ps);
    }
    free(x);
    slowscan_series_table_free(&t);
    free(rows);
}

void suite_series_calls(void)
{
    grid_equals_screen();
    shares_by_hand();
    refusal_and_own_cell();
    recovery_equals_command();
    recovery_without_fit();
    replicates_equal_command();
}
