/* Tests of the Gaussian kernel trends (detrend/gaussian.c, detrend/kernel_sums.c): the
 * Nadaraya-Watson fit `gaussian` and the local-linear fit `gaussian-linear`, against
 * statsmodels' KernelReg, numpy, analytic results and an internal direct sum written here
 * from the DESIGN §3 definitions. Run by the detrend suite. */
#include "detrend_check.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>

enum { FIT_CONSTANT = 0, FIT_LINE = 1 };

static detrend_method method_of(int degree)
{
    return degree == FIT_LINE ? DETREND_GAUSSIAN_LINEAR : DETREND_GAUSSIAN;
}

static const char *name_of(int degree)
{
    return degree == FIT_LINE ? "gaussian-linear" : "gaussian";
}

/* Internal reference, DESIGN §3 summed directly at sample i over lags up to `reach` samples
 * (reach >= n - 1: no truncation), in long double: the weighted mean (degree 0) or the
 * weighted least-squares line at t_i, (S2 T0 - S1 T1) / (S0 S2 - S1^2) (degree 1). Summing
 * x - c for a constant c (the first finite sample) keeps it exact to the rounding of its
 * output under a large offset. */
static double reference_at(const double *x, size_t n, double s, size_t reach, size_t i,
                           int degree)
{
    double c = 0.0;
    for (size_t j = n; j-- > 0;)
        c = isfinite(x[j]) ? x[j] : c;
    long double s0 = 0, s1 = 0, s2 = 0, t0 = 0, t1 = 0;
    size_t lo = i > reach ? i - reach : 0, hi = n - 1 - i > reach ? i + reach : n - 1;
    for (size_t j = lo; j <= hi; j++) {
        if (!isfinite(x[j]))
            continue;
        long double u = ((long double)j - (long double)i) / s, w = expl(-0.5L * u * u);
        s0 += w;
        s1 += w * u;
        s2 += w * u * u;
        t0 += w * (x[j] - c);
        t1 += w * u * (x[j] - c);
    }
    if (!(s0 > 0))
        return NAN;
    long double det = s0 * s2 - s1 * s1;
    return degree == FIT_CONSTANT || !(det > 0) ? (double)(c + t0 / s0)
                                                : (double)(c + (s2 * t0 - s1 * t1) / det);
}

/* The reference at every sample: O(n reach). */
static void reference_fit(const double *x, size_t n, double s, size_t reach, int degree,
                          double *out)
{
    for (size_t i = 0; i < n; i++)
        out[i] = reference_at(x, n, s, reach, i, degree);
}

/* n = 3000, bandwidth 10% of the span (h = 2400 samples: the FFT path), with gaps. */
static void check_fft_against_direct(check_rng *rng, double offset)
{
    size_t n = 3000;
    double dt = 0.5, bandwidth = 0.1 * (double)(n - 1) * dt, x[3000], got[3000], want[3000];
    dc_make_series(rng, offset, x, n);
    dc_punch_gaps(x, n, 600, 40);
    for (int degree = FIT_CONSTANT; degree <= FIT_LINE; degree++) {
        int rc = dc_run(method_of(degree), bandwidth, 0, dt, x, n, got, NULL);
        /* reference: direct sum, DESIGN §3 */
        reference_fit(x, n, bandwidth / dt, n, degree, want);
        double err = check_max_diff(got, want, n) / dc_max_abs(x, n);
        CHECK(rc == SLOWSCAN_OK && err <= 1e-12,
              "%s FFT vs direct sum, offset %g: rc %d, max error / max|x| = %.3g",
              name_of(degree), offset, rc, err);
        CHECK(dc_count_nan(got, n) == 0, "%s trend defined inside short gaps", name_of(degree));
        /* With a large offset, recentring keeps the result within an ulp or so of the exact
         * one; without it the FFT's round-off on the offset itself shows as several ulps. */
        double m = dc_max_abs(x, n), ulp = nextafter(m, INFINITY) - m;
        if (offset != 0.0)
            CHECK(check_max_diff(got, want, n) <= 3.0 * ulp, "%s offset %g: error %.3g ulp",
                  name_of(degree), offset, check_max_diff(got, want, n) / ulp);
    }
}

