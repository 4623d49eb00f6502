/* Tests of detrend/: every method against an independent reference, analytic cases, NaN
 * handling and argument errors. Internal references (direct sums written here from the
 * DESIGN §3 definitions) say so; outside ones name their source. */
#include "check.h"
#include "slowscan/detrend.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define TWO_PI 6.283185307179586476925287 /* M_PI is not in strict C11 */

void suite_detrend(void);

static double max_abs(const double *x, size_t n)
{
    double m = 0.0;
    for (size_t i = 0; i < n; i++)
        if (isfinite(x[i]) && fabs(x[i]) > m)
            m = fabs(x[i]);
    return m;
}

/* Running maximum of errors that treats a NaN error as infinitely bad (fmax would skip it). */
static double worse(double acc, double err)
{
    return isnan(err) ? INFINITY : err > acc ? err : acc;
}

static size_t count_nan(const double *x, size_t n)
{
    size_t c = 0;
    for (size_t i = 0; i < n; i++)
        c += isnan(x[i]) ? 1 : 0;
    return c;
}

/* Writes "t x" lines for the python references; returns 0 on success. */
static int write_series(const char *path, double dt, const double *x, size_t n)
{
    FILE *f = fopen(path, "w");
    if (!f)
        return -1;
    for (size_t i = 0; i < n; i++)
        fprintf(f, "%.17g %.17g\n", (double)i * dt, x[i]);
    return fclose(f) == 0 ? 0 : -1;
}

/* Runs a python reference on x; fills want[n]; returns 1 if it produced n numbers. */
static int python_reference(const char *script, const char *arg, double dt, const double *x,
                            size_t n, double *want)
{
    const char *path = check_tmp_path("detrend_series.txt");
    if (write_series(path, dt, x, n) != 0)
        return 0;
    char cmd[1024];
    snprintf(cmd, sizeof cmd, "%s %s %s", script, path, arg);
    return check_python(cmd, want, n) == (int)n;
}

static int run(detrend_method method, double bandwidth, int degree, double dt, const double *x,
               size_t n, double *trend, double *residual)
{
    detrend_spec spec = {.method = method, .bandwidth = bandwidth, .degree = degree};
    return detrend_apply(&spec, dt, x, n, trend, residual);
}

/* Runs `spec` on x and a python reference (argument: the bandwidth, or the degree for poly)
 * on the same data; returns max |ours - theirs| / max|x|, infinite if either failed. */
static double python_error(const char *script, const detrend_spec *spec, double dt,
                           const double *x, size_t n)
{
    double *got = malloc(n * sizeof *got), *want = malloc(n * sizeof *want);
    char arg[64];
    if (spec->method == DETREND_POLY)
        snprintf(arg, sizeof arg, "%d", spec->degree);
    else
        snprintf(arg, sizeof arg, "%.17g", spec->bandwidth);
    int ok = detrend_apply(spec, dt, x, n, got, NULL) == SLOWSCAN_OK &&
             python_reference(script, arg, dt, x, n, want);
    double err = ok ? check_max_diff(got, want, n) / max_abs(x, n) : INFINITY;
    free(got);
    free(want);
    return err;
}

/* Random walk plus a slow sine and white noise, so trends are non-trivial at every scale. */
static void make_series(check_rng *rng, double offset, double *x, size_t n)
{
    double walk = 0.0;
    for (size_t i = 0; i < n; i++) {
        walk += 0.05 * check_rng_gaussian(rng);
        x[i] = offset + walk + sin(0.004 * (double)i) + 0.3 * check_rng_gaussian(rng);
    }
}

/* Gaps of `len` samples every `every` samples, plus isolated missing samples. */
static void punch_gaps(double *x, size_t n, size_t every, size_t len)
{
    for (size_t start = every / 2; start < n; start += every)
        for (size_t i = start; i < start + len && i < n; i++)
            x[i] = NAN;
    for (size_t i = 7; i < n; i += 97)
        x[i] = NAN;
}

