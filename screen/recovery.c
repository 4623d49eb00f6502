/* The recovery-rate analysis of one prepared series: the drifting-AR(1) fit and path, the
 * surrogate p of t(a1) (screen's recovery_trend test alone), the projected crossing. */
#include "slowscan/recovery.h"
#include "slowscan/significance.h"
#include "slowscan/status.h"
#include "screen_internal.h"

#include <gsl/gsl_rng.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

struct recovery_workspace {
    screen_workspace *test;    /* the surrogate test */
    ar1_drift_workspace *fit;  /* kept from the fit to the projection, which reuses its design */
    size_t fit_n;
    gsl_rng *rng;              /* the projection's bootstrap, reseeded per series */
};

recovery_config slowscan_recovery_config_default(void)
{
    return (recovery_config){0, 2.0};
}

recovery_workspace *slowscan_recovery_workspace_alloc(size_t threads)
{
    recovery_workspace *ws = calloc(1, sizeof *ws);
    if (!ws)
        return NULL;
    ws->test = slowscan_screen_workspace_alloc(threads);
    ws->rng = gsl_rng_alloc(gsl_rng_mt19937);
    if (!ws->test || !ws->rng) {
        slowscan_recovery_workspace_free(ws);
        return NULL;
    }
    return ws;
}

void slowscan_recovery_workspace_free(recovery_workspace *ws)
{
    if (!ws)
        return;
    slowscan_screen_workspace_free(ws->test);
    slowscan_ar1_drift_free(ws->fit);
    if (ws->rng)
        gsl_rng_free(ws->rng);
    free(ws);
}

static int no_memory(screen_detail *d)
{
    *d = (screen_detail){.rule = SCREEN_RULE_NO_MEMORY, .status = SLOWSCAN_ENOMEM};
    return SLOWSCAN_ENOMEM;
}

/* The fit of the residual; a series that does not vary has none. */
static int fit_series(recovery_workspace *ws, const screen_config *cfg, const screen_prepared *ps,
                      ar1_drift_fit *fit)
{
    if (ws->fit_n != ps->n) {
        slowscan_ar1_drift_free(ws->fit);
        ws->fit = slowscan_ar1_drift_alloc(ps->n);
        ws->fit_n = ws->fit ? ps->n : 0;
    }
    if (!ws->fit)
        return SLOWSCAN_ENOMEM;
    slowscan_ar1_drift_set_noise_trend(ws->fit, cfg->noise_trend);
    if (ps->constant)
        return SLOWSCAN_ECONST;
    return slowscan_ar1_drift_estimate(ws->fit, ps->residual, ps->n, fit);
}

/* screen's recovery_trend test run alone: the same surrogates, streams and threads give the
 * same p as its row of `screen`. */
static int surrogate_p(recovery_workspace *ws, const screen_config *cfg, const screen_prepared *ps,
                       recovery_result *out, screen_detail *d)
{
    screen_config drift_only = screen_drift_only(cfg);
    screen_result res;
    memset(&res, 0, sizeof res);
    int st = slowscan_screen_test_series(ws->test, &drift_only, ps, NULL, &res, d);
    out->nwarnings = res.nwarnings;
    memcpy(out->warnings, res.warnings, res.nwarnings * sizeof *res.warnings);
    out->p_value = res.tests[0].p_value;
    return st;
}

static double index_time(const screen_prepared *ps, double index)
{
    return ps->time[0] + index * ps->dt;
}

/* The crossing of lambda = 0 within the horizon, with its residual-bootstrap interval. */
static int project(recovery_workspace *ws, const screen_config *cfg, const recovery_config *rcfg,
                   const screen_prepared *ps, recovery_result *out)
{
    ar1_projection *pr = &out->projection;
    gsl_rng_set(ws->rng, slowscan_stream_seed(cfg->seed, ps->name, "projection", 0));
    int st = slowscan_ar1_drift_project(ws->fit, &out->fit, ps->n,
                                        rcfg->horizon * (double)(ps->n - 1),
                                        rcfg->projection_draws, ws->rng, pr);
    if (st == SLOWSCAN_ENOMEM)
        return st;
    out->projected = 1;
    out->projection_status = st;
    if (st != SLOWSCAN_OK)
        *pr = (ar1_projection){PROJECTION_NONE, NAN, NAN, NAN, NAN, 0};
    out->crossing_time = index_time(ps, pr->index);
    out->crossing_lo = index_time(ps, pr->index_lo);
    out->crossing_hi = index_time(ps, pr->index_hi);
    return SLOWSCAN_OK;
}

int slowscan_recovery_series(recovery_workspace *ws, const screen_config *cfg,
                             const recovery_config *rcfg, const screen_prepared *ps,
                             double *lambda, double *lo, double *hi, recovery_result *out,
                             screen_detail *d)
{
    memset(out, 0, sizeof *out);
    memset(d, 0, sizeof *d);
    out->p_value = out->crossing_time = out->crossing_lo = out->crossing_hi = NAN;
    out->projection = (ar1_projection){PROJECTION_NONE, NAN, NAN, NAN, NAN, 0};
    out->fit_status = fit_series(ws, cfg, ps, &out->fit);
    if (out->fit_status == SLOWSCAN_ENOMEM)
        return no_memory(d);
    if (out->fit_status != SLOWSCAN_OK)
        return SLOWSCAN_OK;
    int st = cfg->surrogates > 0 ? surrogate_p(ws, cfg, ps, out, d) : SLOWSCAN_OK;
    if (st != SLOWSCAN_OK)
        return st;
    if (lambda)
        slowscan_ar1_drift_path(&out->fit, ps->n, ps->dt, lambda, lo, hi);
    if (rcfg->projection_draws > 0 && project(ws, cfg, rcfg, ps, out) != SLOWSCAN_OK)
        return no_memory(d);
    return SLOWSCAN_OK;
}
