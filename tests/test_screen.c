/* The screening library (screen.h) through its public header alone: one series screened by
 * slowscan_screen_series gives the numbers of the `screen` command (tests/golden/, the command's
 * committed output), at any thread count; refusals come back as details; warnings and
 * reasons as data; slowscan_screen_decide's q-values are Benjamini-Hochberg's and its flags follow
 * the summary's rule. */
#include "check.h"
#include "slowscan/io.h"
#include "slowscan/screen.h"
#include "slowscan/significance.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static void defaults(void)
{
    /* DESIGN §4: --bandwidth 10%, --window 50%, variance,lag1, --surrogates 1000, --seed 1,
     * --fdr 0.05, --null phase, gaussian-linear; min coverage 0.8 (§3). */
    screen_config c = slowscan_screen_config_default();
    CHECK(c.bandwidth.percent && c.bandwidth.amount == 10, "default bandwidth 10%%");
    CHECK(c.window.percent && c.window.amount == 50, "default window 50%%");
    CHECK(c.nindicators == 2 && c.indicators[0] == INDICATOR_VARIANCE &&
          c.indicators[1] == INDICATOR_LAG1 && c.drift_test, "default tests");
    CHECK(c.surrogates == 1000 && c.seed == 1 && c.fdr == 0.05 && c.min_coverage == 0.8,
          "default M, seed, fdr, coverage");
    CHECK(c.null_kind == SURROGATE_PHASE && c.detrend.method == DETREND_GAUSSIAN_LINEAR,
          "default null and detrend");
    CHECK(isnan(c.deseason) && slowscan_screen_test_count(&c) == 3, "no deseasoning; three tests");
    CHECK(strcmp(slowscan_screen_test_name(slowscan_screen_test_of(&c, 2)), "recovery_trend") == 0 &&
          !slowscan_screen_test_rolling(SCREEN_TEST_RECOVERY_TREND), "the drift test's kind");
}

/* Formats v as the summary CSV does (%.12g, NA) for a byte comparison. */
static void cell(char *buf, double v)
{
    if (isfinite(v))
        snprintf(buf, 32, "%.12g", v == 0 ? 0.0 : v);
    else
        snprintf(buf, 32, "NA");
}

/* Every test of one series against its rows of the command's summary. */
static void compare_with_summary(const char *summary, const char *name, const screen_result *r)
{
    for (size_t j = 0; j < r->ntests; j++) {
        const screen_test *t = &r->tests[j];
        char want[320], tau[32], stat[32], p[32], window[32];
        cell(tau, t->tau);
        cell(stat, t->statistic);
        cell(p, t->p_value);
        cell(window, slowscan_screen_test_rolling(t->kind) ? r->window : NAN);
        snprintf(want, sizeof want, "\n%s,%s,%zu,%s,", name, slowscan_screen_test_name(t->kind), r->n, window);
        const char *row = strstr(summary, want);
        CHECK(row != NULL, "%s: no summary row '%s'", name, want + 1);
        if (!row)
            continue;
        char *line = strndup(row + 1, strcspn(row + 1, "\n"));
        char bw[32], tail[160];
        cell(bw, r->bandwidth);
        snprintf(tail, sizeof tail, ",%s,%s,%s,%s,", bw, tau, stat, p);
        CHECK(strstr(line, tail) != NULL, "%s %s: library %s, command %s", name,
              slowscan_screen_test_name(t->kind), tail, line);
        free(line);
    }
}

/* The null quantiles of a result, the JSON's five and the figures' outer two, against
 * numpy.quantile of the same null (tests/reference/quantiles_numpy.py). */
static void null_quantiles_match(const screen_workspace *ws, const screen_result *r, size_t m,
                                 const char *name)
{
    for (size_t j = 0; j < r->ntests; j++) {
        const double *null = slowscan_screen_workspace_null(ws, j);
        double want[8];
        int got = null ? check_python_on("quantiles_numpy.py", null, m, "0.01 0.05 0.25 0.5 0.75 0.95 0.99",
                                         want, 8)
                       : -1;
        const screen_test *t = &r->tests[j];
        const double have[7] = {t->quantile_tail[0], t->quantile[0], t->quantile[1], t->quantile[2],
                                t->quantile[3], t->quantile[4], t->quantile_tail[1]};
        int ok = got == 7;
        for (int q = 0; ok && q < 7; q++)
            ok = check_close(have[q], want[q], 1e-12, 1e-15);
        CHECK(ok, "%s test %zu: null quantiles .01 .. .99 as numpy's (%d values)", name, j, got);
    }
}

