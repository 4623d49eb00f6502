/* The calibration battery's cases and their one generator. None of these series slows down:
 * the memory (phi, or the ARMA/1/f structure) is constant in every case, so a test that
 * rejects more often than 5% at p <= 0.05 is mis-sized there, unless the case marks the
 * test's quantity as really changing (the variance under a rising noise amplitude).
 *
 * Scales are in units of the noise's stationary sd unless stated. The noise processes:
 *  - ARMA(1,1) x_i = phi x_{i-1} + e_i + theta e_{i-1} (theta 0: AR(1)), innovations scaled
 *    so the stationary sd is `sd`; started after a burn-in of 30/(1 - phi) samples
 *    (phi^burn-in < 1e-13, so the start is stationary to double precision in effect);
 *  - t3: the same with Student t innovations of 3 degrees of freedom divided by sqrt(3)
 *    (unit variance; heavy tails, finite variance);
 *  - 1/f: the sum of ten AR(1)s with phi_j = 1 - 2^-j, j = 1..10, each of unit variance and
 *    started from its stationary N(0, 1). Equal variance per octave of time scale gives a
 *    spectrum close to 1/f between the fastest and slowest corner (about 1/(2 pi 1024) to
 *    1/(2 pi 2) cycles per sample) — the sum-of-relaxations construction of 1/f noise
 *    (common practice, no source). Chosen over spectral synthesis with random phases because
 *    it is stationary from the first sample and not periodic over the record (a synthesised
 *    record wraps its end onto its start, which a phase null would then match exactly). */
#include "calibration_cases.h"
#include "check.h"

#include <gsl/gsl_math.h> /* M_PI, which strict C11 lacks */
#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

const char *const calibration_test_names[CAL_TESTS] = {"variance", "lag1", "recovery_trend"};

#define VAR (1u << CAL_VARIANCE)

/* Every case's n keeps one screen call (S series, M surrogates) to a few seconds; the long
 * records (n = 2000) are the only expensive ones. */
