/* The screening workspace, the rolling indicators of a prepared series, and the whole
 * pipeline of one series (slowscan_screen_series). */
#include "screen_internal.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

screen_workspace *slowscan_screen_workspace_alloc(size_t threads)
{
    screen_workspace *ws = calloc(1, sizeof *ws);
    if (ws)
        ws->threads = threads < 1 ? 1 : threads > SCREEN_MAX_THREADS ? SCREEN_MAX_THREADS : threads;
    return ws;
}

void slowscan_screen_workspace_set_progress(screen_workspace *ws, screen_progress_fn fn,
                                            void *context)
{
    ws->progress = fn;
    ws->progress_context = context;
}

void slowscan_screen_workspace_free(screen_workspace *ws)
{
    if (!ws)
        return;
    slowscan_kendall_free(ws->kendall);
    slowscan_surrogate_plan_free(ws->plan);
    for (size_t k = 0; k < ws->threads; k++)
        slowscan_null_trend_free(ws->null_ws[k]);
    free(ws->null);
    free(ws->sorted);
    slowscan_ar1_drift_free(ws->drift);
    slowscan_rolling_plan_free(ws->rolling_plan);
    slowscan_detrend_workspace_free(ws->detrend);
    slowscan_screen_prepared_free(&ws->prepared);
    free(ws->paths);
    free(ws);
}

/* The window and the band against the per-window indicators requested. */
static int check_per_window(const screen_config *cfg, const screen_prepared *ps, screen_detail *d)
{
    for (size_t j = 0; j < cfg->nindicators; j++) {
        indicator_kind kind = cfg->indicators[j];
        size_t need = slowscan_indicator_min_window(kind);
        if (slowscan_indicator_per_window(kind) && ps->window < need) {
            *d = (screen_detail){SCREEN_RULE_WINDOW_INDICATOR, SCREEN_OPTION_WINDOW,
                                 SLOWSCAN_EINVAL, (int)kind, ps->window, need, 0, 0, 0};
            return SLOWSCAN_EINVAL;
        }
        if (kind != INDICATOR_SPECTRAL_EXPONENT || (cfg->band_lo == 0 && cfg->band_hi == 0))
            continue;
        double nyquist = 0.5 / ps->dt;
        if (cfg->band_hi > nyquist * (1 + 1e-9)) {
            *d = (screen_detail){SCREEN_RULE_BAND_NYQUIST, SCREEN_OPTION_BAND, SLOWSCAN_EINVAL,
                                 (int)kind, 0, 0, ps->dt, nyquist, 0};
            return SLOWSCAN_EINVAL;
        }
        size_t inside = slowscan_rolling_band_count(ps->window, ps->dt, cfg->band_lo, cfg->band_hi);
        if (inside < SPECTRAL_MIN_FREQUENCIES) {
            *d = (screen_detail){SCREEN_RULE_BAND_TOO_FEW, SCREEN_OPTION_BAND, SLOWSCAN_EINVAL,
                                 (int)kind, inside, SPECTRAL_MIN_FREQUENCIES, (double)ps->window, 0,
                                 0};
            return SLOWSCAN_EINVAL;
        }
    }
    return SLOWSCAN_OK;
}

/* The observed series and every surrogate share one plan per window length and time step;
 * it is made here, in the calling thread, before the surrogate threads start. */
rolling_spec slowscan_screen_rolling_spec(const screen_config *cfg, const screen_prepared *ps)
{
    return (rolling_spec){ps->window, cfg->min_coverage, ps->dt, cfg->recovery, cfg->step,
                          cfg->band_lo, cfg->band_hi, NULL};
}