/* Gaps of 30 s and 10 s with s = 1: the middle of the first is beyond the 8 s reach (NaN);
 * the inner parts of both have FFT sums far below round-off (one-sided neighbourhoods for the
 * line), so this exercises the exact fallback. */
static void check_long_gap(check_rng *rng)
{
    size_t n = 2000, h = 80; /* h = ceil(8 s / dt) */
    double dt = 0.1, bandwidth = 1.0, x[2000], got[2000], want[2000];
    dc_make_series(rng, 0.0, x, n);
    for (size_t i = 700; i < 1000; i++)
        x[i] = NAN;
    for (size_t i = 1400; i < 1500; i++)
        x[i] = NAN;
    for (int degree = FIT_CONSTANT; degree <= FIT_LINE; degree++) {
        int rc = dc_run(method_of(degree), bandwidth, 0, dt, x, n, got, NULL);
        /* reference: direct sum cut at 8 s, DESIGN §3 */
        reference_fit(x, n, bandwidth / dt, h, degree, want);
        double err = check_max_diff(got, want, n) / dc_max_abs(x, n);
        CHECK(rc == SLOWSCAN_OK && err <= 1e-12, "%s long gap: rc %d, max err %.3g",
              name_of(degree), rc, err);
        CHECK(isnan(got[700 + h]) && isnan(got[999 - h]) && isfinite(got[699 + h]) &&
                  isfinite(got[1000 - h]),
              "%s: NaN exactly where no finite sample lies within 8 s", name_of(degree));
    }
}

static void check_constant(double bandwidth, double c)
{
    size_t n = 1000;
    double x[1000], trend[1000];
    for (size_t i = 0; i < n; i++)
        x[i] = c;
    x[0] = x[500] = NAN;
    for (int degree = FIT_CONSTANT; degree <= FIT_LINE; degree++) {
        int rc = dc_run(method_of(degree), bandwidth, 0, 1.0, x, n, trend, NULL);
        /* analytic: a renormalised kernel average (or local line) of a constant is that
         * constant, edges included */
        CHECK(rc == SLOWSCAN_OK, "%s constant rc %d", name_of(degree), rc);
        CHECK_CLOSE(trend[0], c, 1e-12, 0, "constant: first sample (NaN) not pulled to 0");
        CHECK_CLOSE(trend[n - 1], c, 1e-12, 0, "constant: last sample not pulled to 0");
        double err = 0.0;
        for (size_t i = 0; i < n; i++)
            err = dc_worse(err, fabs(trend[i] - c));
        CHECK(err <= 1e-12 * fabs(c), "%s constant %g (s=%g): max err %.3g", name_of(degree), c,
              bandwidth, err);
    }
}

static void check_gaussian_python(check_rng *rng, double bandwidth)
{
    size_t n = 1500;
    double x[1500];
    dc_make_series(rng, 50.0, x, n);
    dc_punch_gaps(x, n, 400, 15);
    detrend_spec spec = {.method = DETREND_GAUSSIAN, .bandwidth = bandwidth};
    /* reference: tests/reference/nw_gaussian.py, direct numpy sum (Debian python3-numpy) */
    double err = dc_python_error("nw_gaussian.py", &spec, 0.25, x, n);
    CHECK(err <= 1e-10, "gaussian vs numpy (s=%g): max err %.3g", bandwidth, err);
}

/* A long series: the O(n log n) path must finish quickly; spot-check against direct sums. */
static void check_gaussian_long(check_rng *rng)
{
    size_t n = (size_t)1 << 19;
    double s = 0.1 * (double)(n - 1); /* dt = 1 */
    double *x = malloc(n * sizeof *x), *trend = malloc(n * sizeof *x);
    dc_make_series(rng, 0.0, x, n);
    dc_punch_gaps(x, n, 50000, 2000);
    for (int degree = FIT_CONSTANT; degree <= FIT_LINE; degree++) {
        int rc = dc_run(method_of(degree), s, 0, 1.0, x, n, trend, NULL);
        CHECK(rc == SLOWSCAN_OK, "%s long series rc %d", name_of(degree), rc);
        static const size_t at[] = {0, 1, 25000, 26000, 262144, 400000, 524287};
        for (size_t k = 0; k < sizeof at / sizeof at[0]; k++)
            /* reference: direct untruncated sum at one point, DESIGN §3 */
            CHECK_CLOSE(trend[at[k]], reference_at(x, n, s, n, at[k], degree), 0.0,
                        1e-12 * dc_max_abs(x, n), "long series, one point");
    }
    free(x);
    free(trend);
}

