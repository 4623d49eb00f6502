/* Relaxation modes of a step response (timescales.h): the nonlinear fits for each number of
 * modes, their starting values, and the choice of K by an effective-sample-size BIC. */
#include "slowscan/timescales.h"
#include "slowscan/status.h"
#include "modes_internal.h"

#include <gsl/gsl_blas.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_multifit.h>
#include <gsl/gsl_multifit_nlinear.h>
#include <gsl/gsl_statistics_double.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

/* The best grid starts kept per K (cfg->starts is capped here). */
enum { MAX_STARTS = 8, MAX_GRID = 24 };

/* One K's fit: parameters (a[K], log tau[K], then c[K] when joint) and their covariance. */
typedef struct {
    int status;
    double x[MODES_MAX_PARAMS];
    double cov[MODES_MAX_PARAMS * MODES_MAX_PARAMS];
    double rss;
} k_fit;

struct timescales_workspace {
    size_t cap;
    double *resid;                          /* 2 cap: the residuals of a fit */
    gsl_multifit_linear_workspace *lin;     /* cap x TIMESCALES_MAX_MODES */
    gsl_matrix *design;                     /* cap x TIMESCALES_MAX_MODES */
    gsl_vector *rhs, *coef;
    gsl_matrix *lin_cov;
    /* nonlinear fit workspaces by (joint, K), made for the current n on first use */
    gsl_multifit_nlinear_workspace *nl[2][TIMESCALES_MAX_MODES];
    size_t nl_n[2][TIMESCALES_MAX_MODES];
    k_fit fits[TIMESCALES_MAX_MODES];
};

/* The data of one fit, handed to GSL's callbacks. */
typedef struct {
    const double *t, *y, *f;
    size_t n, K;
    int joint;
    double wy, wf; /* weights of the response and flux residuals (joint fit) */
} fit_data;

timescales_config slowscan_timescales_config_default(void)
{
    timescales_config c = {.max_modes = 3, .grid_points = 12, .starts = 4,
                           .max_iterations = 500, .unresolved_fraction = 1.0 / 3.0,
                           .multiscale_ratio = 10.0};
    return c;
}

timescales_workspace *slowscan_timescales_workspace_alloc(size_t n)
{
    if (n < 2)
        return NULL;
    timescales_workspace *ws = calloc(1, sizeof *ws);
    if (!ws)
        return NULL;
    ws->cap = n;
    ws->resid = malloc(2 * n * sizeof *ws->resid);
    ws->lin = gsl_multifit_linear_alloc(n, TIMESCALES_MAX_MODES);
    ws->design = gsl_matrix_alloc(n, TIMESCALES_MAX_MODES);
    ws->rhs = gsl_vector_alloc(n);
    ws->coef = gsl_vector_alloc(TIMESCALES_MAX_MODES);
    ws->lin_cov = gsl_matrix_alloc(TIMESCALES_MAX_MODES, TIMESCALES_MAX_MODES);
    if (!ws->resid || !ws->lin || !ws->design || !ws->rhs || !ws->coef || !ws->lin_cov) {
        slowscan_timescales_workspace_free(ws);
        return NULL;
    }
    return ws;
}

void slowscan_timescales_workspace_free(timescales_workspace *ws)
{
    if (!ws)
        return;
    for (int j = 0; j < 2; j++)
        for (int k = 0; k < TIMESCALES_MAX_MODES; k++)
            if (ws->nl[j][k])
                gsl_multifit_nlinear_free(ws->nl[j][k]);
    if (ws->lin)
        gsl_multifit_linear_free(ws->lin);
    if (ws->design)
        gsl_matrix_free(ws->design);
    if (ws->rhs)
        gsl_vector_free(ws->rhs);
    if (ws->coef)
        gsl_vector_free(ws->coef);
    if (ws->lin_cov)
        gsl_matrix_free(ws->lin_cov);
    free(ws->resid);
    free(ws);
}

static size_t nparams(size_t K, int joint) { return K * (joint ? 3 : 2); }

