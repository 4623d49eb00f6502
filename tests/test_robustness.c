/* robustness over detrending methods (--detrends) and with recovery_trend, through the
 * binary: the CSV's shape, agreement with a single-method run and with screen, the fractions
 * (hand-checked and recounted from the grid), and refusals of bad lists. */
#include "check.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static const char grid_header[] = "series,indicator,detrend,window,bandwidth,tau,statistic,p_value\n";

/* AR(1), phi = 0.6, on a slow quadratic trend, so the detrending method matters. */
static double trended_ar1(check_rng *rng, size_t k, size_t i, size_t n, double *state)
{
    double u = (double)i / (double)(n - 1);
    *state = i == 0 ? check_rng_gaussian(rng) / 0.8 : 0.6 * *state + check_rng_gaussian(rng);
    return *state + 4.0 * u * u + (double)k;
}

/* Alternating sign, amplitude rising (series 0) or falling (series 1) linearly: in any window
 * of an even number of samples the pairs sum to the same constant, so the rolling variance
 * rises (falls) strictly and Kendall's tau is exactly +1 (-1) (hand calculation). */
static double alternating(check_rng *rng, size_t k, size_t i, size_t n, double *state)
{
    (void)rng, (void)state;
    double amplitude = 1.0 + (double)(k == 0 ? i : n - 1 - i) / 10.0;
    return (i % 2 ? -1.0 : 1.0) * amplitude;
}

static char *run_ok(const char *args, const char *input)
{
    char cmd[2048];
    snprintf(cmd, sizeof cmd, "%s %s %s", check_binary(), args, input);
    char *out = NULL;
    int rc = check_run(cmd, &out, NULL);
    CHECK(rc == 0 && out, "%s: exit %d", args, rc);
    return out;
}

static size_t count_lines(const char *s, const char *must_hold)
{
    size_t n = 0;
    for (const char *line = s; line && *line;) {
        const char *end = strchr(line, '\n');
        size_t len = end ? (size_t)(end - line) : strlen(line);
        char buf[512];
        snprintf(buf, sizeof buf, "%.*s", (int)len, line);
        n += !must_hold || strstr(buf, must_hold) != NULL;
        line = end ? end + 1 : NULL;
    }
    return n;
}

/* The lines of `text` holding `key`, joined (for byte-for-byte comparison). */
static char *lines_with(const char *text, const char *key)
{
    size_t cap = strlen(text) + 1, used = 0;
    char *out = calloc(cap, 1);
    for (const char *line = text; out && line && *line;) {
        const char *end = strchr(line, '\n');
        size_t len = end ? (size_t)(end - line + 1) : strlen(line);
        char buf[512];
        snprintf(buf, sizeof buf, "%.*s", (int)len, line);
        if (strstr(buf, key)) {
            memcpy(out + used, line, len);
            used += len;
        }
        line = end ? end + 1 : NULL;
    }
    return out;
}

/* Field f (0-based) of the nth (0-based) line of `text` starting with `prefix`. */
static int field_of(const char *text, const char *prefix, size_t nth, int f, char *out, size_t size)
{
    char key[128];
    snprintf(key, sizeof key, "\n%s", prefix);
    const char *at = text ? strstr(text, key) : NULL;
    for (size_t k = 0; k < nth && at; k++)
        at = strstr(at + 1, key);
    if (!at)
        return 0;
    at++;
    for (int k = 0; k < f && at; k++)
        at = strchr(at, ',') ? strchr(at, ',') + 1 : NULL;
    if (!at)
        return 0;
    size_t len = strcspn(at, ",\n");
    snprintf(out, size, "%.*s", (int)len, at);
    return 1;
}

static const char grid_args[] = "robustness --windows 40%,60% --bandwidths 5%,10% "
                                "--indicators variance,lag1,recovery_trend --surrogates 19";

/* 3 methods (two with a bandwidth, one without) x 2 bandwidths x 2 windows, plus
 * recovery_trend per method and bandwidth: per series 2x2x2 + 2 rows for gaussian and for
 * loess, 2x1x2 + 1 for linear (its bandwidth NA), 25 in all. */
