/* Per-window indicators (indicators/spectral.c, dfa.c, window_plan.c): the periodogram against
 * numpy, the precomputed regression designs against GSL, the exponents of white noise and a
 * random walk, AR(1) redness against its analytic spectrum, steps, gaps and errors. */
#include "check.h"

#include "slowscan/indicators.h"
#include "slowscan/status.h"

#include <gsl/gsl_fit.h>
#include <gsl/gsl_integration.h>
#include <gsl/gsl_math.h>
#include <gsl/gsl_statistics_double.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>

static const indicator_kind per_window[3] = {INDICATOR_REDNESS, INDICATOR_SPECTRAL_EXPONENT,
                                             INDICATOR_DFA};

/* A spec of window W, unit time step, the given step and band, with its plan. */
static rolling_spec spec_with_plan(size_t W, size_t step, double lo, double hi)
{
    rolling_spec spec = {W, 0.8, 1.0, RECOVERY_LOG_AR1, step, lo, hi, NULL};
    rolling_plan *plan = NULL;
    int st = slowscan_rolling_plan_alloc(&spec, &plan);
    CHECK(st == SLOWSCAN_OK, "plan for W=%zu band %g:%g: status %d", W, lo, hi, st);
    spec.plan = plan;
    return spec;
}

static void spec_free(rolling_spec *spec)
{
    slowscan_rolling_plan_free((rolling_plan *)spec->plan);
    spec->plan = NULL;
}

/* phi = 1: a random walk; phi = 0: white noise; unit Gaussian innovations. */
static double *ar1_path(unsigned long seed, size_t n, double phi)
{
    check_rng *rng = check_rng_alloc(seed);
    double *x = malloc(n * sizeof *x), a = 0.0;
    for (size_t i = 0; i < n; i++)
        x[i] = a = phi * a + check_rng_gaussian(rng);
    check_rng_free(rng);
    return x;
}

/* Mean of the finite values of the three per-window indicators of x (out[k] their means) and
 * how many windows were evaluated. */
static size_t per_window_means(const rolling_spec *spec, const double *x, size_t n, double mean[3])
{
    double *v[3];
    for (int k = 0; k < 3; k++)
        v[k] = malloc(n * sizeof(double));
    int st = slowscan_rolling_compute(spec, x, NULL, n, per_window, 3, v);
    CHECK(st == SLOWSCAN_OK, "slowscan_rolling_compute status %d", st);
    size_t used = 0;
    for (int k = 0; k < 3; k++) {
        double sum = 0.0;
        size_t count = 0;
        for (size_t i = 0; i < n; i++)
            if (isfinite(v[k][i])) {
                sum += v[k][i];
                count++;
            }
        mean[k] = count ? sum / (double)count : NAN;
        used = count;
        free(v[k]);
    }
    return used;
}

/* The periodogram of a window against numpy.fft.rfft of the same demeaned window under
 * scipy's periodic Hann taper (Debian python3-numpy/scipy), for an even and an odd W. */
static void test_periodogram_numpy(void)
{
    const size_t lengths[2] = {256, 191};
    for (int c = 0; c < 2; c++) {
        size_t W = lengths[c];
        double *x = ar1_path(31 + (unsigned long)c, W, 0.7), power[129], want[129];
        for (size_t j = 0; j < W; j++)
            x[j] += 40.0; /* a mean far from zero, which the demeaning must remove */
        rolling_spec spec = spec_with_plan(W, 0, 0, 0);
        rolling_scratch *scratch = slowscan_rolling_scratch_alloc(W);
        int st = slowscan_rolling_periodogram(spec.plan, scratch, x, power);
        int got = check_python_on("periodogram_hann.py", x, W, NULL, want, 129);
        CHECK(st == SLOWSCAN_OK && got == (int)(W / 2 + 1), "W=%zu: periodogram %d, numpy %d",
              W, st, got);
        double top = 0.0, worst = 0.0;
        for (size_t k = 0; k <= W / 2; k++)
            top = fmax(top, want[k]);
        for (size_t k = 0; got == (int)(W / 2 + 1) && k <= W / 2; k++)
            worst = fmax(worst, fabs(power[k] - want[k]) / top);
        /* numpy.fft.rfft with scipy.signal.get_window("hann"): round-off only. */
        CHECK(got > 0 && worst < 1e-12, "W=%zu: periodogram differs from numpy by %g of its peak",
              W, worst);
        slowscan_rolling_scratch_free(scratch);
        spec_free(&spec);
        free(x);
    }
}