/* Weighted residuals: model minus data, response rows then flux rows. */
static int model_f(const gsl_vector *x, void *params, gsl_vector *f)
{
    const fit_data *d = params;
    for (size_t i = 0; i < d->n; i++) {
        double py = 0, pf = 0;
        for (size_t k = 0; k < d->K; k++) {
            double e = exp(-d->t[i] / exp(gsl_vector_get(x, d->K + k)));
            py += gsl_vector_get(x, k) * (1.0 - e);
            if (d->joint)
                pf += gsl_vector_get(x, 2 * d->K + k) * e;
        }
        gsl_vector_set(f, i, d->wy * (py - d->y[i]));
        if (d->joint)
            gsl_vector_set(f, d->n + i, d->wf * (pf - d->f[i]));
    }
    return GSL_SUCCESS;
}

/* The analytic Jacobian: d/da_k = 1 - e_k, d/dlog tau_k = -a_k e_k t / tau_k (response);
 * d/dc_k = e_k, d/dlog tau_k = c_k e_k t / tau_k (flux), e_k = exp(-t / tau_k). */
static int model_df(const gsl_vector *x, void *params, gsl_matrix *J)
{
    const fit_data *d = params;
    gsl_matrix_set_zero(J);
    for (size_t i = 0; i < d->n; i++) {
        for (size_t k = 0; k < d->K; k++) {
            double tau = exp(gsl_vector_get(x, d->K + k));
            double e = exp(-d->t[i] / tau), s = e * d->t[i] / tau;
            gsl_matrix_set(J, i, k, d->wy * (1.0 - e));
            gsl_matrix_set(J, i, d->K + k, -d->wy * gsl_vector_get(x, k) * s);
            if (!d->joint)
                continue;
            gsl_matrix_set(J, d->n + i, 2 * d->K + k, d->wf * e);
            gsl_matrix_set(J, d->n + i, d->K + k, d->wf * gsl_vector_get(x, 2 * d->K + k) * s);
        }
    }
    return GSL_SUCCESS;
}

/* Linear least squares of one series on the columns 1 - e_k (flux: e_k) for the timescales
 * taus; writes the coefficients into coef[K] and returns the RSS (HUGE_VAL on failure). */
static double linear_part(timescales_workspace *ws, const fit_data *d, const double *taus,
                          const double *v, int flux, double *coef)
{
    gsl_matrix_view X = gsl_matrix_submatrix(ws->design, 0, 0, d->n, d->K);
    gsl_vector_view b = gsl_vector_subvector(ws->rhs, 0, d->n);
    gsl_vector_view c = gsl_vector_subvector(ws->coef, 0, d->K);
    gsl_matrix_view cov = gsl_matrix_submatrix(ws->lin_cov, 0, 0, d->K, d->K);
    for (size_t i = 0; i < d->n; i++) {
        for (size_t k = 0; k < d->K; k++) {
            double e = exp(-d->t[i] / taus[k]);
            gsl_matrix_set(&X.matrix, i, k, flux ? e : 1.0 - e);
        }
        gsl_vector_set(&b.vector, i, v[i]);
    }
    double chisq;
    if (gsl_multifit_linear(&X.matrix, &b.vector, &c.vector, &cov.matrix, &chisq, ws->lin))
        return HUGE_VAL;
    for (size_t k = 0; k < d->K; k++)
        coef[k] = gsl_vector_get(&c.vector, k);
    return isfinite(chisq) ? chisq : HUGE_VAL;
}

/* The weighted RSS of the grid start with timescales taus; its parameters into x. */
static double grid_start(timescales_workspace *ws, const fit_data *d, const double *taus,
                         double *x)
{
    double rss = d->wy * d->wy * linear_part(ws, d, taus, d->y, 0, x);
    if (d->joint)
        rss += d->wf * d->wf * linear_part(ws, d, taus, d->f, 1, x + 2 * d->K);
    for (size_t k = 0; k < d->K; k++)
        x[d->K + k] = log(taus[k]);
    return rss;
}

/* Keeps the `keep` best starts (by RSS) in best[] / best_rss[], sorted. */
static void keep_start(double (*best)[MODES_MAX_PARAMS], double *best_rss, size_t keep,
                       size_t *count, const double *x, double rss)
{
    if (*count == keep && !(rss < best_rss[keep - 1]))
        return;
    size_t at = *count < keep ? (*count)++ : keep - 1;
    while (at > 0 && rss < best_rss[at - 1]) {
        memcpy(best[at], best[at - 1], sizeof best[at]);
        best_rss[at] = best_rss[at - 1];
        at--;
    }
    memcpy(best[at], x, sizeof best[at]);
    best_rss[at] = rss;
}