/* Internal reference: the Nadaraya-Watson sum of DESIGN §3 computed directly, O(n^2), over
 * lags up to `reach` samples (reach >= n - 1 means no truncation at all). Summing x - c for a
 * constant c is the same sum; with c = the first finite sample it keeps the reference exact
 * to the rounding of its output even for a series with a large offset. */
static void direct_nw(const double *x, size_t n, double s_samples, size_t reach, double *out)
{
    double c = 0.0;
    for (size_t j = n; j-- > 0;)
        c = isfinite(x[j]) ? x[j] : c;
    double *w = malloc(n * sizeof *w);
    for (size_t l = 0; l < n; l++)
        w[l] = l <= reach ? exp(-0.5 * ((double)l / s_samples) * ((double)l / s_samples)) : 0;
    for (size_t i = 0; i < n; i++) {
        double num = 0.0, den = 0.0;
        for (size_t j = 0; j < n; j++) {
            if (!isfinite(x[j]))
                continue;
            double wt = w[j > i ? j - i : i - j];
            num += wt * (x[j] - c);
            den += wt;
        }
        out[i] = den > 0.0 ? c + num / den : NAN;
    }
    free(w);
}

static void test_parse(void)
{
    static const struct {
        const char *text;
        detrend_method method;
        int degree;
    } good[] = {
        {"gaussian", DETREND_GAUSSIAN, 0}, {"moving", DETREND_MOVING, 0},
        {"loess", DETREND_LOESS, 0},       {"linear", DETREND_LINEAR, 1},
        {"poly:1", DETREND_POLY, 1},       {"poly:3", DETREND_POLY, 3},
        {"poly:12", DETREND_POLY, 12},     {"difference", DETREND_DIFFERENCE, 0},
        {"none", DETREND_NONE, 0},
    };
    for (size_t k = 0; k < sizeof good / sizeof good[0]; k++) {
        detrend_spec spec = {.method = DETREND_NONE, .bandwidth = 7.5, .degree = -1};
        int rc = detrend_parse_method(good[k].text, &spec);
        CHECK(rc == SLOWSCAN_OK && spec.method == good[k].method &&
                  spec.degree == good[k].degree && spec.bandwidth == 7.5,
              "parse %s: rc %d method %d degree %d", good[k].text, rc, (int)spec.method,
              spec.degree);
    }
    static const char *const bad[] = {"poly", "poly:", "poly:0", "poly:13", "poly:3x",
                                      "poly: 3", "poly:+3", "poly:-1", "poly:3.0", "Gaussian",
                                      "", "linear ", "gauss", "poly:999999999999999999"};
    for (size_t k = 0; k < sizeof bad / sizeof bad[0]; k++) {
        detrend_spec spec = {.method = DETREND_LOESS, .bandwidth = 1.0, .degree = 5};
        int rc = detrend_parse_method(bad[k], &spec);
        CHECK(rc == SLOWSCAN_EINVAL && spec.method == DETREND_LOESS && spec.degree == 5,
              "parse '%s' must fail and leave spec alone (rc %d)", bad[k], rc);
    }
    CHECK(detrend_parse_method(NULL, &(detrend_spec){0}) == SLOWSCAN_EINVAL, "parse NULL");
    CHECK(strcmp(detrend_method_name(DETREND_LOESS), "loess") == 0, "name loess");
    CHECK(strcmp(detrend_method_name(DETREND_DIFFERENCE), "difference") == 0, "name diff");
    CHECK(detrend_uses_bandwidth(DETREND_GAUSSIAN) && detrend_uses_bandwidth(DETREND_MOVING) &&
              detrend_uses_bandwidth(DETREND_LOESS) && !detrend_uses_bandwidth(DETREND_POLY) &&
              !detrend_uses_bandwidth(DETREND_LINEAR) && !detrend_uses_bandwidth(DETREND_NONE),
          "uses_bandwidth");
}

