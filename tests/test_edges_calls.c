/* Suite edges, continued: lag-1 coefficients of exactly +1 and -1, a window of 10^6 samples,
 * the other library calls (Kendall, recovery, the feedback fit) at the edges, and the
 * command's outputs on the same cases (every numeric field a number or NA). */
#include "check.h"
#include "edges_check.h"
#include "slowscan/feedback.h"
#include "slowscan/kendall.h"
#include "slowscan/recovery.h"
#include "slowscan/status.h"

#include <gsl/gsl_statistics_double.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>

enum { N = 240 };

/* A random walk (phi = 1), a straight ramp (ar1 exactly 1 in every window) and a series
 * alternating +1, -1 (lag-1 exactly -1 in the limit): numbers where the statistic is
 * defined, a documented NA where it is not (ln of ar1 <= 0; a path that does not vary). */
void edges_unit_root(void)
{
    screen_config cfg = slowscan_screen_config_default();
    cfg.surrogates = 19;
    cfg.indicators[2] = INDICATOR_AR1;
    cfg.indicators[3] = INDICATOR_RECOVERY;
    cfg.nindicators = 4;
    double walk[N], ramp[N], alt[N], steps[N];
    edges_ar1(steps, N, 21);
    for (size_t i = 0; i < N; i++) {
        walk[i] = (i ? walk[i - 1] : 0) + steps[i] - 0.7 * (i ? steps[i - 1] : 0);
        ramp[i] = 2.0 + 0.5 * (double)i;
        alt[i] = i % 2 ? -1.0 : 1.0;
    }
    screen_result r;
    screen_detail d;
    CHECK(edges_screen(NULL, &cfg, "walk", walk, N, &r, &d) == SLOWSCAN_OK, "random walk");
    edges_result_clean(&r, "random walk");
    /* detrended by a line fitted locally, the ramp leaves round-off: no variation */
    CHECK(edges_screen(NULL, &cfg, "ramp", ramp, N, &r, &d) == SLOWSCAN_OK &&
              r.variation == SCREEN_FLAT_RESIDUAL, "ramp: flat residual (%d)", (int)r.variation);
    edges_result_clean(&r, "ramp");
    cfg.detrend.method = DETREND_NONE;
    screen_workspace *ws = slowscan_screen_workspace_alloc(1);
    CHECK(edges_screen(ws, &cfg, "ramp", ramp, N, &r, &d) == SLOWSCAN_OK, "ramp, undetrended");
    edges_result_clean(&r, "ramp, undetrended");
    /* every window of a ramp is the same ramp: each path is constant (ar1 1, recovery 0) */
    for (size_t j = 0; j < 4; j++)
        CHECK(r.tests[j].reason == SCREEN_REASON_CONSTANT_PATH, "ramp %s: reason %d",
              slowscan_screen_test_name(r.tests[j].kind), (int)r.tests[j].reason);
    const double *ar1 = slowscan_screen_workspace_path(ws, 2);
    CHECK(ar1 && fabs(ar1[N - 1] - 1) < 1e-12, "ramp: ar1 1 (%.17g)", ar1 ? ar1[N - 1] : NAN);
    CHECK(edges_screen(ws, &cfg, "alternating", alt, N, &r, &d) == SLOWSCAN_OK, "alternating");
    edges_result_clean(&r, "alternating");
    const double *lag1 = slowscan_screen_workspace_path(ws, 1);
    double want = gsl_stats_lag1_autocorrelation(alt + N - 121, 1, 121); /* GSL */
    CHECK(lag1 && fabs(lag1[N - 1] - want) < 1e-12, "alternating: lag1 %.17g, GSL %.17g",
          lag1 ? lag1[N - 1] : NAN, want);
    CHECK(r.tests[1].reason == SCREEN_REASON_CONSTANT_PATH &&
              r.tests[2].reason == SCREEN_REASON_CONSTANT_PATH,
          "alternating: lag1 and ar1 paths constant (%d, %d)", (int)r.tests[1].reason,
          (int)r.tests[2].reason);
    CHECK(r.tests[3].reason == SCREEN_REASON_FEW_VALUES, "alternating: recovery ln(ar1 < 0) NA (%d)",
          (int)r.tests[3].reason);
    slowscan_screen_workspace_free(ws);
}

/* A window of 10^6 samples on a series of 1.1 10^6 (no surrogates, so it stays fast): the
 * rolling variance and lag-1 at the last window against GSL's two-pass statistics of the
 * same residual (gsl_stats_variance, gsl_stats_lag1_autocorrelation). */