/* Every increasing choice of K timescales from the log-spaced grid: the best starts. */
static size_t grid_search(timescales_workspace *ws, const fit_data *d, const timescales_config *cfg,
                          double (*best)[MODES_MAX_PARAMS], size_t keep)
{
    size_t G = cfg->grid_points < d->K ? d->K : cfg->grid_points > MAX_GRID ? MAX_GRID : cfg->grid_points;
    double span = d->t[d->n - 1] - d->t[0];
    double lo = 0.5 * span / (double)(d->n - 1), hi = 3.0 * d->t[d->n - 1];
    double grid[MAX_GRID], best_rss[MAX_STARTS], taus[TIMESCALES_MAX_MODES], x[MODES_MAX_PARAMS];
    for (size_t g = 0; g < G; g++)
        grid[g] = lo * pow(hi / lo, G > 1 ? (double)g / (double)(G - 1) : 0.0);
    size_t idx[TIMESCALES_MAX_MODES], count = 0;
    for (size_t k = 0; k < d->K; k++)
        idx[k] = k;
    for (;;) {
        for (size_t k = 0; k < d->K; k++)
            taus[k] = grid[idx[k]];
        double rss = grid_start(ws, d, taus, x);
        if (rss < HUGE_VAL)
            keep_start(best, best_rss, keep, &count, x, rss);
        /* the next combination in lexicographic order */
        size_t k = d->K;
        while (k > 0 && idx[k - 1] == G - d->K + k - 1)
            k--;
        if (k == 0)
            break;
        idx[k - 1]++;
        for (size_t j = k; j < d->K; j++)
            idx[j] = idx[j - 1] + 1;
    }
    return count;
}

/* The nonlinear workspace of (joint, K) for the current n, made on first use. */
static gsl_multifit_nlinear_workspace *nl_workspace(timescales_workspace *ws, const fit_data *d)
{
    gsl_multifit_nlinear_workspace **w = &ws->nl[d->joint][d->K - 1];
    size_t *made = &ws->nl_n[d->joint][d->K - 1];
    if (*w && *made == d->n)
        return *w;
    if (*w)
        gsl_multifit_nlinear_free(*w);
    gsl_multifit_nlinear_parameters p = gsl_multifit_nlinear_default_parameters();
    size_t m = d->n * (d->joint ? 2 : 1);
    *w = gsl_multifit_nlinear_alloc(gsl_multifit_nlinear_trust, &p, m, nparams(d->K, d->joint));
    *made = *w ? d->n : 0;
    return *w;
}

/* Refines one start; returns its RSS (HUGE_VAL when the fit failed), x and cov updated. */
static double refine(timescales_workspace *ws, const fit_data *d, size_t max_iter, double *x,
                     double *cov)
{
    gsl_multifit_nlinear_workspace *w = nl_workspace(ws, d);
    if (!w)
        return HUGE_VAL;
    size_t p = nparams(d->K, d->joint);
    gsl_multifit_nlinear_fdf fdf = {.f = model_f, .df = model_df, .fvv = NULL,
                                    .n = d->n * (d->joint ? 2 : 1), .p = p,
                                    .params = (void *)d};
    gsl_vector_view x0 = gsl_vector_view_array(x, p);
    if (gsl_multifit_nlinear_init(&x0.vector, &fdf, w))
        return HUGE_VAL;
    int info;
    /* ENOPROG or EMAXITER at a point still better than the start is kept: noise-free data
     * reach round-off before the step tolerance is met */
    gsl_multifit_nlinear_driver(max_iter, 1e-12, 1e-12, 0.0, NULL, NULL, &info, w);
    const gsl_vector *xf = gsl_multifit_nlinear_position(w);
    double rss;
    gsl_blas_ddot(gsl_multifit_nlinear_residual(w), gsl_multifit_nlinear_residual(w), &rss);
    gsl_matrix_view C = gsl_matrix_view_array(cov, p, p);
    if (!isfinite(rss) || gsl_multifit_nlinear_covar(gsl_multifit_nlinear_jac(w), 0.0, &C.matrix))
        return HUGE_VAL;
    for (size_t j = 0; j < p; j++) {
        x[j] = gsl_vector_get(xf, j);
        if (!isfinite(x[j]) || !isfinite(cov[j * p + j]))
            return HUGE_VAL;
    }
    return rss;
}