/* n = 3000, bandwidth 10% of the span (h = 2400 samples: the FFT path), with gaps. */
static void check_fft_against_direct(check_rng *rng, double offset)
{
    size_t n = 3000;
    double dt = 0.5, bandwidth = 0.1 * (double)(n - 1) * dt, x[3000], got[3000], want[3000];
    make_series(rng, offset, x, n);
    punch_gaps(x, n, 600, 40);
    int rc = run(DETREND_GAUSSIAN, bandwidth, 0, dt, x, n, got, NULL);
    direct_nw(x, n, bandwidth / dt, n, want); /* reference: direct O(n^2) sum, DESIGN §3 */
    double err = check_max_diff(got, want, n) / max_abs(x, n);
    CHECK(rc == SLOWSCAN_OK && err <= 1e-12,
          "gaussian FFT vs direct sum, offset %g: rc %d, max error / max|x| = %.3g", offset, rc,
          err);
    CHECK(count_nan(got, n) == 0, "gaussian trend defined inside short gaps");
    /* With a large offset, recentring keeps the result within an ulp or so of the exact one;
     * without it the FFT's round-off on the offset itself shows as several ulps. */
    double m = max_abs(x, n), ulp = nextafter(m, INFINITY) - m;
    if (offset != 0.0)
        CHECK(check_max_diff(got, want, n) <= 3.0 * ulp, "gaussian offset %g: error %.3g ulp",
              offset, check_max_diff(got, want, n) / ulp);
}

/* A gap of 30 s with s = 1: its middle is beyond the 8 s reach (NaN), and its inner part has
 * denominators far below FFT round-off, so this exercises the exact fallback. */
static void check_long_gap(check_rng *rng)
{
    size_t n = 2000, h = 80; /* h = ceil(8 s / dt) */
    double dt = 0.1, bandwidth = 1.0, x[2000], got[2000], want[2000];
    make_series(rng, 0.0, x, n);
    for (size_t i = 700; i < 1000; i++)
        x[i] = NAN;
    int rc = run(DETREND_GAUSSIAN, bandwidth, 0, dt, x, n, got, NULL);
    direct_nw(x, n, bandwidth / dt, h, want); /* reference: direct sum cut at 8 s, DESIGN §3 */
    double err = check_max_diff(got, want, n) / max_abs(x, n);
    CHECK(rc == SLOWSCAN_OK && err <= 1e-12, "gaussian long gap: rc %d, max err %.3g", rc, err);
    CHECK(isnan(got[700 + h]) && isnan(got[999 - h]) && isfinite(got[699 + h]) &&
              isfinite(got[1000 - h]),
          "gaussian: NaN exactly where no finite sample lies within 8 s");
}

static void check_constant(double bandwidth, double c)
{
    size_t n = 1000;
    double x[1000], trend[1000];
    for (size_t i = 0; i < n; i++)
        x[i] = c;
    x[0] = x[500] = NAN;
    int rc = run(DETREND_GAUSSIAN, bandwidth, 0, 1.0, x, n, trend, NULL);
    /* analytic: a renormalised kernel average of a constant is that constant, edges included */
    CHECK(rc == SLOWSCAN_OK, "gaussian constant rc %d", rc);
    CHECK_CLOSE(trend[0], c, 1e-12, 0, "gaussian constant: first sample (NaN) not pulled to 0");
    CHECK_CLOSE(trend[n - 1], c, 1e-12, 0, "gaussian constant: last sample not pulled to 0");
    double err = 0.0;
    for (size_t i = 0; i < n; i++)
        err = worse(err, fabs(trend[i] - c));
    CHECK(err <= 1e-12 * fabs(c), "gaussian constant %g (s=%g): max err %.3g", c, bandwidth,
          err);
}

static void check_gaussian_python(check_rng *rng, double bandwidth)
{
    size_t n = 1500;
    double x[1500];
    make_series(rng, 50.0, x, n);
    punch_gaps(x, n, 400, 15);
    detrend_spec spec = {.method = DETREND_GAUSSIAN, .bandwidth = bandwidth};
    /* reference: tests/reference/nw_gaussian.py, direct numpy sum (Debian python3-numpy) */
    double err = python_error("nw_gaussian.py", &spec, 0.25, x, n);
    CHECK(err <= 1e-10, "gaussian vs numpy (s=%g): max err %.3g", bandwidth, err);
}