void edges_long_window(void)
{
    enum { LONG_N = 1100000, LONG_W = 1000000 };
    screen_config cfg = slowscan_screen_config_default();
    cfg.surrogates = 0;
    cfg.window = (screen_length){.amount = LONG_W - 1, .percent = 0};
    double *x = malloc(LONG_N * sizeof *x);
    screen_workspace *ws = slowscan_screen_workspace_alloc(1);
    if (!x || !ws) {
        CHECK(0, "memory for 1.1e6 samples");
        free(x);
        slowscan_screen_workspace_free(ws);
        return;
    }
    edges_ar1(x, LONG_N, 22);
    screen_result r;
    screen_detail d;
    CHECK(edges_screen(ws, &cfg, "long", x, LONG_N, &r, &d) == SLOWSCAN_OK, "1.1e6 samples");
    edges_result_clean(&r, "window of 1e6");
    const screen_prepared *ps = slowscan_screen_workspace_prepared(ws);
    CHECK(ps->window == LONG_W, "window %zu samples", ps->window);
    const double *var = slowscan_screen_workspace_path(ws, 0), *lag1 = slowscan_screen_workspace_path(ws, 1);
    const double *last = ps->residual + LONG_N - LONG_W;
    CHECK_CLOSE(var[LONG_N - 1], gsl_stats_variance(last, 1, LONG_W), 1e-9, 0, "variance, W = 1e6 (GSL)");
    CHECK_CLOSE(lag1[LONG_N - 1], gsl_stats_lag1_autocorrelation(last, 1, LONG_W), 1e-9, 1e-12,
                "lag1, W = 1e6 (GSL)");
    for (size_t j = 0; j < r.ntests; j++)
        CHECK(isfinite(r.tests[j].statistic) && isnan(r.tests[j].p_value),
              "window of 1e6, %s: a statistic, no p without surrogates",
              slowscan_screen_test_name(r.tests[j].kind));
    slowscan_screen_workspace_free(ws);
    free(x);
}

/* Kendall at its edges: one pair (ESHORT), a constant variable (ECONST), both NaN; values
 * spanning 1e-300 .. 1e300 ranked as their ranks are (tau of ranks, common practice). */
static void kendall_edges(void)
{
    kendall_workspace *kw = slowscan_kendall_alloc(16);
    double x[8] = {1, 2, 3, 4, 5, 6, 7, 8}, c[8] = {5, 5, 5, 5, 5, 5, 5, 5};
    double wide[8] = {1e-300, -1e300, 1e300, 1e-299, 0, 1.7e308, -1e-300, 5};
    double ranks[8] = {4, 1, 7, 5, 3, 8, 2, 6}; /* ranks of wide */
    double tau = 0, tr = 0;
    CHECK(slowscan_kendall_tau_b(kw, x, c, 1, &tau, NULL) == SLOWSCAN_ESHORT && isnan(tau),
          "kendall: one pair");
    CHECK(slowscan_kendall_tau_b(kw, x, c, 8, &tau, NULL) == SLOWSCAN_ECONST && isnan(tau),
          "kendall: constant y");
    CHECK(slowscan_kendall_tau_b(kw, x, wide, 8, &tau, NULL) == SLOWSCAN_OK &&
              slowscan_kendall_tau_b(kw, x, ranks, 8, &tr, NULL) == SLOWSCAN_OK && tau == tr,
          "kendall: 1e-300..1e308 as their ranks (%g, %g)", tau, tr);
    slowscan_kendall_free(kw);
}

/* The recovery analysis of a constant series has no fit (ECONST, p NA); of a 1e300-scaled
 * series the same t(a1) and p as unscaled (scale invariance). */
static void recovery_edges(void)
{
    double t[N], x[N], big[N];
    edges_ar1(x, N, 23);
    for (size_t i = 0; i < N; i++)
        t[i] = (double)i, big[i] = 1e300 * x[i];
    screen_config cfg = slowscan_screen_config_default();
    cfg.surrogates = 19;
    recovery_config rcfg = slowscan_recovery_config_default();
    recovery_workspace *ws = slowscan_recovery_workspace_alloc(1);
    recovery_result r[2];
    const double *values[2] = {x, big};
    for (size_t k = 0; k < 2; k++) {
        screen_input in = {.name = "r", .source = "edges", .time_name = "t", .time = t,
                           .values = values[k], .n = N};
        screen_prepared ps;
        screen_detail d;
        int st = slowscan_screen_prepare(&cfg, &in, &ps, &d);
        if (st == SLOWSCAN_OK)
            st = slowscan_recovery_series(ws, &cfg, &rcfg, &ps, NULL, NULL, NULL, &r[k], &d);
        CHECK(st == SLOWSCAN_OK && r[k].fit_status == SLOWSCAN_OK && isfinite(r[k].fit.t_a1) &&
                  r[k].p_value > 0 && r[k].p_value <= 1, "recovery %zu: a fit and p", k);
        slowscan_screen_prepared_free(&ps);
    }
    CHECK(check_close(r[1].fit.t_a1, r[0].fit.t_a1, 1e-9, 0) && r[1].p_value == r[0].p_value,
          "recovery x 1e300: t %.17g p %g, unscaled t %.17g p %g", r[1].fit.t_a1,
          r[1].p_value, r[0].fit.t_a1, r[0].p_value);
    slowscan_recovery_workspace_free(ws);
}

