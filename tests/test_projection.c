/* Projected crossing of lambda = 0 by the drifting AR(1) (indicators/ar1_projection.c). */
#include "check.h"
#include "slowscan/ar1_drift.h"
#include "slowscan/detrend.h"
#include "slowscan/status.h"

#include <gsl/gsl_cdf.h>
#include <gsl/gsl_rng.h>
#include <gsl/gsl_sort.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* x_{t+1} = (a0 + a1 s_t) x_t + sigma e_t, s_t = t/(n-1) - 1/2: the model the fit assumes. */
static void simulate_drifting_ar1(check_rng *r, double *x, size_t n, double a0, double a1)
{
    x[0] = 0;
    for (size_t t = 0; t + 1 < n; t++)
        x[t + 1] = (a0 + a1 * ((double)t / (double)(n - 1) - 0.5)) * x[t] + check_rng_gaussian(r);
}

/* Saddle-node normal form dx = (a - x^2) dt + 0.03 dW, dt = 0.5 per sample (10 Euler-Maruyama
 * substeps), a ramped linearly from 1 to a_end over the record: the linearised recovery rate
 * -2 sqrt(a) reaches 0 where a does, at sample index (n-1) / (1 - a_end). */
static void simulate_fold(check_rng *r, double *x, size_t n, double a_end)
{
    double state = 1.0, h = 0.05;
    for (size_t i = 0; i < n; i++) {
        double a = 1.0 - (1.0 - a_end) * (double)i / (double)(n - 1);
        for (int s = 0; s < 10; s++)
            state += (a - state * state) * h + 0.03 * sqrt(h) * check_rng_gaussian(r);
        x[i] = state;
    }
}

/* Large sample, model as fitted: the bootstrap interval of the crossing agrees with the delta
 * method on s* = (1 - a0)/a1 (Casella & Berger, Statistical Inference, §5.5.4: the estimator
 * of a smooth function of asymptotically normal estimates is asymptotically normal with the
 * gradient-sandwich variance). */
static void test_against_delta_method(ar1_drift_workspace *ws, gsl_rng *rng, double *x)
{
    enum { N = 20000 };
    check_rng *r = check_rng_alloc(11);
    simulate_drifting_ar1(r, x, N, 0.7, 0.3); /* phi: 0.55 -> 0.85; crosses at s = 1 */
    check_rng_free(r);
    ar1_drift_fit fit;
    ar1_projection pr;
    CHECK(slowscan_ar1_drift_estimate(ws, x, N, &fit) == SLOWSCAN_OK, "fit of the long drifting AR(1)");
    CHECK(slowscan_ar1_drift_project(ws, &fit, N, 2.0 * (N - 1), 2000, rng, &pr) == SLOWSCAN_OK,
          "projection runs");
    double g0 = -1.0 / fit.a1, g1 = -(1.0 - fit.a0) / (fit.a1 * fit.a1);
    double var = g0 * g0 * fit.se_a0 * fit.se_a0 + g1 * g1 * fit.se_a1 * fit.se_a1 +
                 2 * g0 * g1 * fit.cov_a0_a1;
    double half = 1.96 * sqrt(var) * (N - 1), centre = ((1 - fit.a0) / fit.a1 + 0.5) * (N - 1);
    CHECK(pr.kind == PROJECTION_AHEAD, "crossing ahead of the record (kind %d)", (int)pr.kind);
    CHECK_CLOSE(pr.index, centre, 1e-12, 1e-9, "point crossing = (1 - a0)/a1 on the index scale");
    CHECK(fabs((pr.index_hi - pr.index_lo) / (2 * half) - 1) < 0.1,
          "bootstrap interval width %.0f vs delta method %.0f samples", pr.index_hi - pr.index_lo,
          2 * half);
    CHECK(fabs(0.5 * (pr.index_lo + pr.index_hi) - centre) < 0.15 * half,
          "bootstrap interval centred on the estimate");
    CHECK(pr.share_crossing == 1.0 && pr.draws == 2000, "every draw crosses (%.3f)", pr.share_crossing);
}

/* Repeated samples from the fitted model: a 95% interval covers the true crossing in about
 * 95% of them (what a confidence interval means; common practice, no source). */