/* spectral_exponent and dfa use slope weights made once per plan; the same slopes from GSL's
 * gsl_fit_linear on the window's own log periodogram and log F(s) (reference library: GSL).
 * F(s) itself against per-box line fits by gsl_fit_linear. */
static void test_designs_against_gsl(void)
{
    enum { W = 200 };
    double *x = ar1_path(41, W, 0.5), power[W / 2 + 1], lf[W], lp[W], F[64], ls[64], lF[64];
    double out_e[W], out_d[W], *out[2] = {out_e, out_d}, c0, c1, cov00, cov01, cov11, ss;
    size_t sizes[64], count = 0;
    indicator_kind kinds[2] = {INDICATOR_SPECTRAL_EXPONENT, INDICATOR_DFA};
    const double bands[2][2] = {{0, 0}, {0.05, 0.3}};
    for (int b = 0; b < 2; b++) {
        rolling_spec spec = spec_with_plan(W, 0, bands[b][0], bands[b][1]);
        rolling_scratch *scratch = slowscan_rolling_scratch_alloc(W);
        slowscan_rolling_periodogram(spec.plan, scratch, x, power);
        size_t m = 0;
        for (size_t k = 1; k <= W / 2; k++) {
            double f = (double)k / W;
            if (b == 0 || (f >= bands[b][0] - 1e-12 && f <= bands[b][1] + 1e-12)) {
                lf[m] = log(f);
                lp[m++] = log(power[k]);
            }
        }
        CHECK(m == slowscan_rolling_band_count(W, 1.0, bands[b][0], bands[b][1]), "band count %zu", m);
        gsl_fit_linear(lf, 1, lp, 1, m, &c0, &c1, &cov00, &cov01, &cov11, &ss);
        CHECK(slowscan_rolling_compute(&spec, x, NULL, W, kinds, 2, out) == SLOWSCAN_OK, "compute");
        CHECK_CLOSE(out_e[W - 1], -c1, 1e-10, 1e-12, "spectral_exponent vs gsl_fit_linear");
        CHECK(slowscan_rolling_dfa_fluctuation(spec.plan, scratch, x, sizes, F, 64, &count) == SLOWSCAN_OK,
              "dfa fluctuation");
        double profile[W], sum = 0.0, mean = gsl_stats_mean(x, 1, W), worst = 0.0, jj[W];
        for (size_t i = 0; i < W; i++) {
            profile[i] = sum += x[i] - mean;
            jj[i] = (double)i;
        }
        for (size_t j = 0; j < count; j++) {
            size_t s = sizes[j], boxes = W / s;
            double rss = 0.0;
            for (size_t bx = 0; bx < boxes; bx++) {
                gsl_fit_linear(jj, 1, profile + bx * s, 1, s, &c0, &c1, &cov00, &cov01, &cov11, &ss);
                rss += ss;
            }
            worst = fmax(worst, fabs(F[j] - sqrt(rss / (double)(boxes * s))) / F[j]);
            ls[j] = log((double)s);
            lF[j] = log(F[j]);
        }
        CHECK(count >= 5 && sizes[0] == 4 && sizes[count - 1] == W / 4,
              "box sizes 4 .. W/4: %zu sizes, %zu .. %zu", count, sizes[0], sizes[count - 1]);
        CHECK(worst < 1e-10, "F(s) vs per-box gsl_fit_linear: relative %g", worst);
        gsl_fit_linear(ls, 1, lF, 1, count, &c0, &c1, &cov00, &cov01, &cov11, &ss);
        CHECK_CLOSE(out_d[W - 1], c1, 1e-10, 1e-12, "dfa vs gsl_fit_linear of ln F on ln s");
        slowscan_rolling_scratch_free(scratch);
        spec_free(&spec);
    }
    free(x);
}

