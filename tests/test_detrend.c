/* Tests of detrend/: every method against an independent reference, analytic cases, NaN
 * handling and argument errors. Internal references (direct sums written here from the
 * DESIGN §3 definitions) say so; outside ones name their source. */
#include "detrend_check.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define TWO_PI 6.283185307179586476925287 /* M_PI is not in strict C11 */

void suite_detrend(void);

static void test_parse(void)
{
    static const struct {
        const char *text;
        detrend_method method;
        int degree;
    } good[] = {
        {"gaussian", DETREND_GAUSSIAN, 0}, {"gaussian-linear", DETREND_GAUSSIAN_LINEAR, 0},
        {"moving", DETREND_MOVING, 0},
        {"loess", DETREND_LOESS, 0},       {"linear", DETREND_LINEAR, 1},
        {"poly:1", DETREND_POLY, 1},       {"poly:3", DETREND_POLY, 3},
        {"poly:12", DETREND_POLY, 12},     {"difference", DETREND_DIFFERENCE, 0},
        {"none", DETREND_NONE, 0},
    };
    for (size_t k = 0; k < sizeof good / sizeof good[0]; k++) {
        detrend_spec spec = {.method = DETREND_NONE, .bandwidth = 7.5, .degree = -1};
        int rc = slowscan_detrend_parse_method(good[k].text, &spec);
        CHECK(rc == SLOWSCAN_OK && spec.method == good[k].method &&
                  spec.degree == good[k].degree && spec.bandwidth == 7.5,
              "parse %s: rc %d method %d degree %d", good[k].text, rc, (int)spec.method,
              spec.degree);
    }
    static const char *const bad[] = {"poly", "poly:", "poly:0", "poly:13", "poly:3x",
                                      "poly: 3", "poly:+3", "poly:-1", "poly:3.0", "Gaussian",
                                      "gaussian-", "gaussian_linear", "gaussian-linear ",
                                      "", "linear ", "gauss", "poly:999999999999999999"};
    for (size_t k = 0; k < sizeof bad / sizeof bad[0]; k++) {
        detrend_spec spec = {.method = DETREND_LOESS, .bandwidth = 1.0, .degree = 5};
        int rc = slowscan_detrend_parse_method(bad[k], &spec);
        CHECK(rc == SLOWSCAN_EINVAL && spec.method == DETREND_LOESS && spec.degree == 5,
              "parse '%s' must fail and leave spec alone (rc %d)", bad[k], rc);
    }
    CHECK(slowscan_detrend_parse_method(NULL, &(detrend_spec){0}) == SLOWSCAN_EINVAL, "parse NULL");
    CHECK(strcmp(slowscan_detrend_method_name(DETREND_LOESS), "loess") == 0, "name loess");
    CHECK(strcmp(slowscan_detrend_method_name(DETREND_DIFFERENCE), "difference") == 0, "name diff");
    CHECK(strcmp(slowscan_detrend_method_name(DETREND_GAUSSIAN_LINEAR), "gaussian-linear") == 0,
          "name gaussian-linear");
    CHECK(slowscan_detrend_uses_bandwidth(DETREND_GAUSSIAN) &&
              slowscan_detrend_uses_bandwidth(DETREND_GAUSSIAN_LINEAR) && slowscan_detrend_uses_bandwidth(DETREND_MOVING) &&
              slowscan_detrend_uses_bandwidth(DETREND_LOESS) && !slowscan_detrend_uses_bandwidth(DETREND_POLY) &&
              !slowscan_detrend_uses_bandwidth(DETREND_LINEAR) && !slowscan_detrend_uses_bandwidth(DETREND_NONE),
          "uses_bandwidth");
}