/* A long series: the O(n log n) path must finish quickly; spot-check against direct sums. */
static void check_gaussian_long(check_rng *rng)
{
    size_t n = (size_t)1 << 19;
    double s = 0.1 * (double)(n - 1); /* dt = 1 */
    double *x = malloc(n * sizeof *x), *trend = malloc(n * sizeof *x);
    make_series(rng, 0.0, x, n);
    punch_gaps(x, n, 50000, 2000);
    int rc = run(DETREND_GAUSSIAN, s, 0, 1.0, x, n, trend, NULL);
    CHECK(rc == SLOWSCAN_OK, "gaussian long series rc %d", rc);
    static const size_t at[] = {0, 1, 25000, 26000, 262144, 400000, 524287};
    for (size_t k = 0; k < sizeof at / sizeof at[0]; k++) {
        size_t i = at[k];
        double num = 0.0, den = 0.0; /* reference: direct sum at one point, DESIGN §3 */
        for (size_t j = 0; j < n; j++) {
            if (isfinite(x[j])) {
                double u = ((double)j - (double)i) / s, w = exp(-0.5 * u * u);
                num += w * x[j];
                den += w;
            }
        }
        CHECK_CLOSE(trend[i], num / den, 0.0, 1e-12 * max_abs(x, n), "gaussian long, point");
    }
    free(x);
    free(trend);
}

static void test_gaussian(check_rng *rng)
{
    check_fft_against_direct(rng, 0.0);
    check_fft_against_direct(rng, 1e6);
    check_long_gap(rng);
    check_constant(300.0, 3.7);  /* FFT path */
    check_constant(300.0, -2e6); /* FFT path, large offset */
    check_constant(2.0, 3.7);    /* direct path */
    check_gaussian_python(rng, 20.0); /* 80 samples: FFT path */
    check_gaussian_python(rng, 1.5);  /* 6 samples: direct path */
    check_gaussian_long(rng);
}

static void check_moving_line(void)
{
    size_t n = 40;
    double x[40], trend[40];
    for (size_t i = 0; i < n; i++)
        x[i] = 2.0 + 3.0 * (double)i;
    /* bandwidth 3, dt 1: h = round(1.5) = 2 (half away from zero), window 5 samples */
    int rc = run(DETREND_MOVING, 3.0, 0, 1.0, x, n, trend, NULL);
    CHECK(rc == SLOWSCAN_OK, "moving rc %d", rc);
    /* analytic: a centred mean of a line is the line; truncated edge windows are not centred */
    CHECK_CLOSE(trend[20], x[20], 1e-15, 0, "moving line interior");
    CHECK_CLOSE(trend[0], x[1], 1e-15, 0, "moving line edge: mean of x0..x2");
    CHECK_CLOSE(trend[1], (x[0] + x[1] + x[2] + x[3]) / 4, 1e-15, 0, "moving: mean x0..x3");
    CHECK_CLOSE(trend[39], x[38], 1e-15, 0, "moving line end: mean of x37..x39");
    x[20] = NAN;
    x[22] = NAN;
    rc = run(DETREND_MOVING, 3.0, 0, 1.0, x, n, trend, NULL);
    /* analytic: the mean of the finite samples of each window */
    CHECK_CLOSE(trend[20], (x[18] + x[19] + x[21]) / 3, 1e-15, 0, "moving NaN at centre");
    CHECK_CLOSE(trend[21], (x[19] + x[21] + x[23]) / 3, 1e-15, 0, "moving two NaN in window");
    for (size_t i = 18; i < 27; i++)
        x[i] = NAN;
    rc = run(DETREND_MOVING, 3.0, 0, 1.0, x, n, trend, NULL);
    /* analytic: with x18..x26 missing, only the windows of 20..24 hold no finite sample */
    CHECK(rc == SLOWSCAN_OK && isnan(trend[20]) && isnan(trend[24]) && count_nan(trend, n) == 5 &&
              trend[19] == x[17] && trend[25] == x[27],
          "moving: NaN only where the window has no finite sample");
}