/* Exponents on long series, averaged over 8 non-overlapping windows of 2048 (step 2048).
 * Over 20 seeds that mean had sd 0.015 (white, exponent), 0.036 (walk, exponent), 0.008 and
 * 0.016 (dfa; means 0.510 and 1.483, DFA's known small-box bias): each tolerance is about
 * 4 sd beyond the bias. */
static void test_white_and_random_walk(void)
{
    enum { W = 2048, N = 8 * W };
    double white[3], walk[3], walk_band[3];
    double *x = ar1_path(51, N, 0.0), *y = ar1_path(52, N, 1.0);
    rolling_spec all = spec_with_plan(W, W, 0, 0), low = spec_with_plan(W, W, 1.0 / W, 0.1);
    CHECK(per_window_means(&all, x, N, white) == 8, "8 windows evaluated at step W");
    per_window_means(&all, y, N, walk);
    per_window_means(&low, y, N, walk_band);
    /* Power-law spectra of white and Brownian noise: exponent 0 and 2 (common practice, no
     * source). The random walk is fitted below 0.1 cycles per step, where its discrete
     * spectrum 1/(4 sin^2(pi f)) still follows f^-2 to within 3%. */
    CHECK(fabs(white[1] - 0.0) < 0.06, "white noise spectral exponent %g, want 0 +- 0.06", white[1]);
    CHECK(fabs(walk_band[1] - 2.0) < 0.15, "random walk spectral exponent %g, want 2 +- 0.15",
          walk_band[1]);
    /* DFA of white noise 0.5, of its running sum (a random walk) 1.5 (Peng et al. 1994,
     * Phys. Rev. E 49:1685). */
    CHECK(fabs(white[2] - 0.5) < 0.05, "white noise dfa %g, want 0.5 +- 0.05", white[2]);
    CHECK(fabs(walk[2] - 1.5) < 0.08, "random walk dfa %g, want 1.5 +- 0.08", walk[2]);
    /* Can fail: the two classes are far apart on every indicator. */
    CHECK(walk[0] > 100 * white[0] && walk[1] > 1.5 && walk[2] > 1.2,
          "random walk redder than white noise: redness %g vs %g", walk[0], white[0]);
    spec_free(&all);
    spec_free(&low);
    free(x);
    free(y);
}

static double ar1_spectrum(double w, void *params)
{
    double phi = *(double *)params;
    return 1.0 / (1.0 - 2.0 * phi * cos(w) + phi * phi);
}

/* The integral of the AR(1) spectrum s^2 / (1 - 2 phi cos w + phi^2) (Box & Jenkins, Time
 * Series Analysis) over [a, b], by GSL's QAGS. */
static double spectrum_integral(double phi, double a, double b)
{
    gsl_integration_workspace *ws = gsl_integration_workspace_alloc(200);
    gsl_function f = {ar1_spectrum, &phi};
    double result = NAN, error;
    gsl_integration_qags(&f, a, b, 0.0, 1e-10, 200, ws, &result, &error);
    gsl_integration_workspace_free(ws);
    return result;
}

/* Redness of AR(1) series against the ratio of the analytic spectrum integrated over the
 * lowest and highest fifths of (0, pi]: mean over 40 windows of 2000. Over 20 seeds the
 * measured/analytic ratio had mean 1.00 to 1.02 (a ratio of sums is biased up by about the
 * relative variance of its denominator) and sd 2.3% to 3%; the tolerance, 12%, is about 4 sd. */
