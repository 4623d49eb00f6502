/* slowscan detrend — loess: local linear regression with tricube weights.
 *
 * Span `bandwidth` time units -> q = round(bandwidth/dt) + 1 grid samples (capped at n).
 * The neighbourhood of i is the q grid samples nearest to t_i; on a regular grid that is a
 * run of consecutive indices, centred on i, with an even q leaning one sample toward the past
 * (ties go to the earlier sample), and shifted inward at the ends of the series so that it
 * always holds q samples (classic loess: the fit at an edge extrapolates a little rather than
 * shrinking its support). Missing samples stay in the neighbourhood with weight 0, so the
 * neighbourhood is a property of the grid, not of where data happen to be missing.
 *
 * Weights (1 - (d/dmax)^3)^3, d = |t_j - t_i|, dmax = the largest d in the neighbourhood
 * times 1.000001 so that the farthest sample keeps a small positive weight. The fit is a
 * weighted straight line in the offset t_j - t_i, so the trend is its intercept, fitted with
 * GSL's closed-form gsl_fit_wlinear. That routine updates running weighted means, so when
 * the line hinges on a sample of negligible weight (e.g. the only other finite sample is the
 * farthest one, weight ~3e-17) rounding erases that sample and it returns 0/0 or a poor
 * slope. Such neighbourhoods -- fewer than two samples of non-negligible weight, or a
 * non-finite fast result -- go through the SVD of the sqrt(w)-scaled rows instead
 * (gsl_multifit_wlinear), which still resolves the line. Values are recentred on the series
 * mean so a large offset does not cost digits. Fewer than two finite samples: the weighted
 * mean (the single sample), or NaN with none.
 *
 * Cost O(n q): each point refits its own neighbourhood; acceptable for the spans used in
 * practice, and the price of exact local fits (no interpolation between fitted points). */
#include "detrend_internal.h"
#include "slowscan/status.h"

#include <gsl/gsl_fit.h>
#include <gsl/gsl_multifit.h>
#include <math.h>
#include <stdint.h>
#include <stdlib.h>

#define DMAX_STRETCH 1.000001
#define SOLID_WEIGHT 1e-6 /* relative weight below which a sample barely counts */

typedef struct {
    double *design, *value, *weight; /* the finite samples of one neighbourhood: rows [1, d] */
    double coef[2], cov[4];
    double centre; /* subtracted from the values, added back to the fit */
    gsl_multifit_linear_workspace *work;
} loess_scratch;

/* First index of the neighbourhood of i. */
static size_t neighbourhood_start(size_t i, size_t q, size_t n)
{
    size_t lo = i >= q / 2 ? i - q / 2 : 0;
    return lo + q > n ? n - q : lo;
}

static double tricube(double d, double dmax)
{
    if (dmax <= 0.0)
        return 1.0; /* q = 1: the neighbourhood is the point itself */
    double r = d / dmax, c = 1.0 - r * r * r;
    return c * c * c;
}

/* Weighted line through the m gathered samples by SVD; its value at offset 0. */
static double svd_line_at_zero(loess_scratch *s, size_t m)
{
    gsl_matrix_view X = gsl_matrix_view_array(s->design, m, 2);
    gsl_vector_view y = gsl_vector_view_array(s->value, m);
    gsl_vector_view w = gsl_vector_view_array(s->weight, m);
    gsl_vector_view c = gsl_vector_view_array(s->coef, 2);
    gsl_matrix_view cov = gsl_matrix_view_array(s->cov, 2, 2);
    double chisq;
    int rc = gsl_multifit_wlinear(&X.matrix, &w.vector, &y.vector, &c.vector, &cov.matrix,
                                  &chisq, s->work);
    return rc == 0 ? s->coef[0] : NAN;
}

/* The same line in closed form (O(m), no factorisation) when it is well conditioned. */
static double line_at_zero(loess_scratch *s, size_t m, size_t solid)
{
    if (solid >= 2) {
        double c0, c1, cov00, cov01, cov11, chisq;
        gsl_fit_wlinear(s->design + 1, 2, s->weight, 1, s->value, 1, m, &c0, &c1, &cov00,
                        &cov01, &cov11, &chisq);
        if (isfinite(c0))
            return s->centre + c0;
    }
    return s->centre + svd_line_at_zero(s, m);
}

static double local_fit(const double *x, size_t i, size_t lo, size_t q, loess_scratch *s)
{
    size_t far_left = i - lo, far_right = lo + q - 1 - i;
    double dmax = (double)(far_left > far_right ? far_left : far_right) * DMAX_STRETCH;
    size_t m = 0, solid = 0;
    double wmax = 0.0;
    for (size_t j = lo; j < lo + q; j++) {
        if (!isfinite(x[j]))
            continue;
        double d = j >= i ? (double)(j - i) : -(double)(i - j);
        s->design[2 * m] = 1.0;
        s->design[2 * m + 1] = d;
        s->value[m] = x[j] - s->centre;
        s->weight[m] = tricube(fabs(d), dmax);
        wmax = fmax(wmax, s->weight[m]);
        m++;
    }
    for (size_t k = 0; k < m; k++)
        solid += s->weight[k] >= SOLID_WEIGHT * wmax ? 1 : 0;
    if (m == 0)
        return NAN;
    if (m == 1)
        return s->centre + s->value[0];
    return line_at_zero(s, m, solid); /* distinct grid times: two samples already fix a line */
}

/* Samples in the neighbourhood for a span of `bandwidth` time units over n samples. */
static size_t span_samples(double bandwidth, double dt, size_t n)
{
    return detrend_clamp_count(round(bandwidth / dt), n - 1) + 1;
}

struct detrend_loess_ws {
    size_t q; /* the largest neighbourhood served */
    loess_scratch s;
};

void detrend_loess_free(detrend_loess_ws *w)
{
    if (!w)
        return;
    if (w->s.work)
        gsl_multifit_linear_free(w->s.work);
    free(w->s.design);
    free(w->s.value);
    free(w->s.weight);
    free(w);
}

detrend_loess_ws *detrend_loess_alloc(double bandwidth, double dt, size_t n, int *status)
{
    size_t q = span_samples(bandwidth, dt, n);
    *status = SLOWSCAN_ENOMEM;
    detrend_loess_ws *w = q <= SIZE_MAX / (2 * sizeof(double)) ? calloc(1, sizeof *w) : NULL;
    if (!w)
        return NULL;
    w->q = q;
    w->s.design = malloc(2 * q * sizeof(double));
    w->s.value = malloc(q * sizeof(double));
    w->s.weight = malloc(q * sizeof(double));
    if (w->s.design && w->s.value && w->s.weight && q >= 2)
        w->s.work = gsl_multifit_linear_alloc(q, 2); /* sized once for the largest neighbourhood */
    if (!w->s.design || !w->s.value || !w->s.weight || (q >= 2 && !w->s.work)) {
        detrend_loess_free(w);
        return NULL;
    }
    *status = SLOWSCAN_OK;
    return w;
}

/* A shorter series may have a smaller neighbourhood (never a larger one); GSL's workspace
 * serves any problem up to the size it was made for. */
int detrend_loess_trend(detrend_loess_ws *w, double bandwidth, double dt, const double *x,
                        size_t n, double *trend)
{
    size_t q = span_samples(bandwidth, dt, n);
    if (q > w->q)
        return SLOWSCAN_EINVAL;
    w->s.centre = detrend_finite_mean(x, n);
    for (size_t i = 0; i < n; i++)
        trend[i] = local_fit(x, i, neighbourhood_start(i, q, n), q, &w->s);
    return SLOWSCAN_OK;
}