static void check_moving_brute(check_rng *rng, double offset)
{
    size_t n = 2000, h = 50; /* h = round(bandwidth / (2 dt)) */
    double dt = 0.1, bandwidth = 10.0, x[2000], got[2000];
    make_series(rng, offset, x, n);
    punch_gaps(x, n, 300, 120); /* gaps wider than the window: NaN trend inside */
    int rc = run(DETREND_MOVING, bandwidth, 0, dt, x, n, got, NULL);
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
        err = worse(err, d);
    }
    /* an exact window mean, rounded once: a few ulps cover the reference's own summation;
     * an uncompensated running sum drifts by hundreds over 2000 steps */
    double m = max_abs(x, n), ulp = nextafter(m, INFINITY) - m;
    CHECK(err <= 8.0 * ulp && count_nan(got, n) > 0,
          "moving vs direct window means, offset %g: max err %.3g ulp", offset, err / ulp);
}

static void check_loess_python(check_rng *rng, size_t n, double bandwidth)
{
    double x[400];
    make_series(rng, 1e3, x, n);
    punch_gaps(x, n, 150, 10);
    detrend_spec spec = {.method = DETREND_LOESS, .bandwidth = bandwidth};
    /* reference: tests/reference/loess_local_linear.py, our definition via numpy.linalg.lstsq
     * (Debian python3-numpy) */
    double err = python_error("loess_local_linear.py", &spec, 0.5, x, n);
    CHECK(err <= 1e-12, "loess vs numpy (n=%zu, span %g): max err %.3g", n, bandwidth, err);
}

static void check_loess_analytic(void)
{
    size_t n = 200;
    double x[200], trend[200];
    for (size_t i = 0; i < n; i++)
        x[i] = 1e4 - 0.75 * (double)i * 0.2;
    x[0] = x[50] = x[51] = x[199] = NAN;
    int rc = run(DETREND_LOESS, 5.0, 0, 0.2, x, n, trend, NULL);
    double err = 0.0;
    for (size_t i = 0; i < n; i++) /* analytic: a local line fit reproduces a line, even at gaps */
        err = worse(err, fabs(trend[i] - (1e4 - 0.75 * (double)i * 0.2)));
    CHECK(rc == SLOWSCAN_OK && err <= 1e-14 * 1e4, "loess line: max err %.3g", err);

    /* sparse data: neighbourhoods of q = 3 holding 0 or 1 finite samples */
    double y[20];
    for (size_t i = 0; i < 20; i++)
        y[i] = NAN;
    y[0] = 1.0;
    y[10] = 4.0;
    y[19] = 9.0;
    rc = run(DETREND_LOESS, 2.0, 0, 1.0, y, 20, trend, NULL);
    CHECK(rc == SLOWSCAN_OK && trend[10] == 4.0 && trend[9] == 4.0 && isnan(trend[5]) &&
              trend[0] == 1.0 && trend[1] == 1.0 && isnan(trend[2]),
          "loess sparse: single-sample neighbourhoods give the sample, empty ones NaN");
    /* two finite samples, one of them the farthest of every neighbourhood (weight ~3e-17):
     * analytic: the weighted line through two points is that line, whatever the weights */
    double z[5] = {2.0, NAN, NAN, NAN, -6.0};
    rc = run(DETREND_LOESS, 4.0, 0, 1.0, z, 5, trend, NULL);
    double zerr = 0.0;
    for (size_t i = 0; i < 5; i++)
        zerr = worse(zerr, fabs(trend[i] - (2.0 - 2.0 * (double)i)));
    CHECK(rc == SLOWSCAN_OK && zerr <= 1e-6, "loess through two samples: max err %.3g", zerr);
}

