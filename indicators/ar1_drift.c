/* AR(1) with a linearly drifting coefficient, fitted by ordinary least squares (GSL). */
#include "slowscan/ar1_drift.h"
#include "slowscan/status.h"
#include "ar1_drift_internal.h"

#include <gsl/gsl_errno.h>
#include <math.h>
#include <stdlib.h>


void slowscan_ar1_drift_free(ar1_drift_workspace *ws)
{
    if (!ws)
        return;
    if (ws->design)
        gsl_matrix_free(ws->design);
    if (ws->response)
        gsl_vector_free(ws->response);
    if (ws->coef)
        gsl_vector_free(ws->coef);
    if (ws->cov)
        gsl_matrix_free(ws->cov);
    if (ws->lw)
        gsl_multifit_linear_free(ws->lw);
    if (ws->s)
        gsl_vector_free(ws->s);
    if (ws->weight)
        gsl_vector_free(ws->weight);
    free(ws);
}

ar1_drift_workspace *slowscan_ar1_drift_alloc(size_t nmax)
{
    if (nmax < 2)
        return NULL;
    ar1_drift_workspace *ws = calloc(1, sizeof *ws);
    if (!ws)
        return NULL;
    ws->nmax = nmax;
    ws->design = gsl_matrix_alloc(nmax - 1, 3);
    ws->response = gsl_vector_alloc(nmax - 1);
    ws->coef = gsl_vector_alloc(3);
    ws->cov = gsl_matrix_alloc(3, 3);
    ws->lw = gsl_multifit_linear_alloc(nmax - 1 < 3 ? 3 : nmax - 1, 3);
    ws->s = gsl_vector_alloc(nmax - 1);
    ws->weight = gsl_vector_alloc(nmax - 1);
    if (!ws->design || !ws->response || !ws->coef || !ws->cov || !ws->lw || !ws->s || !ws->weight) {
        slowscan_ar1_drift_free(ws);
        return NULL;
    }
    return ws;
}

/* Fills the design with the present pairs; returns their number. */
static size_t fill_design(ar1_drift_workspace *ws, const double *x, size_t n)
{
    size_t m = 0;
    for (size_t t = 0; t + 1 < n; t++) {
        if (!isfinite(x[t]) || !isfinite(x[t + 1]))
            continue;
        double s = (double)t / (double)(n - 1) - 0.5;
        gsl_matrix_set(ws->design, m, 0, x[t]);
        gsl_matrix_set(ws->design, m, 1, s * x[t]);
        gsl_matrix_set(ws->design, m, 2, 1.0);
        gsl_vector_set(ws->response, m, x[t + 1]);
        gsl_vector_set(ws->s, m, s);
        m++;
    }
    return m;
}

void slowscan_ar1_drift_set_noise_trend(ar1_drift_workspace *ws, int noise_trend)
{
    ws->noise_trend = noise_trend != 0;
}

/* Weights 1/v(t) from a straight line fitted to the squared OLS residuals over s_t. */
static void noise_weights(ar1_drift_workspace *ws, const gsl_matrix *X, const gsl_vector *y, size_t m)
{
    double mean = 0, sx = 0, sy = 0, sxx = 0, sxy = 0;
    for (size_t k = 0; k < m; k++) {
        double fitted = 0;
        for (size_t j = 0; j < 3; j++)
            fitted += gsl_matrix_get(X, k, j) * gsl_vector_get(ws->coef, j);
        double r2 = gsl_vector_get(y, k) - fitted, s = gsl_vector_get(ws->s, k);
        r2 *= r2;
        gsl_vector_set(ws->weight, k, r2);
        mean += r2, sx += s, sy += r2, sxx += s * s, sxy += s * r2;
    }
    mean /= (double)m;
    double slope = (sxy - sx * sy / (double)m) / (sxx - sx * sx / (double)m);
    double intercept = sy / (double)m - slope * sx / (double)m;
    for (size_t k = 0; k < m; k++) {
        double v = intercept + slope * gsl_vector_get(ws->s, k);
        gsl_vector_set(ws->weight, k, 1.0 / fmax(v, 0.01 * mean));
    }
}

/* HC3 covariance (MacKinnon & White 1985, J. Econometrics 29:305) of the last fit:
 * (X'WX)^-1 [sum_k w_k^2 e_k^2 / (1 - h_k)^2 x_k x_k'] (X'WX)^-1, h_k = w_k x_k'(X'WX)^-1 x_k,
 * written into robust. `inverse` is (X'WX)^-1; w_k = 1 without the noise trend. Each squared
 * residual is inflated by its leverage, so a few influential pairs (a large x_t under a noise
 * that grows with the level) cannot make a1 look precise. */
