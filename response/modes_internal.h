/* Helpers shared by the files of response/ (not part of the public API). */
#ifndef SLOWSCAN_RESPONSE_MODES_INTERNAL_H
#define SLOWSCAN_RESPONSE_MODES_INTERNAL_H

#include "slowscan/timescales.h"

#include <stddef.h>

/* Most parameters of a fit: amplitudes, flux amplitudes and log timescales of every mode. */
enum { MODES_MAX_PARAMS = 3 * TIMESCALES_MAX_MODES };

/* Box-Jenkins lag-1 autocorrelation of x[n] (gsl_stats_lag1_autocorrelation), 0 when n < 3. */
double modes_lag1(const double *x, size_t n);

/* Effective sample size of n samples with lag-1 autocorrelation r1, n (1 - r1) / (1 + r1)
 * (Bretherton et al. 1999, J. Climate 12:1990, their eq. 31 for AR(1) noise), kept within
 * [2, n]: anticorrelated residuals do not buy more samples than there are. */
double modes_effective_n(size_t n, double r1);

/* The mean step of time[0..n), (time[n-1] - time[0]) / (n - 1); NaN below 2 samples. */
double modes_mean_step(const double *time, size_t n);

/* 0 when t[0..n) is finite, >= 0 and strictly increasing and y has no NaN; else EINVAL. */
int modes_check_series(const double *t, const double *y, size_t n);

#endif