static void check_poly_python(check_rng *rng, int degree)
{
    size_t n = 500;
    double dt = 0.01, x[500];
    make_series(rng, 10.0, x, n);
    for (size_t i = 0; i < n; i++)
        x[i] += 0.5 * pow((double)i * dt - 2.0, 3);
    punch_gaps(x, n, 200, 30);
    detrend_spec spec = {.method = DETREND_POLY, .degree = degree};
    /* reference: numpy.polyfit / polyval (Debian python3-numpy), tests/reference/polyfit.py */
    double err = python_error("polyfit.py", &spec, dt, x, n);
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
    int rc = run(DETREND_LINEAR, 0.0, 0, dt, line, n, trend, residual);
    /* analytic: least squares reproduces data lying on the model exactly */
    CHECK(rc == SLOWSCAN_OK && fabs(trend[5] - (3.0 - 0.4 * 0.5)) <= 1e-12 &&
              isnan(residual[5]) && count_nan(residual, n) == 1 && max_abs(residual, n) <= 1e-12,
          "linear reproduces a line (trend at the NaN %.17g)", trend[5]);
    rc = run(DETREND_POLY, 0.0, 3, dt, cubic, n, trend, residual);
    double t5 = 0.5, c5 = 1.0 + t5 - 0.3 * t5 * t5 + 0.02 * t5 * t5 * t5;
    CHECK(rc == SLOWSCAN_OK && fabs(trend[5] - c5) <= 1e-11 && count_nan(residual, n) == 1 &&
              max_abs(residual, n) <= 1e-11,
          "poly:3 reproduces a cubic (max residual %.3g)", max_abs(residual, n));
    rc = run(DETREND_POLY, 0.0, 2, dt, cubic, n, trend, residual);
    CHECK(rc == SLOWSCAN_OK && max_abs(residual, n) > 1e-3, "poly:2 cannot fit a cubic");
    /* degree = finite samples - 1: exact interpolation through them */
    double few[5] = {1.0, NAN, 5.0, NAN, 2.0};
    rc = run(DETREND_POLY, 0.0, 2, 1.0, few, 5, trend, residual);
    CHECK(rc == SLOWSCAN_OK && fabs(residual[0]) + fabs(residual[2]) + fabs(residual[4]) < 1e-12,
          "poly:2 through 3 points is an interpolation");
    CHECK(run(DETREND_POLY, 0.0, 3, 1.0, few, 5, trend, NULL) == SLOWSCAN_EINVAL,
          "poly:3 on 3 finite samples is EINVAL");
}

static void test_difference_none(void)
{
    double x[6] = {1.0, 4.0, NAN, 2.0, 7.0, 7.5}, trend[6], res[6];
    int rc = run(DETREND_DIFFERENCE, 0.0, 0, 1.0, x, 6, trend, res);
    /* analytic: header definition residual_i = x_i - x_{i-1}, trend_i = x_{i-1} */
    CHECK(rc == SLOWSCAN_OK && isnan(res[0]) && res[1] == 3.0 && isnan(res[2]) &&
              isnan(res[3]) && res[4] == 5.0 && res[5] == 0.5,
          "difference residuals");
    CHECK(isnan(trend[0]) && trend[1] == 1.0 && trend[2] == 4.0 && isnan(trend[3]) &&
              trend[5] == 7.0,
          "difference trend");
    rc = run(DETREND_NONE, 0.0, 0, 1.0, x, 6, trend, res);
    int ok = rc == SLOWSCAN_OK;
    for (size_t i = 0; i < 6; i++)
        ok = ok && trend[i] == 0.0 && (isnan(x[i]) ? isnan(res[i]) : res[i] == x[i]);
    CHECK(ok, "none: trend 0, residual = x");
}