/* The K-mode fit: the best refined grid start. */
static void fit_k(timescales_workspace *ws, const fit_data *d, const timescales_config *cfg,
                  k_fit *out)
{
    double starts[MAX_STARTS][MODES_MAX_PARAMS], x[MODES_MAX_PARAMS];
    double cov[MODES_MAX_PARAMS * MODES_MAX_PARAMS];
    size_t keep = cfg->starts < 1 ? 1 : cfg->starts > MAX_STARTS ? MAX_STARTS : cfg->starts;
    size_t count = grid_search(ws, d, cfg, starts, keep);
    out->status = SLOWSCAN_ENUMERIC;
    out->rss = HUGE_VAL;
    size_t p = nparams(d->K, d->joint);
    for (size_t s = 0; s < count; s++) {
        memcpy(x, starts[s], sizeof x);
        double rss = refine(ws, d, cfg->max_iterations, x, cov);
        if (rss < out->rss) {
            out->rss = rss;
            out->status = SLOWSCAN_OK;
            memcpy(out->x, x, p * sizeof *x);
            memcpy(out->cov, cov, p * p * sizeof *cov);
        }
    }
}

/* Unweighted residuals of fit x (data minus model) into r[n] (and r[n..2n) for the flux). */
static void residuals(const fit_data *d, const double *x, double *r)
{
    timescales_result tmp = {.nmodes = d->K, .joint = d->joint};
    for (size_t k = 0; k < d->K; k++) {
        tmp.modes[k].a = x[k];
        tmp.modes[k].tau = exp(x[d->K + k]);
        tmp.modes[k].c = d->joint ? x[2 * d->K + k] : NAN;
    }
    slowscan_timescales_evaluate(&tmp, d->t, d->n, r, d->joint ? r + d->n : NULL);
    for (size_t i = 0; i < d->n; i++) {
        r[i] = d->y[i] - r[i];
        if (d->joint)
            r[d->n + i] = d->f[i] - r[d->n + i];
    }
}

void slowscan_timescales_evaluate(const timescales_result *r, const double *t, size_t n,
                                  double *out, double *flux)
{
    for (size_t i = 0; i < n; i++) {
        double y = 0, f = 0;
        for (size_t k = 0; k < r->nmodes; k++) {
            double e = exp(-t[i] / r->modes[k].tau);
            y += r->modes[k].a * (1.0 - e);
            f += r->joint ? r->modes[k].c * e : 0.0;
        }
        out[i] = y;
        if (flux)
            flux[i] = r->joint ? f : NAN;
    }
}

/* Fits every K and scores it. The BIC counts the effective sample size of the richest fit's
 * response residuals (one n_eff for every K, so the scores stay comparable): with red
 * residuals, n independent samples would overstate the evidence for each extra mode. An RSS
 * below round-off (residual sd under 1e-10 of the data's size) is floored there, so noise-free
 * data do not reward a redundant mode for a smaller round-off. Returns the richest K fitted
 * (0: none). */
static size_t fit_all(timescales_workspace *ws, fit_data *d, const timescales_config *cfg,
                      timescales_result *out)
{
    size_t richest = 0;
    for (size_t K = 1; K <= cfg->max_modes; K++) {
        d->K = K;
        fit_k(ws, d, cfg, &ws->fits[K - 1]);
        if (ws->fits[K - 1].status == SLOWSCAN_OK)
            richest = K;
    }
    if (richest == 0)
        return 0;
    d->K = richest;
    residuals(d, ws->fits[richest - 1].x, ws->resid);
    out->r1 = modes_lag1(ws->resid, d->n);
    out->n_eff = modes_effective_n(d->n, out->r1);
    size_t m = d->n * (d->joint ? 2 : 1);
    double ne = (double)m * out->n_eff / (double)d->n, scale = 0;
    for (size_t i = 0; i < d->n; i++)
        scale = fmax(scale, fmax(d->wy * fabs(d->y[i]), d->joint ? d->wf * fabs(d->f[i]) : 0));
    double floor_rss = (double)m * (1e-10 * scale) * (1e-10 * scale);
    for (size_t K = 1; K <= cfg->max_modes; K++) {
        const k_fit *kf = &ws->fits[K - 1];
        timescales_choice *c = &out->choice[K - 1];
        c->status = kf->status;
        c->rss = kf->status == SLOWSCAN_OK ? kf->rss : NAN;
        c->bic = kf->status == SLOWSCAN_OK
                     ? ne * log(fmax(kf->rss, floor_rss) / (double)m) +
                           (double)nparams(K, d->joint) * log(ne)
                     : NAN;
    }
    return richest;
}

