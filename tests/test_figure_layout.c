/* Figure geometry (suite figure_layout): with the box manifest on, report/ records every
 * string and panel it draws, measured from the rendered glyphs. For per-series figures with
 * 1, 3, 6 and 11 tests and 10^2 and 10^6 samples, for the overview with 150 flagged series
 * whose q-values tie, and for the figures the binary draws: every text box lies on the page,
 * no two overlap, none is cut by a panel's frame, panels do not overlap, and the PNG has ink
 * inside every text box (tests/reference/png_ink.py decodes it). The data are invented, for
 * scale only: the checks are on where things are drawn, not on any number computed. */
#include "check.h"
#include "figure_manifest.h"
#include "slowscan/indicators.h"
#include "slowscan/report.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

/* Overlap of more than half a unit both ways (boxes that only touch are fine). */
static int overlap(const box *a, const box *b)
{
    return fmin(a->x1, b->x1) - fmax(a->x0, b->x0) > 0.5 && fmin(a->y1, b->y1) - fmax(a->y0, b->y0) > 0.5;
}

static int inside(const box *a, const box *outer)
{
    return a->x0 >= outer->x0 && a->x1 <= outer->x1 && a->y0 >= outer->y0 && a->y1 <= outer->y1;
}

/* Every geometric rule of the manifest; returns how many text boxes it has. */
static size_t check_boxes(const manifest *m, const char *what)
{
    size_t texts = 0, faults = 0;
    for (size_t i = 0; i < m->count; i++) {
        const box *a = &m->boxes[i];
        int text = strcmp(a->kind, "text") == 0;
        texts += text;
        if (a->x0 < 0 || a->y0 < 0 || a->x1 > m->width || a->y1 > m->height || !(a->x1 > a->x0))
            CHECK(faults++ > 5, "%s: box '%s' (%g %g %g %g) not on the %gx%g page", what, a->text, a->x0,
                  a->y0, a->x1, a->y1, m->width, m->height);
        for (size_t j = i + 1; j < m->count; j++) {
            const box *b = &m->boxes[j];
            int other_text = strcmp(b->kind, "text") == 0;
            const box *t = text ? a : b, *p = text ? b : a;
            int bad = text == other_text ? overlap(a, b) : overlap(t, p) && !inside(t, p);
            if (bad)
                CHECK(faults++ > 5, "%s: '%s' (%g %g %g %g) and '%s' (%g %g %g %g) %s", what, a->text,
                      a->x0, a->y0, a->x1, a->y1, b->text, b->x0, b->y0, b->x1, b->y1,
                      text == other_text ? "overlap" : "cross (text cut by a frame)");
        }
    }
    CHECK(faults == 0, "%s: %zu geometry faults", what, faults);
    return texts;
}

/* Ink in every text box of the decoded PNG. */
static void check_ink(const char *png, const manifest *m, size_t texts, const char *what)
{
    char args[1400];
    snprintf(args, sizeof args, "png_ink.py %s %s.boxes", png, png);
    double *counts = malloc((texts + 2) * sizeof *counts);
    int got = counts ? check_python(args, counts, texts + 2) : -1;
    CHECK(got == (int)texts + 2 && counts[0] == m->width && counts[1] == m->height,
          "%s: png_ink gave %d values for %zu boxes", what, got, texts);
    size_t k = 2, empty = 0;
    for (size_t i = 0; got == (int)texts + 2 && i < m->count; i++)
        if (strcmp(m->boxes[i].kind, "text") == 0 && counts[k++] <= 0)
            CHECK(empty++ > 5, "%s: no ink inside the box of '%s'", what, m->boxes[i].text);
    CHECK(empty == 0, "%s: %zu text boxes without ink", what, empty);
    free(counts);
}

/* The manifest of a drawn PNG passes every rule; its boxes are left in *m (free them). */
static void check_figure(const char *png, const char *what, manifest *m)
{
    char path[1200];
    snprintf(path, sizeof path, "%s.boxes", png);
    m->boxes = NULL;
    if (read_manifest(path, m) != 0 || m->count == 0) {
        CHECK(0, "%s: no manifest %s", what, path);
        return;
    }
    size_t texts = check_boxes(m, what);
    check_ink(png, m, texts, what);
}

