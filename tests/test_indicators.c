/* Rolling indicators (indicators/): every window against GSL, statsmodels on a shipped data
 * set, the Box-Jenkins AR(1) moments, NaN and coverage handling, recovery, errors. */
#include "check.h"

#include "slowscan/indicators.h"
#include "slowscan/status.h"

#include <float.h>
#include <gsl/gsl_fit.h>
#include <gsl/gsl_statistics_double.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define NK INDICATOR_REDNESS /* the moment indicators, which come first */
#define REL 1e-9   /* relative tolerance against the per-window two-pass references */
#define SHAPE 1e-12 /* absolute floor for dimensionless indicators that may sit near 0 */

static const indicator_kind all_kinds[NK] = {
    INDICATOR_VARIANCE, INDICATOR_SD,  INDICATOR_CV,  INDICATOR_SKEWNESS,
    INDICATOR_KURTOSIS, INDICATOR_LAG1, INDICATOR_AR1, INDICATOR_RECOVERY,
};

typedef struct {
    double *v[NK];
} outputs;

static outputs outputs_alloc(size_t n)
{
    outputs o;
    for (int k = 0; k < NK; k++)
        o.v[k] = malloc(n * sizeof(double));
    return o;
}

static void outputs_free(outputs *o)
{
    for (int k = 0; k < NK; k++)
        free(o->v[k]);
}

static int run_all(const double *x, const double *level, size_t n, size_t W, double cov,
                   double dt, recovery_method rm, outputs *o)
{
    rolling_spec spec = {W, cov, dt, rm, 0, 0, 0, NULL};
    /* cv needs a level; where a test has none, cv is computed on x and not checked. */
    return slowscan_rolling_compute(&spec, x, level ? level : x, n, all_kinds, NK, o->v);
}

/* offset + scale * AR(1) with coefficient phi, unit innovations. */
static double *ar1_series(check_rng *rng, size_t n, double phi, double scale, double offset)
{
    double *x = malloc(n * sizeof(double)), a = check_rng_gaussian(rng);
    for (size_t i = 0; i < n; i++) {
        a = phi * a + check_rng_gaussian(rng);
        x[i] = offset + scale * a;
    }
    return x;
}

/* Collects failures of one indicator over many windows into one check. */
typedef struct {
    const char *what;
    double rel, abs;
    size_t count, fail, first;
    double got, want;
} tally;

static void tally_add_tol(tally *t, double got, double want, size_t i, double rel)
{
    t->count++;
    if (check_close(got, want, rel, t->abs))
        return;
    if (t->fail++ == 0) {
        t->first = i;
        t->got = got;
        t->want = want;
    }
}

static void tally_add(tally *t, double got, double want, size_t i)
{
    tally_add_tol(t, got, want, i, t->rel);
}

#define TALLY_CHECK(t, W)                                                                    \
    CHECK((t).fail == 0 && (t).count > 0, "%s W=%zu: %zu of %zu windows differ, first i=%zu " \
          "got %.17g want %.17g", (t).what, (size_t)(W), (t).fail, (t).count, (t).first,     \
          (t).got, (t).want)

/* Per-window references, from the present samples (moments) and present pairs (lag1, ar1). */
typedef struct {
    double var, sd, cv, skew, kurt, lag1, ar1;
    double ar1_cond; /* sum (h - m)^2 / sum (h - hbar)^2, m the window mean */
    size_t present;
} reference;

typedef struct {
    double *buf, *h, *tl;
} scratch;

/* lag1 from its definition: sum over pairs (h-m)(tl-m) / sum over samples (x-m)^2. */
static double lag1_by_hand(const double *buf, size_t k, const double *h, const double *tl,
                           size_t p)
{
    double m = gsl_stats_mean(buf, 1, k), num = 0.0, den = 0.0;
    for (size_t j = 0; j < p; j++)
        num += (h[j] - m) * (tl[j] - m);
    for (size_t j = 0; j < k; j++)
        den += (buf[j] - m) * (buf[j] - m);
    return p ? num / den : NAN;
}

