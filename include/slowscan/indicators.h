/* slowscan — rolling-window indicators of critical slowing down (module prefix: indicator_ and
 * rolling_).
 *
 * Windows are trailing: the value at index i uses samples i-W+1 .. i; indices below W-1 get
 * NaN. All indicators come from one streaming mechanism (window power sums about a shift that
 * is re-centred on the window mean), so each costs O(1) per step whatever W.
 * Missing samples (NaN): moment indicators use the samples present, lag1/ar1/recovery the
 * adjacent pairs present; a window with fewer than min_coverage*W samples present gives NaN.
 *
 * Definitions (match these exactly):
 *   variance  sample variance (n-1)              sd  its square root
 *   cv        sd of the residual / |mean of the un-detrended level| in the same window
 *   skewness  gsl_stats_skew                     kurtosis  gsl_stats_kurtosis (excess)
 *   lag1      sum (x_t-m)(x_{t+1}-m) / sum (x_t-m)^2, m the window mean (Box-Jenkins)
 *   ar1       OLS slope of x_{t+1} on x_t with intercept, over the pairs in the window
 *   recovery  ln(ar1)/dt (NaN where ar1 <= 0); with RECOVERY_INCREMENTS the OLS slope of
 *             x_{t+1}-x_t on x_t divided by dt. */
#ifndef SLOWSCAN_INDICATORS_H
#define SLOWSCAN_INDICATORS_H

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
    INDICATOR_COUNT
} indicator_kind;

typedef enum { RECOVERY_LOG_AR1, RECOVERY_INCREMENTS } recovery_method;

const char *indicator_name(indicator_kind kind);
/* SLOWSCAN_EINVAL for an unknown name. */
int indicator_lookup(const char *name, indicator_kind *kind);
/* +1: expected to rise toward a threshold (one-sided test); 0: two-sided (skewness). */
int indicator_direction(indicator_kind kind);
/* Whether the indicator needs the un-detrended level series (cv). */
int indicator_needs_level(indicator_kind kind);

typedef struct {
    size_t window;         /* W, samples; >= 3 */
    double min_coverage;   /* in (0, 1]; default 0.8 */
    double dt;             /* time step, for recovery */
    recovery_method recovery;
} rolling_spec;

/* Computes nkinds indicators over the residual series in one pass; out[k] has n entries.
 * `level` (the un-detrended series, n entries) is required when cv is requested, else may be
 * NULL. SLOWSCAN_EINVAL for W < 3, W > n, a coverage outside (0,1], dt <= 0, or cv without a
 * level. Windows without variation give NaN for the ratio indicators (lag1, ar1, skewness,...). */
int rolling_compute(const rolling_spec *spec, const double *residual, const double *level,
                    size_t n, const indicator_kind *kinds, size_t nkinds, double *const *out);

#endif