static void test_ar1_redness(void)
{
    enum { W = 2000, N = 40 * W };
    const double phis[4] = {0.0, 0.3, 0.6, 0.8};
    double previous = 0.0;
    rolling_spec spec = spec_with_plan(W, W, 0, 0);
    for (int p = 0; p < 4; p++) {
        double *x = ar1_path(61 + (unsigned long)p, N, phis[p]), mean[3];
        per_window_means(&spec, x, N, mean);
        double want = spectrum_integral(phis[p], 0.0, M_PI / 5) /
                      spectrum_integral(phis[p], 4 * M_PI / 5, M_PI);
        CHECK(fabs(mean[0] / want - 1.0) < 0.12, "AR(1) phi=%g: redness %g, analytic %g",
              phis[p], mean[0], want);
        CHECK(mean[0] > previous, "redness rises with phi: %g after %g", mean[0], previous);
        previous = mean[0];
        free(x);
    }
    spec_free(&spec);
}

/* Every indicator at step 7: the evaluated windows (counted back from the last) hold exactly
 * the step-1 values, the others NaN (common practice, no source: a step only skips windows). */
static void test_steps(void)
{
    enum { N = 400, W = 96, STEP = 7, K = INDICATOR_COUNT };
    double *x = ar1_path(71, N, 0.6), *one[K], *stepped[K];
    indicator_kind kinds[K];
    for (int k = 0; k < K; k++) {
        kinds[k] = (indicator_kind)k;
        one[k] = malloc(N * sizeof(double));
        stepped[k] = malloc(N * sizeof(double));
    }
    rolling_spec spec = spec_with_plan(W, 1, 0, 0), coarse = spec;
    coarse.step = STEP;
    CHECK(slowscan_rolling_compute(&spec, x, x, N, kinds, K, one) == SLOWSCAN_OK, "step 1");
    CHECK(slowscan_rolling_compute(&coarse, x, x, N, kinds, K, stepped) == SLOWSCAN_OK, "step 7");
    size_t evaluated = 0, bad = 0;
    for (size_t i = W - 1; i < N; i++) {
        int on = (N - 1 - i) % STEP == 0;
        evaluated += on;
        for (int k = 0; k < K; k++)
            bad += on ? !(stepped[k][i] == one[k][i] || (isnan(one[k][i]) && isnan(stepped[k][i])))
                      : !isnan(stepped[k][i]);
    }
    CHECK(bad == 0 && evaluated == (N - W) / STEP + 1 && isfinite(stepped[INDICATOR_DFA][N - 1]),
          "step 7: %zu values differ from step 1 (%zu windows evaluated)", bad, evaluated);
    /* The default: moment indicators every window, per-window ones at most 500 windows. */
    rolling_spec def = spec;
    def.step = 0;
    CHECK(slowscan_rolling_step(&def, INDICATOR_LAG1, 2000) == 1, "default step of lag1");
    def.window = 1001;
    CHECK(slowscan_rolling_step(&def, INDICATOR_DFA, 2000) == 2 && slowscan_rolling_step(&def, INDICATOR_DFA, 1500) == 1 &&
          slowscan_rolling_step(&def, INDICATOR_REDNESS, 1501) == 2, "default step: smallest with <= 500 windows");
    for (int k = 0; k < K; k++) {
        free(one[k]);
        free(stepped[k]);
    }
    spec_free(&spec);
    free(x);
}

/* A missing sample makes every window holding it NA for the per-window indicators (the rule
 * stated in indicators.h); the windows around it keep their values. */