static void stations(void)
{
    series_table t;
    io_error err;
    csv_read_options ro = slowscan_csv_read_options_default();
    char *summary = check_read_file("tests/golden/screen_stations.out");
    CHECK(summary != NULL, "tests/golden/screen_stations.out");
    if (!summary || slowscan_csv_read_table("data/stations.csv", &ro, &t, &err) != SLOWSCAN_OK) {
        free(summary);
        return;
    }
    /* the options of the golden run: --deseason 364 --surrogates 99 */
    screen_config cfg = slowscan_screen_config_default();
    cfg.deseason = 364;
    cfg.surrogates = 99;
    for (size_t threads = 1; threads <= 3; threads += 2) {
        cfg.threads = threads;
        screen_workspace *ws = slowscan_screen_workspace_alloc(threads);
        for (size_t k = 0; ws && k < t.nseries; k++) {
            screen_input in = {.name = t.names[k], .source = "data/stations.csv", .time_name = t.time_name, .time = t.time, .values = t.values[k], .n = t.n, .control = NULL};
            screen_result r;
            screen_detail d;
            int st = slowscan_screen_series(ws, &cfg, &in, &r, &d);
            CHECK(st == SLOWSCAN_OK && r.ntests == 3 && r.nwarnings == 0, "%s: status %d",
                  t.names[k], st);
            if (st == SLOWSCAN_OK)
                compare_with_summary(summary, t.names[k], &r);
            if (st == SLOWSCAN_OK && threads == 1 && k < 2)
                null_quantiles_match(ws, &r, cfg.surrogates, t.names[k]);
            CHECK(slowscan_screen_workspace_path(ws, 0) && slowscan_screen_workspace_null(ws, 2) &&
                  slowscan_screen_workspace_prepared(ws)->n == t.n, "%s: paths and null kept", t.names[k]);
        }
        slowscan_screen_workspace_free(ws);
    }
    slowscan_series_table_free(&t);
    free(summary);
}

/* --null control: surrogates of the control run's residual (golden run screen_control). */
static void control(void)
{
    series_table t, c;
    io_error err;
    csv_read_options ro = slowscan_csv_read_options_default();
    char *summary = check_read_file("tests/golden/screen_control.out");
    int ok = summary && slowscan_csv_read_table("tests/golden/batch.csv", &ro, &t, &err) == SLOWSCAN_OK;
    if (ok && slowscan_csv_read_table("tests/golden/control.csv", &ro, &c, &err) != SLOWSCAN_OK) {
        slowscan_series_table_free(&t);
        ok = 0;
    }
    CHECK(ok, "golden batch, control and summary");
    if (!ok) {
        free(summary);
        return;
    }
    screen_config cfg = slowscan_screen_config_default();
    cfg.surrogates = 19;
    cfg.null_name = "control"; /* the streams of --null control */
    screen_workspace *ws = slowscan_screen_workspace_alloc(2);
    cfg.threads = 2;
    const size_t series[] = {0, 3, 20};
    for (size_t s = 0; ws && s < 3; s++) {
        size_t k = series[s];
        screen_input ci = {.name = c.names[k], .source = "control", .time_name = c.time_name, .time = c.time, .values = c.values[k], .n = c.n, .control = NULL};
        screen_input in = {.name = t.names[k], .source = "batch", .time_name = t.time_name, .time = t.time, .values = t.values[k], .n = t.n, .control = &ci};
        screen_result r;
        screen_detail d;
        CHECK(slowscan_screen_series(ws, &cfg, &in, &r, &d) == SLOWSCAN_OK, "%s with a control", t.names[k]);
        compare_with_summary(summary, t.names[k], &r);
    }
    slowscan_screen_workspace_free(ws);
    slowscan_series_table_free(&t);
    slowscan_series_table_free(&c);
    free(summary);
}

