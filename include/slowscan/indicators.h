/* slowscan — rolling-window indicators of critical slowing down (module prefix: indicator_ and
 * rolling_).
 *
 * Windows are trailing: the value at index i uses samples i-W+1 .. i; indices below W-1 get
 * NaN. The moment indicators (variance .. recovery) come from one streaming mechanism (window
 * power sums about a shift that is re-centred on the window mean), so each costs O(1) per step
 * whatever W. The spectral and scaling indicators (redness, spectral_exponent, dfa) are
 * computed afresh in each window, O(W log W), from a rolling_plan made once per window length.
 * Missing samples (NaN): moment indicators use the samples present, lag1/ar1/recovery the
 * adjacent pairs present; a window with fewer than min_coverage*W samples present gives NaN.
 * redness, spectral_exponent and dfa give NaN for a window with any missing sample: a
 * periodogram or a profile with holes would need a fill rule of its own, and a filled window
 * would mix invented values into the very spectrum being measured.
 *
 * Steps: only every step-th window is evaluated, counted back from the last (windows ending at
 * n-1, n-1-step, ...), so the latest window is always among them; the others are NaN. Default
 * (step 0): step 1 for the moment indicators, and for the spectral and scaling ones the
 * smallest step that leaves at most ROLLING_MAX_WINDOWS windows (slowscan_rolling_step).
 *
 * Definitions (match these exactly):
 *   variance  sample variance (n-1)              sd  its square root
 *   cv        sd of the residual / |mean of the un-detrended level| in the same window
 *   skewness  gsl_stats_skew                     kurtosis  gsl_stats_kurtosis (excess)
 *   lag1      sum (x_t-m)(x_{t+1}-m) / sum (x_t-m)^2, m the window mean (Box-Jenkins)
 *   ar1       OLS slope of x_{t+1} on x_t with intercept, over the pairs in the window
 *   recovery  ln(ar1)/dt (NaN where ar1 <= 0); with RECOVERY_INCREMENTS the OLS slope of
 *             x_{t+1}-x_t on x_t divided by dt.
 *   The periodogram of a window: the window minus its mean, times the periodic Hann taper
 *   w_j = (1 - cos(2 pi j / W)) / 2, then P_k = |sum_j x_j e^{-2 pi i jk/W}|^2 for
 *   k = 0 .. floor(W/2); positive frequency k is f_k = k / (W dt).
 *   redness   sum of P_k over the lowest fifth of the positive frequencies (k = 1 .. L,
 *             L = floor(floor(W/2) / 5)) over the sum over the highest fifth (the last L).
 *   spectral_exponent  minus the OLS slope of ln P_k on ln f_k over the positive frequencies,
 *             or over those in [band_lo, band_hi]; white noise ~0, a random walk ~2.
 *   dfa       detrended fluctuation analysis: profile Y_i = cumulative sum of (x - mean);
 *             for each box size s (log-spaced from 4 to floor(W/4), see slowscan_rolling_plan_alloc)
 *             the profile is cut from its start into floor(W/s) boxes, a line is fitted by
 *             least squares in each, F(s) = sqrt(mean squared residual over all boxes); the
 *             exponent is the OLS slope of ln F on ln s. White noise ~0.5, a random walk ~1.5.
 *   All three are expected to rise as a system slows down (power moves to low frequencies,
 *   the spectrum steepens, correlations reach further): direction "rising", one-sided. */
#ifndef SLOWSCAN_INDICATORS_H
#define SLOWSCAN_INDICATORS_H

#include "slowscan/export.h"

#include <stddef.h>

typedef enum {
    INDICATOR_VARIANCE,
    INDICATOR_SD,
    INDICATOR_CV,
    INDICATOR_SKEWNESS,
    INDICATOR_KURTOSIS,
    INDICATOR_LAG1,
    INDICATOR_AR1,
    INDICATOR_RECOVERY,
    INDICATOR_REDNESS,
    INDICATOR_SPECTRAL_EXPONENT,
    INDICATOR_DFA,
    INDICATOR_COUNT
} indicator_kind;

typedef enum { RECOVERY_LOG_AR1, RECOVERY_INCREMENTS } recovery_method;

SLOWSCAN_API
const char *slowscan_indicator_name(indicator_kind kind);
/* SLOWSCAN_EINVAL for an unknown name. */
SLOWSCAN_API
int slowscan_indicator_lookup(const char *name, indicator_kind *kind);
/* +1: expected to rise toward a threshold (one-sided test); 0: two-sided (skewness). */
SLOWSCAN_API
int slowscan_indicator_direction(indicator_kind kind);
/* Whether the indicator needs the un-detrended level series (cv). */
SLOWSCAN_API
int slowscan_indicator_needs_level(indicator_kind kind);
/* Whether it is computed afresh in each window (redness, spectral_exponent, dfa): it needs a
 * rolling_plan and, by default, is evaluated on a coarser step. */
SLOWSCAN_API
int slowscan_indicator_per_window(indicator_kind kind);
/* The smallest window (samples) the indicator is defined for: 3 for the moment indicators,
 * 6 for spectral_exponent (3 positive frequencies), 10 for redness (a fifth of the positive
 * frequencies must hold one), DFA_MIN_WINDOW for dfa. */
SLOWSCAN_API
size_t slowscan_indicator_min_window(indicator_kind kind);
/* How the indicator scales with its series: k when multiplying the series by a multiplies
 * the indicator by |a|^k (2 variance, 1 sd, 0 for every ratio, correlation and exponent). */
SLOWSCAN_API
int slowscan_indicator_scale_power(indicator_kind kind);

