/* Figures (report/ and --figures): every figure type is made for the demo data, the files are
 * valid PNG/SVG/PDF of the size the layout promises, each panel holds drawn data (coloured
 * pixels counted in the decoded PNG), 1 and 200 series work, and a figure directory that
 * cannot be used is refused before any computation. */
#include "check.h"
#include "figure_manifest.h"
#include "slowscan/report.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

static char *run_err;

static int slowscan(const char *args)
{
    free(run_err);
    char cmd[4096];
    snprintf(cmd, sizeof cmd, "%s %s", check_binary(), args);
    return check_run(cmd, NULL, &run_err);
}

static size_t count_lines(const char *s)
{
    size_t n = 0;
    for (; s && *s; s++)
        n += *s == '\n';
    return n;
}

static void path_in(char *out, size_t size, const char *dir, const char *file)
{
    snprintf(out, size, "%s/%s", dir, file);
}

/* Files in dir (a shell count; names with ".tmp." are leftover temporary files). */
static int files_in(const char *dir, const char *pattern)
{
    char cmd[1200], *out = NULL;
    snprintf(cmd, sizeof cmd, "ls -A '%s' 2>/dev/null | grep -c -- '%s'", dir, pattern);
    check_run(cmd, &out, NULL);
    int n = out ? atoi(out) : -1;
    free(out);
    return n;
}

/* PNG signature and IHDR size (PNG spec, W3C 2003, sections 5.2 and 11.2.2). */
static int png_size(const char *path, unsigned *width, unsigned *height)
{
    FILE *f = fopen(path, "rb");
    unsigned char h[24];
    int ok = f && fread(h, 1, 24, f) == 24 && memcmp(h, "\x89PNG\r\n\x1a\n", 8) == 0 &&
             memcmp(h + 12, "IHDR", 4) == 0;
    if (f)
        fclose(f);
    if (ok) {
        *width = (unsigned)h[16] << 24 | (unsigned)h[17] << 16 | (unsigned)h[18] << 8 | h[19];
        *height = (unsigned)h[20] << 24 | (unsigned)h[21] << 16 | (unsigned)h[22] << 8 | h[23];
    }
    return ok;
}

static void expect_valid_png(const char *path, const report_layout *layout)
{
    unsigned w = 0, h = 0;
    CHECK(png_size(path, &w, &h), "%s is a PNG", path);
    CHECK(w == REPORT_PAGE_WIDTH && h == (unsigned)slowscan_report_page_height(layout),
          "%s: %ux%u, want %dx%d", path, w, h, REPORT_PAGE_WIDTH, slowscan_report_page_height(layout));
}

/* Every panel of the figure's manifest (there must be `panels`) holds drawn data: at least
 * `least` clearly coloured pixels inside its frame (tests/reference/png_chroma.py, standard
 * library zlib); the heading strip above the panels holds only neutral text and must count
 * ~0, so the count can tell a drawn panel from an empty one. */
static void expect_panels_drawn(const char *png, size_t panels, double least)
{
    char path[800], args[4096];
    snprintf(path, sizeof path, "%s.boxes", png);
    manifest m;
    if (read_manifest(path, &m) != 0) {
        CHECK(0, "%s: no box manifest", png);
        free(m.boxes);
        return;
    }
    int len = snprintf(args, sizeof args, "png_chroma.py %s", png);
    size_t found = 0;
    for (size_t i = 0; i < m.count && len < (int)sizeof args - 64; i++)
        if (strcmp(m.boxes[i].kind, "panel") == 0) {
            const box *b = &m.boxes[i];
            len += snprintf(args + len, sizeof args - (size_t)len, " %d %d %d %d", (int)b->x0 + 2,
                            (int)b->y0 + 2, (int)b->x1 - 2, (int)b->y1 - 2);
            found++;
        }
    snprintf(args + len, sizeof args - (size_t)len, " 0 0 %d %d", REPORT_PAGE_WIDTH, REPORT_PAGE_TOP - 8);
    CHECK(found == panels, "%s: %zu panels, want %zu", png, found, panels);
    double values[64];
    int got = check_python(args, values, 64);
    CHECK(got == (int)found + 3 && values[0] == m.width && values[1] == m.height,
          "%s: decoded (%d values)", png, got);
    for (size_t k = 0; got == (int)found + 3 && k < found; k++)
        CHECK(values[2 + k] >= least, "%s: panel %zu has %g coloured pixels, want >= %g", png, k,
              values[2 + k], least);
    if (got == (int)found + 3)
        CHECK(values[2 + found] < 5, "%s: the heading strip has %g coloured pixels", png,
              values[2 + found]);
    free(m.boxes);
}