static void check_moving_line(void)
{
    size_t n = 40;
    double x[40], trend[40];
    for (size_t i = 0; i < n; i++)
        x[i] = 2.0 + 3.0 * (double)i;
    /* bandwidth 3, dt 1: h = round(1.5) = 2 (half away from zero), window 5 samples */
    int rc = dc_run(DETREND_MOVING, 3.0, 0, 1.0, x, n, trend, NULL);
    CHECK(rc == SLOWSCAN_OK, "moving rc %d", rc);
    /* analytic: a centred mean of a line is the line; truncated edge windows are not centred */
    CHECK_CLOSE(trend[20], x[20], 1e-15, 0, "moving line interior");
    CHECK_CLOSE(trend[0], x[1], 1e-15, 0, "moving line edge: mean of x0..x2");
    CHECK_CLOSE(trend[1], (x[0] + x[1] + x[2] + x[3]) / 4, 1e-15, 0, "moving: mean x0..x3");
    CHECK_CLOSE(trend[39], x[38], 1e-15, 0, "moving line end: mean of x37..x39");
    x[20] = NAN;
    x[22] = NAN;
    rc = dc_run(DETREND_MOVING, 3.0, 0, 1.0, x, n, trend, NULL);
    /* analytic: the mean of the finite samples of each window */
    CHECK_CLOSE(trend[20], (x[18] + x[19] + x[21]) / 3, 1e-15, 0, "moving NaN at centre");
    CHECK_CLOSE(trend[21], (x[19] + x[21] + x[23]) / 3, 1e-15, 0, "moving two NaN in window");
    for (size_t i = 18; i < 27; i++)
        x[i] = NAN;
    rc = dc_run(DETREND_MOVING, 3.0, 0, 1.0, x, n, trend, NULL);
    /* analytic: with x18..x26 missing, only the windows of 20..24 hold no finite sample */
    CHECK(rc == SLOWSCAN_OK && isnan(trend[20]) && isnan(trend[24]) && dc_count_nan(trend, n) == 5 &&
              trend[19] == x[17] && trend[25] == x[27],
          "moving: NaN only where the window has no finite sample");
}

static void check_moving_brute(check_rng *rng, double offset)
{
    size_t n = 2000, h = 50; /* h = round(bandwidth / (2 dt)) */
    double dt = 0.1, bandwidth = 10.0, x[2000], got[2000];
    dc_make_series(rng, offset, x, n);
    dc_punch_gaps(x, n, 300, 120); /* gaps wider than the window: NaN trend inside */
    int rc = dc_run(DETREND_MOVING, bandwidth, 0, dt, x, n, got, NULL);
    double err = rc == SLOWSCAN_OK ? 0.0 : INFINITY;
    for (size_t i = 0; i < n; i++) {
        size_t lo = i > h ? i - h : 0, hi = i + h < n ? i + h : n - 1, c = 0;
        double sum = 0.0; /* reference: the window mean summed directly, O(n h) */
        for (size_t j = lo; j <= hi; j++)
            if (isfinite(x[j])) {
                sum += x[j] - offset;
                c++;
            }
        double want = c ? offset + sum / (double)c : NAN;
        double d = isnan(want) != isnan(got[i]) ? INFINITY : isnan(want) ? 0 : fabs(got[i] - want);
        err = dc_worse(err, d);
    }
    /* an exact window mean, rounded once: a few ulps cover the reference's own summation;
     * an uncompensated running sum drifts by hundreds over 2000 steps */
    double m = dc_max_abs(x, n), ulp = nextafter(m, INFINITY) - m;
    CHECK(err <= 8.0 * ulp && dc_count_nan(got, n) > 0,
          "moving vs direct window means, offset %g: max err %.3g ulp", offset, err / ulp);
}

static void check_loess_python(check_rng *rng, size_t n, double bandwidth)
{
    double x[400];
    dc_make_series(rng, 1e3, x, n);
    dc_punch_gaps(x, n, 150, 10);
    detrend_spec spec = {.method = DETREND_LOESS, .bandwidth = bandwidth};
    /* reference: tests/reference/loess_local_linear.py, our definition via numpy.linalg.lstsq
     * (Debian python3-numpy) */
    double err = dc_python_error("loess_local_linear.py", &spec, 0.5, x, n);
    CHECK(err <= 1e-12, "loess vs numpy (n=%zu, span %g): max err %.3g", n, bandwidth, err);
}