/* Two-pass cv: sd of the residual window over |mean| of the level window. */
static double cv_two_pass(const double *buf, size_t k, const double *level, size_t lo,
                          size_t W)
{
    double m = 0.0, ss = 0.0, lm = 0.0;
    size_t nl = 0;
    for (size_t j = 0; j < k; j++)
        m += buf[j] / (double)k;
    for (size_t j = 0; j < k; j++)
        ss += (buf[j] - m) * (buf[j] - m);
    for (size_t j = lo; j < lo + W; j++)
        if (isfinite(level[j])) {
            lm += level[j];
            nl++;
        }
    return sqrt(ss / (double)(k - 1)) / fabs(lm / (double)nl);
}

/* Window lo..lo+W-1 of x, shifted by `shift` (an exact subtraction for the test data). */
static void reference_window(const double *x, const double *level, size_t lo, size_t W,
                             double shift, scratch *s, reference *r)
{
    size_t k = 0, p = 0;
    for (size_t j = lo; j < lo + W; j++) {
        if (isfinite(x[j]))
            s->buf[k++] = x[j] - shift;
        if (j + 1 < lo + W && isfinite(x[j]) && isfinite(x[j + 1])) {
            s->h[p] = x[j] - shift;
            s->tl[p++] = x[j + 1] - shift;
        }
    }
    r->present = k;
    r->var = r->sd = r->cv = r->skew = r->kurt = r->lag1 = r->ar1 = NAN;
    r->ar1_cond = 1.0;
    if (k >= 2) {
        /* Reference library: GSL (gsl_stats_variance, _sd, _skew, _kurtosis). */
        r->var = gsl_stats_variance(s->buf, 1, k);
        r->sd = gsl_stats_sd(s->buf, 1, k);
        r->skew = gsl_stats_skew(s->buf, 1, k);
        r->kurt = gsl_stats_kurtosis(s->buf, 1, k);
        /* Reference library: GSL gsl_stats_lag1_autocorrelation on a gap-free window; with
         * gaps the Box-Jenkins formula over the present pairs (computed by hand). */
        r->lag1 = k == W ? gsl_stats_lag1_autocorrelation(s->buf, 1, k)
                         : lag1_by_hand(s->buf, k, s->h, s->tl, p);
        r->cv = level ? cv_two_pass(s->buf, k, level, lo, W) : NAN;
    }
    if (p >= 2) {
        double c0, c1, c00, c01, c11, ssq;
        /* Reference library: GSL gsl_fit_linear, OLS of x_{t+1} on x_t with intercept. */
        gsl_fit_linear(s->h, 1, s->tl, 1, p, &c0, &c1, &c00, &c01, &c11, &ssq);
        r->ar1 = c1;
        double m = gsl_stats_mean(s->buf, 1, k), hbar = gsl_stats_mean(s->h, 1, p);
        double about_m = 0.0, about_hbar = 0.0;
        for (size_t j = 0; j < p; j++) {
            about_m += (s->h[j] - m) * (s->h[j] - m);
            about_hbar += (s->h[j] - hbar) * (s->h[j] - hbar);
        }
        r->ar1_cond = about_m / about_hbar;
    }
}