/* The layout of screen's per-series figure with `paths` indicator paths of `tests` tests
 * (the others model tests). */
static report_layout series_layout(size_t paths, size_t tests)
{
    static const double dummy[1] = {0};
    report_series_test list[8] = {{0}};
    for (size_t j = 0; j < tests; j++) {
        list[j].path = j < paths ? dummy : NULL;
        list[j].statistic_name = j < paths ? "tau" : "t(a1)";
    }
    report_series_data data = {0};
    data.tests = list;
    data.ntests = tests;
    report_layout layout = {0};
    slowscan_report_series_figure.layout(&data, &layout);
    return layout;
}

static const char demo_args[] = "--deseason 364 --surrogates 19";

static void test_screen_figures(void)
{
    char dir[512], args[2048], png[700];
    snprintf(dir, sizeof dir, "%s", check_tmp_path("fig-screen"));
    const char *plain = check_tmp_path("fig-plain.csv"), *with = check_tmp_path("fig-with.csv");
    snprintf(args, sizeof args, "screen %s -o %s data/stations.csv", demo_args, plain);
    {
        int rc_ = slowscan(args);
        CHECK(rc_ == 0, "screen without figures: %s", run_err);
    }
    snprintf(args, sizeof args, "screen %s --figures %s -o %s data/stations.csv", demo_args, dir, with);
    {
        setenv("SLOWSCAN_FIGURE_BOXES", "1", 1); /* panels found through the manifest */
        int rc_ = slowscan(args);
        unsetenv("SLOWSCAN_FIGURE_BOXES");
        CHECK(rc_ == 0, "screen --figures: %s", run_err);
    }
    CHECK(run_err && run_err[0] == '\0', "screen --figures is silent: %s", run_err);
    char *a = check_read_file(plain), *b = check_read_file(with);
    CHECK(a && b && strcmp(a, b) == 0, "the summary is the same with and without --figures");
    free(a);
    free(b);
    /* The demo has eight stations: eight series figures and the overview, each with its
     * manifest, nothing else. */
    CHECK(files_in(dir, "^screen-.*\\.png$") == 9 && files_in(dir, "^screen-.*\\.png\\.boxes$") == 9 &&
              files_in(dir, ".") == 18, "nine figures and their manifests in %s", dir);
    CHECK(files_in(dir, "\\.tmp\\.") == 0, "no temporary files left");
    /* variance and lag1 have paths, recovery_trend only a null: the record, the indicators,
     * the tau tests and the model test. */
    report_layout layout = series_layout(2, 3);
    CHECK(layout.rows == 4, "series layout rows %zu", layout.rows);
    path_in(png, sizeof png, dir, "screen-mill_pond.png");
    expect_valid_png(png, &layout);
    expect_panels_drawn(png, 4, 300);

    report_layout over = {0};
    const char *labels[3] = {"variance", "lag1", "recovery_trend"};
    report_overview_data od = {labels, labels, 3, NULL, 0, 0.05};
    slowscan_report_overview_figure.layout(&od, &over);
    path_in(png, sizeof png, dir, "screen-overview.png");
    expect_valid_png(png, &over);
    expect_panels_drawn(png, 3, 40); /* eight points per panel */
}