static void check_loess_analytic(void)
{
    size_t n = 200;
    double x[200], trend[200];
    for (size_t i = 0; i < n; i++)
        x[i] = 1e4 - 0.75 * (double)i * 0.2;
    x[0] = x[50] = x[51] = x[199] = NAN;
    int rc = dc_run(DETREND_LOESS, 5.0, 0, 0.2, x, n, trend, NULL);
    double err = 0.0;
    for (size_t i = 0; i < n; i++) /* analytic: a local line fit reproduces a line, even at gaps */
        err = dc_worse(err, fabs(trend[i] - (1e4 - 0.75 * (double)i * 0.2)));
    CHECK(rc == SLOWSCAN_OK && err <= 1e-14 * 1e4, "loess line: max err %.3g", err);

    /* sparse data: neighbourhoods of q = 3 holding 0 or 1 finite samples */
    double y[20];
    for (size_t i = 0; i < 20; i++)
        y[i] = NAN;
    y[0] = 1.0;
    y[10] = 4.0;
    y[19] = 9.0;
    rc = dc_run(DETREND_LOESS, 2.0, 0, 1.0, y, 20, trend, NULL);
    CHECK(rc == SLOWSCAN_OK && trend[10] == 4.0 && trend[9] == 4.0 && isnan(trend[5]) &&
              trend[0] == 1.0 && trend[1] == 1.0 && isnan(trend[2]),
          "loess sparse: single-sample neighbourhoods give the sample, empty ones NaN");
    /* two finite samples, one of them the farthest of every neighbourhood (weight ~3e-17):
     * analytic: the weighted line through two points is that line, whatever the weights */
    double z[5] = {2.0, NAN, NAN, NAN, -6.0};
    rc = dc_run(DETREND_LOESS, 4.0, 0, 1.0, z, 5, trend, NULL);
    double zerr = 0.0;
    for (size_t i = 0; i < 5; i++)
        zerr = dc_worse(zerr, fabs(trend[i] - (2.0 - 2.0 * (double)i)));
    CHECK(rc == SLOWSCAN_OK && zerr <= 1e-6, "loess through two samples: max err %.3g", zerr);
}

static void check_poly_python(check_rng *rng, int degree)
{
    size_t n = 500;
    double dt = 0.01, x[500];
    dc_make_series(rng, 10.0, x, n);
    for (size_t i = 0; i < n; i++)
        x[i] += 0.5 * pow((double)i * dt - 2.0, 3);
    dc_punch_gaps(x, n, 200, 30);
    detrend_spec spec = {.method = DETREND_POLY, .degree = degree};
    /* reference: numpy.polyfit / polyval (Debian python3-numpy), tests/reference/polyfit.py */
    double err = dc_python_error("polyfit.py", &spec, dt, x, n);
    CHECK(err <= 1e-10, "poly:%d vs numpy.polyfit: max err %.3g", degree, err);
}