static void test_missing(void)
{
    enum { N = 300, W = 64 };
    double *x = ar1_path(81, N, 0.4), *v[3];
    x[150] = NAN;
    for (int k = 0; k < 3; k++)
        v[k] = malloc(N * sizeof(double));
    rolling_spec spec = spec_with_plan(W, 1, 0, 0);
    CHECK(slowscan_rolling_compute(&spec, x, NULL, N, per_window, 3, v) == SLOWSCAN_OK, "gap: status");
    size_t bad = 0;
    for (size_t i = W - 1; i < N; i++)
        for (int k = 0; k < 3; k++)
            bad += (i >= 150 && i < 150 + W) != !isfinite(v[k][i]);
    CHECK(bad == 0, "gap: %zu windows wrongly NA or not", bad);
    for (int k = 0; k < 3; k++)
        free(v[k]);
    spec_free(&spec);
    free(x);
}

static void test_errors(void)
{
    enum { N = 64 };
    double *x = ar1_path(91, N, 0.3), out[N], *outs[1] = {out};
    indicator_kind dfa = INDICATOR_DFA, exponent = INDICATOR_SPECTRAL_EXPONENT;
    rolling_spec bare = {40, 0.8, 1.0, RECOVERY_LOG_AR1, 0, 0, 0, NULL}, s = bare;
    rolling_plan *plan = NULL;
    CHECK(slowscan_rolling_compute(&bare, x, NULL, N, &dfa, 1, outs) == SLOWSCAN_EINVAL, "no plan");
    const double bad_bands[3][2] = {{0.1, 0.6}, {0.3, 0.2}, {-0.1, 0.2}};
    for (int b = 0; b < 3; b++) {
        s.band_lo = bad_bands[b][0], s.band_hi = bad_bands[b][1];
        CHECK(slowscan_rolling_plan_alloc(&s, &plan) == SLOWSCAN_EINVAL && !plan, "band %g:%g refused",
              s.band_lo, s.band_hi);
    }
    s = bare, s.band_lo = 0.1, s.band_hi = 0.14; /* k/40 in it: 0.1, 0.125 */
    CHECK(slowscan_rolling_band_count(40, 1.0, 0.1, 0.14) == 2, "two frequencies in the band");
    CHECK(slowscan_rolling_plan_alloc(&s, &plan) == SLOWSCAN_OK, "narrow band: plan made");
    s.plan = plan;
    CHECK(slowscan_rolling_compute(&s, x, NULL, N, &exponent, 1, outs) == SLOWSCAN_EINVAL,
          "band with 2 frequencies refused");
    slowscan_rolling_plan_free(plan);
    s = bare, s.window = DFA_MIN_WINDOW - 1;
    CHECK(slowscan_rolling_plan_alloc(&s, &plan) == SLOWSCAN_OK, "W=31: plan made");
    s.plan = plan;
    CHECK(slowscan_rolling_compute(&s, x, NULL, N, &dfa, 1, outs) == SLOWSCAN_EINVAL, "dfa at W=31");
    s.window = DFA_MIN_WINDOW;
    CHECK(slowscan_rolling_compute(&s, x, NULL, N, &dfa, 1, outs) == SLOWSCAN_EINVAL,
          "a plan of another window refused");
    slowscan_rolling_plan_free(plan);
    /* The smallest DFA window: box sizes 4, 5, 6, 7, 8 (four per octave, rounded). */
    s.plan = NULL;
    CHECK(slowscan_rolling_plan_alloc(&s, &plan) == SLOWSCAN_OK, "W=32: plan made");
    rolling_scratch *scratch = slowscan_rolling_scratch_alloc(DFA_MIN_WINDOW);
    size_t sizes[16], count = 0;
    double F[16];
    CHECK(slowscan_rolling_dfa_fluctuation(plan, scratch, x, sizes, F, 16, &count) == SLOWSCAN_OK &&
          count == 5 && sizes[0] == 4 && sizes[1] == 5 && sizes[4] == 8, "W=32: %zu box sizes", count);
    slowscan_rolling_scratch_free(scratch);
    slowscan_rolling_plan_free(plan);
    free(x);
}

void suite_spectral(void)
{
    test_errors();
    test_periodogram_numpy();
    test_designs_against_gsl();
    test_steps();
    test_missing();
    test_white_and_random_walk();
    test_ar1_redness();
}