const calibration_case calibration_cases[] = {
    {.name = "ar1-0.5-n300", .what = "AR(1) phi 0.5, short record", .n = 300,
     .noise = CAL_NOISE_ARMA, .phi = 0.5, .sd = 1, .sd_end = 1, .options = ""},
    {.name = "ar1-0.5-n2000", .what = "AR(1) phi 0.5, long record", .n = 2000,
     .noise = CAL_NOISE_ARMA, .phi = 0.5, .sd = 1, .sd_end = 1, .options = ""},
    {.name = "ar1-0.95-n300", .what = "AR(1) phi 0.95, short record", .n = 300,
     .noise = CAL_NOISE_ARMA, .phi = 0.95, .sd = 1, .sd_end = 1, .options = ""},
    {.name = "ar1-0.95-n2000", .what = "AR(1) phi 0.95, long record", .n = 2000,
     .noise = CAL_NOISE_ARMA, .phi = 0.95, .sd = 1, .sd_end = 1, .options = ""},
    {.name = "arma11", .what = "ARMA(1,1) phi 0.6, theta 0.4", .n = 500,
     .noise = CAL_NOISE_ARMA, .phi = 0.6, .theta = 0.4, .sd = 1, .sd_end = 1, .options = "",
     .ar1_mismatch = 1},
    {.name = "pink", .what = "1/f noise (sum of ten AR(1)s, octave time scales)", .n = 1000,
     .noise = CAL_NOISE_PINK, .sd = 1, .sd_end = 1, .options = "", .ar1_mismatch = 1},
    {.name = "exp-ar1", .what = "exp of AR(1) phi 0.5, sd 0.5: skewed, spread grows with level",
     .n = 500, .noise = CAL_NOISE_ARMA, .phi = 0.5, .sd = 0.5, .sd_end = 0.5,
     .exp_transform = 1, .options = ""},
    {.name = "t3-ar1", .what = "AR(1) phi 0.5, t innovations (3 d.o.f.)", .n = 500,
     .noise = CAL_NOISE_ARMA_T3, .phi = 0.5, .sd = 1, .sd_end = 1, .options = ""},
    {.name = "linear-trend", .what = "AR(1) phi 0.5 on a linear trend of 10 sd", .n = 500,
     .noise = CAL_NOISE_ARMA, .phi = 0.5, .sd = 1, .sd_end = 1, .mean = CAL_MEAN_LINEAR,
     .change = 10, .options = ""},
    {.name = "quadratic-trend", .what = "AR(1) phi 0.5 on 24 u^2 (accelerating)", .n = 500,
     .noise = CAL_NOISE_ARMA, .phi = 0.5, .sd = 1, .sd_end = 1, .mean = CAL_MEAN_QUADRATIC,
     .change = 24, .options = ""},
    /* The one case that needs an option: at the default bandwidth (10%) the local-linear fit
     * cannot follow this curvature (its bias, s^2 m''/2, reaches 0.7 noise sd over the last
     * third, a dip inside the record that the edge-leakage test does not see) and
     * recovery_trend rejected 110 of 400 (27.5%); neither a drifting intercept in the drift
     * regression nor re-detrending each surrogate brought it near 5% in our trials (19% and 14%
     * on 200 series). A bandwidth that follows the curve does: the README names it. */
    {.name = "exp-trend", .what = "AR(1) phi 0.5 on 24 (e^{4u}-1)/(e^4-1), bandwidth 5%",
     .n = 500, .noise = CAL_NOISE_ARMA, .phi = 0.5, .sd = 1, .sd_end = 1,
     .mean = CAL_MEAN_EXPONENTIAL, .change = 24, .options = "--bandwidth 5%"},
    /* Noise sd 0.155 = 0.2 of the mean's total change 1 - sqrt(0.05) = 0.776. */
    {.name = "fold-mean", .what = "mean sqrt(1-0.95u), AR(1) phi 0.5 sd 0.155", .n = 1000,
     .noise = CAL_NOISE_ARMA, .phi = 0.5, .sd = 0.155, .sd_end = 0.155,
     .mean = CAL_MEAN_FOLD, .change = 1, .options = ""},
    {.name = "step-mean", .what = "AR(1) phi 0.5, mean step of 2 sd halfway", .n = 500,
     .noise = CAL_NOISE_ARMA, .phi = 0.5, .sd = 1, .sd_end = 1, .mean = CAL_MEAN_STEP,
     .change = 2, .options = ""},
    {.name = "rising-noise", .what = "AR(1) phi 0.5, noise sd 1 -> 3 linearly", .n = 500,
     .noise = CAL_NOISE_ARMA, .phi = 0.5, .sd = 1, .sd_end = 3, .options = "",
     .expected = VAR},
    {.name = "rising-noise-nt", .what = "the same, screened with --noise-trend", .n = 500,
     .noise = CAL_NOISE_ARMA, .phi = 0.5, .sd = 1, .sd_end = 3, .options = "--noise-trend",
     .needs = "--noise-trend", .expected = VAR},
    /* A 20% running climatology spans 10 cycles of this 50-cycle record: each phase's mean
     * averages about 10 values (noise left in the cycle: sd/sqrt(10)), while the quadratic
     * amplitude's curvature biases a centred mean by only (a''/6) h^2 = 3 * 0.1^2 = 0.03
     * (h = 0.1 the half-window in u; a'' = 6 for 1 + 3u^2). */
    {.name = "seasonal-growing", .what = "period 12, amplitude 1 -> 4 (u^2), AR(1) phi 0.5",
     .n = 600, .noise = CAL_NOISE_ARMA, .phi = 0.5, .sd = 1, .sd_end = 1, .period = 12,
     .amp0 = 1, .amp1 = 4, .options = "--deseason 12 --deseason-window 20%",
     .needs = "--deseason-window"},
    /* Weekly samples of an annual cycle: 52.1775 steps per period is no whole number, so the
     * cycle is fitted as two sine/cosine pairs (the shape has two harmonics). */
    {.name = "seasonal-weekly", .what = "period 52.1775 steps, 2 harmonics, AR(1) phi 0.5",
     .n = 522, .noise = CAL_NOISE_ARMA, .phi = 0.5, .sd = 1, .sd_end = 1, .period = 52.1775,
     .amp0 = 2, .amp1 = 2, .second = 0.4, .options = "--deseason 52.1775 --harmonics 2",
     .needs = "--harmonics"},
    {.name = "missing-10%", .what = "AR(1) phi 0.5, 10% of samples missing at random",
     .n = 500, .noise = CAL_NOISE_ARMA, .phi = 0.5, .sd = 1, .sd_end = 1,
     .gaps = CAL_GAPS_RANDOM, .gap_share = 0.10, .options = ""},
    {.name = "gap-15%", .what = "AR(1) phi 0.5, one gap of 15% in the middle", .n = 500,
     .noise = CAL_NOISE_ARMA, .phi = 0.5, .sd = 1, .sd_end = 1, .gaps = CAL_GAPS_BLOCK,
     .gap_share = 0.15, .options = ""},
};
const size_t calibration_case_count = sizeof calibration_cases / sizeof calibration_cases[0];

unsigned long calibration_seed(const calibration_case *c, unsigned long salt)
{
    unsigned long h = 2166136261ul;
    for (const char *p = c->name; *p; p++)
        h = ((h ^ (unsigned char)*p) * 16777619ul) & 0xfffffffful;
    return ((h ^ (salt * 2654435761ul)) & 0x7fffffff) | 1;
}