static void check_poly_exact(void)
{
    size_t n = 300;
    double dt = 0.1, line[300], cubic[300], trend[300], residual[300];
    for (size_t i = 0; i < n; i++) {
        double t = (double)i * dt;
        line[i] = 3.0 - 0.4 * t;
        cubic[i] = 1.0 + t - 0.3 * t * t + 0.02 * t * t * t;
    }
    line[5] = cubic[5] = NAN;
    int rc = dc_run(DETREND_LINEAR, 0.0, 0, dt, line, n, trend, residual);
    /* analytic: least squares reproduces data lying on the model exactly */
    CHECK(rc == SLOWSCAN_OK && fabs(trend[5] - (3.0 - 0.4 * 0.5)) <= 1e-12 &&
              isnan(residual[5]) && dc_count_nan(residual, n) == 1 && dc_max_abs(residual, n) <= 1e-12,
          "linear reproduces a line (trend at the NaN %.17g)", trend[5]);
    rc = dc_run(DETREND_POLY, 0.0, 3, dt, cubic, n, trend, residual);
    double t5 = 0.5, c5 = 1.0 + t5 - 0.3 * t5 * t5 + 0.02 * t5 * t5 * t5;
    CHECK(rc == SLOWSCAN_OK && fabs(trend[5] - c5) <= 1e-11 && dc_count_nan(residual, n) == 1 &&
              dc_max_abs(residual, n) <= 1e-11,
          "poly:3 reproduces a cubic (max residual %.3g)", dc_max_abs(residual, n));
    rc = dc_run(DETREND_POLY, 0.0, 2, dt, cubic, n, trend, residual);
    CHECK(rc == SLOWSCAN_OK && dc_max_abs(residual, n) > 1e-3, "poly:2 cannot fit a cubic");
    /* degree = finite samples - 1: exact interpolation through them */
    double few[5] = {1.0, NAN, 5.0, NAN, 2.0};
    rc = dc_run(DETREND_POLY, 0.0, 2, 1.0, few, 5, trend, residual);
    CHECK(rc == SLOWSCAN_OK && fabs(residual[0]) + fabs(residual[2]) + fabs(residual[4]) < 1e-12,
          "poly:2 through 3 points is an interpolation");
    CHECK(dc_run(DETREND_POLY, 0.0, 3, 1.0, few, 5, trend, NULL) == SLOWSCAN_EINVAL,
          "poly:3 on 3 finite samples is EINVAL");
}

static void test_difference_none(void)
{
    double x[6] = {1.0, 4.0, NAN, 2.0, 7.0, 7.5}, trend[6], res[6];
    int rc = dc_run(DETREND_DIFFERENCE, 0.0, 0, 1.0, x, 6, trend, res);
    /* analytic: header definition residual_i = x_i - x_{i-1}, trend_i = x_{i-1} */
    CHECK(rc == SLOWSCAN_OK && isnan(res[0]) && res[1] == 3.0 && isnan(res[2]) &&
              isnan(res[3]) && res[4] == 5.0 && res[5] == 0.5,
          "difference residuals");
    CHECK(isnan(trend[0]) && trend[1] == 1.0 && trend[2] == 4.0 && isnan(trend[3]) &&
              trend[5] == 7.0,
          "difference trend");
    rc = dc_run(DETREND_NONE, 0.0, 0, 1.0, x, 6, trend, res);
    int ok = rc == SLOWSCAN_OK;
    for (size_t i = 0; i < 6; i++)
        ok = ok && trend[i] == 0.0 && (isnan(x[i]) ? isnan(res[i]) : res[i] == x[i]);
    CHECK(ok, "none: trend 0, residual = x");
}

static void test_residual_rules(check_rng *rng)
{
    size_t n = 400;
    double x[400], trend[400], res[400], inplace[400];
    dc_make_series(rng, 5.0, x, n);
    dc_punch_gaps(x, n, 100, 5);
    int rc = dc_run(DETREND_LOESS, 4.0, 0, 0.1, x, n, trend, res);
    int ok = rc == SLOWSCAN_OK;
    for (size_t i = 0; i < n; i++)
        ok = ok && (isnan(x[i]) ? isnan(res[i]) && isfinite(trend[i]) : res[i] == x[i] - trend[i]);
    CHECK(ok, "residual = x - trend, NaN exactly where x is NaN");
    memcpy(inplace, x, sizeof x);
    rc = dc_run(DETREND_LOESS, 4.0, 0, 0.1, inplace, n, NULL, inplace);
    CHECK(rc == SLOWSCAN_OK && check_max_diff(inplace, res, n) == 0.0, "residual in place over x");
    memcpy(inplace, x, sizeof x);
    rc = dc_run(DETREND_GAUSSIAN, 4.0, 0, 0.1, inplace, n, inplace, NULL);
    dc_run(DETREND_GAUSSIAN, 4.0, 0, 0.1, x, n, trend, NULL);
    CHECK(rc == SLOWSCAN_OK && check_max_diff(inplace, trend, n) == 0.0, "trend in place over x");
}

