/* Internal to surrogates/tail*.c (and the tests): the profile-likelihood upper confidence
 * limit of the tail estimate (tail_bound.c). Not part of the library's API. */
#ifndef SLOWSCAN_TAIL_INTERNAL_H
#define SLOWSCAN_TAIL_INTERNAL_H

#include <gsl/gsl_math.h>
#include <stddef.h>

/* One accepted fit: the exceedances x[k] - threshold (x ascending, each above it), their
 * maximum-likelihood shape and scale, the finite surrogates m, and the likelihood deficit c
 * that bounds the confidence region (half the chi-square(1) quantile). */
typedef struct {
    const double *x;
    size_t k, m;
    double threshold, xi, sigma;
    double c;
} tail_fit;

/* Half the chi-square(1) quantile at 2 confidence - 1: the deficit of a one-sided
 * profile-likelihood limit at `confidence`. */
double tail_bound_deficit(double confidence);

/* The upper confidence limit of P(X > observed) = zeta * (1 - F(observed - t)) over the
 * region, the predictive tail probability (its mean over the confidence distribution), and
 * the upper limit with the shape fixed at 0 (the exponential floor), each multiplied by
 * zeta's upper limit (see tail_bound.c). When the floor reaches cap the other two are not
 * computed (left at cap). Each is `cap` when it reaches cap
 * (not resolved above it); *upper is 0 when no distribution in the region reaches the
 * observed (every end point lies before it). SLOWSCAN_OK; SLOWSCAN_ENUMERIC when the limit
 * cannot be trusted (the profile's maximum on the border of the shapes searched, or a root
 * finder failing). observed must exceed every x. */
int tail_bound_p(const tail_fit *f, double observed, double cap, double *upper,
                 double *predicted, double *exponential);

/* Brent's root of fn in [lo, hi] (fn(lo), fn(hi) of opposite signs), to an absolute width
 * tol: the final bracket in *root_lo, *root_hi. SLOWSCAN_OK or SLOWSCAN_ENUMERIC. */
int tail_root(gsl_function *fn, double lo, double hi, double tol,
              double *root_lo, double *root_hi);

#endif
