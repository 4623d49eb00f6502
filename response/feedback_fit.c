/* One window of the feedback regression N = F + lambda T: OLS (gsl_fit_linear) or Deming
 * total least squares with a known noise-variance ratio, the errors widened for the
 * residuals' autocorrelation, and the implied equilibrium T_eq = -F/lambda. */
#include "feedback_internal.h"
#include "../library/magnitude.h"
#include "slowscan/status.h"

#include <gsl/gsl_cdf.h>
#include <gsl/gsl_fit.h>
#include <gsl/gsl_statistics_double.h>
#include <math.h>
#include <stdlib.h>

/* Copies the pairs with both values finite into x (T), y (N); returns their count. */
static size_t gather_pairs(const double *flux, const double *response, size_t first,
                           size_t len, double *x, double *y)
{
    size_t m = 0;
    for (size_t i = first; i < first + len; i++)
        if (isfinite(flux[i]) && isfinite(response[i])) {
            x[m] = response[i];
            y[m++] = flux[i];
        }
    return m;
}

/* Deming regression with delta = var(noise of y) / var(noise of x) (closed form). The
 * covariance is the one ODRPACK reports for a straight line (scipy.odr's cov_beta times
 * res_var): the residual variance sum r^2/(n-2) times the inverse of the cross-product
 * matrix of (1, x~), x~ the fitted x; that inverse is gsl_fit_wlinear's covariance with unit
 * weights. xt and w are scratch of n. */
static int deming(const double *x, const double *y, size_t n, double delta, double *xt,
                  double *w, double *b0, double *b1, double *c00, double *c01, double *c11)
{
    double mx = gsl_stats_mean(x, 1, n), my = gsl_stats_mean(y, 1, n);
    double sxx = gsl_stats_variance_m(x, 1, n, mx), syy = gsl_stats_variance_m(y, 1, n, my);
    double sxy = gsl_stats_covariance_m(x, 1, y, 1, n, mx, my);
    if (sxy == 0 || sxx == 0)
        return SLOWSCAN_ECONST;
    double d = syy - delta * sxx;
    *b1 = (d + sqrt(d * d + 4 * delta * sxy * sxy)) / (2 * sxy);
    *b0 = my - *b1 * mx;
    double ss = 0, g = delta + *b1 * *b1;
    for (size_t i = 0; i < n; i++) {
        double r = y[i] - *b0 - *b1 * x[i];
        ss += r * r;
        xt[i] = x[i] + *b1 * r / g;
        w[i] = 1.0;
    }
    double f0, f1, sumsq;
    if (gsl_fit_wlinear(xt, 1, w, 1, y, 1, n, &f0, &f1, c00, c01, c11, &sumsq) != 0)
        return SLOWSCAN_ENUMERIC;
    double s2 = ss / (double)(n - 2);
    *c00 *= s2, *c01 *= s2, *c11 *= s2;
    return SLOWSCAN_OK;
}

/* Effective sample size from the residuals' lag-1 autocorrelation r_e, n (1 - r_e)/(1 + r_e)
 * (Bretherton et al. 1999, J. Climate 12:1990, the AR(1) form for a series' own
 * statistics; Santer et al. 2000, JGR 105:7337 use it for a trend's error). The form for a
 * slope on a red regressor, n (1 - r_x r_e)/(1 + r_x r_e) (Bretherton's covariance form), is
 * smaller in its correction; with it the drift test flagged 5.6-7.9% of constant-feedback runs
 * at a nominal 5% (tests/test_feedback_rates.c), with this form 2.3-4.3%, so this one is used.
 * A negative r_e earns no credit: n_eff is at most n. r_x is kept for the output only. */
static double effective_size(size_t n, double r_e)
{
    double rho = r_e > 0 ? r_e : 0;
    return (double)n * (1 - rho) / (1 + rho);
}

/* The lag-1 autocorrelation of a short series is biased low, by about (1 + 3 r) / n for a
 * mean-removed series (Marriott & Pope 1954, Biometrika 41:390; from memory); without the
 * correction short windows of red residuals earn too large an n_eff. Kept inside (-1, 1). */
static double debias_lag1(double r, size_t n)
{
    if (!isfinite(r))
        return r;
    r += (1 + 3 * r) / (double)n;
    return r > 0.99 ? 0.99 : r;
}

/* Adjusted errors, interval, flags of the interval and the equilibrium of a fitted window. */
static void finish_window(const feedback_config *cfg, double c00, double c01, double c11,
                          feedback_window *o)
{
    double n = (double)o->n;
    double f2 = o->n_eff > 2 ? (n - 2) / (o->n_eff - 2) : NAN;
    o->se_lambda = sqrt(c11);
    o->se_forcing = sqrt(c00);
    o->cov = c01;
    o->se_lambda_adj = sqrt(c11 * f2);
    o->se_forcing_adj = sqrt(c00 * f2);
    double q = o->n_eff > 2 ? gsl_cdf_tdist_Pinv(0.5 + cfg->level / 2, o->n_eff - 2) : NAN;
    o->lo = o->lambda - q * o->se_lambda_adj;
    o->hi = o->lambda + q * o->se_lambda_adj;
    if (!(o->lo > 0 || o->hi < 0))
        o->flags |= FEEDBACK_FLAG_WEAK;
    if (!(o->lambda < 0)) {
        o->teq_reason = FEEDBACK_TEQ_NOT_RESTORING;
        return;
    }
    double l = o->lambda, F = o->forcing;
    /* delta method for -F/lambda: gradient (-1/l, F/l^2) */
    double var = (c00 / (l * l) + F * F * c11 / (l * l * l * l) - 2 * F * c01 / (l * l * l)) * f2;
    o->t_eq = -F / l * cfg->scale;
    o->se_t_eq = sqrt(var) * fabs(cfg->scale);
}

