/* A series made ready for its indicators: the window rule, deseasoning, detrending, the
 * round-off check and the trend-leakage test. Refusals fill a screen_detail; nothing prints. */
#include "screen_internal.h"
#include "../library/magnitude.h"
#include "slowscan/status.h"

#include <float.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

static int refuse(screen_detail *d, screen_rule rule, screen_option option, int status)
{
    d->rule = rule;
    d->option = option;
    d->status = status;
    return status;
}

/* A length in time units: percent of the span, or as given; must fit in the span. */
static int resolve_length(const screen_length *len, screen_option option, double span,
                          double *out, screen_detail *d)
{
    double v = len->percent ? len->amount / 100.0 * span : len->amount;
    if (!(v <= span * (1 + 1e-9))) {
        d->limit = span;
        return refuse(d, SCREEN_RULE_LONGER_THAN_SPAN, option, SLOWSCAN_EINVAL);
    }
    *out = v;
    return SLOWSCAN_OK;
}

/* Samples in a window, DESIGN §3: round(window/dt)+1 or round(p/100 (n-1))+1. */
int slowscan_screen_window(const screen_config *cfg, size_t n, double span, size_t *window,
                  screen_detail *d)
{
    double length, dt = span / (double)(n - 1);
    int st = resolve_length(&cfg->window, SCREEN_OPTION_WINDOW, span, &length, d);
    if (st != SLOWSCAN_OK)
        return st;
    double w = cfg->window.percent ? floor(cfg->window.amount / 100.0 * (double)(n - 1) + 0.5)
                                   : floor(length / dt + 0.5);
    *window = (size_t)w + 1;
    if (*window < 3) {
        d->count = *window;
        return refuse(d, SCREEN_RULE_WINDOW_TOO_FEW, SCREEN_OPTION_WINDOW, SLOWSCAN_EINVAL);
    }
    return SLOWSCAN_OK;
}

/* Removes the cycle of cfg->deseason from ps->value. */
static int deseason_series(const screen_config *cfg, screen_prepared *ps, screen_detail *d)
{
    deseason_spec spec = slowscan_detrend_deseason_default();
    spec.period = cfg->deseason;
    spec.harmonics = cfg->harmonics;
    int st = SLOWSCAN_OK;
    if (!isnan(cfg->deseason_window.amount))
        st = resolve_length(&cfg->deseason_window, SCREEN_OPTION_DESEASON_WINDOW, ps->span,
                            &spec.window, d);
    if (st != SLOWSCAN_OK)
        return st;
    deseason_problem problem;
    if (slowscan_detrend_deseason_check(&spec, ps->dt, ps->n, &problem, &ps->harmonics) != SLOWSCAN_OK) {
        d->value = cfg->deseason / ps->dt; /* the period in steps */
        d->limit = problem == DESEASON_BAD_WINDOW ? ps->span : ps->dt;
        screen_rule rule = problem == DESEASON_BAD_HARMONICS ? SCREEN_RULE_DESEASON_HARMONICS
                           : problem == DESEASON_BAD_WINDOW  ? SCREEN_RULE_DESEASON_WINDOW
                                                             : SCREEN_RULE_DESEASON_PERIOD;
        screen_option option = problem == DESEASON_BAD_HARMONICS ? SCREEN_OPTION_HARMONICS
                               : problem == DESEASON_BAD_WINDOW  ? SCREEN_OPTION_DESEASON_WINDOW
                                                                 : SCREEN_OPTION_DESEASON;
        return refuse(d, rule, option, SLOWSCAN_EINVAL);
    }
    st = slowscan_detrend_deseason_apply(&spec, ps->dt, ps->value, ps->n);
    if (st == SLOWSCAN_ESHORT) {
        d->count = (size_t)ps->harmonics; /* the message says which fit lacked samples */
        return refuse(d, SCREEN_RULE_DESEASON_SHORT, SCREEN_OPTION_DESEASON, st);
    }
    if (st != SLOWSCAN_OK)
        return refuse(d, SCREEN_RULE_DESEASON_FAILED, SCREEN_OPTION_DESEASON, st);
    return SLOWSCAN_OK;
}

