/* The windows of a feedback run, their flags relative to the first window, and the one
 * drift test of the run. */
#include "feedback_internal.h"
#include "modes_internal.h"
#include "slowscan/status.h"

#include <gsl/gsl_cdf.h>
#include <gsl/gsl_fit.h>
#include <math.h>
#include <stdlib.h>

feedback_config slowscan_feedback_config_default(void)
{
    feedback_config c = {.fit = FEEDBACK_OLS, .noise_ratio = NAN, .window = NAN,
                         .stride = NAN, .skip = 0, .span_from = NAN, .span_until = NAN,
                         .scale = 1, .level = 0.95};
    return c;
}

/* Where the windows lie: the first sample, samples per window, samples between starts. */
typedef struct {
    size_t first, len, step, count;
} window_layout;

/* Index of the first time >= t (within a millionth of a step), n when none. */
static size_t first_at(const double *time, size_t n, double t, double dt)
{
    size_t i = 0;
    while (i < n && time[i] < t - 1e-6 * dt)
        i++;
    return i;
}

static int layout(const double *time, size_t n, const feedback_config *c, window_layout *L)
{
    if (!time || !c || n < 2 || !(c->level > 0 && c->level < 1) || !isfinite(c->scale) ||
        c->scale == 0 || !(c->skip >= 0))
        return SLOWSCAN_EINVAL;
    if (c->fit == FEEDBACK_TLS && !(c->noise_ratio > 0 && isfinite(c->noise_ratio)))
        return SLOWSCAN_EINVAL;
    double dt = modes_mean_step(time, n);
    if (!isnan(c->span_from) || !isnan(c->span_until)) {
        L->first = first_at(time, n, c->span_from, dt);
        size_t end = first_at(time, n, c->span_until + dt, dt); /* one past the last */
        if (!(c->span_from < c->span_until) || end <= L->first + 3)
            return SLOWSCAN_EINVAL;
        L->len = end - L->first;
        L->step = L->len;
        L->count = 1;
        return SLOWSCAN_OK;
    }
    if (!(c->window > 0) || !(c->stride > 0))
        return SLOWSCAN_EINVAL;
    L->first = first_at(time, n, time[0] + c->skip, dt);
    L->len = (size_t)lround(c->window / dt) + 1;
    L->step = (size_t)lround(c->stride / dt);
    if (L->step < 1 || L->len < 4 || L->first >= n || L->len > n - L->first)
        return SLOWSCAN_EINVAL;
    L->count = (n - L->first - L->len) / L->step + 1;
    return SLOWSCAN_OK;
}

int slowscan_feedback_window_count(const double *time, size_t n, const feedback_config *cfg,
                                   size_t *count)
{
    window_layout L;
    int st = layout(time, n, cfg, &L);
    *count = st == SLOWSCAN_OK ? L.count : 0;
    return st;
}

/* First against last window (two), or the weighted regression of lambda on the windows'
 * middle times with weights 1/se^2 taken as known (gsl_fit_wlinear's covariance). The
 * reference is Student's t, not the normal: each error is itself estimated from n_eff - 2
 * degrees of freedom. Two windows take Welch-Satterthwaite's degrees of freedom; more take
 * the smallest window's, which errs on the conservative side. */
static void drift_test(const feedback_window *w, size_t m, double level, double *buf,
                       feedback_drift *d)
{
    double *t = buf, *l = buf + m, *wt = buf + 2 * m;
    size_t k = 0;
    double dof_min = INFINITY, welch_num = 0, welch_den = 0;
    for (size_t j = 0; j < m; j++)
        if (w[j].status == SLOWSCAN_OK && w[j].se_lambda_adj > 0 && isfinite(w[j].se_lambda_adj)) {
            double v = w[j].se_lambda_adj * w[j].se_lambda_adj, dof = w[j].n_eff - 2;
            t[k] = 0.5 * (w[j].start + w[j].end);
            l[k] = w[j].lambda;
            wt[k++] = 1 / v;
            dof_min = fmin(dof_min, dof);
            welch_num += v;
            welch_den += v * v / dof;
        }
    *d = (feedback_drift){FEEDBACK_DRIFT_UNTESTED, FEEDBACK_DRIFT_NONE, k, NAN, NAN, NAN, NAN};
    if (k < 2)
        return;
    double dof = dof_min;
    if (k == 2) {
        d->method = FEEDBACK_DRIFT_ENDS;
        d->slope = (l[1] - l[0]) / (t[1] - t[0]);
        d->se_slope = sqrt(1 / wt[0] + 1 / wt[1]) / (t[1] - t[0]);
        dof = welch_num * welch_num / welch_den;
    } else {
        double c0, c00, c01, c11, chi2;
        d->method = FEEDBACK_DRIFT_TREND;
        if (gsl_fit_wlinear(t, 1, wt, 1, l, 1, k, &c0, &d->slope, &c00, &c01, &c11, &chi2))
            return;
        d->se_slope = sqrt(c11);
    }
    d->z = d->slope / d->se_slope;
    d->p_value = 2 * gsl_cdf_tdist_Q(fabs(d->z), dof);
    d->verdict = d->p_value <= 1 - level ? FEEDBACK_DRIFT_DRIFTING : FEEDBACK_DRIFT_STEADY;
}

/* The record after the skip cut into k consecutive blocks that do not overlap, as many as
 * windows of the chosen length fit, at least two (a window longer than half the record then
 * gives two halves): the drift test compares independent estimates only. */
static int drift_windows(const double *time, const double *flux, const double *response,
                         size_t n, const feedback_config *cfg, const window_layout *L,
                         double *scratch, feedback_drift *drift)
{
    size_t avail = n - L->first;
    size_t m = L->count == 1 && L->step == L->len ? 1 : avail / L->len < 2 ? 2 : avail / L->len;
    size_t len = m > 1 ? avail / m : L->len;
    feedback_window *w = malloc(m * sizeof *w);
    double *buf = malloc(3 * m * sizeof *buf);
    if (!w || !buf) {
        free(w);
        free(buf);
        return SLOWSCAN_ENOMEM;
    }
    for (size_t j = 0; j < m && m > 1; j++)
        feedback_fit_with(time, flux, response, L->first + j * len, len, cfg, scratch, &w[j]);
    drift_test(w, m > 1 ? m : 0, cfg->level, buf, drift);
    free(w);
    free(buf);
    return SLOWSCAN_OK;
}

int slowscan_feedback_run(const double *time, const double *flux, const double *response,
                          size_t n, const feedback_config *cfg, feedback_window *out,
                          size_t count, feedback_drift *drift)
{
    window_layout L;
    int st = layout(time, n, cfg, &L);
    if (st != SLOWSCAN_OK)
        return st;
    if (!flux || !response || !out || count < L.count)
        return SLOWSCAN_EINVAL;
    double *scratch = malloc(4 * (n - L.first) * sizeof *scratch); /* the drift blocks too */
    if (!scratch)
        return SLOWSCAN_ENOMEM;
    double reference = NAN; /* lambda of the first window with a fit */
    for (size_t j = 0; j < L.count; j++) {
        feedback_window *w = &out[j];
        feedback_fit_with(time, flux, response, L.first + j * L.step, L.len, cfg, scratch, w);
        if (isnan(reference) && w->status == SLOWSCAN_OK)
            reference = w->lambda;
        if (w->status == SLOWSCAN_OK && reference * w->lambda < 0)
            w->flags |= FEEDBACK_FLAG_REVERSED;
    }
    if (drift)
        st = drift_windows(time, flux, response, n, cfg, &L, scratch, drift);
    free(scratch);
    return st;
}