/* Series for the KernelReg comparison: a slope or a curve plus noise, missing at uneven ends
 * (3 samples at the start, 9 at the end), in two gaps and at one isolated sample. */
static void kernelreg_series(check_rng *rng, int curve, double dt, double *x, size_t n)
{
    for (size_t i = 0; i < n; i++) {
        double t = (double)i * dt;
        x[i] = (curve ? 10.0 * sin(t / 15.0) + 0.002 * t * t : 3.0 + 0.8 * t) +
               0.3 * check_rng_gaussian(rng);
    }
    for (size_t i = 0; i < n; i++)
        if (i < 3 || i >= n - 9 || (i >= 100 && i < 105) || (i >= 250 && i < 262) || i == 333)
            x[i] = NAN;
}

/* Both fits against statsmodels' KernelReg (reg_type 'll' and 'lc', Gaussian kernel, bw fixed;
 * Debian python3-statsmodels, tests/reference/kernelreg_statsmodels.py), which gets only the
 * finite samples as data and is evaluated at every t_i. Its kernel is untruncated (ours is cut
 * beyond 8 s: ~1e-14) and it solves each raw, uncentred 2x2 system with a pseudo-inverse. The
 * differences measured: 'lc' ~1e-15 of max|x|, 'll' 2.5e-14 (FFT paths) and 3.3e-13 (direct
 * path, inside the 4 s gap, where KernelReg's system is least well conditioned); 1e-10
 * leaves room for another BLAS without hiding a wrong formula (a lag is ~1e-2). */
static void check_kernelreg(check_rng *rng, int curve, double bandwidth)
{
    enum { N = 500 };
    double dt = 0.5, x[N], want[2 * N], got[N];
    kernelreg_series(rng, curve, dt, x, N);
    char arg[64];
    snprintf(arg, sizeof arg, "%.17g ll,lc", bandwidth);
    int ok = dc_python_reference("kernelreg_statsmodels.py", arg, dt, x, N, want, 2 * N);
    CHECK(ok, "KernelReg reference ran");
    for (int degree = FIT_LINE; ok && degree >= FIT_CONSTANT; degree--) {
        int rc = dc_run(method_of(degree), bandwidth, 0, dt, x, N, got, NULL);
        const double *ref = degree == FIT_LINE ? want : want + N;
        double err = check_max_diff(got, ref, N) / dc_max_abs(x, N);
        CHECK(rc == SLOWSCAN_OK && err <= 1e-10,
              "%s vs KernelReg %s (%s, s=%g): rc %d, max err / max|x| = %.3g", name_of(degree),
              degree == FIT_LINE ? "ll" : "lc", curve ? "curve" : "slope", bandwidth, rc, err);
    }
}

/* Analytic (Fan & Gijbels 1996, §3.2: a local-linear fit reproduces linear functions): a
 * straight line comes back exactly, at the ends and around gaps, on both paths. The
 * Nadaraya-Watson fit does not: at the first sample it lags by the kernel's one-sided mean
 * lag, s sqrt(2/pi) ~ 0.8 s times the slope -- the check that this test can fail. */
static void check_line(double bandwidth)
{
    enum { N = 1200 };
    double slope = -0.3, x[N], got[N];
    for (size_t i = 0; i < N; i++)
        x[i] = 2.0 + slope * (double)i;
    for (size_t i = 300; i < 300 + (size_t)(3.0 * bandwidth); i++)
        x[i] = NAN; /* a gap of 3 s: its middle is fitted from both rims at 1.5 s */
    x[700] = x[N - 1] = NAN;
    int rc = dc_run(DETREND_GAUSSIAN_LINEAR, bandwidth, 0, 1.0, x, N, got, NULL);
    double err = 0.0;
    for (size_t i = 0; i < N; i++)
        err = dc_worse(err, fabs(got[i] - (2.0 + slope * (double)i)));
    CHECK(rc == SLOWSCAN_OK && err <= 1e-12 * dc_max_abs(x, N),
          "gaussian-linear reproduces a line (s=%g): rc %d, max err %.3g", bandwidth, rc, err);
    rc = dc_run(DETREND_GAUSSIAN, bandwidth, 0, 1.0, x, N, got, NULL);
    double lag = got[0] - x[0];
    CHECK(rc == SLOWSCAN_OK && lag < -0.5 * fabs(slope) * bandwidth,
          "gaussian lags at the start of a line (s=%g): %g (0.8 s slope = %g)", bandwidth, lag,
          0.8 * slope * bandwidth);
}