static const manifest *find_text(const manifest *m, const char *needle, const box **found)
{
    *found = NULL;
    for (size_t i = 0; i < m->count && !*found; i++)
        if (strcmp(m->boxes[i].kind, "text") == 0 && strstr(m->boxes[i].text, needle))
            *found = &m->boxes[i];
    return m;
}

/* ---- per-series figures from invented data -------------------------------------------- */

typedef struct {
    double *time, *value, *trend, *paths;
} series_arrays;

/* A slow rise with noise, and paths that wander (a random walk), n samples. */
static int make_series(series_arrays *s, size_t n, size_t ntests)
{
    s->time = malloc(n * sizeof *s->time);
    s->value = malloc(n * sizeof *s->value);
    s->trend = malloc(n * sizeof *s->trend);
    s->paths = malloc(n * ntests * sizeof *s->paths);
    if (!s->time || !s->value || !s->trend || !s->paths)
        return -1;
    check_rng *rng = check_rng_alloc(3);
    for (size_t i = 0; i < n; i++) {
        s->time[i] = 1850.0 + (double)i / 12.0;
        s->trend[i] = 0.002 * (double)i / (double)n * 1000;
        s->value[i] = s->trend[i] + check_rng_gaussian(rng);
    }
    for (size_t j = 0; j < ntests; j++)
        for (size_t i = 0; i < n; i++) {
            double *p = s->paths + j * n;
            p[i] = i < n / 2 ? NAN : (i == n / 2 ? 0 : p[i - 1]) + check_rng_gaussian(rng);
        }
    check_rng_free(rng);
    return 0;
}

static void free_series(series_arrays *s)
{
    free(s->time);
    free(s->value);
    free(s->trend);
    free(s->paths);
}

/* ntests tests (the last one recovery_trend when there are three or more), one of them at
 * tau = 0.9998, p at the floor 1/(M+1). */
static void draw_series_case(report_batch *batch, size_t ntests, size_t n, const char *name)
{
    series_arrays s;
    report_series_test tests[12];
    if (make_series(&s, n, ntests) != 0) {
        CHECK(0, "%s: out of memory", name);
        free_series(&s);
        return;
    }
    for (size_t j = 0; j < ntests; j++) {
        int model = ntests >= 3 && j + 1 == ntests;
        double stat = j == 0 ? 0.9998 : model ? 3.5 : -0.3 + 0.11 * (double)j;
        tests[j] = (report_series_test){model ? "recovery_trend" : slowscan_indicator_name((indicator_kind)j),
                                        model ? "t(a1)" : "tau", model ? NULL : s.paths + j * n,
                                        stat, 1.0 / 1000.0, j == 0 ? 0.0049 : 0.31,
                                        -0.7, -0.5, 0.02, 0.5, 0.7, 999,
                                        j == 0 ? "flagged: rising" : "not flagged", j == 0};
        if (model) {
            tests[j].null_q01 = -2.9;
            tests[j].null_q05 = -1.8;
            tests[j].null_q95 = 1.7;
            tests[j].null_q99 = 2.6;
        }
    }
    report_series_data data = {name, "year", "invented.csv", n, s.time, s.value, s.trend,
                               n / 2 + 1, tests, ntests};
    io_error err = {{0}};
    CHECK(slowscan_report_batch_draw(batch, &slowscan_report_series_figure, &data, "series", name, &err) ==
              SLOWSCAN_OK, "%s drawn: %s", name, err.message);
    free_series(&s);
}

/* A batch into the scratch folder `name` (its path in dir), recording box manifests. */
static report_batch *open_batch(const char *name, report_format format, char *dir, size_t size)
{
    snprintf(dir, size, "%s", check_tmp_path(name));
    report_batch *batch = NULL;
    io_error err = {{0}};
    CHECK(slowscan_report_batch_open(&batch, dir, format, &err) == SLOWSCAN_OK, "batch %s: %s", name,
          err.message);
    if (batch)
        slowscan_report_batch_record_boxes(batch, 1);
    return batch;
}

