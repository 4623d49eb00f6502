/* Projected crossing of lambda = 0 by the drifting AR(1), with a residual-bootstrap interval.
 *
 * The design of the fit is kept fixed and only the residuals are redrawn (a fixed-design
 * residual bootstrap, Davison & Hinkley 1997, Bootstrap Methods and their Application, §6.2).
 * Because the design does not change, every refit is linear in the drawn residuals:
 * b* = b + P e*, P = (X'WX)^-1 X'W, so P is formed once and a draw costs O(pairs). */
#include "slowscan/ar1_drift.h"
#include "slowscan/status.h"
#include "ar1_drift_internal.h"

#include <gsl/gsl_sort.h>
#include <math.h>
#include <stdlib.h>

/* Sample index (0 = first sample) where phi = a0 + a1 s reaches 1 going up, s = i/(n-1) - 1/2;
 * +INFINITY when phi does not rise (a1 <= 0) or reaches 1 beyond the horizon; 0 when phi is
 * at or above 1 from the first sample on (nothing to extrapolate: already there). */
static double crossing_index(double a0, double a1, size_t n, double horizon)
{
    if (!(a1 > 0))
        return INFINITY;
    double index = ((1.0 - a0) / a1 + 0.5) * (double)(n - 1);
    return index <= horizon ? fmax(index, 0.0) : INFINITY;
}

/* The a0 and a1 rows of P = (X'WX)^-1 X'W (the crossing needs no intercept), stored by pair
 * k (2 entries) and scaled by 1/sqrt(w_k) so that a draw multiplies them by the drawn
 * standardised residual directly; and those residuals, u_k = r_k sqrt(w_k), centred and
 * inflated for the degrees of freedom. */
static void bootstrap_design(const ar1_drift_workspace *ws, const ar1_drift_fit *fit, double *P,
                             double *u)
{
    size_t m = fit->pairs;
    double inverse[3][3], b[3] = {fit->a0, fit->a1, fit->c}, mean = 0;
    /* GSL's covariance is sigma2 (X'WX)^-1 (scaled so by slowscan_ar1_drift_estimate under WLS too). */
    for (size_t i = 0; i < 3; i++)
        for (size_t j = 0; j < 3; j++)
            inverse[i][j] = gsl_matrix_get(ws->cov, i, j) / fit->sigma2;
    for (size_t k = 0; k < m; k++) {
        double w = ws->noise_trend ? gsl_vector_get(ws->weight, k) : 1.0, fitted = 0;
        for (size_t j = 0; j < 3; j++)
            fitted += gsl_matrix_get(ws->design, k, j) * b[j];
        for (size_t i = 0; i < 2; i++) {
            double p = 0;
            for (size_t j = 0; j < 3; j++)
                p += inverse[i][j] * gsl_matrix_get(ws->design, k, j);
            P[2 * k + i] = p * sqrt(w); /* w / sqrt(w): the weight, and undoing u's scaling */
        }
        u[k] = (gsl_vector_get(ws->response, k) - fitted) * sqrt(w);
        mean += u[k];
    }
    mean /= (double)m;
    double inflate = sqrt((double)m / (double)(m - 3));
    for (size_t k = 0; k < m; k++)
        u[k] = (u[k] - mean) * inflate;
}

/* Percentile of sorted values that may end in +INFINITY (draws that never cross): linear
 * interpolation between order statistics, infinite as soon as either neighbour is. */
static double percentile_sorted(const double *sorted, size_t count, double level)
{
    double position = level * (double)(count - 1);
    size_t lower = (size_t)position;
    double frac = position - (double)lower;
    if (lower + 1 >= count || frac == 0)
        return sorted[lower];
    if (isinf(sorted[lower]) || isinf(sorted[lower + 1]))
        return INFINITY;
    return sorted[lower] + frac * (sorted[lower + 1] - sorted[lower]);
}

static void draw_crossings(const ar1_drift_fit *fit, size_t n, double horizon, const double *P,
                           const double *u, size_t draws, gsl_rng *rng, double *crossing)
{
    size_t m = fit->pairs;
    for (size_t d = 0; d < draws; d++) {
        double delta[2] = {0, 0};
        for (size_t k = 0; k < m; k++) {
            double e = u[gsl_rng_uniform_int(rng, m)];
            delta[0] += P[2 * k] * e;
            delta[1] += P[2 * k + 1] * e;
        }
        crossing[d] = crossing_index(fit->a0 + delta[0], fit->a1 + delta[1], n, horizon);
    }
}

int slowscan_ar1_drift_project(ar1_drift_workspace *ws, const ar1_drift_fit *fit, size_t n, double horizon,
                      size_t draws, gsl_rng *rng, ar1_projection *out)
{
    if (draws < 1 || fit->pairs < 8 || n < 2 || !(fit->sigma2 > 0))
        return SLOWSCAN_EINVAL;
    size_t m = fit->pairs;
    double *P = malloc(2 * m * sizeof *P), *u = malloc(m * sizeof *u);
    double *crossing = malloc(draws * sizeof *crossing);
    if (!P || !u || !crossing) {
        free(P), free(u), free(crossing);
        return SLOWSCAN_ENOMEM;
    }
    bootstrap_design(ws, fit, P, u);
    draw_crossings(fit, n, horizon, P, u, draws, rng, crossing);
    gsl_sort(crossing, 1, draws);
    size_t finite = 0;
    while (finite < draws && isfinite(crossing[finite]))
        finite++;
    double index = crossing_index(fit->a0, fit->a1, n, horizon);
    *out = (ar1_projection){
        .kind = isinf(index) ? PROJECTION_NONE
                : index <= (double)(n - 1) ? PROJECTION_WITHIN_RECORD : PROJECTION_AHEAD,
        .index = isinf(index) ? NAN : index,
        .index_lo = percentile_sorted(crossing, draws, 0.025),
        .index_hi = percentile_sorted(crossing, draws, 0.975),
        .share_crossing = (double)finite / (double)draws,
        .draws = draws,
    };
    if (isinf(out->index_lo))
        out->index_lo = NAN;
    free(P), free(u), free(crossing);
    return SLOWSCAN_OK;
}