static void refusals_and_warnings(void)
{
    enum { N = 40 };
    double time[N], flat[N], wavy[N];
    for (size_t i = 0; i < N; i++) {
        time[i] = (double)i;
        flat[i] = 2.5;
        wavy[i] = sin(0.7 * (double)i) + 0.01 * (double)(i * i % 7);
    }
    screen_config cfg = slowscan_screen_config_default();
    cfg.surrogates = 19;
    screen_workspace *ws = slowscan_screen_workspace_alloc(1);
    screen_result r;
    screen_detail d;
    screen_input in = {.name = "flat", .source = "memory", .time_name = "t", .time = time, .values = flat, .n = N, .control = NULL};
    int st = slowscan_screen_series(ws, &cfg, &in, &r, &d);
    CHECK(st == SLOWSCAN_OK && r.nwarnings == 1 && r.warnings[0].kind == SCREEN_WARN_NO_PATHS &&
          r.warnings[0].status == SCREEN_CONSTANT, "a constant series warns, as data");
    for (size_t j = 0; st == SLOWSCAN_OK && j < r.ntests; j++)
        CHECK(isnan(r.tests[j].statistic) && r.tests[j].reason == SCREEN_REASON_NO_VARIATION,
              "constant series, test %zu: no variation", j);
    /* A control run lacking the series: nothing to attach to a series that does not vary,
     * CONTROL_MISSING for one that does (common practice, no source). */
    screen_input missing = {.name = "flat", .source = "control", .time_name = "t", .time = time, .values = NULL, .n = N, .control = NULL};
    for (int varies = 0; varies < 2; varies++) {
        screen_prepared ps;
        in.values = varies ? wavy : flat;
        st = slowscan_screen_prepare(&cfg, &in, &ps, &d);
        int attached = slowscan_screen_attach_control(&cfg, &ps, &missing, &d);
        CHECK(st == SLOWSCAN_OK && (varies ? attached == SLOWSCAN_EINVAL && d.control &&
                                                 d.rule == SCREEN_RULE_CONTROL_MISSING
                                           : attached == SLOWSCAN_OK && ps.constant &&
                                                 ps.null_source == ps.residual),
              "a control lacking the series, which %s: status %d", varies ? "varies" : "is flat",
              attached);
        slowscan_screen_prepared_free(&ps);
    }
    cfg.window = (screen_length){.amount = 2, .percent = 1}; /* round(0.02 x 39) + 1 = 2 samples */
    in.values = wavy;
    st = slowscan_screen_series(ws, &cfg, &in, &r, &d);
    CHECK(st == SLOWSCAN_EINVAL && d.rule == SCREEN_RULE_WINDOW_TOO_FEW && d.count == 2 &&
          d.option == SCREEN_OPTION_WINDOW, "a two-sample window is refused (rule %d)", d.rule);
    cfg.window = (screen_length){.amount = 50, .percent = 1};
    cfg.bandwidth = (screen_length){.amount = 100, .percent = 0}; /* longer than the span 39 */
    st = slowscan_screen_series(ws, &cfg, &in, &r, &d);
    CHECK(st == SLOWSCAN_EINVAL && d.rule == SCREEN_RULE_LONGER_THAN_SPAN &&
          d.option == SCREEN_OPTION_BANDWIDTH && d.limit == 39, "a bandwidth beyond the span");
    slowscan_screen_workspace_free(ws);
}

