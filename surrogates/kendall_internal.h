/* Private to surrogates/: Kendall tau-b against time for callers that test the time axis
 * once and then correlate many paths with it (null_trend.c: two paths per surrogate). */
#ifndef SLOWSCAN_SURROGATES_KENDALL_INTERNAL_H
#define SLOWSCAN_SURROGATES_KENDALL_INTERNAL_H

#include "slowscan/kendall.h"

#include <stddef.h>

/* Whether x[n] is finite and strictly increasing: slowscan_kendall_tau_b's time-like case. */
int kendall_time_like(const double *x, size_t n);

/* slowscan_kendall_tau_b(ws, x, y, n, tau, used) for an x with kendall_time_like(x, n): the
 * same tau and the same status, without looking at x. Pairs with y NaN are left out as there,
 * so a path may be passed without its undefined head (the result is the same). */
int kendall_tau_b_time_like(kendall_workspace *ws, const double *y, size_t n, double *tau,
                            size_t *used);

#endif