/* Compares every stride-th window (and all leading NaNs) of the 7 GSL-checkable indicators. */
static void compare_series(const char *label, const double *x, const double *level, size_t n,
                           size_t W, double cov, double shift, size_t stride)
{
    outputs o = outputs_alloc(n);
    int st = run_all(x, level, n, W, cov, 1.0, RECOVERY_LOG_AR1, &o);
    CHECK(st == SLOWSCAN_OK, "%s W=%zu: slowscan_rolling_compute status %d", label, W, st);
    scratch s = {malloc(W * sizeof(double)), malloc(W * sizeof(double)),
                 malloc(W * sizeof(double))};
    tally t[7] = {{"variance", REL, 0, 0, 0, 0, 0, 0}, {"sd", REL, 0, 0, 0, 0, 0, 0},
                  {"cv", REL, 0, 0, 0, 0, 0, 0},       {"skewness", REL, SHAPE, 0, 0, 0, 0, 0},
                  {"kurtosis", REL, SHAPE, 0, 0, 0, 0, 0}, {"lag1", REL, SHAPE, 0, 0, 0, 0, 0},
                  {"ar1", REL, SHAPE, 0, 0, 0, 0, 0}};
    size_t lead_bad = 0, need = (size_t)ceil(cov * (double)W - 1e-9);
    for (size_t i = 0; i < W - 1; i++)
        for (int k = 0; k < NK; k++)
            lead_bad += !isnan(o.v[k][i]);
    CHECK(lead_bad == 0, "%s W=%zu: %zu values before index W-1 are not NaN", label, W,
          lead_bad);
    for (size_t i = W - 1; st == SLOWSCAN_OK && i < n; i += stride) {
        reference r;
        reference_window(x, level, i + 1 - W, W, shift, &s, &r);
        if (r.present < need)
            r.var = r.sd = r.cv = r.skew = r.kurt = r.lag1 = r.ar1 = NAN;
        double want[7] = {r.var, r.sd, r.cv, r.skew, r.kurt, r.lag1, r.ar1};
        for (int k = 0; k < 6; k++)
            if (k != 2 || level)
                tally_add(&t[k], o.v[k][i], want[k], i);
        /* The slope is ill-conditioned when the pairs' x_t nearly coincide while the window
         * does not (possible in tiny windows: W = 3 gave ar1 = 3684 from two pairs): sums
         * about the window mean then lose about eps * ar1_cond of its digits. */
        tally_add_tol(&t[6], o.v[6][i], want[6], i, REL + 8 * DBL_EPSILON * r.ar1_cond);
    }
    for (int k = 0; k < 7; k++)
        if (k != 2 || level)
            TALLY_CHECK(t[k], W);
    free(s.buf), free(s.h), free(s.tl);
    outputs_free(&o);
}

static void test_every_window(void)
{
    const size_t n = 3000, windows[] = {3, 17, 300, 1500, 3000};
    check_rng *rng = check_rng_alloc(11);
    for (int pass = 0; pass < 2; pass++) {
        /* pass 1: the same kind of data on a 1e6 offset (sd ~1): the references see the
         * shifted window x - 1e6, which is exact (Sterbenz), so they stay exact. */
        double shift = pass ? 1e6 : 0.0;
        double *x = ar1_series(rng, n, 0.6, 1.0, shift), *level = malloc(n * sizeof(double));
        for (size_t i = 0; i < n; i++)
            level[i] = 40.0 + 0.01 * (double)i + x[i] - shift;
        for (size_t w = 0; w < sizeof windows / sizeof windows[0]; w++)
            compare_series(pass ? "offset 1e6" : "random", x, level, n, windows[w], 0.8, shift,
                           1);
        free(x);
        free(level);
    }
    check_rng_free(rng);
}

/* Series that stress the re-centring: a steep ramp on a 1e6 offset (the mean runs away from
 * the shift), and a noisy stretch followed by a nearly quiet one (old round-off would swamp
 * the new spread). */
static void test_hard_series(void)
{
    const size_t n = 4000;
    check_rng *rng = check_rng_alloc(12);
    double *ramp = ar1_series(rng, n, 0.3, 1.0, 1e6), *quiet = malloc(n * sizeof(double));
    for (size_t i = 0; i < n; i++) {
        ramp[i] += 0.25 * (double)i; /* still within [5e5, 2e6]: x - 1e6 exact */
        quiet[i] = 1e6 + (i < n / 2 ? 1e3 : 1e-3) * check_rng_gaussian(rng);
    }
    compare_series("ramp", ramp, NULL, n, 400, 0.8, 1e6, 1);
    compare_series("collapse", quiet, NULL, n, 300, 0.8, 1e6, 1);
    /* One sample 1e8 times the noise: the windows it enters and leaves must not lose the
     * pairs' sums to cancellation (a review found ar1 off by 1% on the gap-free path). */
    double *spike = ar1_series(rng, n, 0.5, 1.0, 0.0), *ar1 = malloc(n * sizeof(double));
    spike[1000] = 1e8;
    indicator_kind kind = INDICATOR_AR1;
    rolling_spec spec = {50, 0.8, 1.0, RECOVERY_LOG_AR1, 0, 0, 0, NULL};
    double worst = 0;
    if (slowscan_rolling_compute(&spec, spike, NULL, n, &kind, 1, &ar1) == SLOWSCAN_OK)
        for (size_t i = 990; i < 1060; i++) {
            double c0, c1, c00, c01, c11, ssq; /* reference library: GSL gsl_fit_linear */
            const double *w = spike + i + 1 - 50;
            gsl_fit_linear(w, 1, w + 1, 1, 49, &c0, &c1, &c00, &c01, &c11, &ssq);
            worst = fmax(worst, fabs(ar1[i] - c1) / fabs(c1));
        }
    CHECK(worst < 1e-6, "ar1 around a 1e8 spike: worst relative error %.3g", worst);
    free(spike);
    free(ar1);
    free(ramp);
    free(quiet);
    check_rng_free(rng);
}