static void count_finite(screen_prepared *ps)
{
    double lo = INFINITY, hi = -INFINITY;
    ps->finite = 0;
    for (size_t i = 0; i < ps->n; i++)
        if (isfinite(ps->value[i])) {
            ps->finite++;
            lo = fmin(lo, ps->value[i]);
            hi = fmax(hi, ps->value[i]);
        }
    ps->constant = ps->finite > 0 && lo == hi ? SCREEN_CONSTANT : SCREEN_VARIES;
}

/* Magnitudes beyond 2^+-100 are brought near 1 by a power of two before anything is
 * computed (library/magnitude.h): at 1e300 the rolling sums of squares overflowed to Inf
 * and a good series came out as "no variation"; at 1e-300 they underflowed. Taus and
 * p-values are those of the same series near 1; outputs are unscaled by the caller. */
static void scale_series(screen_prepared *ps)
{
    ps->scale_exp = magnitude_exponent(ps->value, ps->n);
    magnitude_scale(ps->value, ps->n, ps->scale_exp);
}

double slowscan_screen_unscale(const screen_prepared *ps, double v, int power)
{
    double u = ldexp(v, power * ps->scale_exp);
    /* beyond the double range either way (the variance of a 1e300 series is 1e600, of a
     * 1e-300 one 1e-600): no number rather than Inf or a 0 that is not one */
    if (ps->scale_exp != 0 && isfinite(v) && v != 0 && (isinf(u) || fabs(u) < DBL_MIN))
        return NAN;
    return u;
}

/* A residual at round-off level (a straight line under --detrend linear, say) carries no
 * information: its lag-1 autocorrelation would be computed from rounding noise. Treat it as
 * constant rather than report numbers made of round-off. */
static void flag_flat_residual(screen_prepared *ps)
{
    double res = 0, scale = 0;
    for (size_t i = 0; i < ps->n; i++)
        if (isfinite(ps->residual[i])) {
            res = fmax(res, fabs(ps->residual[i]));
            scale = fmax(scale, fabs(ps->value[i]));
        }
    if (res <= 1e-11 * scale)
        ps->constant = SCREEN_FLAT_RESIDUAL;
}

/* The trend-leakage diagnostic over edge spans of one bandwidth (cfg->bandwidth, even for a
 * method that has none, so every method is judged on the same spans), at level 0.01. */
enum { LEAKAGE_MIN_EDGE = 8 };
#define LEAKAGE_LEVEL 0.01

static void test_leakage(const screen_config *cfg, screen_prepared *ps)
{
    double length = cfg->bandwidth.percent ? cfg->bandwidth.amount / 100.0 * ps->span
                                           : cfg->bandwidth.amount;
    double edge = floor(length / ps->dt + 0.5);
    if (!(edge >= LEAKAGE_MIN_EDGE) || edge > (double)(ps->n / 2))
        return; /* too short to say anything, or the edges would overlap */
    ps->leakage_tested = slowscan_detrend_leakage_test(ps->residual, ps->n, (size_t)edge, LEAKAGE_LEVEL,
                                              &ps->leakage) == SLOWSCAN_OK;
    /* the edge means in the input's units, as messages and the JSON print them */
    ps->leakage.first.mean = slowscan_screen_unscale(ps, ps->leakage.first.mean, 1);
    ps->leakage.last.mean = slowscan_screen_unscale(ps, ps->leakage.last.mean, 1);
}

static int same_detrend(const screen_workspace *ws, const detrend_spec *spec, double dt,
                        size_t n)
{
    const detrend_spec *kept = &ws->detrend_spec;
    int bandwidth = !slowscan_detrend_uses_bandwidth(spec->method) ||
                    kept->bandwidth == spec->bandwidth;
    return ws->detrend && kept->method == spec->method && kept->degree == spec->degree &&
           bandwidth && ws->detrend_dt == dt && ws->detrend_n == n;
}

/* A batch of series on one grid plans FFTW once per worker instead of once per series. */
int screen_detrend(screen_workspace *ws, const detrend_spec *spec, double dt, const double *x,
                   size_t n, double *trend, double *residual)
{
    if (ws && !same_detrend(ws, spec, dt, n)) {
        slowscan_detrend_workspace_free(ws->detrend);
        ws->detrend = slowscan_detrend_workspace_alloc(spec, dt, n);
        ws->detrend_spec = *spec;
        ws->detrend_dt = dt;
        ws->detrend_n = n;
    }
    /* No workspace (or none could be made: a bad spec, no memory): the one-shot call, which
     * also says which of the two it was. */
    if (!ws || !ws->detrend)
        return slowscan_detrend_apply(spec, dt, x, n, trend, residual);
    return slowscan_detrend_apply_with(ws->detrend, x, n, trend, residual);
}