/* v 2^e, or NaN when that passes the double range (lambda of N near 1e300 on T near
 * 1e-300 would be 1e600): no Inf leaves the fit. */
static void back(double *v, int e)
{
    double u = ldexp(*v, e);
    *v = isinf(u) && isfinite(*v) ? NAN : u;
}

/* A window fitted to T 2^-ex and N 2^-ey back in the units of N (forcing), N/T (lambda),
 * T (T_eq) and their products; the rest is unitless. */
static void unscale_window(feedback_window *o, int ex, int ey)
{
    double *per_n[] = {&o->forcing, &o->se_forcing, &o->se_forcing_adj};
    double *per_t[] = {&o->lambda, &o->se_lambda, &o->se_lambda_adj, &o->lo, &o->hi};
    for (size_t k = 0; k < sizeof per_n / sizeof per_n[0]; k++)
        back(per_n[k], ey);
    for (size_t k = 0; k < sizeof per_t / sizeof per_t[0]; k++)
        back(per_t[k], ey - ex);
    back(&o->cov, 2 * ey - ex);
    back(&o->t_eq, ex);
    back(&o->se_t_eq, ex);
}

static void clear_window(feedback_window *o)
{
    double *v[] = {&o->lambda, &o->se_lambda, &o->se_lambda_adj, &o->forcing, &o->se_forcing,
                   &o->se_forcing_adj, &o->cov, &o->r2, &o->r_response, &o->r_residual,
                   &o->n_eff, &o->lo, &o->hi, &o->t_eq, &o->se_t_eq};
    for (size_t k = 0; k < sizeof v / sizeof v[0]; k++)
        *v[k] = NAN;
    o->flags = 0;
    o->teq_reason = FEEDBACK_TEQ_NO_FIT;
}

int feedback_fit_with(const double *time, const double *flux, const double *response,
                      size_t first, size_t len, const feedback_config *cfg, double *scratch,
                      feedback_window *o)
{
    double *x = scratch, *y = scratch + len, *e = scratch + 2 * len, *w = scratch + 3 * len;
    clear_window(o);
    o->start = time[first];
    o->end = time[first + len - 1];
    o->n = gather_pairs(flux, response, first, len, x, y);
    o->status = o->n < 4 ? SLOWSCAN_ESHORT : SLOWSCAN_OK;
    if (o->status != SLOWSCAN_OK)
        return SLOWSCAN_OK;
    /* T and N near 1e300 (or 1e-300) overflow (underflow) the sums of squares: the fit is
     * made on both brought near 1 by powers of two, and its numbers given their units back
     * (unscale_window); r2, the autocorrelations and n_eff do not depend on the units. */
    int ex = magnitude_exponent(x, o->n), ey = magnitude_exponent(y, o->n);
    magnitude_scale(x, o->n, ex);
    magnitude_scale(y, o->n, ey);
    double c00, c01, c11, sumsq;
    if (cfg->fit == FEEDBACK_TLS)
        o->status = deming(x, y, o->n, ldexp(cfg->noise_ratio, 2 * (ex - ey)), e, w, &o->forcing,
                           &o->lambda, &c00, &c01, &c11);
    else if (gsl_stats_variance(x, 1, o->n) == 0)
        o->status = SLOWSCAN_ECONST;
    else if (gsl_fit_linear(x, 1, y, 1, o->n, &o->forcing, &o->lambda, &c00, &c01, &c11, &sumsq))
        o->status = SLOWSCAN_ENUMERIC;
    if (o->status != SLOWSCAN_OK) {
        o->forcing = o->lambda = NAN;
        return SLOWSCAN_OK;
    }
    for (size_t i = 0; i < o->n; i++)
        e[i] = y[i] - o->forcing - o->lambda * x[i];
    double r = gsl_stats_correlation(x, 1, y, 1, o->n);
    o->r2 = r * r;
    o->r_response = gsl_stats_lag1_autocorrelation(x, 1, o->n);
    o->r_residual = debias_lag1(gsl_stats_lag1_autocorrelation(e, 1, o->n), o->n);
    o->n_eff = effective_size(o->n, o->r_residual);
    o->teq_reason = FEEDBACK_TEQ_OK;
    finish_window(cfg, c00, c01, c11, o);
    unscale_window(o, ex, ey);
    return SLOWSCAN_OK;
}

int slowscan_feedback_fit(const double *time, const double *flux, const double *response,
                          size_t first, size_t len, const feedback_config *cfg,
                          feedback_window *out)
{
    if (!time || !flux || !response || !cfg || !out || len == 0)
        return SLOWSCAN_EINVAL;
    if (cfg->fit == FEEDBACK_TLS && !(cfg->noise_ratio > 0 && isfinite(cfg->noise_ratio)))
        return SLOWSCAN_EINVAL;
    double *scratch = malloc(4 * len * sizeof *scratch);
    if (!scratch)
        return SLOWSCAN_ENOMEM;
    int st = feedback_fit_with(time, flux, response, first, len, cfg, scratch, out);
    free(scratch);
    return st;
}