/* The feedback fit: T constant has no fit (ECONST, lambda NA); N and T near 1e300 or
 * 1e-300 give lambda = N/T's slope as at unit scale, or a refusal — never Inf. */
static void feedback_edges(void)
{
    enum { M = 60 };
    double t[M], n[M], T[M], nb[M], Tb[M], c[M];
    double noise[M];
    edges_ar1(noise, M, 24);
    for (size_t i = 0; i < M; i++) {
        t[i] = (double)i;
        T[i] = 4.0 * (1 - exp(-(double)i / 10.0)) + 0.1 * noise[i];
        n[i] = 3.7 - 1.2 * T[i] + 0.2 * noise[(i + 7) % M];
        c[i] = 2.0;
    }
    feedback_config cfg = slowscan_feedback_config_default();
    cfg.window = M - 1;
    feedback_window base, w;
    CHECK(slowscan_feedback_fit(t, n, c, 0, M, &cfg, &w) == SLOWSCAN_OK ? w.status == SLOWSCAN_ECONST &&
              isnan(w.lambda) && w.teq_reason == FEEDBACK_TEQ_NO_FIT : 1,
          "feedback: constant response, no fit (status %d)", w.status);
    CHECK(slowscan_feedback_fit(t, n, T, 0, M, &cfg, &base) == SLOWSCAN_OK &&
              base.status == SLOWSCAN_OK, "feedback: unit scale");
    const double scales[] = {1e300, 1e-300, 1e150};
    for (size_t k = 0; k < sizeof scales / sizeof scales[0]; k++) {
        for (size_t i = 0; i < M; i++)
            nb[i] = n[i] * scales[k], Tb[i] = T[i] * scales[k];
        int st = slowscan_feedback_fit(t, nb, Tb, 0, M, &cfg, &w);
        int refused = st != SLOWSCAN_OK || w.status != SLOWSCAN_OK;
        CHECK(refused ? isnan(w.lambda) : check_close(w.lambda, base.lambda, 1e-9, 0) &&
                                              check_close(w.r2, base.r2, 1e-9, 0) &&
                                              isfinite(w.se_lambda_adj),
              "feedback x %g: lambda %.17g (unit scale %.17g), se %g, status %d/%d", scales[k],
              w.lambda, base.lambda, w.se_lambda_adj, st, w.status);
        const double v[] = {w.lambda, w.se_lambda, w.se_lambda_adj, w.forcing, w.se_forcing,
                            w.se_forcing_adj, w.r2, w.r_response, w.r_residual, w.n_eff, w.lo,
                            w.hi, w.t_eq, w.se_t_eq};
        for (size_t f = 0; f < sizeof v / sizeof v[0]; f++)
            CHECK(refused ? !isinf(v[f]) : isfinite(v[f]), "feedback x %g: field %zu is %g",
                  scales[k], f, v[f]);
        if (!refused)
            CHECK(check_close(w.t_eq, base.t_eq * scales[k], 1e-9, 0),
                  "feedback x %g: T_eq %g scales with T (unit scale %g)", scales[k], w.t_eq,
                  base.t_eq);
    }
}

void edges_other_calls(void)
{
    kendall_edges();
    recovery_edges();
    feedback_edges();
}

/* Whether a CSV or JSON text holds a non-finite number spelt out (inf, nan, Infinity) where a
 * value goes: after ',', ':', '[' or at a line's start. The writers print NA and null. */
static int spelt_nonfinite(const char *text)
{
    for (const char *p = text; *p; p++) {
        if (strncasecmp(p, "inf", 3) != 0 && strncasecmp(p, "nan", 3) != 0)
            continue;
        const char *q = p;
        if (q > text && (q[-1] == '-' || q[-1] == '+'))
            q--;
        while (q > text && q[-1] == ' ')
            q--;
        if (q == text || strchr(",:[\n", q[-1]))
            return 1;
    }
    return 0;
}