static int detrend_series(screen_workspace *ws, const screen_config *cfg,
                          const detrend_spec *spec, screen_prepared *ps, screen_detail *d)
{
    int st = screen_detrend(ws, spec, ps->dt, ps->value, ps->n, ps->trend, ps->residual);
    if (st == SLOWSCAN_ENOMEM)
        return refuse(d, SCREEN_RULE_NO_MEMORY, SCREEN_OPTION_NONE, st);
    if (st != SLOWSCAN_OK) {
        d->count = ps->finite;
        int degree = st == SLOWSCAN_EINVAL && cfg->detrend.method == DETREND_POLY;
        return refuse(d, degree ? SCREEN_RULE_DETREND_DEGREE : SCREEN_RULE_DETREND_FAILED,
                      SCREEN_OPTION_DETREND, st);
    }
    flag_flat_residual(ps);
    if (!ps->constant)
        test_leakage(cfg, ps);
    return SLOWSCAN_OK;
}

int slowscan_screen_prepare(const screen_config *cfg, const screen_input *in,
                            screen_prepared *ps, screen_detail *d)
{
    return slowscan_screen_prepare_with(NULL, cfg, in, ps, d);
}

int slowscan_screen_prepare_with(screen_workspace *ws, const screen_config *given,
                                 const screen_input *in, screen_prepared *ps, screen_detail *d)
{
    memset(ps, 0, sizeof *ps);
    memset(d, 0, sizeof *d);
    screen_config on_axis = *given;
    const screen_config *cfg = &on_axis;
    ps->name = in->name;
    ps->source = in->source;
    ps->time_name = in->time_name;
    ps->n = in->n;
    ps->time = in->time;
    ps->axis = in->axis;
    ps->span = in->time[in->n - 1] - in->time[0];
    ps->dt = ps->span / (double)(in->n - 1);
    /* lengths in calendar units (30y) measured on this input's axis */
    int st = slowscan_screen_config_on_axis(&on_axis, &in->axis, d);
    if (st != SLOWSCAN_OK)
        return st;
    st = slowscan_screen_window(cfg, in->n, ps->span, &ps->window, d);
    detrend_spec spec = cfg->detrend;
    ps->bandwidth = NAN;
    if (st == SLOWSCAN_OK && slowscan_detrend_uses_bandwidth(spec.method)) {
        st = resolve_length(&cfg->bandwidth, SCREEN_OPTION_BANDWIDTH, ps->span, &spec.bandwidth, d);
        ps->bandwidth = spec.bandwidth;
    }
    if (st != SLOWSCAN_OK)
        return st;
    ps->value = malloc(3 * in->n * sizeof(double));
    if (!ps->value)
        return refuse(d, SCREEN_RULE_NO_MEMORY, SCREEN_OPTION_NONE, SLOWSCAN_ENOMEM);
    ps->trend = ps->value + in->n;
    ps->residual = ps->trend + in->n;
    ps->null_source = ps->residual;
    ps->null_range = in->null_range;
    ps->null_first = in->null_first;
    ps->null_count = in->null_count;
    memcpy(ps->value, in->values, in->n * sizeof(double));
    count_finite(ps);
    scale_series(ps);
    if (!isnan(cfg->deseason) && (st = deseason_series(cfg, ps, d)) != SLOWSCAN_OK)
        return st;
    if (ps->finite < 2 || ps->constant) {
        /* Nothing to detrend: the series' tests are insufficient. */
        for (size_t i = 0; i < in->n; i++)
            ps->trend[i] = ps->residual[i] = NAN;
        return SLOWSCAN_OK;
    }
    return detrend_series(ws, cfg, &spec, ps, d);
}

void slowscan_screen_prepared_free(screen_prepared *ps)
{
    free(ps->value);
    free(ps->owned);
    memset(ps, 0, sizeof *ps);
}