/* One window of 10^5 over 3*10^5 values ~1e6 with sd ~1 and a slow swing; a sample of about
 * 200 windows against GSL. */
static void test_long_window(void)
{
    const size_t n = 300000, W = 100000;
    check_rng *rng = check_rng_alloc(13);
    double *x = ar1_series(rng, n, 0.5, 1.0, 1e6);
    for (size_t i = 0; i < n; i++)
        x[i] += 5.0 * sin(6.283185307179586 * (double)i / 70000.0);
    compare_series("long window", x, NULL, n, W, 0.8, 1e6, 997);
    free(x);
    check_rng_free(rng);
}

/* Gaps: 15% missing at random, a block of 40 and an infinity; windows below coverage are NaN. */
static void test_gaps(void)
{
    const size_t n = 2000;
    check_rng *rng = check_rng_alloc(14);
    double *x = ar1_series(rng, n, 0.7, 2.0, 10.0), *level = malloc(n * sizeof(double));
    for (size_t i = 0; i < n; i++) {
        if (check_rng_uniform(rng) < 0.15 || (i >= 700 && i < 740))
            x[i] = NAN;
        level[i] = 100.0 + (isfinite(x[i]) ? x[i] : 0.0);
    }
    x[1200] = INFINITY; /* treated as missing, like NaN */
    compare_series("gaps", x, level, n, 50, 0.6, 0.0, 1);
    compare_series("gaps", x, level, n, 9, 0.5, 0.0, 1);
    free(x);
    free(level);
    check_rng_free(rng);
}

/* ceil(0.8 * 10) = 8 present samples needed: 8 gives a value, 7 gives NaN. */
static void test_coverage_threshold(void)
{
    double x[10] = {1, 4, NAN, 2, 8, 5, NAN, 7, 3, 6}, out[10];
    double *outs[1] = {out};
    indicator_kind kind = INDICATOR_VARIANCE;
    rolling_spec spec = {10, 0.8, 1.0, RECOVERY_LOG_AR1, 0, 0, 0, NULL};
    CHECK(slowscan_rolling_compute(&spec, x, NULL, 10, &kind, 1, outs) == SLOWSCAN_OK, "coverage run");
    double present[8] = {1, 4, 2, 8, 5, 7, 3, 6};
    /* Reference library: GSL gsl_stats_variance on the 8 present samples. */
    CHECK_CLOSE(out[9], gsl_stats_variance(present, 1, 8), 1e-14, 0, "8 of 10 present");
    x[0] = NAN;
    CHECK(slowscan_rolling_compute(&spec, x, NULL, 10, &kind, 1, outs) == SLOWSCAN_OK, "coverage run");
    CHECK(isnan(out[9]), "7 of 10 present at coverage 0.8 gives NaN, got %g", out[9]);
    spec.min_coverage = 0.7;
    CHECK(slowscan_rolling_compute(&spec, x, NULL, 10, &kind, 1, outs) == SLOWSCAN_OK, "coverage run");
    CHECK(isfinite(out[9]), "7 of 10 present at coverage 0.7 gives a value");
}

/* Data set: yearly sunspot numbers 1700-2008 shipped in python3-statsmodels
 * (statsmodels.api.datasets.sunspots, SUNACTIVITY). Reference library: statsmodels
 * tsa.stattools.acf (lag 1) and numpy.var(ddof=1), via tests/reference/sunspots_acf.py. */