static void decide(void)
{
    /* The check is that slowscan_screen_decide's q-values are slowscan_significance_bh's (that one is compared
     * with statsmodels in the significance suite), so any p-values do; these span the steps. */
    const double p[] = {0.0001, 0.0004, 0.0019, 0.0095, 0.0201, 0.0278};
    enum { T = 9 };
    screen_test tests[T];
    const screen_test *list[T];
    for (size_t r = 0; r < T; r++) {
        tests[r] = (screen_test){.statistic = r == 2 ? -0.5 : 0.4, .p_value = r < 6 ? p[r] : NAN,
                                 .surrogates = 99};
        list[r] = &tests[r];
    }
    tests[6].statistic = NAN;  /* no statistic: insufficient */
    tests[8].surrogates = 0;   /* a statistic, no surrogates asked for: untested */
    /* tests[7]: a statistic, surrogates asked for, no p: insufficient */
    double q[T], want[6];
    screen_flag flags[T];
    CHECK(slowscan_screen_decide(list, T, 0.05, q, flags) == SLOWSCAN_OK, "decide");
    slowscan_significance_bh(p, 6, want, NULL);
    for (size_t r = 0; r < 6; r++)
        CHECK_CLOSE(q[r], want[r], 0, 0, "q equals slowscan_significance_bh's");
    CHECK(flags[0] == SCREEN_FLAG_RISING && flags[2] == SCREEN_FLAG_FALLING, "rising, falling");
    CHECK(flags[6] == SCREEN_FLAG_INSUFFICIENT && flags[7] == SCREEN_FLAG_INSUFFICIENT &&
          flags[8] == SCREEN_FLAG_UNTESTED && isnan(q[7]), "insufficient, untested");
    CHECK(strcmp(slowscan_screen_flag_name(flags[8]), "untested") == 0, "flag names");
    /* a single tested p decides itself: 0.04 <= 0.05 */
    tests[0].p_value = 0.04;
    CHECK(slowscan_screen_decide(list, 1, 0.05, q, flags) == SLOWSCAN_OK && flags[0] == SCREEN_FLAG_RISING,
          "one test: p decides");
}

/* 1 when two prepared series hold the same bits (value, trend, residual) and record. */
static int same_prepared(const screen_prepared *a, const screen_prepared *b)
{
    return a->n == b->n && a->window == b->window && a->constant == b->constant &&
           a->leakage_tested == b->leakage_tested &&
           memcmp(a->value, b->value, 3 * a->n * sizeof *a->value) == 0 &&
           (!a->leakage_tested || memcmp(&a->leakage, &b->leakage, sizeof a->leakage) == 0);
}

/* slowscan_screen_prepare_with through one workspace gives slowscan_screen_prepare's bits
 * while the length, the step and the method change from one series to the next (the kept
 * detrend plans must be remade, not reused, when any of them changes). A check of the
 * project against itself: the detrend is compared with outside references in the detrend
 * suites. */
static void prepare_with_workspace(void)
{
    static const struct { size_t n; double dt; const char *method; } cases[] = {
        {300, 1, "gaussian-linear"}, {300, 1, "gaussian-linear"}, {2000, 1, "gaussian-linear"},
        {300, 1, "gaussian-linear"}, {300, 0.25, "gaussian-linear"}, {300, 0.25, "gaussian"},
        {300, 0.25, "loess"},        {300, 0.25, "poly:3"},          {300, 0.25, "gaussian"}};
    enum { CASES = sizeof cases / sizeof cases[0], NMAX = 2000 };
    check_rng *rng = check_rng_alloc(11);
    screen_workspace *ws = slowscan_screen_workspace_alloc(1);
    double t[NMAX], x[NMAX];
    size_t same = 0;
    for (size_t c = 0; c < CASES && ws && rng; c++) {
        screen_config cfg = slowscan_screen_config_default();
        cfg.bandwidth = (screen_length){.amount = 60, .percent = 0}; /* time units: kept as n changes; long: by FFT */
        slowscan_detrend_parse_method(cases[c].method, &cfg.detrend);
        for (size_t i = 0; i < cases[c].n; i++) {
            t[i] = (double)i * cases[c].dt;
            x[i] = 0.01 * (double)(i * c) + check_rng_gaussian(rng);
        }
        if (c % 2 == 1)
            x[cases[c].n / 3] = NAN; /* gap-free and gapped series in turn */
        screen_input in = {.name = "y", .source = "test", .time_name = "time", .time = t,
                           .values = x, .n = cases[c].n, .control = NULL};
        screen_prepared a, b;
        screen_detail d;
        int sa = slowscan_screen_prepare(&cfg, &in, &a, &d);
        int sb = slowscan_screen_prepare_with(ws, &cfg, &in, &b, &d);
        same += sa == SLOWSCAN_OK && sb == SLOWSCAN_OK && same_prepared(&a, &b);
        slowscan_screen_prepared_free(&a);
        slowscan_screen_prepared_free(&b);
    }
    CHECK(same == CASES, "prepare_with equals prepare bit for bit in %zu of %d cases", same,
          (int)CASES);
    slowscan_screen_workspace_free(ws);
    check_rng_free(rng);
}

void suite_screen(void)
{
    prepare_with_workspace();
    defaults();
    stations();
    control();
    refusals_and_warnings();
    decide();
}