/* Analytic: on x = c t^2, a symmetric full kernel gives S1 = T1 = 0, so the local line's
 * value is c sum w u^2 / sum w = c s^2 (the discrete Gaussian's second moment equals s^2 up
 * to terms of order exp(-2 pi^2 s^2)): the interior bias s^2 f''/2 of Fan & Gijbels 1996,
 * Thm 3.1, exact for a quadratic. Checked 8 s away from both ends. */
static void check_quadratic(double bandwidth)
{
    enum { N = 1000 };
    double c = 0.01, x[N], got[N];
    for (size_t i = 0; i < N; i++)
        x[i] = c * ((double)i - 400.0) * ((double)i - 400.0);
    size_t h = (size_t)ceil(8.0 * bandwidth);
    int rc = dc_run(DETREND_GAUSSIAN_LINEAR, bandwidth, 0, 1.0, x, N, got, NULL);
    double bias = c * bandwidth * bandwidth, err = 0.0;
    for (size_t i = h; i + h < N; i++)
        err = dc_worse(err, fabs(got[i] - x[i] - bias));
    CHECK(rc == SLOWSCAN_OK && err <= 1e-9 * bias,
          "gaussian-linear quadratic bias s^2 f''/2 = %g (s=%g): rc %d, max err %.3g", bias,
          bandwidth, rc, err);
}

/* Two samples alone in a long gap, 6 s apart, on the line 1 + 0.01 t. On the near side of
 * the first one the second weighs under exp(-18) ~ 1.5e-8 of it: fewer than 2 samples of
 * non-negligible weight, so the local-constant value is used (detrend.h), not the line through
 * both, which would be the data line itself. Between them both count and the line is
 * reproduced. NaN beyond 8 s of every sample. h = 40 is the direct path, h = 80 the FFT one. */
static void check_lone_samples(double bandwidth)
{
    enum { N = 400 };
    size_t h = (size_t)ceil(8.0 * bandwidth), lone = 250, mate = lone + (size_t)(6 * bandwidth);
    double x[N], got[N], nw[N];
    for (size_t i = 0; i < N; i++)
        x[i] = (i < 100 || i >= 390 || i == lone || i == mate) ? 1.0 + 0.01 * (double)i : NAN;
    int rc = dc_run(DETREND_GAUSSIAN_LINEAR, bandwidth, 0, 1.0, x, N, got, NULL);
    rc |= dc_run(DETREND_GAUSSIAN, bandwidth, 0, 1.0, x, N, nw, NULL);
    size_t bad = 0, first = 100 + h; /* no sample of the long runs within reach from here */
    for (size_t i = first; i <= lone; i++)
        bad += i + h < lone ? !isnan(got[i]) : !(fabs(got[i] - nw[i]) <= 1e-12);
    size_t mid = (lone + mate) / 2;
    CHECK(rc == SLOWSCAN_OK && bad == 0 && fabs(nw[lone] - x[lone]) < 1e-7 &&
              fabs(got[mid] - (1.0 + 0.01 * (double)mid)) <= 1e-12,
          "gaussian-linear, lone samples (s=%g): %zu points not local-constant / NaN; line "
          "between them %.17g", bandwidth, bad, got[mid]);
}

void detrend_gaussian_checks(check_rng *rng)
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
    check_rng *own = check_rng_alloc(20250110UL); /* the other detrend checks keep their draws */
    check_kernelreg(own, 0, 20.0); /* s = 40 samples: FFT path */
    check_kernelreg(own, 1, 1.5);  /* s = 3 samples: direct path */
    check_kernelreg(own, 1, 10.0); /* FFT path, the 6-unit gap spans 0.6 s */
    check_rng_free(own);
    check_line(4.0);  /* direct path */
    check_line(40.0); /* FFT path */
    check_quadratic(4.0);
    check_quadratic(30.0);
    check_lone_samples(5.0);
    check_lone_samples(10.0);
}