static void test_sunspots(void)
{
    double vals[400];
    int got = check_python("sunspots_acf.py", vals, 400);
    CHECK(got == 312 && vals[0] == 309, "sunspots reference: read %d numbers", got);
    if (got != 312 || vals[0] != 309)
        return;
    size_t n = 309;
    const double *x = vals + 1;
    double lag1[309], var[309], *outs[2] = {lag1, var};
    indicator_kind kinds[2] = {INDICATOR_LAG1, INDICATOR_VARIANCE};
    rolling_spec spec = {n, 1.0, 1.0, RECOVERY_LOG_AR1, 0, 0, 0, NULL};
    CHECK(slowscan_rolling_compute(&spec, x, NULL, n, kinds, 2, outs) == SLOWSCAN_OK, "sunspots run");
    CHECK_CLOSE(lag1[n - 1], vals[n + 1], 1e-12, 0, "sunspots lag1 vs statsmodels acf");
    CHECK_CLOSE(var[n - 1], vals[n + 2], 1e-12, 0, "sunspots variance vs numpy var(ddof=1)");
    CHECK(isnan(lag1[n - 2]), "sunspots: index n-2 < W-1 is NaN");
}

/* Box & Jenkins, Time Series Analysis (recalled from memory): a stationary AR(1)
 * x_t = phi x_{t-1} + e_t, e ~ N(0, s^2) has variance s^2/(1-phi^2) and lag-1
 * autocorrelation phi; for long series se(lag1) ~ sqrt((1-phi^2)/n) and
 * se(var) ~ var sqrt(2(1+phi^2)/((1-phi^2) n)). Check within 4 standard errors. */
static void test_box_jenkins(void)
{
    const size_t n = 200000;
    const double phi = 0.7, s = 1.5, var = s * s / (1 - phi * phi);
    check_rng *rng = check_rng_alloc(15);
    double *x = malloc(n * sizeof(double));
    x[0] = sqrt(var) * check_rng_gaussian(rng); /* start in the stationary distribution */
    for (size_t i = 1; i < n; i++)
        x[i] = phi * x[i - 1] + s * check_rng_gaussian(rng);
    outputs o = outputs_alloc(n);
    CHECK(run_all(x, x, n, n, 1.0, 1.0, RECOVERY_LOG_AR1, &o) == SLOWSCAN_OK, "AR(1) run");
    double se_lag1 = sqrt((1 - phi * phi) / (double)n);
    double se_var = var * sqrt(2 * (1 + phi * phi) / ((1 - phi * phi) * (double)n));
    CHECK(fabs(o.v[INDICATOR_LAG1][n - 1] - phi) < 4 * se_lag1, "AR(1) lag1 %.6f vs %.2f",
          o.v[INDICATOR_LAG1][n - 1], phi);
    CHECK(fabs(o.v[INDICATOR_AR1][n - 1] - phi) < 4 * se_lag1, "AR(1) ar1 %.6f vs %.2f",
          o.v[INDICATOR_AR1][n - 1], phi);
    CHECK(fabs(o.v[INDICATOR_VARIANCE][n - 1] - var) < 4 * se_var, "AR(1) var %.6f vs %.6f",
          o.v[INDICATOR_VARIANCE][n - 1], var);
    free(x);
    outputs_free(&o);
    check_rng_free(rng);
}

/* recovery = ln(ar1)/dt (NaN for ar1 <= 0); the increments estimator is the OLS slope of
 * x_{t+1}-x_t on x_t over dt, checked against GSL gsl_fit_linear and against (ar1-1)/dt. */