/* DFA needs W/4 >= 8 so that its box sizes (4 .. W/4) span an octave: five sizes at W = 32.
 * Fewer sizes give a slope from two or three points. */
enum { DFA_MIN_WINDOW = 32 };
/* The default step keeps a per-window indicator to at most this many windows. */
enum { ROLLING_MAX_WINDOWS = 500 };
/* spectral_exponent needs at least this many frequencies in its band. */
enum { SPECTRAL_MIN_FREQUENCIES = 3 };

typedef struct rolling_plan rolling_plan;

typedef struct {
    size_t window;         /* W, samples; >= 3 */
    double min_coverage;   /* in (0, 1]; default 0.8 */
    double dt;             /* time step, for recovery and the frequencies */
    recovery_method recovery;
    size_t step;           /* evaluate every step-th window; 0: the default (slowscan_rolling_step) */
    double band_lo, band_hi; /* spectral_exponent: frequencies in [band_lo, band_hi], cycles
                                per time unit; both 0: every positive frequency */
    const rolling_plan *plan; /* for redness, spectral_exponent, dfa: slowscan_rolling_plan_alloc of
                                 this window, dt and band; NULL otherwise */
} rolling_spec;

/* The step indicator `kind` is evaluated on in a series of n samples: spec->step when given,
 * else 1 for the moment indicators and floor((n - W) / ROLLING_MAX_WINDOWS) + 1 for the
 * per-window ones (the smallest step leaving at most ROLLING_MAX_WINDOWS windows). */
SLOWSCAN_API
size_t slowscan_rolling_step(const rolling_spec *spec, indicator_kind kind, size_t n);
/* Whether the window ending at i (i >= W-1) is evaluated on this step. */
static inline int rolling_evaluated(size_t step, size_t n, size_t i)
{
    return (n - 1 - i) % step == 0;
}

/* How many positive frequencies k/(W dt), k = 1 .. floor(W/2), lie in [lo, hi] (within a
 * relative 1e-9); lo = hi = 0 counts them all. */
SLOWSCAN_API
size_t slowscan_rolling_band_count(size_t window, double dt, double lo, double hi);

/* What the per-window indicators need for one window length: the FFTW r2c plan, the Hann
 * taper, the frequency bins of redness and of the band, the regression weights of ln f, and
 * DFA's box sizes with their regression designs. FFTW planning is not thread-safe: make plans
 * before starting threads (or under a lock); a plan is then shared read-only by every thread.
 * Reads spec->window, dt, band_lo, band_hi. SLOWSCAN_EINVAL for W < 3, dt <= 0, or a band not
 * inside (0, 1/(2 dt)] with lo < hi; SLOWSCAN_ENOMEM. A band holding fewer than
 * SPECTRAL_MIN_FREQUENCIES frequencies, or W < DFA_MIN_WINDOW, is accepted here and refused
 * by slowscan_rolling_compute for the indicator that needs it. */
SLOWSCAN_API
int slowscan_rolling_plan_alloc(const rolling_spec *spec, rolling_plan **plan);
SLOWSCAN_API
void slowscan_rolling_plan_free(rolling_plan *plan);
/* Whether `plan` was made for spec's window, dt and band (so it may be reused). */
SLOWSCAN_API
int slowscan_rolling_plan_matches(const rolling_plan *plan, const rolling_spec *spec);

/* Scratch of the per-window indicators (tapered window, spectrum, profile), one per thread,
 * for windows of up to max_window samples. NULL on failure. */
typedef struct rolling_scratch rolling_scratch;
SLOWSCAN_API
rolling_scratch *slowscan_rolling_scratch_alloc(size_t max_window);
SLOWSCAN_API
void slowscan_rolling_scratch_free(rolling_scratch *scratch);

/* The periodogram (definition above) of one gap-free window x[W]: power[k], k = 0 .. W/2. */
SLOWSCAN_API
int slowscan_rolling_periodogram(const rolling_plan *plan, rolling_scratch *scratch, const double *x,
                        double *power);
/* DFA's fluctuation function of one gap-free window x[W]: sizes[j] and F[j] for the plan's
 * *count box sizes (at most max). SLOWSCAN_EINVAL when W < DFA_MIN_WINDOW. */
SLOWSCAN_API
int slowscan_rolling_dfa_fluctuation(const rolling_plan *plan, rolling_scratch *scratch, const double *x,
                            size_t *sizes, double *F, size_t max, size_t *count);

/* Computes nkinds indicators over the residual series; out[k] has n entries, NaN before
 * W-1 and at windows not evaluated on the indicator's step. `level` (the un-detrended series,
 * n entries) is required when cv is requested, else may be NULL. SLOWSCAN_EINVAL for W < 3,
 * W > n, a coverage outside (0,1], dt <= 0, cv without a level, a per-window indicator
 * without a plan of this W and dt or with W below its slowscan_indicator_min_window, or
 * spectral_exponent with fewer than SPECTRAL_MIN_FREQUENCIES in its band. Windows without
 * variation give NaN for the ratio indicators (lag1, ar1, skewness, redness, ...).
 * slowscan_rolling_compute allocates scratch for per-window indicators itself; slowscan_rolling_compute_with
 * uses the caller's (for windows up to its max_window), so that repeated calls (surrogates)
 * allocate nothing. */
SLOWSCAN_API
int slowscan_rolling_compute(const rolling_spec *spec, const double *residual, const double *level,
                    size_t n, const indicator_kind *kinds, size_t nkinds, double *const *out);
SLOWSCAN_API
int slowscan_rolling_compute_with(const rolling_spec *spec, rolling_scratch *scratch,
                         const double *residual, const double *level, size_t n,
                         const indicator_kind *kinds, size_t nkinds, double *const *out);

#endif