static void test_series_geometry(void)
{
    char dir[512], png[700];
    io_error err = {{0}};
    report_batch *batch = open_batch("geometry-series", REPORT_PNG, dir, sizeof dir);
    if (!batch)
        return;
    static const struct {
        size_t tests, n;
        const char *name;
    } cases[] = {{1, 1000, "tests1"}, {3, 1000, "tests3"}, {6, 1000, "tests6"}, {11, 1000, "tests11"},
                 {6, 100, "n100"}, {6, 1000000, "n1000000"}};
    for (size_t c = 0; c < sizeof cases / sizeof cases[0]; c++)
        draw_series_case(batch, cases[c].tests, cases[c].n, cases[c].name);
    CHECK(slowscan_report_batch_commit(batch, &err) == SLOWSCAN_OK, "commit: %s", err.message);
    for (size_t c = 0; c < sizeof cases / sizeof cases[0]; c++) {
        snprintf(png, sizeof png, "%s/series-%s.png", dir, cases[c].name);
        manifest m;
        check_figure(png, cases[c].name, &m);
        const box *b;
        find_text(&m, "tau 0.9998", &b);
        CHECK(b != NULL, "%s: tau 0.9998 printed as such (not rounded to 1)", cases[c].name);
        find_text(&m, "p 0.00100", &b); /* the floor of M = 999, three digits */
        CHECK(b != NULL, "%s: p at the floor printed as 0.00100", cases[c].name);
        free(m.boxes);
    }
    slowscan_report_batch_free(batch);
}

static long file_size(const char *path)
{
    struct stat st;
    return stat(path, &st) == 0 ? (long)st.st_size : -1;
}

/* Long paths are reduced per pixel column: the SVG of 10^6 samples is about the size of the
 * one of 10^5 (drawn point by point it would be ten times larger). */
static void test_decimation(void)
{
    char dir[512], small[700], large[700];
    io_error err = {{0}};
    report_batch *batch = open_batch("geometry-svg", REPORT_SVG, dir, sizeof dir);
    if (!batch)
        return;
    draw_series_case(batch, 6, 100000, "n100000");
    draw_series_case(batch, 6, 1000000, "n1000000");
    CHECK(slowscan_report_batch_commit(batch, &err) == SLOWSCAN_OK, "commit: %s", err.message);
    slowscan_report_batch_free(batch);
    snprintf(small, sizeof small, "%s/series-n100000.svg", dir);
    snprintf(large, sizeof large, "%s/series-n1000000.svg", dir);
    long a = file_size(small), b = file_size(large);
    CHECK(a > 0 && b > 0 && (double)b < 1.5 * (double)a, "SVG of 10^6 samples %ld bytes, of 10^5 %ld", b, a);
}

/* ---- the overview with many flagged series --------------------------------------------- */

static void test_overview_labels(void)
{
    enum { FLAGGED = 150, PLAIN = 300, M = 999 };
    char dir[512], png[700], name[FLAGGED + PLAIN][16];
    report_overview_point points[FLAGGED + PLAIN];
    check_rng *rng = check_rng_alloc(17);
    for (size_t i = 0; i < FLAGGED + PLAIN; i++) {
        snprintf(name[i], sizeof name[i], "site%03zu", i);
        int flagged = i < FLAGGED;
        /* every flagged q at the floor: a tie broken by the statistic */
        double q = flagged ? 1.0 / (M + 1) : 0.06 + 0.9 * check_rng_uniform(rng);
        double stat = flagged ? 0.45 + 0.5 * check_rng_uniform(rng) : -0.5 + check_rng_uniform(rng);
        points[i] = (report_overview_point){name[i], 0, stat, q, flagged};
    }
    check_rng_free(rng);
    const char *labels[1] = {"variance"}, *stats[1] = {"Kendall tau"};
    report_overview_data data = {labels, stats, 1, points, FLAGGED + PLAIN, 0.05};
    io_error err = {{0}};
    report_batch *batch = open_batch("geometry-overview", REPORT_PNG, dir, sizeof dir);
    int ok = batch && slowscan_report_batch_draw(batch, &slowscan_report_overview_figure, &data, "", "overview", &err) == SLOWSCAN_OK;
    ok = ok && slowscan_report_batch_commit(batch, &err) == SLOWSCAN_OK;
    CHECK(ok, "overview drawn: %s", err.message);
    slowscan_report_batch_free(batch);
    snprintf(png, sizeof png, "%s/overview.png", dir);
    manifest m;
    check_figure(png, "overview of 150 flagged", &m);
    /* The 20 strongest (largest statistic, q tied) are all named. */
    size_t named = 0, strongest_named = 0;
    int order[FLAGGED];
    for (int i = 0; i < FLAGGED; i++)
        order[i] = i;
    for (int i = 1; i < FLAGGED; i++) /* insertion sort by statistic, largest first */
        for (int k = i; k > 0 && points[order[k]].statistic > points[order[k - 1]].statistic; k--) {
            int t = order[k];
            order[k] = order[k - 1];
            order[k - 1] = t;
        }
    for (size_t i = 0; m.boxes && i < m.count; i++)
        if (strcmp(m.boxes[i].kind, "text") == 0 && strncmp(m.boxes[i].text, "site", 4) == 0) {
            named++;
            for (int k = 0; k < 20; k++)
                strongest_named += strcmp(m.boxes[i].text, name[order[k]]) == 0;
        }
    CHECK(named >= 20 && strongest_named == 20, "named %zu, of the 20 strongest %zu", named,
          strongest_named);
    const box *b;
    char count[64];
    snprintf(count, sizeof count, "%zu of %d flagged not named", (size_t)FLAGGED - named, FLAGGED);
    find_text(&m, count, &b);
    CHECK(b != NULL, "the corner box says '%s'", count);
    free(m.boxes);
}