static void test_recovery(void)
{
    const size_t n = 1500, W = 60;
    const double dt = 0.25;
    check_rng *rng = check_rng_alloc(16);
    double *x = ar1_series(rng, n, -0.1, 1.0, 3.0); /* ar1 of both signs across windows */
    outputs lg = outputs_alloc(n), inc = outputs_alloc(n);
    CHECK(run_all(x, x, n, W, 0.8, dt, RECOVERY_LOG_AR1, &lg) == SLOWSCAN_OK, "recovery run");
    CHECK(run_all(x, x, n, W, 0.8, dt, RECOVERY_INCREMENTS, &inc) == SLOWSCAN_OK, "inc run");
    tally tl = {"recovery log", 1e-12, 1e-14, 0, 0, 0, 0, 0};
    tally ti = {"recovery increments", 1e-9, 1e-12, 0, 0, 0, 0, 0};
    tally ta = {"increments = (ar1-1)/dt", 1e-12, 1e-12, 0, 0, 0, 0, 0};
    size_t negative = 0;
    double h[60], y[60];
    for (size_t i = W - 1; i < n; i++) {
        double a = lg.v[INDICATOR_AR1][i];
        negative += a <= 0;
        tally_add(&tl, lg.v[INDICATOR_RECOVERY][i], a > 0 ? log(a) / dt : NAN, i);
        tally_add(&ta, inc.v[INDICATOR_RECOVERY][i], (a - 1) / dt, i);
        for (size_t j = 0; j + 1 < W; j++) {
            h[j] = x[i + 1 - W + j];
            y[j] = x[i + 2 - W + j] - h[j];
        }
        double c0, c1, c00, c01, c11, ssq;
        /* Reference library: GSL gsl_fit_linear of the increments on the level. */
        gsl_fit_linear(h, 1, y, 1, W - 1, &c0, &c1, &c00, &c01, &c11, &ssq);
        tally_add(&ti, inc.v[INDICATOR_RECOVERY][i], c1 / dt, i);
    }
    CHECK(negative > 10 && negative < n - W - 10, "windows with ar1 <= 0: %zu", negative);
    TALLY_CHECK(tl, W);
    TALLY_CHECK(ti, W);
    TALLY_CHECK(ta, W);
    free(x);
    outputs_free(&lg);
    outputs_free(&inc);
    check_rng_free(rng);
}

/* Constant windows: variance exactly 0, ratios NaN, nothing crashes (common practice). */
static void test_constant(void)
{
    const size_t n = 120, W = 10;
    double x[120], level[120];
    const double values[3] = {3.7, 0.0, 0.1};
    outputs o = outputs_alloc(n);
    for (int v = 0; v < 3; v++) {
        for (size_t i = 0; i < n; i++)
            x[i] = level[i] = values[v];
        CHECK(run_all(x, level, n, W, 0.8, 1.0, RECOVERY_LOG_AR1, &o) == SLOWSCAN_OK, "const");
        size_t bad = 0;
        for (size_t i = W - 1; i < n; i++) {
            bad += o.v[INDICATOR_VARIANCE][i] != 0.0 || o.v[INDICATOR_SD][i] != 0.0;
            for (int k = INDICATOR_SKEWNESS; k < NK; k++)
                bad += !isnan(o.v[k][i]);
            bad += values[v] != 0.0 ? o.v[INDICATOR_CV][i] != 0.0 : !isnan(o.v[INDICATOR_CV][i]);
        }
        CHECK(bad == 0, "constant %g: %zu unexpected values", values[v], bad);
    }
    /* Noise, then a constant stretch: once the window is inside it, variance is exactly 0. */
    check_rng *rng = check_rng_alloc(17);
    for (size_t i = 0; i < n; i++)
        x[i] = i < 50 ? 1e3 * check_rng_gaussian(rng) : 2.5;
    CHECK(run_all(x, x, n, W, 0.8, 1.0, RECOVERY_LOG_AR1, &o) == SLOWSCAN_OK, "noise+const");
    size_t bad = 0;
    for (size_t i = 50 + W - 1; i < n; i++)
        bad += o.v[INDICATOR_VARIANCE][i] != 0.0 || !isnan(o.v[INDICATOR_LAG1][i]);
    CHECK(bad == 0, "constant after noise: %zu windows not exactly 0 / NaN", bad);
    check_rng_free(rng);
    outputs_free(&o);
}