static void test_grid_shape(const char *in, const char *fr)
{
    char args[1024];
    snprintf(args, sizeof args, "%s --detrends gaussian,loess,linear --fractions %s", grid_args, fr);
    char *grid = run_ok(args, in);
    CHECK(grid && strncmp(grid, grid_header, strlen(grid_header)) == 0, "grid header: %.80s",
          grid ? grid : "");
    CHECK(count_lines(grid, NULL) == 1 + 2 * 25, "rows: %zu, want 1 + 2 x 25", count_lines(grid, NULL));
    CHECK(count_lines(grid, ",linear,") == 2 * 5 && count_lines(grid, ",linear,NA,NA,") == 2,
          "linear: 5 rows per series, one of them recovery_trend with window and bandwidth NA");
    CHECK(count_lines(grid, ",recovery_trend,") == 2 * 5 &&
              count_lines(grid, ",recovery_trend,gaussian,NA,") == 2 * 2,
          "recovery_trend: once per method and bandwidth, window NA");
    /* Single-method run with the same grid: the gaussian rows, byte for byte. */
    char single_args[1024];
    snprintf(single_args, sizeof single_args, "%s --detrend gaussian", grid_args);
    char *single = run_ok(single_args, in);
    char *a = grid ? lines_with(grid, ",gaussian,") : NULL, *b = single ? lines_with(single, ",gaussian,") : NULL;
    CHECK(a && b && *a && strcmp(a, b) == 0 && count_lines(single, NULL) == 1 + 2 * 10,
          "gaussian rows equal robustness --detrend gaussian alone");
    free(a);
    free(b);
    free(single);
    char *f = check_read_file(fr);
    static const char fr_header[] = "series,indicator,detrend,cells,share_statistic_positive,"
                                    "share_p_at_most_0.05\n";
    CHECK(f && strncmp(f, fr_header, strlen(fr_header)) == 0 &&
              count_lines(f, NULL) == 1 + 2 * 3 * 4, "fractions: 3 tests x (3 methods + all) per series");
    free(f);
    free(grid);
}

/* recovery_trend in the grid equals screen's with the same method and bandwidth. */
static void test_drift_matches_screen(const char *in)
{
    /* the grid's rows of a method come in --bandwidths order: loess at 10% is its second */
    static const struct {
        const char *method, *bandwidth, *prefix;
        size_t nth;
    } cases[] = {{"loess", "--bandwidth 10%", "s1,recovery_trend,loess,NA,", 1},
                 {"linear", "", "s1,recovery_trend,linear,NA,", 0}};
    char args[1024];
    snprintf(args, sizeof args, "%s --detrends gaussian,loess,linear", grid_args);
    char *grid = run_ok(args, in);
    for (size_t c = 0; c < sizeof cases / sizeof cases[0]; c++) {
        snprintf(args, sizeof args, "screen --indicators recovery_trend --surrogates 19 --detrend %s %s",
                 cases[c].method, cases[c].bandwidth);
        char *one = run_ok(args, in);
        char want_t[64] = "", want_p[64] = "", got_t[64] = "", got_p[64] = "";
        /* screen: series,indicator,n,window,bandwidth,tau,statistic,p_value,...; the grid:
         * series,indicator,detrend,window,bandwidth,tau,statistic,p_value */
        field_of(one, "s1,recovery_trend,", 0, 6, want_t, sizeof want_t);
        field_of(one, "s1,recovery_trend,", 0, 7, want_p, sizeof want_p);
        field_of(grid, cases[c].prefix, cases[c].nth, 6, got_t, sizeof got_t);
        field_of(grid, cases[c].prefix, cases[c].nth, 7, got_p, sizeof got_p);
        CHECK(*want_t && strcmp(got_t, want_t) == 0 && strcmp(got_p, want_p) == 0,
              "%s: recovery_trend t %s p %s, screen %s %s", cases[c].method, got_t, got_p, want_t,
              want_p);
        free(one);
    }
    free(grid);
}

/* The fractions file recounted from the grid itself: per (series, test, method) the share of
 * finite statistics > 0 and of p <= 0.05, recovery_trend included. */
static void test_fractions_recount(const char *in, const char *fr)
{
    char args[1024];
    snprintf(args, sizeof args, "%s --detrends gaussian,loess,linear --fractions %s", grid_args, fr);
    char *grid = run_ok(args, in);
    char *f = check_read_file(fr);
    const char *tests[] = {"variance", "lag1", "recovery_trend"}, *methods[] = {"gaussian", "loess", "linear"};
    for (size_t s = 0; s < 2; s++)
        for (size_t j = 0; j < 3; j++)
            for (size_t m = 0; m < 3; m++) {
                char key[128], line[512];
                snprintf(key, sizeof key, "s%zu,%s,%s,", s, tests[j], methods[m]);
                size_t cells = 0, stat = 0, positive = 0, with_p = 0, low = 0;
                for (const char *at = grid ? strstr(grid, key) : NULL; at; at = strstr(at + 1, key)) {
                    if (at[-1] != '\n')
                        continue;
                    double v[5];
                    char txt[5][32];
                    sscanf(at + strlen(key), "%31[^,],%31[^,],%31[^,],%31[^,],%31[^\n]", txt[0],
                           txt[1], txt[2], txt[3], txt[4]);
                    for (int k = 0; k < 5; k++)
                        v[k] = strcmp(txt[k], "NA") == 0 ? NAN : strtod(txt[k], NULL);
                    cells++;
                    stat += !isnan(v[3]);
                    positive += v[3] > 0;
                    with_p += !isnan(v[4]);
                    low += v[4] <= 0.05;
                }
                char share_s[32] = "NA", share_p[32] = "NA";
                if (stat)
                    snprintf(share_s, sizeof share_s, "%.12g", (double)positive / (double)stat);
                if (with_p)
                    snprintf(share_p, sizeof share_p, "%.12g", (double)low / (double)with_p);
                snprintf(line, sizeof line, "\n%s%zu,%s,%s\n", key, cells, share_s, share_p);
                CHECK(f && cells > 0 && strstr(f, line), "fractions row %s", line + 1);
            }
    free(f);
    free(grid);
}