/* ---- robustness and recovery from invented data ------------------------------------------ */

/* A grid larger than the binary's demo: two methods (one without a bandwidth), four
 * indicators and recovery_trend, eleven windows, twelve bandwidths with long labels; and the
 * recovery figure with a crossing and without one. */
static void test_grid_and_recovery_geometry(void)
{
    enum { METHODS = 2, IND = 4, NW = 11, NB = 12, N = 300 };
    static double tau[METHODS * IND * NW * NB], p[METHODS * IND * NW * NB], t[METHODS * NB], tp[METHODS * NB];
    char wl[NW][16], bl[NB][24], dir[512], png[800];
    const char *windows[NW], *bands[NB], *names[IND] = {"variance", "lag1", "spectral_exponent", "dfa"};
    const char *methods[METHODS] = {"gaussian-linear", "poly:2"};
    const int has_bw[METHODS] = {1, 0};
    for (int w = 0; w < NW; w++)
        snprintf(wl[w], sizeof wl[w], "%d%%", 25 + 5 * w), windows[w] = wl[w];
    for (int b = 0; b < NB; b++)
        snprintf(bl[b], sizeof bl[b], "%d days", 100 + 50 * b), bands[b] = bl[b];
    for (size_t i = 0; i < sizeof tau / sizeof tau[0]; i++) {
        tau[i] = i % 7 == 0 ? NAN : 0.98 - 0.0015 * (double)i;
        p[i] = (double)(i % 20) / 20.0;
    }
    for (size_t i = 0; i < METHODS * NB; i++)
        t[i] = -1.0 + 0.4 * (double)i, tp[i] = 0.5;
    report_robustness_data rd = {"a grid", "day", NW, NB, windows, bands, IND, names, METHODS, methods,
                                 has_bw, tau, p, 1, t, tp, 0, 5, 2, 1};
    enum { NR = 120 };
    double time[NR], lambda[NR], lo[NR], hi[NR];
    for (int i = 0; i < NR; i++)
        time[i] = i, lambda[i] = -0.3 + 0.002 * i, lo[i] = lambda[i] - 0.03, hi[i] = lambda[i] + 0.03;
    report_crossing cross = {1, 150.0, 131.0, INFINITY, 0, 240.0, 0, NULL, NULL};
    report_crossing never = {0, NAN, NAN, NAN, 1, NAN, 0, NULL, NULL};
    report_recovery_data rec = {"a record", "day", NR, time, lambda, lo, hi, 2.5, 0.001, &cross};
    io_error err = {{0}};
    report_batch *batch = open_batch("geometry-grid", REPORT_PNG, dir, sizeof dir);
    int ok = batch && slowscan_report_batch_draw(batch, &slowscan_report_robustness_figure, &rd, "robustness",
                                                 "grid", &err) == SLOWSCAN_OK;
    ok = ok && slowscan_report_batch_draw(batch, &slowscan_report_recovery_figure, &rec, "recovery", "cross",
                                          &err) == SLOWSCAN_OK;
    rec.crossing = &never;
    ok = ok && slowscan_report_batch_draw(batch, &slowscan_report_recovery_figure, &rec, "recovery", "never",
                                          &err) == SLOWSCAN_OK;
    ok = ok && slowscan_report_batch_commit(batch, &err) == SLOWSCAN_OK;
    CHECK(ok, "grid and recovery figures drawn: %s", err.message);
    slowscan_report_batch_free(batch);
    static const char *const figures[] = {"robustness-grid", "recovery-cross", "recovery-never"};
    for (size_t k = 0; ok && k < 3; k++) {
        snprintf(png, sizeof png, "%s/%s.png", dir, figures[k]);
        manifest m;
        check_figure(png, figures[k], &m);
        free(m.boxes);
    }
}

