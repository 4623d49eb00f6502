/* slowscan — trend and seasonal-cycle removal (module prefix: detrend_).
 *
 * All functions work on a regular time grid t_i = t_0 + i*dt; only the step dt matters.
 * Missing samples are NaN. Every method accepts NaN input by design:
 *   gaussian-linear, gaussian, moving, loess:
 *                            a NaN sample gets weight 0; the trend is still defined there
 *                            (from its neighbours) and the residual is NaN.
 *   linear, poly:K:          NaN samples are left out of the least-squares fit; the trend is
 *                            evaluated at every time; residual NaN where the sample is NaN.
 *   difference:              residual_i = x_i - x_{i-1}, trend_i = x_{i-1}; residual_0 is NaN,
 *                            and so is every residual touching a NaN sample.
 *   none:                    trend 0, residual = x.
 * No function does I/O or allocates global state. */
#ifndef SLOWSCAN_DETREND_H
#define SLOWSCAN_DETREND_H

#include <stddef.h>

typedef enum {
    DETREND_GAUSSIAN,   /* Nadaraya-Watson (local constant), Gaussian kernel, s = bandwidth */
    DETREND_GAUSSIAN_LINEAR, /* local-linear, Gaussian kernel, s = bandwidth (the CLI default) */
    DETREND_MOVING,     /* centred moving mean over a span of `bandwidth` time units */
    DETREND_LOESS,      /* local linear regression, tricube weights, span = bandwidth */
    DETREND_LINEAR,     /* least-squares straight line */
    DETREND_POLY,       /* least-squares polynomial of degree `degree` */
    DETREND_DIFFERENCE, /* first differences */
    DETREND_NONE
} detrend_method;

typedef struct {
    detrend_method method;
    double bandwidth; /* time units; used by gaussian-linear, gaussian, moving, loess */
    int degree;       /* used by poly */
} detrend_spec;

/* "gaussian-linear", "gaussian", "moving", "loess", "linear", "poly:K", "difference", "none".
 * Sets spec->method and spec->degree; leaves spec->bandwidth alone. */
int detrend_parse_method(const char *text, detrend_spec *spec);
const char *detrend_method_name(detrend_method method);
/* Whether the method reads spec->bandwidth. */
int detrend_uses_bandwidth(detrend_method method);

/* Writes trend[n] and residual[n] (either may be NULL). Returns SLOWSCAN_EINVAL for a
 * bandwidth <= 0 where one is used, dt <= 0, or a polynomial degree not below the number of
 * finite samples (or above 12, where the fit is numerically meaningless); SLOWSCAN_ESHORT when
 * fewer than 2 finite samples remain. Gaussian detrending (both fits) is O(n log n) (FFT
 * convolution with the kernel truncated at 8 s) whatever the bandwidth.
 *
 * gaussian-linear: at each t_i the weighted least-squares line through the finite samples,
 * weights exp(-0.5 ((t_j - t_i)/s)^2) (cut beyond 8 s), evaluated at t_i (Fan & Gijbels 1996,
 * Local Polynomial Modelling and Its Applications, ch. 3). It reproduces straight lines
 * exactly, so it does not lag at the record's ends or at the rims of gaps where the trend has
 * a slope; its interior bias on a smooth trend is s^2 f''/2. Where fewer than 2 samples carry
 * non-negligible weight (weight >= 1e-6 of the largest weight present) the line is
 * undetermined and the local-constant (gaussian) value is used; NaN where no finite sample
 * lies within 8 s. gaussian: the Nadaraya-Watson weighted mean with the same weights. */
int detrend_apply(const detrend_spec *spec, double dt, const double *x, size_t n,
                  double *trend, double *residual);

/* Removes the mean cycle of period `period` (time units) in place: the sample at index i
 * belongs to phase i mod P, P = round(period/dt). The cycle is estimated as in the additive
 * classical decomposition: phase means of the series minus its centred one-period moving
 * average (2xP average for even P; windows with a missing sample are skipped), normalised
 * to mean zero, so a trend does not leak into the cycle and the series keeps its level.
 * SLOWSCAN_EINVAL if period/dt is not within 1e-6 (relative) of an integer P >= 2, or if
 * P > n/2 (fewer than two full cycles); SLOWSCAN_ESHORT if a phase has no usable sample. */
int detrend_deseason(double dt, double period, double *x, size_t n);

#endif