static void test_vector_formats_and_one_series(void)
{
    char dir[512], args[2048], file[700];
    static const char *formats[] = {"svg", "pdf"};
    for (int k = 0; k < 2; k++) {
        snprintf(dir, sizeof dir, "%s-%s", check_tmp_path("fig-vector"), formats[k]);
        snprintf(args, sizeof args, "screen %s --vars mill_pond --figures %s --figure-format %s "
                 "-o /dev/null data/stations.csv", demo_args, dir, formats[k]);
        {
            int rc_ = slowscan(args);
            CHECK(rc_ == 0, "screen --figure-format %s: %s", formats[k], run_err);
        }
        /* One series: its figure, no overview. */
        CHECK(files_in(dir, ".") == 1, "one figure for one series (%s)", formats[k]);
        snprintf(file, sizeof file, "%s/screen-mill_pond.%s", dir, formats[k]);
        char head[8] = "", tail[33] = "";
        FILE *f = fopen(file, "rb");
        size_t got = f ? fread(head, 1, 7, f) : 0;
        if (f && fseek(f, -32, SEEK_END) == 0)
            got += fread(tail, 1, 32, f);
        if (f)
            fclose(f);
        for (int i = 0; i < 32; i++) /* the tail may hold NULs; make it one string */
            tail[i] = tail[i] ? tail[i] : ' ';
        char *text = k == 0 ? check_read_file(file) : NULL;
        if (k == 0) /* SVG 1.1 (W3C 2011): an XML document whose root is <svg> */
            CHECK(text && strncmp(text, "<?xml", 5) == 0 && strstr(text, "<svg"), "%s is SVG", file);
        else /* PDF 1.7 (ISO 32000-1:2008, 7.5.2 and 7.5.5): %PDF- header, %%EOF trailer */
            CHECK(got == 39 && strncmp(head, "%PDF-", 5) == 0 && strstr(tail, "%%EOF"),
                  "%s is PDF", file);
        free(text);
    }
}

static void test_robustness_and_recovery_figures(void)
{
    char dir[512], args[2048], png[700];
    setenv("SLOWSCAN_FIGURE_BOXES", "1", 1); /* panels found through the manifest */
    snprintf(dir, sizeof dir, "%s", check_tmp_path("fig-rob"));
    snprintf(args, sizeof args, "robustness %s --vars mill_pond --windows 30%%:70%%:20%% "
             "--bandwidths 5%%:15%%:5%% --figures %s -o /dev/null data/stations.csv", demo_args, dir);
    {
        int rc_ = slowscan(args);
        CHECK(rc_ == 0, "robustness --figures: %s", run_err);
    }
    report_layout layout = {0};
    const char *names[2] = {"variance", "lag1"};
    report_robustness_data rd = {0};
    rd.nindicators = 2;
    rd.indicator_labels = names;
    slowscan_report_robustness_figure.layout(&rd, &layout);
    path_in(png, sizeof png, dir, "robustness-mill_pond.png");
    expect_valid_png(png, &layout);
    expect_panels_drawn(png, 2, 300); /* three bandwidth lines over three windows each */

    /* Several detrending methods and recovery_trend: a panel per method x test, the method
     * without a bandwidth one line, recovery_trend a line over bandwidth. */
    snprintf(dir, sizeof dir, "%s", check_tmp_path("fig-rob-methods"));
    snprintf(args, sizeof args, "robustness %s --vars mill_pond --windows 30%%,60%% "
             "--bandwidths 5%%,15%% --detrends gaussian,linear --indicators variance,recovery_trend "
             "--figures %s -o /dev/null data/stations.csv", demo_args, dir);
    {
        int rc_ = slowscan(args);
        CHECK(rc_ == 0, "robustness --detrends --figures: %s", run_err);
    }
    const char *one_name[1] = {"variance"}, *methods[2] = {"gaussian", "linear"};
    const int has_bandwidth[2] = {1, 0};
    report_robustness_data md = {0};
    md.nindicators = 1;
    md.indicator_labels = one_name;
    md.ndetrends = 2;
    md.detrend_labels = methods;
    md.detrend_has_bandwidth = has_bandwidth;
    md.drift = 1;
    slowscan_report_robustness_figure.layout(&md, &layout);
    CHECK(layout.rows == 2 && layout.cols[0] == 2, "a row per method: %zu rows", layout.rows);
    path_in(png, sizeof png, dir, "robustness-mill_pond.png");
    expect_valid_png(png, &layout);
    expect_panels_drawn(png, 4, 40); /* a line in every panel (one segment at least) */

    snprintf(args, sizeof args, "recovery %s --vars mill_pond --figures %s -o /dev/null "
             "data/stations.csv", demo_args, dir);
    {
        int rc_ = slowscan(args);
        CHECK(rc_ == 0, "recovery --figures: %s", run_err);
    }
    report_recovery_data rec = {0};
    slowscan_report_recovery_figure.layout(&rec, &layout);
    path_in(png, sizeof png, dir, "recovery-mill_pond.png");
    expect_valid_png(png, &layout);
    expect_panels_drawn(png, 1, 500);
    unsetenv("SLOWSCAN_FIGURE_BOXES");
}