static void hc3_covariance(const ar1_drift_workspace *ws, const gsl_matrix *X, const gsl_vector *y,
                           size_t m, const double inverse[3][3], double robust[3][3])
{
    double meat[3][3] = {{0}};
    for (size_t k = 0; k < m; k++) {
        double row[3], fitted = 0, leverage = 0;
        double w = ws->noise_trend ? gsl_vector_get(ws->weight, k) : 1.0;
        for (size_t j = 0; j < 3; j++) {
            row[j] = gsl_matrix_get(X, k, j);
            fitted += row[j] * gsl_vector_get(ws->coef, j);
        }
        for (size_t i = 0; i < 3; i++)
            for (size_t j = 0; j < 3; j++)
                leverage += row[i] * inverse[i][j] * row[j];
        leverage *= w;
        double e = (gsl_vector_get(y, k) - fitted) * w / (1.0 - fmin(leverage, 1.0 - 1e-12));
        for (size_t i = 0; i < 3; i++)
            for (size_t j = 0; j < 3; j++)
                meat[i][j] += e * e * row[i] * row[j];
    }
    for (size_t i = 0; i < 3; i++)
        for (size_t j = 0; j < 3; j++) {
            double sum = 0;
            for (size_t a = 0; a < 3; a++)
                for (size_t b = 0; b < 3; b++)
                    sum += inverse[i][a] * meat[a][b] * inverse[b][j];
            robust[i][j] = sum;
        }
}

/* The weighted refit under the noise trend; leaves (X'WX)^-1 in ws->cov. */
static int noise_trend_refit(ar1_drift_workspace *ws, const gsl_matrix *X, const gsl_vector *y,
                             size_t m, double *chisq)
{
    size_t rank;
    gsl_vector_view w = gsl_vector_subvector(ws->weight, 0, m);
    noise_weights(ws, X, y, m);
    int st = gsl_multifit_wlinear_tsvd(X, &w.vector, y, 1e-12, ws->coef, ws->cov, chisq, &rank,
                                       ws->lw);
    if (st != GSL_SUCCESS)
        return SLOWSCAN_ENUMERIC;
    return rank < 3 ? SLOWSCAN_ECONST : SLOWSCAN_OK;
}

int slowscan_ar1_drift_estimate(ar1_drift_workspace *ws, const double *x, size_t n, ar1_drift_fit *fit)
{
    if (n > ws->nmax || n < 2)
        return SLOWSCAN_EINVAL;
    size_t m = fill_design(ws, x, n);
    if (m < 8)
        return SLOWSCAN_ESHORT;
    gsl_matrix_view X = gsl_matrix_submatrix(ws->design, 0, 0, m, 3);
    gsl_vector_view y = gsl_vector_subvector(ws->response, 0, m);
    double chisq;
    size_t rank;
    /* The SVD with a relative tolerance tells a singular design (a constant series) apart. */
    int st = gsl_multifit_linear_tsvd(&X.matrix, &y.vector, 1e-12, ws->coef, ws->cov, &chisq,
                                      &rank, ws->lw);
    if (st != GSL_SUCCESS)
        return SLOWSCAN_ENUMERIC;
    if (rank < 3)
        return SLOWSCAN_ECONST;
    /* GSL's covariance is s^2 (X'X)^-1 with s^2 = chisq / (m - 3) after an unweighted fit, and
     * (X'WX)^-1 unscaled after a weighted one. */
    double s2 = chisq / (double)(m - 3), inverse[3][3], robust[3][3];
    if (ws->noise_trend) {
        if ((st = noise_trend_refit(ws, &X.matrix, &y.vector, m, &chisq)) != SLOWSCAN_OK)
            return st;
        s2 = chisq / (double)(m - 3);
    }
    for (size_t i = 0; i < 3; i++)
        for (size_t j = 0; j < 3; j++)
            inverse[i][j] = gsl_matrix_get(ws->cov, i, j) / (ws->noise_trend ? 1.0 : s2);
    if (ws->noise_trend) /* the model-based covariance, as after the unweighted fit */
        gsl_matrix_scale(ws->cov, s2);
    hc3_covariance(ws, &X.matrix, &y.vector, m, inverse, robust);
    *fit = (ar1_drift_fit){
        .a0 = gsl_vector_get(ws->coef, 0), .a1 = gsl_vector_get(ws->coef, 1),
        .c = gsl_vector_get(ws->coef, 2), .se_a0 = sqrt(robust[0][0]), .se_a1 = sqrt(robust[1][1]),
        .se_c = sqrt(robust[2][2]), .cov_a0_a1 = robust[0][1],
        .se_a1_model = sqrt(gsl_matrix_get(ws->cov, 1, 1)), .sigma2 = s2, .pairs = m};
    fit->t_a1 = fit->se_a1 > 0 ? fit->a1 / fit->se_a1 : NAN;
    fit->t_a1_model = fit->se_a1_model > 0 ? fit->a1 / fit->se_a1_model : NAN;
    return SLOWSCAN_OK;
}

void slowscan_ar1_drift_path(const ar1_drift_fit *fit, size_t n, double dt, double *lambda, double *lo,
                    double *hi)
{
    double v0 = fit->se_a0 * fit->se_a0, v1 = fit->se_a1 * fit->se_a1;
    for (size_t i = 0; i < n; i++) {
        double s = n > 1 ? (double)i / (double)(n - 1) - 0.5 : 0.0;
        double phi = fit->a0 + fit->a1 * s;
        double se_phi = sqrt(fmax(0.0, v0 + s * s * v1 + 2.0 * s * fit->cov_a0_a1));
        double l = phi > 0 ? log(phi) / dt : NAN, se = phi > 0 ? se_phi / (phi * dt) : NAN;
        lambda[i] = l;
        if (lo)
            lo[i] = l - 1.96 * se;
        if (hi)
            hi[i] = l + 1.96 * se;
    }
}