static void test_coverage_model(ar1_drift_workspace *ws, gsl_rng *rng, double *x)
{
    enum { N = 1200, REPLICATES = 100 };
    check_rng *r = check_rng_alloc(12);
    size_t covered = 0;
    double truth = ((1 - 0.7) / 0.4 + 0.5) * (N - 1); /* phi = 1 at s = 0.75 */
    for (int k = 0; k < REPLICATES; k++) {
        simulate_drifting_ar1(r, x, N, 0.7, 0.4);
        ar1_drift_fit fit;
        ar1_projection pr;
        if (slowscan_ar1_drift_estimate(ws, x, N, &fit) != SLOWSCAN_OK ||
            slowscan_ar1_drift_project(ws, &fit, N, 2.0 * (N - 1), 500, rng, &pr) != SLOWSCAN_OK)
            continue;
        covered += pr.index_lo <= truth && truth <= pr.index_hi;
    }
    check_rng_free(r);
    fprintf(stderr, "projection coverage, drifting AR(1): %zu of %d intervals hold the true crossing\n",
            covered, REPLICATES);
    /* Binomial 99% acceptance region around 0.95, as in the calibration tests. */
    size_t lo = 0;
    while (gsl_cdf_binomial_P((unsigned)lo, 0.95, REPLICATES) < 0.005)
        lo++;
    CHECK(covered >= lo, "coverage %zu of %d (nominal 95, lowest accepted %zu)", covered,
          REPLICATES, lo);
}

/* The fold with a known ramp, detrended as by default (what the fit does not assume:
 * phi = exp(-sqrt(a) dt) is curved in time, its recovery rate goes to zero like the square
 * root of the distance to the fold). A straight line through such a path reaches zero too
 * late: the point estimates must lie after the true crossing, and the intervals, which cover
 * only the fit's noise, mostly miss it. Both are reported; the README quotes them. */
static void test_coverage_fold(ar1_drift_workspace *ws, gsl_rng *rng, double *x)
{
    enum { N = 1200, REPLICATES = 40 };
    const double a_end = 0.02, truth = (N - 1) / (1 - a_end);
    check_rng *r = check_rng_alloc(13);
    detrend_spec spec = {DETREND_GAUSSIAN_LINEAR, 0.1 * (N - 1), 0};
    double *residual = malloc(N * sizeof *residual), late[REPLICATES];
    size_t covered = 0, ahead = 0, fitted = 0;
    for (int k = 0; k < REPLICATES; k++) {
        simulate_fold(r, x, N, a_end);
        ar1_drift_fit fit;
        ar1_projection pr;
        if (slowscan_detrend_apply(&spec, 1.0, x, N, NULL, residual) != SLOWSCAN_OK ||
            slowscan_ar1_drift_estimate(ws, residual, N, &fit) != SLOWSCAN_OK ||
            slowscan_ar1_drift_project(ws, &fit, N, 2.0 * (N - 1), 500, rng, &pr) != SLOWSCAN_OK)
            continue;
        ahead += pr.kind == PROJECTION_AHEAD;
        covered += pr.index_lo <= truth && truth <= pr.index_hi;
        /* lateness in record lengths; no crossing within the horizon counts as latest */
        late[fitted++] = isnan(pr.index) ? INFINITY : (pr.index - truth) / (N - 1);
    }
    check_rng_free(r);
    free(residual);
    gsl_sort(late, 1, fitted);
    double median = fitted ? late[fitted / 2] : NAN;
    fprintf(stderr, "projection coverage, fold approach: %zu of %d intervals hold the true crossing "
            "(%zu point estimates ahead of the record; median %.2f record lengths after the "
            "true crossing)\n", covered, REPLICATES, ahead, median);
    CHECK(fitted == REPLICATES && median > 0, "fold projections late: median %.3f", median);
}

/* No trend in the coefficient: most draws do not cross within twice the record. */
static void test_no_crossing(ar1_drift_workspace *ws, gsl_rng *rng, double *x)
{
    enum { N = 2000 };
    check_rng *r = check_rng_alloc(14);
    simulate_drifting_ar1(r, x, N, 0.5, 0.0);
    check_rng_free(r);
    ar1_drift_fit fit;
    ar1_projection pr;
    CHECK(slowscan_ar1_drift_estimate(ws, x, N, &fit) == SLOWSCAN_OK, "fit of the stationary AR(1)");
    CHECK(slowscan_ar1_drift_project(ws, &fit, N, 2.0 * (N - 1), 500, rng, &pr) == SLOWSCAN_OK, "projects");
    CHECK(pr.kind == PROJECTION_NONE && isnan(pr.index) && isinf(pr.index_hi) &&
              pr.share_crossing < 0.05, "no crossing: kind %d, share %.3f", (int)pr.kind,
          pr.share_crossing);
    CHECK(slowscan_ar1_drift_project(ws, &fit, N, 2.0 * (N - 1), 0, rng, &pr) == SLOWSCAN_EINVAL,
          "zero draws refused");
}

/* Series 0 and 1: drifting AR(1), phi 0.5 -> 0.9 (crossing at index 1.75 (n-1)); series 2:
 * stationary, phi = 0.5. */
static double cli_sample(check_rng *rng, size_t k, size_t i, size_t n, double *state)
{
    double a1 = k < 2 ? 0.4 : 0.0, s = (double)i / (double)(n - 1) - 0.5;
    *state = i == 0 ? 0.0 : (0.7 + a1 * s) * *state + check_rng_gaussian(rng);
    return *state;
}