/* The chosen K's modes (by increasing tau) with their standard errors, the equilibrium and
 * the flags. Standard errors: (J'J)^-1 rss/(m - p), inflated by n / n_eff in variance. */
static void describe(timescales_workspace *ws, const fit_data *d, const timescales_config *cfg,
                     size_t K, timescales_result *out)
{
    const k_fit *kf = &ws->fits[K - 1];
    size_t p = nparams(K, d->joint), m = d->n * (d->joint ? 2 : 1);
    double s2 = kf->rss / (double)(m > p ? m - p : 1);
    out->se_inflation = sqrt((double)d->n / out->n_eff);
    double v = s2 * out->se_inflation * out->se_inflation;
    size_t order[TIMESCALES_MAX_MODES];
    for (size_t k = 0; k < K; k++) {
        size_t at = k;
        while (at > 0 && kf->x[K + order[at - 1]] > kf->x[K + k]) {
            order[at] = order[at - 1];
            at--;
        }
        order[at] = k;
    }
    double eq_var = 0, f_var = 0, cf = d->joint ? 0 : NAN;
    out->equilibrium = 0;
    for (size_t j = 0; j < K; j++) {
        size_t k = order[j], c = 2 * K + k;
        timescales_mode *md = &out->modes[j];
        md->a = kf->x[k];
        md->se_a = sqrt(kf->cov[k * p + k] * v);
        md->tau = exp(kf->x[K + k]);
        md->se_tau = md->tau * sqrt(kf->cov[(K + k) * p + K + k] * v); /* delta method */
        md->c = d->joint ? kf->x[c] : NAN;
        md->se_c = d->joint ? sqrt(kf->cov[c * p + c] * v) : NAN;
        out->equilibrium += md->a;
        cf += d->joint ? md->c : 0.0;
        for (size_t l = 0; l < K; l++) {
            eq_var += kf->cov[k * p + l] * v;
            f_var += d->joint ? kf->cov[c * p + 2 * K + l] * v : 0.0;
        }
    }
    out->se_equilibrium = sqrt(eq_var);
    out->forcing = cf;
    out->se_forcing = d->joint ? sqrt(f_var) : NAN;
    out->nmodes = K;
    residuals(d, kf->x, ws->resid);
    double ss = 0;
    for (size_t i = 0; i < d->n; i++)
        ss += ws->resid[i] * ws->resid[i];
    out->sigma = sqrt(ss / (double)(d->n > 2 * K ? d->n - 2 * K : 1));
    double longest = out->modes[K - 1].tau, shortest = out->modes[0].tau;
    out->flags = 0;
    if (longest > cfg->unresolved_fraction * d->t[d->n - 1])
        out->flags |= TIMESCALES_FLAG_UNRESOLVED;
    if (K > 1 && longest > cfg->multiscale_ratio * shortest)
        out->flags |= TIMESCALES_FLAG_MULTISCALE;
}

/* The checks every fit makes, and a cleared result. */
static int start_fit(timescales_workspace *ws, const timescales_config *cfg, const double *t,
                     const double *y, size_t n, timescales_result *out)
{
    memset(out, 0, sizeof *out);
    out->n = n;
    if (!ws || !cfg || cfg->max_modes < 1 || cfg->max_modes > TIMESCALES_MAX_MODES ||
        n > ws->cap || !(cfg->unresolved_fraction > 0) || !(cfg->multiscale_ratio > 1))
        return SLOWSCAN_EINVAL;
    if (n < 3 * cfg->max_modes + 3)
        return SLOWSCAN_ESHORT;
    if (modes_check_series(t, y, n) != SLOWSCAN_OK)
        return SLOWSCAN_EINVAL;
    double lo = y[0], hi = y[0];
    for (size_t i = 1; i < n; i++) {
        lo = fmin(lo, y[i]);
        hi = fmax(hi, y[i]);
    }
    return hi > lo ? SLOWSCAN_OK : SLOWSCAN_ECONST;
}