int screen_rolling_ready(screen_workspace *ws, const screen_config *cfg,
                         const screen_prepared *ps, rolling_spec *spec, screen_detail *d)
{
    *spec = slowscan_screen_rolling_spec(cfg, ps);
    int per_window = 0;
    for (size_t j = 0; j < cfg->nindicators; j++)
        per_window |= slowscan_indicator_per_window(cfg->indicators[j]);
    if (!per_window)
        return SLOWSCAN_OK;
    int st = check_per_window(cfg, ps, d);
    if (st != SLOWSCAN_OK)
        return st;
    if (!ws->rolling_plan || !slowscan_rolling_plan_matches(ws->rolling_plan, spec)) {
        slowscan_rolling_plan_free(ws->rolling_plan);
        ws->rolling_plan = NULL;
        if ((st = slowscan_rolling_plan_alloc(spec, &ws->rolling_plan)) != SLOWSCAN_OK) {
            *d = (screen_detail){SCREEN_RULE_PLAN_FAILED, SCREEN_OPTION_NONE, st, 0, 0, 0, 0, 0, 0};
            return st;
        }
    }
    spec->plan = ws->rolling_plan;
    return SLOWSCAN_OK;
}

int slowscan_screen_indicators(screen_workspace *ws, const screen_config *cfg, const screen_prepared *ps,
                      double *const *paths, screen_warning *warning, int *warned,
                      screen_detail *d)
{
    memset(d, 0, sizeof *d);
    *warned = 0;
    if (ps->window > ps->n) {
        *d = (screen_detail){SCREEN_RULE_WINDOW_LONGER, SCREEN_OPTION_WINDOW, SLOWSCAN_EINVAL, 0,
                             ps->window, ps->n, 0, 0, 0};
        return SLOWSCAN_EINVAL;
    }
    rolling_spec spec;
    int st = screen_rolling_ready(ws, cfg, ps, &spec, d);
    if (st != SLOWSCAN_OK)
        return st;
    if (ps->constant || ps->finite < 2) {
        *warning = (screen_warning){SCREEN_WARN_NO_PATHS, ps->finite, ps->n, (int)ps->constant};
        *warned = 1;
        for (size_t j = 0; j < cfg->nindicators; j++)
            for (size_t i = 0; i < ps->n; i++)
                paths[j][i] = NAN;
        return SLOWSCAN_OK;
    }
    st = slowscan_rolling_compute(&spec, ps->residual, ps->value, ps->n, cfg->indicators, cfg->nindicators,
                         paths);
    if (st != SLOWSCAN_OK)
        *d = (screen_detail){SCREEN_RULE_ROLLING_FAILED, SCREEN_OPTION_NONE, st, 0, 0, 0, 0, 0, 0};
    return st;
}

/* The control run must hold the series, at least as long, on the same step. */
static int check_control(const screen_prepared *ps, const screen_input *c, screen_detail *d)
{
    if (!c->values) {
        *d = (screen_detail){.rule = SCREEN_RULE_CONTROL_MISSING, .option = SCREEN_OPTION_NULL,
                             .status = SLOWSCAN_EINVAL};
        return SLOWSCAN_EINVAL;
    }
    if (c->n < ps->n) {
        *d = (screen_detail){.rule = SCREEN_RULE_CONTROL_SHORT, .option = SCREEN_OPTION_NULL,
                             .status = SLOWSCAN_ESHORT, .count = c->n, .need = ps->n};
        return SLOWSCAN_ESHORT;
    }
    double cdt = (c->time[c->n - 1] - c->time[0]) / (double)(c->n - 1);
    if (fabs(cdt - ps->dt) > 1e-6 * ps->dt) {
        *d = (screen_detail){.rule = SCREEN_RULE_CONTROL_STEP, .option = SCREEN_OPTION_NULL,
                             .status = SLOWSCAN_EINVAL, .value = cdt, .limit = ps->dt};
        return SLOWSCAN_EINVAL;
    }
    return SLOWSCAN_OK;
}

int slowscan_screen_attach_control(const screen_config *cfg, screen_prepared *ps,
                          const screen_input *control, screen_detail *d)
{
    return screen_attach_control_with(NULL, cfg, ps, control, d);
}