static void test_errors(void)
{
    double x[10] = {1, 2, 3, 4, 5, 6, 7, 8, 9, 10}, t[10], nanx[10];
    static const detrend_method bw_methods[] = {DETREND_GAUSSIAN, DETREND_GAUSSIAN_LINEAR,
                                                DETREND_MOVING, DETREND_LOESS};
    for (size_t k = 0; k < 4; k++) {
        CHECK(dc_run(bw_methods[k], 0.0, 0, 1.0, x, 10, t, NULL) == SLOWSCAN_EINVAL, "bw 0");
        CHECK(dc_run(bw_methods[k], -1.0, 0, 1.0, x, 10, t, NULL) == SLOWSCAN_EINVAL, "bw < 0");
        CHECK(dc_run(bw_methods[k], NAN, 0, 1.0, x, 10, t, NULL) == SLOWSCAN_EINVAL, "bw NaN");
        CHECK(dc_run(bw_methods[k], 2.0, 0, 0.0, x, 10, t, NULL) == SLOWSCAN_EINVAL, "dt 0");
    }
    CHECK(dc_run(DETREND_LINEAR, 0.0, 0, 1.0, x, 10, t, NULL) == SLOWSCAN_OK, "linear ignores bw");
    CHECK(dc_run(DETREND_POLY, 0.0, 13, 1.0, x, 10, t, NULL) == SLOWSCAN_EINVAL, "degree 13");
    CHECK(dc_run(DETREND_POLY, 0.0, 0, 1.0, x, 10, t, NULL) == SLOWSCAN_EINVAL, "degree 0");
    CHECK(dc_run(DETREND_POLY, 0.0, 10, 1.0, x, 10, t, NULL) == SLOWSCAN_EINVAL, "degree >= n");
    CHECK(dc_run(DETREND_POLY, 0.0, 9, 1.0, x, 10, t, NULL) == SLOWSCAN_OK, "degree n-1");
    for (size_t i = 0; i < 10; i++)
        nanx[i] = NAN;
    for (int m = DETREND_GAUSSIAN; m <= DETREND_NONE; m++)
        CHECK(dc_run((detrend_method)m, 2.0, 1, 1.0, nanx, 10, t, NULL) == SLOWSCAN_ESHORT,
              "all NaN -> ESHORT (method %d)", m);
    nanx[4] = 1.0;
    CHECK(dc_run(DETREND_GAUSSIAN, 2.0, 0, 1.0, nanx, 10, t, NULL) == SLOWSCAN_ESHORT &&
              dc_run(DETREND_GAUSSIAN_LINEAR, 2.0, 0, 1.0, nanx, 10, t, NULL) == SLOWSCAN_ESHORT,
          "one finite sample -> ESHORT");
    CHECK(dc_run(DETREND_NONE, 2.0, 0, 1.0, x, 0, t, NULL) == SLOWSCAN_ESHORT, "n = 0");
    CHECK(slowscan_detrend_apply(NULL, 1.0, x, 10, t, NULL) == SLOWSCAN_EINVAL, "NULL spec");
}

void suite_detrend(void)
{
    check_rng *rng = check_rng_alloc(20240611UL);
    test_parse();
    detrend_gaussian_checks(rng);
    check_moving_line();
    check_moving_brute(rng, 0.0);
    check_moving_brute(rng, 1e6);
    check_loess_python(rng, 400, 30.0);  /* q = 61 */
    check_loess_python(rng, 400, 30.5);  /* q = 62: even, ties toward the past */
    check_loess_python(rng, 60, 100.0);  /* q > n: one neighbourhood for all */
    check_loess_analytic();
    check_poly_python(rng, 1);
    check_poly_python(rng, 3);
    check_poly_python(rng, 6);
    check_poly_exact();
    test_difference_none();
    test_residual_rules(rng);
    test_errors();
    detrend_workspace_checks(rng);
    check_rng_free(rng);
}