/* ---- maps of a grid from invented data ---------------------------------------------------- */

/* Clearly coloured pixels inside the panel named `name` of a drawn PNG (png_chroma.py). */
static double panel_chroma(const char *png, const manifest *m, const char *name)
{
    for (size_t i = 0; i < m->count; i++) {
        const box *b = &m->boxes[i];
        if (strcmp(b->kind, "panel") != 0 || strcmp(b->text, name) != 0)
            continue;
        char args[1400];
        double said[3];
        snprintf(args, sizeof args, "png_chroma.py %s %d %d %d %d", png, (int)b->x0 + 2,
                 (int)b->y0 + 2, (int)b->x1 - 2, (int)b->y1 - 2);
        return check_python(args, said, 3) == 3 ? said[2] : -1;
    }
    return -1;
}

/* Four tests (three tau, recovery_trend with |t| up to 4.2) on 18 longitudes x 9 latitudes
 * running north to south, some cells without a value and some flagged; the geometry rules,
 * and the flagged cells' near-black frames: the same map without flags has more coloured
 * pixels in its panel. */
static void test_map_geometry(void)
{
    enum { NX = 18, NY = 9, TESTS = 4 };
    static double stat[TESTS][NX * NY];
    static unsigned char flagged[TESTS][NX * NY];
    double lon[NX], lat[NY];
    for (int i = 0; i < NX; i++)
        lon[i] = -170.0 + 20.0 * i;
    for (int j = 0; j < NY; j++)
        lat[j] = 80.0 - 20.0 * j;
    static const char *const labels[TESTS] = {"variance", "lag1", "spectral_exponent",
                                              "recovery_trend"};
    report_map_test tests[TESTS];
    for (int k = 0; k < TESTS; k++) {
        for (int i = 0; i < NX * NY; i++) {
            double v = sin(0.3 * i + k) * (k == 3 ? 4.2 : 0.95);
            stat[k][i] = i % 11 == 3 ? NAN : v;
            flagged[k][i] = fabs(v) > (k == 3 ? 3.5 : 0.8) && i % 11 != 3;
        }
        tests[k] = (report_map_test){.label = labels[k], .rolling = k < 3,
                                     .statistic = stat[k], .flagged = flagged[k]};
    }
    report_map_data d = {.name = "a field", .x_name = "longitude", .y_name = "latitude",
                         .nx = NX, .ny = NY, .x = lon, .y = lat, .tests = tests, .ntests = TESTS};
    char dir[512], png[800];
    io_error err = {{0}};
    report_batch *batch = open_batch("geometry-map", REPORT_PNG, dir, sizeof dir);
    int ok = batch && slowscan_report_batch_draw(batch, &slowscan_report_map_figure, &d, "map",
                                                 "field", &err) == SLOWSCAN_OK;
    tests[0].flagged = NULL;
    ok = ok && slowscan_report_batch_draw(batch, &slowscan_report_map_figure, &d, "map",
                                          "unflagged", &err) == SLOWSCAN_OK;
    ok = ok && slowscan_report_batch_commit(batch, &err) == SLOWSCAN_OK;
    CHECK(ok, "map figure drawn: %s", err.message);
    slowscan_report_batch_free(batch);
    if (!ok)
        return;
    char plain[800];
    snprintf(png, sizeof png, "%s/map-field.png", dir);
    snprintf(plain, sizeof plain, "%s/map-unflagged.png", dir);
    manifest m, n;
    check_figure(png, "map of a field", &m);
    check_figure(plain, "map without flags", &n);
    double framed = panel_chroma(png, &m, "variance"), bare = panel_chroma(plain, &n, "variance");
    CHECK(framed > 0 && bare > framed, "flagged cells are framed: %g coloured pixels in the "
          "panel with frames, %g without", framed, bare);
    free(m.boxes), free(n.boxes);
}