/* Noise whose amplitude grows in every fourth series (invented, for scale only). */
static double scale_sample(check_rng *rng, size_t k, size_t i, size_t n, double *state)
{
    (void)n, (void)state;
    return check_rng_gaussian(rng) * (1 + (k % 4 == 0) * (double)i / 40.0);
}

/* 200 series of 120 samples: every figure is made. */
static void test_many_series(void)
{
    char dir[512], args[2048];
    const char *csv = check_tmp_path("fig-200.csv");
    check_write_series_csv(csv, 200, 120, scale_sample, 11);
    snprintf(dir, sizeof dir, "%s", check_tmp_path("fig-200"));
    snprintf(args, sizeof args, "screen --surrogates 19 --indicators variance --figures %s "
             "--figure-format svg -o /dev/null %s", dir, csv);
    {
        int rc_ = slowscan(args);
        CHECK(rc_ == 0, "200 series with figures: %s", run_err);
    }
    CHECK(files_in(dir, "^screen-s[0-9]*\\.svg$") == 200 && files_in(dir, "^screen-overview\\.svg$") == 1,
          "200 series figures and the overview");
}

/* exit 1, one line naming --figures and the path, no output, before any series is done. */
static void expect_refused(const char *what, const char *figures, const char *needle)
{
    char args[2048];
    const char *out = check_tmp_path("fig-refused.csv");
    remove(out);
    /* --progress would print a line after the first series: none may appear. */
    snprintf(args, sizeof args, "screen --surrogates 99999 --progress --figures %s -o %s "
             "data/stations.csv", figures, out);
    int rc = slowscan(args);
    CHECK(rc == 1, "%s: exit %d, want 1", what, rc);
    CHECK(count_lines(run_err) == 1 && strstr(run_err, "--figures") && strstr(run_err, needle),
          "%s: want one line naming --figures and %s, got: %s", what, needle, run_err);
    CHECK(!check_file_exists(out), "%s: no output file", what);
}

static void test_unusable_figure_directory(void)
{
    char path[600], sub[1300];
    snprintf(path, sizeof path, "%s", check_tmp_path("fig-a-file"));
    check_write_file(path, "not a directory\n");
    expect_refused("existing file", path, path);
    snprintf(sub, sizeof sub, "%s/missing-parent/figs", check_tmp_path("fig-nowhere"));
    expect_refused("missing parent", sub, sub);
    /* A directory nothing can be written into: mode 0555 for a normal user; root ignores
     * modes, so there a read-only file system (/proc) serves. */
    snprintf(path, sizeof path, "%s", check_tmp_path("fig-readonly"));
    snprintf(sub, sizeof sub, "mkdir -p %s && chmod 555 %s", path, path);
    check_run(sub, NULL, NULL);
    expect_refused("unwritable directory", geteuid() == 0 ? "/proc/self" : path,
                   geteuid() == 0 ? "/proc/self" : path);
    {
        int rc_ = slowscan("screen --figure-format svg data/stations.csv");
        CHECK(rc_ == 1 &&
              strstr(run_err, "--figure-format needs --figures"), "--figure-format alone refused");
    }
    {
        int rc_ = slowscan("screen --figures x --figure-format gif data/stations.csv");
        CHECK(rc_ == 1 &&
              strstr(run_err, "--figure-format") && strstr(run_err, "gif"), "unknown format refused");
    }
}

