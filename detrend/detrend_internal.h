/* slowscan detrend — private interface between the files of detrend/ (not installed).
 *
 * Each method computes only the trend; detrend.c validates arguments, counts finite samples
 * and forms the residual, so those rules live in one place. Every function here may assume
 * n >= 2 finite samples, dt > 0 and a positive finite bandwidth, and returns a slowscan
 * status code. Non-finite samples (NaN, and +-Inf which we treat the same way) are missing. */
#ifndef SLOWSCAN_DETREND_INTERNAL_H
#define SLOWSCAN_DETREND_INTERNAL_H

#include <stddef.h>

/* Mean of the finite samples (there must be at least one). */
double detrend_finite_mean(const double *x, size_t n);

/* Converts a non-negative sample count held in a double to size_t, clamped to `cap`, so that
 * enormous bandwidths cannot overflow the conversion. */
size_t detrend_clamp_count(double count, size_t cap);

int detrend_gaussian_trend(double bandwidth, double dt, const double *x, size_t n,
                           double *trend);
int detrend_moving_trend(double bandwidth, double dt, const double *x, size_t n,
                         double *trend);
int detrend_loess_trend(double bandwidth, double dt, const double *x, size_t n,
                        double *trend);
int detrend_poly_trend(int degree, const double *x, size_t n, double *trend);

#endif