/* Field k (from 0) of a CSV line (no quoting in these files) into buf. */
static void csv_field(const char *line, size_t k, char *buf, size_t size)
{
    for (; k > 0 && line; k--)
        line = strchr(line, ',') ? strchr(line, ',') + 1 : NULL;
    size_t len = line ? strcspn(line, ",\n") : 0;
    snprintf(buf, size, "%.*s", (int)(len < size ? len : size - 1), line ? line : "");
}

/* Every summary row: tau, statistic, p and q are NA or finite, p and q in (0, 1]; a row
 * flagged insufficient has its series named on stderr (the reason). */
static void summary_clean(const char *summary, const char *err, const char *what)
{
    const char *line = summary ? strchr(summary, '\n') : NULL;
    size_t rows = 0;
    for (; line && line[1]; line = strchr(line + 1, '\n')) {
        char name[64], cell[64], flag[32];
        csv_field(line + 1, 0, name, sizeof name);
        csv_field(line + 1, 11, flag, sizeof flag);
        for (size_t k = 2; k <= 8; k++) { /* n, window, bandwidth, tau, statistic, p, q */
            csv_field(line + 1, k, cell, sizeof cell);
            char *end;
            double v = strtod(cell, &end);
            int ok = strcmp(cell, "NA") == 0 || (*cell && !*end && isfinite(v) && (k < 7 || (v > 0 && v <= 1)));
            CHECK(ok, "%s: %s field %zu is '%s'", what, name, k, cell);
        }
        if (strcmp(flag, "insufficient") == 0)
            CHECK(err && strstr(err, name), "%s: %s insufficient, and stderr says why", what, name);
        rows++;
    }
    CHECK(rows > 0, "%s: summary rows", what);
}

/* Eight samples and an all-missing column through screen; recovery of the edge cases; the
 * feedback command on a run near 1e300 and on a constant response: numbers or NA only. */
static void edges_cli_commands(double *cols, const double *x)
{
    char cmd[2048], *out = NULL, *err = NULL;
    const char *eight = check_tmp_path("edges-eight.csv");
    check_write_file(eight, "t,a,b\n0,0.3,NA\n1,-1.2,NA\n2,0.8,NA\n3,1.9,NA\n4,-0.4,NA\n"
                            "5,0.6,NA\n6,-2.2,NA\n7,1.1,NA\n");
    snprintf(cmd, sizeof cmd, "%s screen --surrogates 19 %s", check_binary(), eight);
    CHECK(check_run(cmd, &out, &err) == 0 && out && err && strstr(err, "fewer than 8 adjacent pairs") &&
              strstr(err, "'b' has fewer than 2 finite samples"),
          "eight samples, all missing: screened, reasons on stderr (%s)", err ? err : "");
    summary_clean(out, err, "eight samples");
    free(out), free(err);
    snprintf(cmd, sizeof cmd, "%s recovery --surrogates 19 --json %s -o %s %s", check_binary(),
             check_tmp_path("edges-recovery.json"), check_tmp_path("edges-recovery.csv"),
             check_tmp_path("edges.csv"));
    int rc = check_run(cmd, NULL, &err);
    char *rec = check_read_file(check_tmp_path("edges-recovery.csv"));
    char *rj = check_read_file(check_tmp_path("edges-recovery.json"));
    CHECK(rc == 0 && rec && rj && !spelt_nonfinite(rec) && !spelt_nonfinite(rj),
          "recovery of the edge cases: numbers or NA (exit %d: %s)", rc, err ? err : "");
    free(rec), free(rj), free(err);
    /* feedback: T a relaxation, N = 3.7 - 1.2 T + noise, both x 1e300; and T constant */
    for (size_t i = 0; i < N; i++) {
        double T = 4.0 * (1 - exp(-(double)i / 30.0)) + 0.1 * x[i];
        cols[i] = 1e300 * T;
        cols[N + i] = 1e300 * (3.7 - 1.2 * T + 0.2 * x[(i + 5) % N]);
        cols[2 * N + i] = 2.0;
    }
    const char *run = check_tmp_path("edges-forced.csv");
    check_write_table_csv(run, "t,T,N,C", 3, N, 1.0, cols);
    const char *resp[2] = {"T", "C"};
    for (size_t k = 0; k < 2; k++) {
        snprintf(cmd, sizeof cmd, "%s feedback --flux N --response %s --window 60 %s",
                 check_binary(), resp[k], run);
        rc = check_run(cmd, &out, &err);
        CHECK(rc == 0 && out && !spelt_nonfinite(out) && (k == 1 || strstr(out, ",-1.")),
              "feedback, response %s: lambda in N/T units, numbers or NA (exit %d: %s)", resp[k],
              rc, err ? err : "");
        CHECK(k == 0 || (out && strstr(out, "no_fit")), "feedback, constant response: no fit");
        free(out), free(err);
    }
}