/* Through the binary: the table, its labels, determinism over threads, bad options. */
static void test_cli_projection(void)
{
    const char *in = check_tmp_path("proj.csv"), *out = check_tmp_path("proj-out.csv");
    const char *js = check_tmp_path("proj.json"), *out2 = check_tmp_path("proj-out2.csv");
    check_write_series_csv(in, 3, 2000, cli_sample, 21);
    char cmd[1600];
    char *err = NULL;
    snprintf(cmd, sizeof cmd, "%s recovery --detrend none --project %s --json %s --threads 1 -o /dev/null %s",
             check_binary(), out, js, in);
    CHECK(check_run(cmd, NULL, &err) == 0, "recovery --project runs");
    CHECK(err && strstr(err, "not forecasts"), "the run says the crossing is no forecast");
    free(err);
    char *table = check_read_file(out);
    const char *header = "series,status,crossing_time,crossing_lo,crossing_hi,interval,share_crossing,"
                         "draws,basis\n";
    CHECK(table && strncmp(table, header, strlen(header)) == 0, "projection header");
    CHECK(table && strstr(table, "\ns0,ahead,") && strstr(table, "\ns1,ahead,") &&
              strstr(table, "\ns2,none_within_2x_record,NA,"), "statuses:\n%s", table ? table : "");
    size_t labelled = 0;
    for (const char *p = table; p && (p = strstr(p, ",1000,extrapolated_linear_trend_in_recovery_rate\n")); p++)
        labelled++;
    CHECK(labelled == 3, "every row labelled as an extrapolation (%zu)", labelled);
    char *json = check_read_file(js);
    CHECK(json && strstr(json, "\"projection\": {\"basis\": \"extrapolated_linear_trend_in_recovery_rate\""),
          "JSON carries the projection");
    free(json);
    /* Same seed, same numbers, whatever the thread count (DESIGN §2). */
    snprintf(cmd, sizeof cmd, "%s recovery --detrend none --project %s --threads 2 -o /dev/null %s 2>/dev/null",
             check_binary(), out2, in);
    CHECK(check_run(cmd, NULL, NULL) == 0, "second run");
    char *table2 = check_read_file(out2);
    CHECK(table && table2 && strcmp(table, table2) == 0, "identical projection with 1 and 2 threads");
    free(table), free(table2);
    /* With --figures the recovery figure draws the projection (report/fig_recovery.c). */
    const char *dir = check_tmp_path("proj-figures");
    snprintf(cmd, sizeof cmd, "%s recovery --detrend none --vars s0 --project %s --figures %s "
             "-o /dev/null %s 2>/dev/null", check_binary(), out2, dir, in);
    CHECK(check_run(cmd, NULL, NULL) == 0, "recovery --project --figures runs");
    char png[1200];
    snprintf(png, sizeof png, "%s/recovery-s0.png", dir);
    char *image = check_read_file(png);
    CHECK(image && memcmp(image, "\x89PNG\r\n\x1a\n", 8) == 0, "recovery figure with the projection");
    free(image);
    /* Bad options: one message naming the option, exit 1, no output. */
    const char *bad[][2] = {{"--project-draws 100 --project %s", "--project-draws"},
                            {"--project-draws 600", "--project"},
                            {"--project /nonexistent-dir/p.csv", "--project"}};
    for (size_t b = 0; b < 3; b++) {
        const char *o = check_tmp_path("proj-bad.csv"), *pp = check_tmp_path("proj-bad-p.csv");
        char args[200];
        snprintf(args, sizeof args, bad[b][0], pp); /* the format is one of ours, above */
        snprintf(cmd, sizeof cmd, "%s recovery %s -o %s %s", check_binary(), args, o, in);
        err = NULL;
        int rc = check_run(cmd, NULL, &err);
        CHECK(rc == 1 && err && strstr(err, bad[b][1]) && !strchr(strchr(err, '\n') + 1, '\n'),
              "'%s': exit %d, message %s", bad[b][0], rc, err ? err : "(none)");
        CHECK(!check_file_exists(o) && !check_file_exists(pp), "'%s': no output left", bad[b][0]);
        free(err);
    }
}

void suite_projection(void)
{
    test_cli_projection();
    double *x = malloc(20000 * sizeof *x);
    ar1_drift_workspace *ws = slowscan_ar1_drift_alloc(20000);
    gsl_rng *rng = gsl_rng_alloc(gsl_rng_mt19937);
    gsl_rng_set(rng, 7);
    test_against_delta_method(ws, rng, x);
    test_coverage_model(ws, rng, x);
    test_coverage_fold(ws, rng, x);
    test_no_crossing(ws, rng, x);
    gsl_rng_free(rng);
    slowscan_ar1_drift_free(ws);
    free(x);
}
