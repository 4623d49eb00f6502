/* The trend-leakage diagnostic (detrend/leakage.c) and its report through the binary. */
#include "check.h"
#include "slowscan/detrend.h"
#include "slowscan/status.h"

#include <gsl/gsl_cdf.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

void suite_leakage(void);

static void ar1_fill(check_rng *rng, double phi, double *x, size_t n)
{
    double v = check_rng_gaussian(rng) / sqrt(1 - phi * phi);
    for (size_t i = 0; i < n; i++)
        x[i] = v = phi * v + check_rng_gaussian(rng);
}

/* The statistic written out from its definition: z = edge mean / (sd / sqrt(n_eff)),
 * n_eff = m (1 - r1)/(1 + r1) (Bretherton et al. 1999, J. Climate 12:1990, eq. 31). */
static void test_definition(check_rng *rng)
{
    enum { N = 400, EDGE = 40 };
    double x[N];
    ar1_fill(rng, 0.6, x, N);
    for (size_t i = N - EDGE; i < N; i++)
        x[i] += 1.5; /* a step left at the end */
    detrend_leakage l;
    CHECK(slowscan_detrend_leakage_test(x, N, EDGE, 0.01, &l) == SLOWSCAN_OK, "leakage test runs");
    double mean = 0, ss = 0, cross = 0, last = 0;
    for (size_t i = 0; i < N; i++)
        mean += x[i] / N;
    for (size_t i = 0; i < N; i++) {
        ss += (x[i] - mean) * (x[i] - mean);
        if (i + 1 < N)
            cross += (x[i] - mean) * (x[i + 1] - mean);
        if (i >= N - EDGE)
            last += x[i] / EDGE;
    }
    double r1 = cross / ss, sd = sqrt(ss / (N - 1)), neff = EDGE * (1 - r1) / (1 + r1);
    double z = last / (sd / sqrt(neff));
    CHECK_CLOSE(l.r1, r1, 1e-12, 0, "residual lag-1 autocorrelation");
    CHECK_CLOSE(l.last.effective, neff, 1e-12, 0, "effective samples of the last edge");
    CHECK_CLOSE(l.last.z, z, 1e-10, 0, "z of the last edge");
    /* two-sided normal p (GSL's gsl_cdf_ugaussian_Q) */
    CHECK_CLOSE(l.last.p, 2 * gsl_cdf_ugaussian_Q(fabs(z)), 1e-10, 0, "p of the last edge");
    CHECK(l.leaking && l.last.p < 0.005, "a step of 1.5 sd over the last edge leaks (p %.3g)", l.last.p);
    /* errors */
    CHECK(slowscan_detrend_leakage_test(x, N, 1, 0.01, &l) == SLOWSCAN_EINVAL, "edge of 1 refused");
    CHECK(slowscan_detrend_leakage_test(x, N, N + 1, 0.01, &l) == SLOWSCAN_EINVAL, "edge > n refused");
    CHECK(slowscan_detrend_leakage_test(x, N, EDGE, 0, &l) == SLOWSCAN_EINVAL, "level 0 refused");
    for (size_t i = 0; i < N; i++)
        x[i] = 3.0;
    CHECK(slowscan_detrend_leakage_test(x, N, EDGE, 0.01, &l) == SLOWSCAN_ECONST, "constant residual");
}

/* Size: residuals of the default detrend of stationary AR(1) series (no trend) must not be
 * called leaking more often than the level allows; counted over 400 series against the
 * binomial upper bound at 0.1% (common practice, no source). And the lagging local-constant
 * fit on a steep ramp must be caught every time. */
static void test_size_and_power(check_rng *rng)
{
    enum { N = 500, SERIES = 400 };
    double x[N], res[N];
    size_t leaks = 0, caught = 0;
    detrend_spec linear = {.method = DETREND_GAUSSIAN_LINEAR, .bandwidth = 50};
    detrend_spec constant = {.method = DETREND_GAUSSIAN, .bandwidth = 50};
    detrend_leakage l;
    for (size_t k = 0; k < SERIES; k++) {
        ar1_fill(rng, 0.5, x, N);
        if (slowscan_detrend_apply(&linear, 1.0, x, N, NULL, res) == SLOWSCAN_OK &&
            slowscan_detrend_leakage_test(res, N, 50, 0.01, &l) == SLOWSCAN_OK)
            leaks += l.leaking;
        for (size_t i = 0; i < N; i++)
            x[i] += 0.05 * (double)i; /* 25 units over the record, ~1.15 noise sd */
        if (slowscan_detrend_apply(&constant, 1.0, x, N, NULL, res) == SLOWSCAN_OK &&
            slowscan_detrend_leakage_test(res, N, 50, 0.01, &l) == SLOWSCAN_OK)
            caught += l.leaking;
    }
    unsigned bound = 0;
    while (gsl_cdf_binomial_Q(bound, 0.01, SERIES) > 0.001)
        bound++;
    printf("trend leakage: %zu of %d AR(1) residuals called leaking (bound %u); the lagging fit "
           "caught on %zu of %d ramps\n", leaks, SERIES, bound, caught, SERIES);
    CHECK(leaks <= bound, "false leakage %zu of %d > %u", leaks, SERIES, bound);
    CHECK(caught == SERIES, "ramps caught %zu of %d", caught, SERIES);
}

static double ramp_sample(check_rng *rng, size_t k, size_t i, size_t n, double *state)
{
    (void)n;
    *state = 0.5 * *state + check_rng_gaussian(rng);
    double slope = k < 6 ? 0.05 : 0.0; /* the first six series rise steeply */
    return slope * (double)i + *state;
}

/* Through the binary: the lagging local-constant fit is reported, one line per series for a
 * few, one summary line for many; the default fit is not; --json records the test. */
static void test_binary(void)
{
    const char *in = check_tmp_path("leak.csv"), *json = check_tmp_path("leak.json");
    check_write_series_csv(in, 8, 400, ramp_sample, 3);
    char cmd[1024], *out = NULL, *err = NULL;
    snprintf(cmd, sizeof cmd, "%s detrend --detrend gaussian --vars s0,s1,s7 %s", check_binary(), in);
    int rc = check_run(cmd, &out, &err);
    CHECK(rc == 0 && err && strstr(err, "column 's0': the residual keeps part of the trend") &&
              strstr(err, "column 's1'") && !strstr(err, "'s7'"),
          "a warning per leaking series: %s", err ? err : "");
    free(out), free(err);
    snprintf(cmd, sizeof cmd, "%s screen --detrend gaussian --surrogates 19 --json %s %s",
             check_binary(), json, in);
    rc = check_run(cmd, &out, &err);
    size_t lines = 0;
    for (const char *c = err; c && *c; c++)
        lines += *c == '\n';
    CHECK(rc == 0 && err && strstr(err, "6 of 8 series keep part of their trend") && lines == 1,
          "one summary line for many: %s", err ? err : "");
    char *j = check_read_file(json);
    CHECK(j && strstr(j, "\"trend_leakage\": {\"level\": 0.01, \"leaking\": true"),
          "json records the leakage test");
    free(j), free(out), free(err);
    snprintf(cmd, sizeof cmd, "%s screen --surrogates 19 %s", check_binary(), in);
    rc = check_run(cmd, &out, &err);
    CHECK(rc == 0 && err && !strstr(err, "keep"), "the default fit follows the ramps: %s",
          err ? err : "");
    free(out), free(err);
}

void suite_leakage(void)
{
    check_rng *rng = check_rng_alloc(29);
    test_definition(rng);
    test_size_and_power(rng);
    test_binary();
    check_rng_free(rng);
}