static void test_errors(void)
{
    double x[20], out[20], *outs[1] = {out};
    for (int i = 0; i < 20; i++)
        x[i] = (double)(i % 7);
    indicator_kind var = INDICATOR_VARIANCE, cv = INDICATOR_CV, bad = INDICATOR_COUNT;
    rolling_spec ok = {10, 0.8, 1.0, RECOVERY_LOG_AR1, 0, 0, 0, NULL}, s;
    CHECK(slowscan_rolling_compute(&ok, x, NULL, 20, &var, 1, outs) == SLOWSCAN_OK, "valid spec");
    s = ok, s.window = 2;
    CHECK(slowscan_rolling_compute(&s, x, NULL, 20, &var, 1, outs) == SLOWSCAN_EINVAL, "W < 3");
    s = ok, s.window = 21;
    CHECK(slowscan_rolling_compute(&s, x, NULL, 20, &var, 1, outs) == SLOWSCAN_EINVAL, "W > n");
    s = ok, s.window = 20;
    CHECK(slowscan_rolling_compute(&s, x, NULL, 20, &var, 1, outs) == SLOWSCAN_OK, "W = n");
    const double covs[4] = {0.0, -0.1, 1.0000001, NAN};
    for (int c = 0; c < 4; c++) {
        s = ok, s.min_coverage = covs[c];
        CHECK(slowscan_rolling_compute(&s, x, NULL, 20, &var, 1, outs) == SLOWSCAN_EINVAL,
              "coverage %g", covs[c]);
    }
    s = ok, s.dt = 0.0;
    CHECK(slowscan_rolling_compute(&s, x, NULL, 20, &var, 1, outs) == SLOWSCAN_EINVAL, "dt = 0");
    CHECK(slowscan_rolling_compute(&ok, x, NULL, 20, &cv, 1, outs) == SLOWSCAN_EINVAL, "cv, no level");
    CHECK(slowscan_rolling_compute(&ok, x, x, 20, &cv, 1, outs) == SLOWSCAN_OK, "cv with level");
    CHECK(slowscan_rolling_compute(&ok, x, NULL, 20, &bad, 1, outs) == SLOWSCAN_EINVAL, "bad kind");
    CHECK(slowscan_rolling_compute(&ok, x, NULL, 20, &var, 1, NULL) == SLOWSCAN_EINVAL, "no out");
    CHECK(slowscan_rolling_compute(NULL, x, NULL, 20, &var, 1, outs) == SLOWSCAN_EINVAL, "no spec");
}

static void test_names(void)
{
    const char *names[NK] = {"variance", "sd",   "cv",  "skewness",
                             "kurtosis", "lag1", "ar1", "recovery"};
    for (int k = 0; k < NK; k++) {
        indicator_kind got = INDICATOR_COUNT;
        CHECK(slowscan_indicator_name((indicator_kind)k) && !strcmp(slowscan_indicator_name((indicator_kind)k),
                                                           names[k]), "name %d", k);
        CHECK(slowscan_indicator_lookup(names[k], &got) == SLOWSCAN_OK && got == (indicator_kind)k,
              "lookup %s", names[k]);
        CHECK(slowscan_indicator_direction((indicator_kind)k) == (k == INDICATOR_SKEWNESS ? 0 : 1),
              "direction %s", names[k]);
        CHECK(slowscan_indicator_needs_level((indicator_kind)k) == (k == INDICATOR_CV), "level %s",
              names[k]);
    }
    indicator_kind got;
    CHECK(slowscan_indicator_lookup("redness?", &got) == SLOWSCAN_EINVAL, "unknown name");
    CHECK(slowscan_indicator_name(INDICATOR_COUNT) == NULL, "name of an invalid kind");
}

/* The comparison must be able to fail: a reference taken over windows one sample short
 * (an off-by-one window) disagrees with the indicators. */
static void test_comparison_can_fail(void)
{
    const size_t n = 400, W = 40;
    check_rng *rng = check_rng_alloc(18);
    double *x = ar1_series(rng, n, 0.5, 1.0, 0.0);
    outputs o = outputs_alloc(n);
    run_all(x, NULL, n, W, 0.8, 1.0, RECOVERY_LOG_AR1, &o);
    size_t agree = 0;
    for (size_t i = W - 1; i < n; i++)
        agree += check_close(o.v[INDICATOR_VARIANCE][i],
                             gsl_stats_variance(x + i + 2 - W, 1, W - 1), REL, 0);
    CHECK(agree == 0, "an off-by-one reference agreed on %zu windows", agree);
    free(x);
    outputs_free(&o);
    check_rng_free(rng);
}

void suite_indicators(void)
{
    test_names();
    test_errors();
    test_every_window();
    test_hard_series();
    test_long_window();
    test_gaps();
    test_coverage_threshold();
    test_sunspots();
    test_box_jenkins();
    test_recovery();
    test_constant();
    test_comparison_can_fail();
}
