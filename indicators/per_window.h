/* Private to indicators/: the per-window indicators (redness, spectral_exponent, dfa) and the
 * plan they share. Everything that depends only on the window length — the FFTW plan, the
 * taper, the frequency bins, the regression weights, DFA's box sizes — is computed once in
 * slowscan_rolling_plan_alloc; evaluating a window then costs one r2c (or one profile) and sums. */
#ifndef SLOWSCAN_INDICATORS_PER_WINDOW_H
#define SLOWSCAN_INDICATORS_PER_WINDOW_H

#include "slowscan/indicators.h"

#include <fftw3.h>
#include <stddef.h>

typedef struct {
    size_t count;      /* box sizes */
    size_t *sizes;     /* 4 .. floor(W/4), log-spaced, increasing, distinct */
    double *box_sxx;   /* per size s: sum_{j<s} (j - (s-1)/2)^2 = s (s^2 - 1) / 12 */
    double *weights;   /* OLS slope weights over ln s (rolling_slope_weights) */
} dfa_design;

struct rolling_plan {
    size_t window;
    double dt, band_lo, band_hi; /* as made (slowscan_rolling_plan_matches) */
    fftw_plan r2c;      /* length W, executed on scratch arrays (new-array execute) */
    double *taper;      /* W: periodic Hann */
    size_t npos;        /* positive frequencies, k = 1 .. floor(W/2) */
    size_t fifth;       /* redness: bins 1 .. fifth against npos-fifth+1 .. npos */
    size_t band_first, band_count; /* spectral_exponent's bins */
    double *band_weights;          /* band_count OLS slope weights over ln f */
    dfa_design dfa;     /* count 0 when W < DFA_MIN_WINDOW */
};

struct rolling_scratch {
    size_t capacity;
    double *real;           /* tapered window, FFTW-aligned */
    fftw_complex *spectrum; /* capacity/2 + 1 */
    double *power;          /* capacity/2 + 1 */
    double *profile;        /* capacity */
};

/* Mean of x[W] by one sum: gsl_stats_mean's running mean divides at every sample, which in
 * a per-window indicator evaluated hundreds of times per surrogate costs more than the FFT. */
static inline double window_mean(const double *x, size_t W)
{
    double sum = 0.0;
    for (size_t j = 0; j < W; j++)
        sum += x[j];
    return sum / (double)W;
}

/* w[k] = (u[k] - mean u) / sum (u - mean u)^2, so that sum_k w[k] y[k] is the OLS slope of y
 * on u with intercept. m >= 2 distinct u. */
void rolling_slope_weights(const double *u, size_t m, double *w);

/* Fills the plan's spectral part (taper, bins, band weights) and dfa part; SLOWSCAN_EINVAL
 * for a band outside (0, Nyquist], SLOWSCAN_ENOMEM. */
int spectral_design_init(rolling_plan *plan, double band_lo, double band_hi);
void spectral_design_free(rolling_plan *plan);
int dfa_design_init(dfa_design *d, size_t window);
void dfa_design_free(dfa_design *d);

/* Periodogram of x[W] into scratch->power[0 .. W/2]. */
void spectral_power(const rolling_plan *plan, rolling_scratch *scratch, const double *x);
/* From scratch->power (spectral_power first): the ratio, the exponent; NaN when undefined. */
double spectral_redness(const rolling_plan *plan, const rolling_scratch *scratch);
double spectral_exponent(const rolling_plan *plan, const rolling_scratch *scratch);
/* F(s) of x[W] for each box size of the plan into F[count]. */
void dfa_fluctuations(const rolling_plan *plan, rolling_scratch *scratch, const double *x,
                      double *F);
double dfa_exponent(const rolling_plan *plan, rolling_scratch *scratch, const double *x);

/* The per-window indicators among kinds, on their step; the moment ones are left alone. */
int rolling_per_window_pass(const rolling_spec *spec, rolling_scratch *scratch, const double *x,
                            size_t n, const indicator_kind *kinds, size_t nkinds,
                            double *const *out);

#endif