int screen_attach_control_with(screen_workspace *ws, const screen_config *cfg,
                               screen_prepared *ps, const screen_input *control,
                               screen_detail *d)
{
    if (ps->constant) /* its tests are insufficient whatever the null: nothing to attach */
        return SLOWSCAN_OK;
    int st = check_control(ps, control, d);
    if (st != SLOWSCAN_OK) {
        d->control = 1;
        return st;
    }
    screen_config same = *cfg;
    same.bandwidth = (screen_length){.amount = isnan(ps->bandwidth) ? 1.0 : ps->bandwidth, .percent = 0};
    same.window = (screen_length){.amount = (double)(ps->window - 1) * ps->dt, .percent = 0};
    screen_input cut = *control;
    cut.n = ps->n;
    cut.control = NULL;
    screen_prepared cps;
    st = slowscan_screen_prepare_with(ws, &same, &cut, &cps, d);
    if (st == SLOWSCAN_OK && (cps.constant || cps.finite < 8)) {
        *d = (screen_detail){SCREEN_RULE_CONTROL_FLAT, SCREEN_OPTION_NULL, SLOWSCAN_ECONST, 0, 0, 0,
                             0, 0, 0};
        st = SLOWSCAN_ECONST;
    }
    if (st == SLOWSCAN_OK) {
        /* The control's residual in the series' units (each was scaled on its own). */
        if (cps.scale_exp != ps->scale_exp)
            for (size_t i = 0; i < cps.n; i++)
                cps.residual[i] = ldexp(cps.residual[i], cps.scale_exp - ps->scale_exp);
        free(ps->owned);
        ps->owned = cps.value; /* residual lives in the same block */
        ps->null_source = cps.residual;
        cps.value = NULL;
    }
    slowscan_screen_prepared_free(&cps);
    if (st != SLOWSCAN_OK)
        d->control = 1;
    return st;
}

void screen_describe(const screen_config *cfg, const screen_prepared *ps, screen_result *out)
{
    out->n = ps->finite;
    out->window = (double)(ps->window - 1) * ps->dt;
    out->bandwidth = ps->bandwidth;
    out->harmonics = isnan(cfg->deseason) ? -1 : ps->harmonics;
    out->variation = ps->constant;
    out->leakage = ps->leakage;
    out->leakage_tested = ps->leakage_tested;
}

int slowscan_screen_series(screen_workspace *ws, const screen_config *cfg, const screen_input *in,
                  screen_result *out, screen_detail *d)
{
    memset(out, 0, sizeof *out);
    slowscan_screen_prepared_free(&ws->prepared);
    screen_prepared *ps = &ws->prepared;
    int st = slowscan_screen_prepare_with(ws, cfg, in, ps, d);
    if (st == SLOWSCAN_OK && in->control)
        st = screen_attach_control_with(ws, cfg, ps, in->control, d);
    if (st != SLOWSCAN_OK)
        return st;
    size_t need = cfg->nindicators * in->n;
    if (ws->paths_cap < need) {
        free(ws->paths);
        ws->paths_cap = (ws->paths = malloc(need * sizeof *ws->paths)) ? need : 0;
        if (!ws->paths) {
            *d = (screen_detail){SCREEN_RULE_NO_MEMORY, SCREEN_OPTION_NONE, SLOWSCAN_ENOMEM, 0, 0,
                                 0, 0, 0, 0};
            return SLOWSCAN_ENOMEM;
        }
    }
    double *paths[INDICATOR_COUNT];
    for (size_t j = 0; j < cfg->nindicators; j++)
        paths[j] = ws->paths + j * in->n;
    int warned;
    st = slowscan_screen_indicators(ws, cfg, ps, paths, &out->warnings[0], &warned, d);
    out->nwarnings = (size_t)warned;
    return st == SLOWSCAN_OK ? slowscan_screen_test_series(ws, cfg, ps, paths, out, d) : st;
}

const screen_prepared *slowscan_screen_workspace_prepared(const screen_workspace *ws)
{
    return &ws->prepared;
}

const double *slowscan_screen_workspace_path(const screen_workspace *ws, size_t j)
{
    return ws->paths && ws->prepared.value ? ws->paths + j * ws->prepared.n : NULL;
}