/* The K of least BIC among those fitted. */
static size_t choose(const timescales_result *out, size_t max_modes)
{
    size_t best = 0;
    for (size_t K = 1; K <= max_modes; K++)
        if (out->choice[K - 1].status == SLOWSCAN_OK &&
            (best == 0 || out->choice[K - 1].bic < out->choice[best - 1].bic))
            best = K;
    return best;
}

int slowscan_timescales_fit(timescales_workspace *ws, const timescales_config *cfg,
                            const double *t, const double *y, size_t n, timescales_result *out)
{
    int st = start_fit(ws, cfg, t, y, n, out);
    if (st != SLOWSCAN_OK)
        return st;
    fit_data d = {.t = t, .y = y, .f = NULL, .n = n, .joint = 0, .wy = 1.0, .wf = 0.0};
    out->weight_response = 1.0;
    if (fit_all(ws, &d, cfg, out) == 0)
        return SLOWSCAN_ENUMERIC;
    d.K = choose(out, cfg->max_modes);
    describe(ws, &d, cfg, d.K, out);
    return SLOWSCAN_OK;
}

/* A noise scale of x: the sd of its first differences over sqrt 2 (blind to a smooth trend),
 * or its sd, or 1 for a series with neither. */
static double noise_scale(const double *x, size_t n, double *scratch)
{
    for (size_t i = 0; i + 1 < n; i++)
        scratch[i] = x[i + 1] - x[i];
    double s = gsl_stats_sd(scratch, 1, n - 1) / sqrt(2.0);
    if (!(s > 0))
        s = gsl_stats_sd(x, 1, n);
    return s > 0 ? s : 1.0;
}

/* The residuals' sd of series j (0 response, 1 flux) of the richest fit. */
static double residual_sd(const timescales_workspace *ws, size_t n, int j)
{
    return gsl_stats_sd(ws->resid + (size_t)j * n, 1, n);
}

int slowscan_timescales_fit_joint(timescales_workspace *ws, const timescales_config *cfg,
                                  const double *t, const double *y, const double *f, size_t n,
                                  timescales_result *out)
{
    int st = start_fit(ws, cfg, t, y, n, out);
    if (st == SLOWSCAN_OK && modes_check_series(t, f, n) != SLOWSCAN_OK)
        st = SLOWSCAN_EINVAL;
    if (st != SLOWSCAN_OK)
        return st;
    /* The two series have their own units (K, W m-2): each block of residuals is weighted by
     * its noise scale, first from first differences, then once more from the residuals of
     * that fit (a two-step feasible weighted least squares). */
    fit_data d = {.t = t, .y = y, .f = f, .n = n, .joint = 1};
    d.wy = 1.0 / noise_scale(y, n, ws->resid);
    d.wf = 1.0 / noise_scale(f, n, ws->resid);
    size_t richest = fit_all(ws, &d, cfg, out);
    if (richest == 0)
        return SLOWSCAN_ENUMERIC;
    double sy = residual_sd(ws, n, 0), sf = residual_sd(ws, n, 1);
    double scale_y = 1.0 / d.wy, scale_f = 1.0 / d.wf;
    /* residuals at round-off (noise-free data) say nothing about the noise: keep the first weights */
    if (sy > 1e-8 * scale_y && sf > 1e-8 * scale_f) {
        d.wy = 1.0 / sy;
        d.wf = 1.0 / sf;
        if (fit_all(ws, &d, cfg, out) == 0)
            return SLOWSCAN_ENUMERIC;
    }
    out->joint = 1;
    out->weight_response = d.wy;
    out->weight_flux = d.wf;
    d.K = choose(out, cfg->max_modes);
    describe(ws, &d, cfg, d.K, out);
    return SLOWSCAN_OK;
}