void edges_cli(void)
{
    double x[N];
    edges_ar1(x, N, 31);
    double *cols = malloc(7 * N * sizeof *cols);
    for (size_t i = 0; i < N; i++) {
        cols[i] = 3.5;                                   /* const */
        cols[N + i] = 1 + 1e-15 * x[i];                  /* nearconst */
        cols[2 * N + i] = 1e300 * x[i];                  /* big */
        cols[3 * N + i] = 1e-300 * x[i];                 /* tiny */
        cols[4 * N + i] = (i ? cols[4 * N + i - 1] : 0) + x[i]; /* walk */
        cols[5 * N + i] = i % 2 ? -1.0 : 1.0;            /* alt */
        cols[6 * N + i] = i >= 60 && i < 140 ? NAN : x[i]; /* gap */
    }
    const char *in = check_tmp_path("edges.csv"), *sum = check_tmp_path("edges-summary.csv"),
               *json = check_tmp_path("edges.json"), *roll = check_tmp_path("edges-rolling.csv");
    check_write_table_csv(in, "t,const,nearconst,big,tiny,walk,alt,gap", 7, N, 1.0, cols);
    char cmd[2048], *out = NULL, *err = NULL;
    snprintf(cmd, sizeof cmd, "%s screen --surrogates 19 --indicators variance,sd,lag1,ar1,"
             "recovery,skewness,kurtosis,cv --json %s --rolling %s -o %s %s", check_binary(),
             json, roll, sum, in);
    int rc = check_run(cmd, NULL, &err);
    CHECK(rc == 0, "screen of the edge cases: exit %d (%s)", rc, err ? err : "");
    char *s = check_read_file(sum), *j = check_read_file(json), *r = check_read_file(roll);
    summary_clean(s, err, "screen");
    CHECK(s && j && r && !spelt_nonfinite(s) && !spelt_nonfinite(j) && !spelt_nonfinite(r),
          "summary, JSON and rolling: no inf or nan spelt out");
    free(s), free(j), free(r), free(err);
    /* the same column at unit scale and at 1e290 and 1e-290: the same summary row */
    char *rows[3] = {NULL};
    const double factors[3] = {1, 1e290, 1e-290};
    for (size_t k = 0; k < 3; k++) {
        for (size_t i = 0; i < N; i++)
            cols[i] = factors[k] * x[i];
        const char *one = check_tmp_path("edges-scaled.csv");
        check_write_table_csv(one, "t,s", 1, N, 1.0, cols);
        snprintf(cmd, sizeof cmd, "%s screen --surrogates 19 %s", check_binary(), one);
        CHECK(check_run(cmd, &rows[k], NULL) == 0, "screen x %g", factors[k]);
        summary_clean(rows[k], "", "scaled");
    }
    CHECK(rows[0] && rows[1] && rows[2] && strcmp(rows[0], rows[1]) == 0 && strcmp(rows[0], rows[2]) == 0,
          "screen of x, 1e290 x, 1e-290 x: the same summary (scale invariance)\n%s\n%s\n%s",
          rows[0], rows[1], rows[2]);
    for (size_t k = 0; k < 3; k++)
        free(rows[k]);
    /* the detrend and indicators commands of the 1e-290 column: values in its own units, a
     * variance below the double range NA (1e-580), lag1 a number */
    const char *scaled = check_tmp_path("edges-scaled.csv");
    snprintf(cmd, sizeof cmd, "%s detrend %s", check_binary(), scaled);
    CHECK(check_run(cmd, &out, NULL) == 0 && out && !spelt_nonfinite(out) && strstr(out, "e-29"),
          "detrend of a 1e-290 series in its units");
    free(out);
    snprintf(cmd, sizeof cmd, "%s indicators --indicators variance,sd,lag1 %s", check_binary(), scaled);
    CHECK(check_run(cmd, &out, NULL) == 0 && out && !spelt_nonfinite(out) &&
              strstr(out, ",variance,NA\n") && !strstr(out, ",variance,0\n") &&
              strstr(out, ",sd,1.") && strstr(out, "e-290\n") && !strstr(out, ",lag1,NA\n"),
          "indicators of a 1e-290 series: variance NA (1e-580), sd in its units, lag1 numbers");
    free(out);
    edges_cli_commands(cols, x);
    free(cols);
}