/* A run that fails after one figure was drawn leaves no figure and no directory it made:
 * the second input is too short for the block length (an error at its turn). */
static void test_failed_run_leaves_no_figure(void)
{
    char dir[512], args[2048];
    const char *good = check_tmp_path("fig-good.csv"), *bad = check_tmp_path("fig-short.csv");
    FILE *f = fopen(good, "w"), *g = fopen(bad, "w");
    fputs("t,x\n", f);
    fputs("t,x\n", g);
    check_rng *rng = check_rng_alloc(5);
    for (int i = 0; i < 200; i++)
        fprintf(f, "%d,%.6f\n", i, check_rng_gaussian(rng));
    for (int i = 0; i < 40; i++)
        fprintf(g, "%d,%.6f\n", i, check_rng_gaussian(rng));
    fclose(f);
    fclose(g);
    check_rng_free(rng);
    snprintf(dir, sizeof dir, "%s", check_tmp_path("fig-failed"));
    snprintf(args, sizeof args, "robustness --windows 40%% --bandwidths 10%% --surrogates 19 "
             "--null block --block-length 30 --figures %s -o /dev/null %s %s", dir, good, bad);
    {
        int rc_ = slowscan(args);
        CHECK(rc_ == 1 && strstr(run_err, "--block-length"), "the short input fails: %s", run_err);
    }
    CHECK(!check_file_exists(dir), "no figure directory left after the failed run");
    /* A figure's name taken by a directory: refused while drawing, before anything is in
     * place — neither the summary nor the other figures are left (found in review). */
    char taken[600], out[600];
    snprintf(dir, sizeof dir, "%s", check_tmp_path("fig-taken"));
    snprintf(taken, sizeof taken, "%s/screen-x.png", dir);
    snprintf(out, sizeof out, "%s", check_tmp_path("fig-taken-summary.csv"));
    mkdir(dir, 0755);
    mkdir(taken, 0755);
    char copy[600];
    snprintf(copy, sizeof copy, "%s", check_tmp_path("fig-good-copy.csv"));
    char *text = check_read_file(good);
    check_write_file(copy, text ? text : "");
    free(text);
    snprintf(args, sizeof args, "screen --surrogates 19 --figures %s -o %s %s %s", dir, out, good,
             copy);
    CHECK(slowscan(args) == 1 && strstr(run_err, "not a regular file"), "figure name taken: %s",
          run_err ? run_err : "");
    CHECK(!check_file_exists(out) && files_in(dir, ".png") == 1, "nothing left: summary %d, pngs %d",
          check_file_exists(out), files_in(dir, ".png"));
}

