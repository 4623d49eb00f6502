/* slowscan — AR(1) with a linearly drifting coefficient (module prefix: ar1_drift_).
 *
 * Ordinary least squares of x_{t+1} = (a0 + a1 s_t) x_t + c + e_t over the adjacent pairs
 * present, s_t the time of x_t rescaled to [-1/2, 1/2] over the series (index t / (n-1) -
 * 1/2 on the regular grid). a1 > 0 means the lag-one memory grows — the recovery rate
 * lambda(t) = ln(a0 + a1 s_t) / dt drifts toward zero. The t-value of a1 is the statistic of
 * the model-based slowing-down test; its null distribution comes from surrogates, not from
 * Student's t, because the residual is not white under the alternatives that matter.
 * Its standard error is heteroscedasticity-consistent (HC3, MacKinnon & White 1985): with the
 * model-based one, a noise whose spread grows with the level or over time gives the observed
 * series a t that spreads wider than the surrogates' (which are Gaussian and homoscedastic),
 * and false alarms follow; the sandwich estimate keeps both on one scale. The model-based
 * standard error is kept beside it (se_a1_model).
 * The workspace holds the design, so refits (one per surrogate) do not allocate. */
#ifndef SLOWSCAN_AR1_DRIFT_H
#define SLOWSCAN_AR1_DRIFT_H

#include "slowscan/export.h"

#include <stddef.h>
#include <gsl/gsl_rng.h>

typedef struct {
    double a0, a1, c;             /* coefficients */
    double se_a0, se_a1, se_c;    /* heteroscedasticity-consistent (HC3) standard errors */
    double cov_a0_a1;             /* HC3 covariance of a0 and a1 */
    double t_a1;                  /* a1 / se_a1: the statistic of the drift test */
    double se_a1_model;           /* the model-based (OLS, or WLS under the noise trend) one */
    double t_a1_model;            /* a1 / se_a1_model */
    double sigma2;                /* residual variance (pairs - 3 degrees of freedom) */
    size_t pairs;                 /* pairs used */
} ar1_drift_fit;

typedef struct ar1_drift_workspace ar1_drift_workspace;

SLOWSCAN_API
ar1_drift_workspace *slowscan_ar1_drift_alloc(size_t nmax);
SLOWSCAN_API
void slowscan_ar1_drift_free(ar1_drift_workspace *ws);

/* With noise_trend non-zero, later fits let the innovation variance drift linearly too:
 * after the OLS fit, the squared residuals are regressed on s_t, and the fit is redone by
 * weighted least squares with weights 1/variance(t) (floored at 1% of the mean squared
 * residual), the covariance scaled by the weighted residual variance. A noise that grows
 * then no longer passes for a memory that grows. */
SLOWSCAN_API
void slowscan_ar1_drift_set_noise_trend(ar1_drift_workspace *ws, int noise_trend);

/* Fits x[0..n) (NaN: missing; a pair is used when both samples are present). SLOWSCAN_ESHORT
 * with fewer than 8 pairs, SLOWSCAN_ECONST when the design is singular (a constant series),
 * SLOWSCAN_EINVAL for n > nmax. */
SLOWSCAN_API
int slowscan_ar1_drift_estimate(ar1_drift_workspace *ws, const double *x, size_t n, ar1_drift_fit *fit);

/* The recovery-rate path lambda(t_i) = ln(a0 + a1 s_i) / dt at every sample i, with a
 * pointwise 95% band by the delta method (se(phi) / (phi dt), phi = a0 + a1 s_i, +-1.96 se).
 * NaN where phi <= 0. lo and hi may be NULL. */
SLOWSCAN_API
void slowscan_ar1_drift_path(const ar1_drift_fit *fit, size_t n, double dt, double *lambda, double *lo,
                    double *hi);

/* Projected crossing of lambda = 0 — an extrapolation of the fitted linear trend in the AR(1)
 * coefficient, not a forecast: a slow mode the record does not resolve, a change of regime or
 * a transition set off by noise or by the rate of forcing all break it.
 * Positions are fractional sample indices from the first sample (0 .. n-1 is the record);
 * the caller turns them into times (t_first + index * dt). */
typedef enum {
    PROJECTION_AHEAD,         /* crosses after the record, within the horizon */
    PROJECTION_WITHIN_RECORD, /* the fitted path already reaches lambda = 0 inside the record */
    PROJECTION_NONE           /* a1 <= 0, or the crossing lies beyond the horizon */
} ar1_projection_kind;

typedef struct {
    ar1_projection_kind kind;
    double index;          /* crossing of the fitted path (NaN for PROJECTION_NONE) */
    double index_lo;       /* 2.5% bootstrap percentile of the crossing (NaN if it does not exist) */
    double index_hi;       /* 97.5% percentile; +INFINITY when more than 2.5% of draws do not
                            * cross within the horizon (the interval is open above) */
    double share_crossing; /* share of bootstrap draws that cross within the horizon */
    size_t draws;
} ar1_projection;

/* Residual bootstrap of the last fit made with ws (fit must be what slowscan_ar1_drift_estimate just
 * returned for the same series): the design is kept, the centred residuals (standardised by
 * the weights under the noise trend, inflated by sqrt(m/(m-3))) are drawn with replacement, the
 * coefficients refitted, and each draw's upward crossing phi = 1 located. The horizon is
 * `horizon` samples from the first (2(n-1) for twice the record). Each draw costs O(pairs): the
 * refit is b + (X'WX)^-1 X'W e*, with the projection matrix formed once.
 * SLOWSCAN_EINVAL for draws < 1; SLOWSCAN_ENOMEM. */
SLOWSCAN_API
int slowscan_ar1_drift_project(ar1_drift_workspace *ws, const ar1_drift_fit *fit, size_t n, double horizon,
                      size_t draws, gsl_rng *rng, ar1_projection *out);

#endif