static double innovation(const calibration_case *c, gsl_rng *r)
{
    if (c->noise == CAL_NOISE_ARMA_T3)
        return gsl_ran_tdist(r, 3.0) / sqrt(3.0);
    return gsl_ran_gaussian_ziggurat(r, 1.0);
}

/* Stationary-sd-1 ARMA(1,1) whose innovations are scaled by the ramp sd(u)/sd(0). */
static void noise_arma(const calibration_case *c, gsl_rng *r, double *x)
{
    double phi = c->phi, th = c->theta;
    double norm = sqrt((1 - phi * phi) / (1 + 2 * phi * th + th * th));
    size_t burn = (size_t)ceil(30.0 / (1.0 - phi));
    double prev = 0, e_prev = 0;
    for (size_t i = 0; i < burn + c->n; i++) {
        double u = i < burn ? 0.0 : (double)(i - burn) / (double)(c->n - 1);
        double e = innovation(c, r) * (1.0 + (c->sd_end / c->sd - 1.0) * u);
        prev = phi * prev + norm * (e + th * e_prev);
        e_prev = e;
        if (i >= burn)
            x[i - burn] = prev;
    }
}

static void noise_pink(const calibration_case *c, gsl_rng *r, double *x)
{
    enum { PARTS = 10 };
    memset(x, 0, c->n * sizeof *x);
    for (int j = 1; j <= PARTS; j++) {
        double phi = 1.0 - ldexp(1.0, -j), y = gsl_ran_gaussian_ziggurat(r, 1.0);
        for (size_t i = 0; i < c->n; i++) {
            x[i] += y / sqrt((double)PARTS);
            y = phi * y + gsl_ran_gaussian_ziggurat(r, sqrt(1 - phi * phi));
        }
    }
}

static double mean_at(const calibration_case *c, size_t i)
{
    double u = (double)i / (double)(c->n - 1);
    switch (c->mean) {
    case CAL_MEAN_LINEAR: return c->change * u;
    case CAL_MEAN_QUADRATIC: return c->change * u * u;
    case CAL_MEAN_EXPONENTIAL: return c->change * expm1(4 * u) / expm1(4);
    case CAL_MEAN_FOLD: return c->change * sqrt(1 - 0.95 * u);
    case CAL_MEAN_STEP: return i >= c->n / 2 ? c->change : 0.0;
    case CAL_MEAN_FLAT: break;
    }
    return 0.0;
}

static double season_at(const calibration_case *c, size_t i)
{
    if (c->period <= 0)
        return 0.0;
    double u = (double)i / (double)(c->n - 1);
    double amp = c->amp0 + (c->amp1 - c->amp0) * u * u;
    double phase = 2 * M_PI * (double)i / c->period;
    return amp * (sin(phase) + c->second * cos(2 * phase));
}

/* Random gaps keep the first and last samples, so every series spans the same time.
 * scratch holds 2n indices: the candidates, then the chosen ones. */
static void punch_gaps(const calibration_case *c, gsl_rng *r, double *x, size_t *scratch)
{
    size_t n = c->n, k = (size_t)lround(c->gap_share * (double)n);
    if (c->gaps == CAL_GAPS_BLOCK) {
        size_t start = (size_t)lround((0.5 - c->gap_share / 2) * (double)n);
        for (size_t i = start; i < start + k; i++)
            x[i] = NAN;
    } else if (c->gaps == CAL_GAPS_RANDOM) {
        for (size_t i = 0; i + 2 < n; i++)
            scratch[i] = i + 1;
        gsl_ran_choose(r, scratch + n, k, scratch, n - 2, sizeof *scratch);
        for (size_t j = 0; j < k; j++)
            x[scratch[n + j]] = NAN;
    }
}

static void draw_series(const calibration_case *c, gsl_rng *r, double *x, size_t *scratch)
{
    if (c->noise == CAL_NOISE_PINK)
        noise_pink(c, r, x);
    else
        noise_arma(c, r, x);
    for (size_t i = 0; i < c->n; i++) {
        double v = c->sd * x[i];
        x[i] = (c->exp_transform ? exp(v) : v) + mean_at(c, i) + season_at(c, i);
    }
    punch_gaps(c, r, x, scratch);
}

int calibration_write_case(const calibration_case *c, size_t series, unsigned long seed,
                           const char *path)
{
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    double *x = malloc(series * c->n * sizeof *x);
    size_t *scratch = malloc(2 * c->n * sizeof *scratch);
    int status = -1;
    if (r && x && scratch) {
        gsl_rng_set(r, seed);
        for (size_t k = 0; k < series; k++)
            draw_series(c, r, x + k * c->n, scratch);
        status = check_write_columns_csv(path, series, c->n, x);
    }
    free(scratch);
    free(x);
    gsl_rng_free(r);
    return status;
}