/* Hand-checkable: tau = +1 for s0 and -1 for s1 in every cell (see `alternating`), windows of
 * 40 and 60 samples (39, 59 time units), two methods without a bandwidth, so 2 cells a method
 * and 4 in the "all" row; no surrogates, so no p. */
static void test_fractions_by_hand(void)
{
    const char *in = check_tmp_path("rob-alt.csv"), *fr = check_tmp_path("rob-alt-fr.csv");
    check_write_series_csv(in, 2, 100, alternating, 1);
    char args[512];
    snprintf(args, sizeof args, "robustness --detrends none,linear --windows 39,59 "
             "--indicators variance --fractions %s", fr);
    char *grid = run_ok(args, in);
    CHECK(grid && count_lines(grid, ",variance,none,39,NA,1,1,NA") == 1 &&
              count_lines(grid, ",variance,linear,59,NA,-1,-1,NA") == 1, "tau +-1 by hand");
    char *f = check_read_file(fr);
    CHECK(f && strstr(f, "\ns0,variance,none,2,1,NA\ns0,variance,linear,2,1,NA\n"
                         "s0,variance,all,4,1,NA\ns1,variance,none,2,0,NA\n"
                         "s1,variance,linear,2,0,NA\ns1,variance,all,4,0,NA\n"),
          "hand-counted fractions: %s", f ? f : "");
    free(f);
    free(grid);
}

/* Bad lists: exit 1, one line naming --detrends, no output file. */
static void test_refusals(const char *in)
{
    static const char *const bad[] = {"gaussian,,loess", "gaussian,", ",gaussian", "", "gaussian,bogus",
                                      "loess,gaussian,loess", "poly:2,poly:02", "poly:0",
                                      "gaussian,moving,loess,linear,poly:1,poly:2,poly:3,difference,none"};
    const char *out = check_tmp_path("rob-refused.csv");
    for (size_t k = 0; k < sizeof bad / sizeof bad[0]; k++) {
        char cmd[1024];
        snprintf(cmd, sizeof cmd, "%s robustness --detrends '%s' -o %s %s", check_binary(), bad[k], out, in);
        char *err = NULL;
        int rc = check_run(cmd, NULL, &err);
        CHECK(rc == 1 && err && strstr(err, "--detrends") && count_lines(err, NULL) == 1 &&
                  !check_file_exists(out), "--detrends '%s' refused: exit %d, %s", bad[k], rc,
              err ? err : "");
        free(err);
    }
    /* A method the data cannot carry fails on the data, and says which list it came from. */
    const char *short_in = check_tmp_path("rob-short.csv");
    check_write_file(short_in, "t,a\n0,1\n1,3\n2,2\n3,5\n4,4\n5,6\n6,5\n7,8\n8,7\n9,9\n");
    char cmd[1024];
    snprintf(cmd, sizeof cmd, "%s robustness --windows 50%% --detrends gaussian,poly:12 -o %s %s",
             check_binary(), out, short_in);
    char *err = NULL;
    int rc = check_run(cmd, NULL, &err);
    CHECK(rc == 1 && err && strstr(err, "--detrends poly:12") && count_lines(err, NULL) == 1 &&
              !check_file_exists(out), "poly:12 on 10 samples: exit %d, %s", rc, err ? err : "");
    free(err);
    /* recovery_trend is still a test, not a rolling indicator, for the other commands */
    snprintf(cmd, sizeof cmd, "%s indicators --indicators recovery_trend %s", check_binary(), in);
    CHECK(check_run(cmd, NULL, NULL) == 1, "indicators refuses recovery_trend");
}

void suite_robustness(void)
{
    const char *in = check_tmp_path("rob-axis.csv"), *fr = check_tmp_path("rob-axis-fr.csv");
    check_write_series_csv(in, 2, 240, trended_ar1, 17);
    test_grid_shape(in, fr);
    test_drift_matches_screen(in);
    test_fractions_recount(in, fr);
    test_fractions_by_hand();
    test_refusals(in);
}
