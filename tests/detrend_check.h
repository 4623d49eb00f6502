/* Helpers shared by the detrend test files (test_detrend.c, test_gaussian.c, test_detrend_ws.c). */
#ifndef SLOWSCAN_TESTS_DETREND_CHECK_H
#define SLOWSCAN_TESTS_DETREND_CHECK_H

#include "check.h"
#include "slowscan/detrend.h"

#include <stddef.h>

double dc_max_abs(const double *x, size_t n);
/* Running maximum of errors that treats a NaN error as infinitely bad (fmax would skip it). */
double dc_worse(double acc, double err);
size_t dc_count_nan(const double *x, size_t n);

/* Writes x as "t x" lines (t = i dt), runs the python reference `script FILE arg` on it and
 * reads `count` numbers into want; returns 1 if it produced them. */
int dc_python_reference(const char *script, const char *arg, double dt, const double *x,
                        size_t n, double *want, size_t count);
/* Runs `spec` on x and a python reference (argument: the bandwidth, or the degree for poly)
 * on the same data; returns max |ours - theirs| / max|x|, infinite if either failed. */
double dc_python_error(const char *script, const detrend_spec *spec, double dt,
                       const double *x, size_t n);

int dc_run(detrend_method method, double bandwidth, int degree, double dt, const double *x,
           size_t n, double *trend, double *residual);

/* Random walk plus a slow sine and white noise, so trends are non-trivial at every scale. */
void dc_make_series(check_rng *rng, double offset, double *x, size_t n);
/* Gaps of `len` samples every `every` samples, plus isolated missing samples. */
void dc_punch_gaps(double *x, size_t n, size_t every, size_t len);

/* The Gaussian-kernel tests (test_gaussian.c), run by the detrend suite. */
void detrend_gaussian_checks(check_rng *rng);
/* The detrend workspace tests (test_detrend_ws.c), run by the detrend suite. */
void detrend_workspace_checks(check_rng *rng);

#endif
