/* slowscan detrend — method names, argument checks, the detrend workspace and the dispatch
 * of slowscan_detrend_apply_with (slowscan_detrend_apply is alloc + apply + free).
 *
 * The per-method files compute a trend only, from what the workspace keeps for them;
 * everything every method shares (validation, the finite-sample count, the residual rule
 * "NaN where x is missing") lives here so that it cannot drift between methods. */
#include "slowscan/detrend.h"

#include "detrend_internal.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#define DETREND_MAX_DEGREE 12

static const char *const method_names[] = {
    [DETREND_GAUSSIAN] = "gaussian", [DETREND_GAUSSIAN_LINEAR] = "gaussian-linear",
    [DETREND_MOVING] = "moving",
    [DETREND_LOESS] = "loess",       [DETREND_LINEAR] = "linear",
    [DETREND_POLY] = "poly",         [DETREND_DIFFERENCE] = "difference",
    [DETREND_NONE] = "none",
};

static int method_valid(detrend_method method)
{
    return (int)method >= 0 && (int)method <= (int)DETREND_NONE;
}

/* "poly:K" with K written as decimal digits only (no sign, no space, nothing trailing), so a
 * typo such as "poly:3x" or "poly:" is an error rather than a silently different degree. */
static int parse_degree(const char *digits, int *degree)
{
    int value = 0;
    if (*digits == '\0')
        return SLOWSCAN_EINVAL;
    for (const char *p = digits; *p; p++) {
        if (*p < '0' || *p > '9')
            return SLOWSCAN_EINVAL;
        value = value * 10 + (*p - '0');
        if (value > DETREND_MAX_DEGREE) /* also stops the accumulation from overflowing */
            return SLOWSCAN_EINVAL;
    }
    if (value < 1)
        return SLOWSCAN_EINVAL;
    *degree = value;
    return SLOWSCAN_OK;
}

int slowscan_detrend_parse_method(const char *text, detrend_spec *spec)
{
    if (!text || !spec)
        return SLOWSCAN_EINVAL;
    if (strncmp(text, "poly:", 5) == 0) {
        int degree;
        if (parse_degree(text + 5, &degree) != SLOWSCAN_OK)
            return SLOWSCAN_EINVAL;
        spec->method = DETREND_POLY;
        spec->degree = degree;
        return SLOWSCAN_OK;
    }
    for (int m = 0; m <= (int)DETREND_NONE; m++) {
        /* bare "poly" has no degree and is rejected: the caller must say which polynomial */
        if (m == DETREND_POLY || strcmp(text, method_names[m]) != 0)
            continue;
        spec->method = (detrend_method)m;
        spec->degree = m == DETREND_LINEAR ? 1 : 0;
        return SLOWSCAN_OK;
    }
    return SLOWSCAN_EINVAL;
}

const char *slowscan_detrend_method_name(detrend_method method)
{
    return method_valid(method) ? method_names[method] : "unknown";
}

int slowscan_detrend_uses_bandwidth(detrend_method method)
{
    return method == DETREND_GAUSSIAN || method == DETREND_GAUSSIAN_LINEAR ||
           method == DETREND_MOVING || method == DETREND_LOESS;
}

double detrend_finite_mean(const double *x, size_t n)
{
    double sum = 0.0;
    size_t count = 0;
    for (size_t i = 0; i < n; i++) {
        if (isfinite(x[i])) {
            sum += x[i];
            count++;
        }
    }
    return count ? sum / (double)count : NAN;
}

size_t detrend_clamp_count(double count, size_t cap)
{
    if (!(count > 0.0))
        return 0;
    return count >= (double)cap ? cap : (size_t)count;
}

static size_t count_finite(const double *x, size_t n)
{
    size_t count = 0;
    for (size_t i = 0; i < n; i++)
        count += isfinite(x[i]) ? 1 : 0;
    return count;
}

/* Checks that do not need the data. */
static int check_spec(const detrend_spec *spec, double dt)
{
    if (!spec || !method_valid(spec->method))
        return SLOWSCAN_EINVAL;
    if (!(dt > 0.0) || !isfinite(dt))
        return SLOWSCAN_EINVAL;
    if (slowscan_detrend_uses_bandwidth(spec->method) &&
        (!(spec->bandwidth > 0.0) || !isfinite(spec->bandwidth)))
        return SLOWSCAN_EINVAL;
    if (spec->method == DETREND_POLY &&
        (spec->degree < 1 || spec->degree > DETREND_MAX_DEGREE))
        return SLOWSCAN_EINVAL;
    return SLOWSCAN_OK;
}

static void difference_trend(const double *x, size_t n, double *trend)
{
    trend[0] = NAN; /* x_{-1} does not exist, so residual_0 is NaN as the header states */
    for (size_t i = 1; i < n; i++)
        trend[i] = isfinite(x[i - 1]) ? x[i - 1] : NAN;
}

/* Holds what each method keeps between calls; NULL members for methods that keep nothing
 * (moving, linear, poly, difference, none compute from scratch, as they are cheap). */
struct detrend_workspace {
    detrend_spec spec;
    double dt;
    size_t n;
    double *work; /* the trend before it is copied out (lets trend or residual alias x) */
    detrend_gauss_ws *gauss;
    detrend_loess_ws *loess;
};