/* ---- the figures of the binary ---------------------------------------------------------- */

static void test_binary_figures(void)
{
    char dir[512], cmd[2048], png[800];
    snprintf(dir, sizeof dir, "%s", check_tmp_path("geometry-cli"));
    snprintf(cmd, sizeof cmd,
             "SLOWSCAN_FIGURE_BOXES=1 %s screen --deseason 364 --surrogates 19 --indicators "
             "variance,lag1,ar1,redness,skewness,recovery_trend --figures %s -o /dev/null data/stations.csv "
             "&& SLOWSCAN_FIGURE_BOXES=1 %s robustness --deseason 364 --vars mill_pond --surrogates 19 "
             "--indicators variance,lag1,recovery_trend --figures %s -o /dev/null data/stations.csv "
             "&& SLOWSCAN_FIGURE_BOXES=1 %s recovery --deseason 364 --vars mill_pond --figures %s "
             "-o /dev/null data/stations.csv",
             check_binary(), dir, check_binary(), dir, check_binary(), dir);
    char *err = NULL;
    CHECK(check_run(cmd, NULL, &err) == 0, "the binary draws its figures: %s", err ? err : "");
    free(err);
    static const char *const figures[] = {"screen-mill_pond", "screen-overview", "robustness-mill_pond",
                                          "recovery-mill_pond"};
    for (size_t k = 0; k < 4; k++) {
        snprintf(png, sizeof png, "%s/%s.png", dir, figures[k]);
        manifest m;
        check_figure(png, figures[k], &m);
        free(m.boxes);
    }
}

/* screen --maps --figures on the python3-netcdf4 test grid: a map figure per variable. */
static void test_binary_map(void)
{
    char dir[512], grid[512], cmd[2400], png[800];
    snprintf(dir, sizeof dir, "%s", check_tmp_path("geometry-map-cli"));
    snprintf(grid, sizeof grid, "%s", check_tmp_path("map-grid.nc"));
    static double ref[2 * 12 * 30];
    snprintf(cmd, sizeof cmd, "netcdf_grid.py %s NETCDF4 map_chunks", grid);
    if (check_python(cmd, ref, 2 * 12 * 30) != 2 * 12 * 30) {
        CHECK(0, "python3-netcdf4 wrote the grid");
        return;
    }
    snprintf(cmd, sizeof cmd, "SLOWSCAN_FIGURE_BOXES=1 %s screen --surrogates 19 --window 12 "
             "--bandwidth 6 --maps %s/maps.nc --figures %s -o /dev/null %s", check_binary(), dir,
             dir, grid);
    char *err = NULL;
    CHECK(check_run(cmd, NULL, &err) == 0, "screen --maps --figures: %s", err ? err : "");
    free(err);
    static const char *const figures[] = {"map-tas", "map-pr"};
    for (size_t k = 0; k < 2; k++) {
        snprintf(png, sizeof png, "%s/%s.png", dir, figures[k]);
        manifest m;
        check_figure(png, figures[k], &m);
        free(m.boxes);
    }
}

/* ---- the feedback figure from invented data --------------------------------------------- */

/* A forced run's feedback figure: every text box on the page, none overlapping, ink in each,
 * and coloured data in both panels (png_chroma.py). */
static void test_feedback_geometry(void)
{
    enum { NF = 150, NWIN = 12 };
    double T[NF], Nf[NF], mid[NWIN], lam[NWIN], lo[NWIN], hi[NWIN], F[NWIN], t0[NWIN], t1[NWIN];
    unsigned flags[NWIN];
    for (int i = 0; i < NF; i++) {
        T[i] = 6 * (1 - exp(-(i + 1) / 30.0)) + 0.1 * sin(i);
        Nf[i] = 7.4 - 1.2 * T[i] + 0.3 * cos(1.7 * i);
    }
    for (int j = 0; j < NWIN; j++) {
        mid[j] = 1890 + 6 * j, lam[j] = -1.3 + 0.08 * j, lo[j] = lam[j] - 0.4, hi[j] = lam[j] + 0.4;
        F[j] = 7.4, t0[j] = 0.5 * j, t1[j] = 0.5 * j + 1.5;
        flags[j] = j > 9 ? 1u : 0u;
    }
    report_feedback_data d = {"an abrupt run", "net flux", "temperature", "year", NF, Nf, T, NWIN,
                              mid, lam, lo, hi, F, t0, t1, flags, "drifting (p = 0.012)"};
    char dir[512], png[800];
    io_error err = {{0}};
    report_batch *batch = open_batch("geometry-feedback", REPORT_PNG, dir, sizeof dir);
    int ok = batch && slowscan_report_batch_draw(batch, &slowscan_report_feedback_figure, &d,
                                                 "feedback", "run", &err) == SLOWSCAN_OK;
    ok = ok && slowscan_report_batch_commit(batch, &err) == SLOWSCAN_OK;
    CHECK(ok, "feedback figure drawn: %s", err.message);
    slowscan_report_batch_free(batch);
    if (!ok)
        return;
    snprintf(png, sizeof png, "%s/feedback-run.png", dir);
    manifest m;
    check_figure(png, "feedback-run", &m);
    CHECK(panel_chroma(png, &m, "scatter") > 50 && panel_chroma(png, &m, "lambda") > 50,
          "feedback figure: coloured data in both panels");
    free(m.boxes);
}

