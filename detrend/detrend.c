/* slowscan detrend — method names, argument checks and the dispatch of detrend_apply.
 *
 * The per-method files compute a trend only; everything every method shares (validation,
 * the finite-sample count, the residual rule "NaN where x is missing") lives here so that it
 * cannot drift between methods. */
#include "slowscan/detrend.h"

#include "detrend_internal.h"
#include "slowscan/status.h"

#include <math.h>
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

int detrend_parse_method(const char *text, detrend_spec *spec)
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

const char *detrend_method_name(detrend_method method)
{
    return method_valid(method) ? method_names[method] : "unknown";
}

int detrend_uses_bandwidth(detrend_method method)
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
    if (detrend_uses_bandwidth(spec->method) &&
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

static int compute_trend(const detrend_spec *spec, double dt, const double *x, size_t n,
                         double *trend)
{
    switch (spec->method) {
    case DETREND_GAUSSIAN: return detrend_gaussian_trend(spec->bandwidth, dt, x, n, trend);
    case DETREND_GAUSSIAN_LINEAR:
        return detrend_gaussian_linear_trend(spec->bandwidth, dt, x, n, trend);
    case DETREND_MOVING: return detrend_moving_trend(spec->bandwidth, dt, x, n, trend);
    case DETREND_LOESS: return detrend_loess_trend(spec->bandwidth, dt, x, n, trend);
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

/* The trend goes to a private buffer first so that `trend` or `residual` may alias `x`
 * (in-place detrending): the residual is formed element by element before `trend` is
 * written. */
int detrend_apply(const detrend_spec *spec, double dt, const double *x, size_t n,
                  double *trend, double *residual)
{
    int status = check_spec(spec, dt);
    if (status != SLOWSCAN_OK)
        return status;
    if (!x && n > 0)
        return SLOWSCAN_EINVAL;
    size_t finite = n ? count_finite(x, n) : 0;
    if (finite < 2)
        return SLOWSCAN_ESHORT;
    if (spec->method == DETREND_POLY && (size_t)spec->degree >= finite)
        return SLOWSCAN_EINVAL;
    double *work = malloc(n * sizeof *work);
    if (!work)
        return SLOWSCAN_ENOMEM;
    status = compute_trend(spec, dt, x, n, work);
    if (status == SLOWSCAN_OK) {
        if (residual)
            for (size_t i = 0; i < n; i++)
                residual[i] = isfinite(x[i]) ? x[i] - work[i] : NAN;
        if (trend)
            memcpy(trend, work, n * sizeof *work);
    }
    free(work);
    return status;
}