static void test_residual_rules(check_rng *rng)
{
    size_t n = 400;
    double x[400], trend[400], res[400], inplace[400];
    make_series(rng, 5.0, x, n);
    punch_gaps(x, n, 100, 5);
    int rc = run(DETREND_LOESS, 4.0, 0, 0.1, x, n, trend, res);
    int ok = rc == SLOWSCAN_OK;
    for (size_t i = 0; i < n; i++)
        ok = ok && (isnan(x[i]) ? isnan(res[i]) && isfinite(trend[i]) : res[i] == x[i] - trend[i]);
    CHECK(ok, "residual = x - trend, NaN exactly where x is NaN");
    memcpy(inplace, x, sizeof x);
    rc = run(DETREND_LOESS, 4.0, 0, 0.1, inplace, n, NULL, inplace);
    CHECK(rc == SLOWSCAN_OK && check_max_diff(inplace, res, n) == 0.0, "residual in place over x");
    memcpy(inplace, x, sizeof x);
    rc = run(DETREND_GAUSSIAN, 4.0, 0, 0.1, inplace, n, inplace, NULL);
    run(DETREND_GAUSSIAN, 4.0, 0, 0.1, x, n, trend, NULL);
    CHECK(rc == SLOWSCAN_OK && check_max_diff(inplace, trend, n) == 0.0, "trend in place over x");
}

static void test_errors(void)
{
    double x[10] = {1, 2, 3, 4, 5, 6, 7, 8, 9, 10}, t[10], nanx[10];
    static const detrend_method bw_methods[] = {DETREND_GAUSSIAN, DETREND_MOVING, DETREND_LOESS};
    for (size_t k = 0; k < 3; k++) {
        CHECK(run(bw_methods[k], 0.0, 0, 1.0, x, 10, t, NULL) == SLOWSCAN_EINVAL, "bw 0");
        CHECK(run(bw_methods[k], -1.0, 0, 1.0, x, 10, t, NULL) == SLOWSCAN_EINVAL, "bw < 0");
        CHECK(run(bw_methods[k], NAN, 0, 1.0, x, 10, t, NULL) == SLOWSCAN_EINVAL, "bw NaN");
        CHECK(run(bw_methods[k], 2.0, 0, 0.0, x, 10, t, NULL) == SLOWSCAN_EINVAL, "dt 0");
    }
    CHECK(run(DETREND_LINEAR, 0.0, 0, 1.0, x, 10, t, NULL) == SLOWSCAN_OK, "linear ignores bw");
    CHECK(run(DETREND_POLY, 0.0, 13, 1.0, x, 10, t, NULL) == SLOWSCAN_EINVAL, "degree 13");
    CHECK(run(DETREND_POLY, 0.0, 0, 1.0, x, 10, t, NULL) == SLOWSCAN_EINVAL, "degree 0");
    CHECK(run(DETREND_POLY, 0.0, 10, 1.0, x, 10, t, NULL) == SLOWSCAN_EINVAL, "degree >= n");
    CHECK(run(DETREND_POLY, 0.0, 9, 1.0, x, 10, t, NULL) == SLOWSCAN_OK, "degree n-1");
    for (size_t i = 0; i < 10; i++)
        nanx[i] = NAN;
    for (int m = DETREND_GAUSSIAN; m <= DETREND_NONE; m++)
        CHECK(run((detrend_method)m, 2.0, 1, 1.0, nanx, 10, t, NULL) == SLOWSCAN_ESHORT,
              "all NaN -> ESHORT (method %d)", m);
    nanx[4] = 1.0;
    CHECK(run(DETREND_GAUSSIAN, 2.0, 0, 1.0, nanx, 10, t, NULL) == SLOWSCAN_ESHORT,
          "one finite sample -> ESHORT");
    CHECK(run(DETREND_NONE, 2.0, 0, 1.0, x, 0, t, NULL) == SLOWSCAN_ESHORT, "n = 0");
    CHECK(detrend_apply(NULL, 1.0, x, 10, t, NULL) == SLOWSCAN_EINVAL, "NULL spec");
}

void suite_detrend(void)
{
    check_rng *rng = check_rng_alloc(20240611UL);
    test_parse();
    test_gaussian(rng);
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
    check_rng_free(rng);
}