/* ---- timescales and emulate from invented data ---------------------------------------- */

/* The modes figure with three modes and both flags in its title, the emulation with a
 * departure and without a compared run. */
static void test_modes_geometry(void)
{
    enum { NM = 150 };
    static double time[NM], data[NM], fit[NM], resid[NM], m[3][NM], lo[NM], hi[NM], act[NM];
    const double taus[3] = {2.0, 15.0, 90.0}, amp[3] = {1.0, 2.0, 3.0};
    for (int i = 0; i < NM; i++) {
        time[i] = 1850 + i;
        fit[i] = 0;
        for (int k = 0; k < 3; k++)
            fit[i] += m[k][i] = amp[k] * (1 - exp(-(i + 1) / taus[k]));
        resid[i] = 0.1 * sin(0.7 * i);
        data[i] = fit[i] + resid[i];
        lo[i] = fit[i] - 0.3, hi[i] = fit[i] + 0.3;
        act[i] = fit[i] + (i > 100 ? 1.0 : 0.0) + resid[i];
    }
    const double *modes[3] = {m[0], m[1], m[2]};
    report_timescales_data td = {.name = "a response with a long name", .time_name = "year",
                                 .n = NM, .time = time, .data = data, .fit = fit,
                                 .residual = resid, .nmodes = 3, .modes = modes, .taus = taus,
                                 .equilibrium = 6.0, .flags = "unresolved;multiscale"};
    report_emulate_data ed = {.name = "tas", .time_name = "year", .n = NM, .time = time,
                              .emulated = fit, .lower = lo, .upper = hi, .actual = act,
                              .departed = 1, .departure_time = 1951, .confirmed_time = 1955,
                              .size = 1.0, .band_level = 0.99};
    char dir[512], png[800];
    io_error err = {{0}};
    report_batch *batch = open_batch("geometry-modes", REPORT_PNG, dir, sizeof dir);
    int ok = batch && slowscan_report_batch_draw(batch, &slowscan_report_timescales_figure, &td,
                                                 "timescales", "three", &err) == SLOWSCAN_OK;
    ok = ok && slowscan_report_batch_draw(batch, &slowscan_report_emulate_figure, &ed, "emulate",
                                          "departed", &err) == SLOWSCAN_OK;
    ed.actual = NULL, ed.departed = 0;
    ok = ok && slowscan_report_batch_draw(batch, &slowscan_report_emulate_figure, &ed, "emulate",
                                          "alone", &err) == SLOWSCAN_OK;
    ok = ok && slowscan_report_batch_commit(batch, &err) == SLOWSCAN_OK;
    CHECK(ok, "timescales and emulate figures drawn: %s", err.message);
    slowscan_report_batch_free(batch);
    static const char *const figures[] = {"timescales-three", "emulate-departed", "emulate-alone"};
    for (size_t k = 0; ok && k < 3; k++) {
        snprintf(png, sizeof png, "%s/%s.png", dir, figures[k]);
        manifest mf;
        check_figure(png, figures[k], &mf);
        free(mf.boxes);
    }
}

void suite_figure_layout(void)
{
    test_feedback_geometry();
    test_series_geometry();
    test_decimation();
    test_overview_labels();
    test_grid_and_recovery_geometry();
    test_binary_figures();
    test_map_geometry();
    test_binary_map();
    test_modes_geometry();
}