void slowscan_detrend_workspace_free(detrend_workspace *ws)
{
    if (!ws)
        return;
    detrend_gauss_free(ws->gauss);
    detrend_loess_free(ws->loess);
    free(ws->work);
    free(ws);
}

/* slowscan_detrend_workspace_alloc with the reason for a NULL in *status (for slowscan_detrend_apply). */
static detrend_workspace *workspace_make(const detrend_spec *spec, double dt, size_t n,
                                         int *status)
{
    *status = check_spec(spec, dt);
    if (*status != SLOWSCAN_OK || n == 0) {
        *status = SLOWSCAN_EINVAL;
        return NULL;
    }
    *status = SLOWSCAN_ENOMEM;
    if (n > SIZE_MAX / sizeof(double))
        return NULL;
    detrend_workspace *ws = malloc(sizeof *ws);
    double *work = malloc(n * sizeof *work);
    if (!ws || !work) {
        free(ws);
        free(work);
        return NULL;
    }
    *ws = (detrend_workspace){.spec = *spec, .dt = dt, .n = n, .work = work};
    *status = SLOWSCAN_OK;
    if (spec->method == DETREND_GAUSSIAN || spec->method == DETREND_GAUSSIAN_LINEAR)
        ws->gauss = detrend_gauss_alloc(spec->method == DETREND_GAUSSIAN_LINEAR,
                                        spec->bandwidth, dt, n, status);
    else if (spec->method == DETREND_LOESS)
        ws->loess = detrend_loess_alloc(spec->bandwidth, dt, n, status);
    if (*status != SLOWSCAN_OK) {
        slowscan_detrend_workspace_free(ws);
        return NULL;
    }
    return ws;
}

detrend_workspace *slowscan_detrend_workspace_alloc(const detrend_spec *spec, double dt, size_t n)
{
    int status;
    return workspace_make(spec, dt, n, &status);
}

static int compute_trend(detrend_workspace *ws, const double *x, size_t n, double *trend)
{
    const detrend_spec *spec = &ws->spec;
    switch (spec->method) {
    case DETREND_GAUSSIAN:
    case DETREND_GAUSSIAN_LINEAR: return detrend_gauss_trend(ws->gauss, x, n, trend);
    case DETREND_MOVING: return detrend_moving_trend(spec->bandwidth, ws->dt, x, n, trend);
    case DETREND_LOESS:
        return detrend_loess_trend(ws->loess, spec->bandwidth, ws->dt, x, n, trend);
    case DETREND_LINEAR: return detrend_poly_trend(1, x, n, trend);
    case DETREND_POLY: return detrend_poly_trend(spec->degree, x, n, trend);
    case DETREND_DIFFERENCE: difference_trend(x, n, trend); return SLOWSCAN_OK;
    case DETREND_NONE:
        for (size_t i = 0; i < n; i++)
            trend[i] = 0.0;
        return SLOWSCAN_OK;
    }
    return SLOWSCAN_EINVAL;
}

/* Checks that need the data, in the order slowscan_detrend_apply has always made them. */
static int check_data(const detrend_spec *spec, const double *x, size_t n)
{
    if (!x && n > 0)
        return SLOWSCAN_EINVAL;
    size_t finite = n ? count_finite(x, n) : 0;
    if (finite < 2)
        return SLOWSCAN_ESHORT;
    if (spec->method == DETREND_POLY && (size_t)spec->degree >= finite)
        return SLOWSCAN_EINVAL;
    return SLOWSCAN_OK;
}

/* The trend goes to the workspace's buffer first so that `trend` or `residual` may alias `x`
 * (in-place detrending): the residual is formed element by element before `trend` is
 * written. */
int slowscan_detrend_apply_with(detrend_workspace *ws, const double *x, size_t n, double *trend,
                       double *residual)
{
    if (!ws || n > ws->n)
        return SLOWSCAN_EINVAL;
    int status = check_data(&ws->spec, x, n);
    if (status == SLOWSCAN_OK)
        status = compute_trend(ws, x, n, ws->work);
    if (status != SLOWSCAN_OK)
        return status;
    if (residual)
        for (size_t i = 0; i < n; i++)
            residual[i] = isfinite(x[i]) ? x[i] - ws->work[i] : NAN;
    if (trend)
        memcpy(trend, ws->work, n * sizeof *ws->work);
    return SLOWSCAN_OK;
}

/* The data are checked before the workspace is made so that the status codes stay those of
 * the checks (ESHORT for a series too short, not a failed allocation). */
int slowscan_detrend_apply(const detrend_spec *spec, double dt, const double *x, size_t n,
                  double *trend, double *residual)
{
    int status = check_spec(spec, dt);
    if (status == SLOWSCAN_OK)
        status = check_data(spec, x, n);
    if (status != SLOWSCAN_OK)
        return status;
    detrend_workspace *ws = workspace_make(spec, dt, n, &status);
    if (ws)
        status = slowscan_detrend_apply_with(ws, x, n, trend, residual);
    slowscan_detrend_workspace_free(ws);
    return status;
}
