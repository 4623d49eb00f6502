/* slowscan detrend — least-squares polynomial trend (linear = degree 1).
 *
 * Times are mapped to u in [-1, 1] over the whole grid and the polynomial is written in the
 * Chebyshev basis T_0..T_K: on [-1, 1] those columns are close to orthogonal, whereas raw
 * powers of t make a design matrix whose condition number explodes with the degree. The
 * fitted polynomial is the same one; only the round-off differs. The fit (GSL's SVD-based
 * gsl_multifit_linear) uses the finite samples only, recentred on their mean; the trend is
 * evaluated at every grid time, missing ones included. */
#include "detrend_internal.h"
#include "slowscan/status.h"

#include <gsl/gsl_multifit.h>
#include <math.h>
#include <stdint.h>
#include <stdlib.h>

static double grid_u(size_t i, size_t n)
{
    return 2.0 * (double)i / (double)(n - 1) - 1.0;
}

/* basis[k] = T_k(u), k = 0..degree, by the three-term recurrence. */
static void chebyshev_row(double u, int degree, double *basis)
{
    basis[0] = 1.0;
    if (degree >= 1)
        basis[1] = u;
    for (int k = 2; k <= degree; k++)
        basis[k] = 2.0 * u * basis[k - 1] - basis[k - 2];
}

/* Design matrix and right-hand side of the finite samples; returns their number. */
static size_t build_system(const double *x, size_t n, int degree, double mean, double *design,
                           double *rhs)
{
    size_t p = (size_t)degree + 1, m = 0;
    for (size_t i = 0; i < n; i++) {
        if (!isfinite(x[i]))
            continue;
        chebyshev_row(grid_u(i, n), degree, design + m * p);
        rhs[m++] = x[i] - mean;
    }
    return m;
}

static int solve(double *design, double *rhs, size_t m, size_t p, double *coef, double *cov)
{
    gsl_matrix_view X = gsl_matrix_view_array(design, m, p);
    gsl_vector_view y = gsl_vector_view_array(rhs, m);
    gsl_vector_view c = gsl_vector_view_array(coef, p);
    gsl_matrix_view C = gsl_matrix_view_array(cov, p, p);
    gsl_multifit_linear_workspace *work = gsl_multifit_linear_alloc(m, p);
    if (!work)
        return SLOWSCAN_ENOMEM;
    double chisq;
    int rc = gsl_multifit_linear(&X.matrix, &y.vector, &c.vector, &C.matrix, &chisq, work);
    gsl_multifit_linear_free(work);
    return rc == 0 ? SLOWSCAN_OK : SLOWSCAN_ENUMERIC;
}

static void evaluate(const double *coef, int degree, double mean, size_t n, double *basis,
                     double *trend)
{
    for (size_t i = 0; i < n; i++) {
        chebyshev_row(grid_u(i, n), degree, basis);
        double sum = 0.0;
        for (int k = degree; k >= 0; k--) /* small terms first */
            sum += coef[k] * basis[k];
        trend[i] = mean + sum;
    }
}

/* The caller guarantees 1 <= degree <= 12 and degree < number of finite samples. */
int detrend_poly_trend(int degree, const double *x, size_t n, double *trend)
{
    size_t p = (size_t)degree + 1;
    double mean = detrend_finite_mean(x, n);
    if (n > SIZE_MAX / (p * sizeof(double)))
        return SLOWSCAN_ENOMEM;
    /* plain malloc + GSL views: gsl_matrix_alloc would report a failed allocation through
     * GSL's error handler, which by default aborts the program */
    double *design = malloc(n * p * sizeof *design), *rhs = malloc(n * sizeof *rhs);
    double *small = malloc((2 * p + p * p) * sizeof *small); /* coef, basis, covariance */
    int status = SLOWSCAN_ENOMEM;
    if (design && rhs && small) {
        size_t m = build_system(x, n, degree, mean, design, rhs);
        status = solve(design, rhs, m, p, small, small + 2 * p);
        if (status == SLOWSCAN_OK)
            evaluate(small, degree, mean, n, small + p, trend);
    }
    free(design);
    free(rhs);
    free(small);
    return status;
}