/* The module itself: safe names, unique names, and the recovery figure's extrapolation. */
static void test_module(void)
{
    char safe[64];
    slowscan_report_safe_name("north bay/2 #1", safe, sizeof safe);
    CHECK(strcmp(safe, "north_bay_2__1") == 0, "safe name: %s", safe);
    slowscan_report_safe_name(".hidden", safe, sizeof safe);
    CHECK(strcmp(safe, "_hidden") == 0, "no leading dot: %s", safe);
    slowscan_report_safe_name("", safe, sizeof safe);
    CHECK(strcmp(safe, "series") == 0, "empty name: %s", safe);
    report_format fmt;
    CHECK(slowscan_report_format_parse("pdf", &fmt) == SLOWSCAN_OK && fmt == REPORT_PDF &&
              slowscan_report_format_parse("gif", &fmt) == SLOWSCAN_EINVAL, "format names");

    char dir[512];
    snprintf(dir, sizeof dir, "%s", check_tmp_path("fig-module"));
    report_batch *batch = NULL;
    io_error err = {{0}};
    CHECK(slowscan_report_batch_open(&batch, dir, REPORT_PNG, &err) == SLOWSCAN_OK, "batch: %s", err.message);
    if (batch)
        slowscan_report_batch_record_boxes(batch, 1);
    enum { N = 100 };
    double t[N], lambda[N], lo[N], hi[N];
    for (int i = 0; i < N; i++) { /* a recovery rate rising linearly toward zero */
        t[i] = i;
        lambda[i] = -0.2 + 0.0015 * i;
        lo[i] = lambda[i] - 0.02;
        hi[i] = lambda[i] + 0.02;
    }
    report_crossing cross = {1, 133.0, 120.0, 150.0, 0, NAN, 0, NULL, NULL};
    report_recovery_data data = {"a b", "t", N, t, lambda, lo, hi, 4.0, 0.01, &cross};
    int ok = batch && slowscan_report_batch_draw(batch, &slowscan_report_recovery_figure, &data, "recovery", "a b", &err) == SLOWSCAN_OK;
    report_crossing none = {0, NAN, NAN, NAN, 1, NAN, 0, NULL, NULL};
    data.crossing = &none;
    ok = ok && slowscan_report_batch_draw(batch, &slowscan_report_recovery_figure, &data, "recovery", "a_b", &err) == SLOWSCAN_OK;
    CHECK(ok && slowscan_report_batch_count(batch) == 2, "two recovery figures drawn: %s", err.message);
    CHECK(ok && strstr(slowscan_report_batch_path(batch, 1), "recovery-a_b-2.png"),
          "names that meet are made unique: %s", ok ? slowscan_report_batch_path(batch, 1) : "");
    CHECK(ok && files_in(dir, "^recovery-.*\\.png$") == 0 && files_in(dir, "\\.boxes$") == 0,
          "nothing in place before the commit");
    CHECK(batch && slowscan_report_batch_commit(batch, &err) == SLOWSCAN_OK, "commit: %s", err.message);
    char png[700];
    path_in(png, sizeof png, dir, "recovery-a_b.png");
    report_layout layout = {0};
    slowscan_report_recovery_figure.layout(&data, &layout);
    expect_valid_png(png, &layout);
    /* The extrapolation (beyond t = 99 up to 150) is drawn in the vermilion mark colour: the
     * right third of the panel has coloured pixels though no data lies there. */
    char args[1200], boxes[800];
    double values[4];
    snprintf(boxes, sizeof boxes, "%s.boxes", png);
    manifest m;
    const box *panel = NULL;
    if (read_manifest(boxes, &m) == 0)
        for (size_t i = 0; i < m.count && !panel; i++)
            panel = strcmp(m.boxes[i].kind, "panel") == 0 ? &m.boxes[i] : NULL;
    CHECK(panel != NULL, "the recovery figure's panel is in its manifest");
    box area = panel ? *panel : (box){"", 0, 0, 1, 1, ""};
    free(m.boxes);
    double x_data_end = area.x0 + (area.x1 - area.x0) * 99.0 / 150.0;
    snprintf(args, sizeof args, "png_chroma.py %s %d %d %d %d", png, (int)x_data_end + 4,
             (int)area.y0 + 2, (int)area.x1 - 2, (int)area.y1 - 2);
    CHECK(check_python(args, values, 4) == 3 && values[2] > 100,
          "extrapolation region drawn (%g coloured pixels)", values[2]);
    slowscan_report_batch_free(batch);
}

void suite_report(void)
{
    test_module();
    test_screen_figures();
    test_vector_formats_and_one_series();
    test_robustness_and_recovery_figures();
    test_many_series();
    test_unusable_figure_directory();
    test_failed_run_leaves_no_figure();
    free(run_err);
    run_err = NULL;
}
