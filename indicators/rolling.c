/* Rolling indicators: the moment indicators in one pass of the shared window accumulator
 * (window_sums.c), each a small closed-form function of the window's sums, so the cost per
 * step is O(1) whatever W; then the per-window ones (window_plan.c) on their step. */
#include "slowscan/indicators.h"
#include "slowscan/status.h"

#include "per_window.h"
#include "window_sums.h"

#include <math.h>

/* A level mean smaller than this fraction of the level's magnitude is round-off. */
#define LEVEL_RESOLUTION 1e-14

/* sum (x - m)^3 and sum (x - m)^4 from the sums about c, with d = m - c (binomial
 * expansion of ((x - c) - d)^k). */
static double central3(const window_sums *s, double d)
{
    double n = (double)s->n;
    return s->s3 - 3.0 * d * s->s2 + 3.0 * d * d * s->s1 - n * d * d * d;
}

static double central4(const window_sums *s, double d)
{
    double n = (double)s->n, d2 = d * d;
    return s->s4 - 4.0 * d * s->s3 + 6.0 * d2 * s->s2 - 4.0 * d2 * d * s->s1 + n * d2 * d2;
}

/* Sample variance (n-1). A window whose spread is below round-off is constant: exactly 0. */
static double ind_variance(const window_sums *s, const rolling_spec *spec)
{
    (void)spec;
    if (s->n < 2)
        return NAN;
    return wsums_has_spread(s) ? wsums_central2(s) / (double)(s->n - 1) : 0.0;
}

static double ind_sd(const window_sums *s, const rolling_spec *spec)
{
    return sqrt(ind_variance(s, spec));
}

/* sd of the residual over |mean of the level|, both over the window's present samples. */
static double ind_cv(const window_sums *s, const rolling_spec *spec)
{
    if (s->nl == 0)
        return NAN;
    double mean = s->cl + s->sl / (double)s->nl;
    if (fabs(mean) <= LEVEL_RESOLUTION * fabs(s->cl))
        return NAN;
    return ind_sd(s, spec) / fabs(mean);
}

/* GSL's gsl_stats_skew: (1/N) sum ((x-m)/sd)^3 with sd from the (n-1) variance. */
static double ind_skewness(const window_sums *s, const rolling_spec *spec)
{
    (void)spec;
    if (!wsums_has_spread(s))
        return NAN;
    double n = (double)s->n, sd = sqrt(wsums_central2(s) / (n - 1.0));
    return central3(s, wsums_offset(s)) / n / (sd * sd * sd);
}

/* GSL's gsl_stats_kurtosis: (1/N) sum ((x-m)/sd)^4 - 3, sd as for the skewness. */
static double ind_kurtosis(const window_sums *s, const rolling_spec *spec)
{
    (void)spec;
    if (!wsums_has_spread(s))
        return NAN;
    double n = (double)s->n, var = wsums_central2(s) / (n - 1.0);
    return central4(s, wsums_offset(s)) / n / (var * var) - 3.0;
}

/* Box-Jenkins: sum over pairs (h - d)(tl - d) / sum over all present samples (x - m)^2,
 * with d = m - c, so both use the one window mean m. */
static double ind_lag1(const window_sums *s, const rolling_spec *spec)
{
    (void)spec;
    if (s->np == 0 || !wsums_has_spread(s))
        return NAN;
    double d = wsums_offset(s);
    double num = s->pht - d * (s->ph + s->pt) + (double)s->np * d * d;
    return num / wsums_central2(s);
}

/* OLS slope of x_{t+1} on x_t with intercept: S_{h,tl} / S_{h,h} over the pairs. */
static double ind_ar1(const window_sums *s, const rolling_spec *spec)
{
    (void)spec;
    if (!wsums_has_pair_spread(s))
        return NAN;
    return wsums_pair_sht(s) / wsums_pair_shh(s);
}

/* RECOVERY_LOG_AR1: lambda = ln(ar1)/dt, defined only for ar1 > 0.
 * RECOVERY_INCREMENTS: OLS slope of y = tl - h on h. Centring y over the pairs gives
 * S_{h,y} = S_{h,tl} - S_{h,h}, so the slope is ar1 - 1 exactly in exact arithmetic; it is
 * the linearised (small dt) recovery rate and stays defined when ar1 <= 0. */
static double ind_recovery(const window_sums *s, const rolling_spec *spec)
{
    if (!wsums_has_pair_spread(s))
        return NAN;
    double shh = wsums_pair_shh(s), sht = wsums_pair_sht(s);
    if (spec->recovery == RECOVERY_INCREMENTS)
        return (sht - shh) / shh / spec->dt;
    double ar1 = sht / shh;
    return ar1 > 0.0 ? log(ar1) / spec->dt : NAN;
}

/* The table of the moment indicators. A switch rather than an array of pointers: it runs
 * once per window and indicator of every surrogate, and direct calls are inlined where an
 * indirect call per window would cost as much as the indicator itself. */
static inline double evaluate(indicator_kind kind, const window_sums *s, const rolling_spec *spec)
{
    switch (kind) {
    case INDICATOR_VARIANCE: return ind_variance(s, spec);
    case INDICATOR_SD: return ind_sd(s, spec);
    case INDICATOR_CV: return ind_cv(s, spec);
    case INDICATOR_SKEWNESS: return ind_skewness(s, spec);
    case INDICATOR_KURTOSIS: return ind_kurtosis(s, spec);
    case INDICATOR_LAG1: return ind_lag1(s, spec);
    case INDICATOR_AR1: return ind_ar1(s, spec);
    case INDICATOR_RECOVERY: return ind_recovery(s, spec);
    default: return NAN; /* per-window indicators: window_plan.c */
    }
}

/* A per-window indicator needs a plan of this W and dt, a W it is defined for and, for
 * spectral_exponent, enough frequencies in the band. */
static int per_window_ready(const rolling_spec *spec, indicator_kind kind)
{
    const rolling_plan *plan = spec->plan;
    if (!plan || plan->window != spec->window || plan->dt != spec->dt)
        return 0;
    if (spec->window < slowscan_indicator_min_window(kind))
        return 0;
    if (kind == INDICATOR_DFA)
        return plan->dfa.count > 0;
    return kind != INDICATOR_SPECTRAL_EXPONENT || plan->band_count >= SPECTRAL_MIN_FREQUENCIES;
}

static int validate(const rolling_spec *spec, const double *residual, const double *level,
                    size_t n, const indicator_kind *kinds, size_t nkinds, double *const *out)
{
    if (!spec || !residual || (nkinds && (!kinds || !out)))
        return SLOWSCAN_EINVAL;
    if (spec->window < 3 || spec->window > n)
        return SLOWSCAN_EINVAL;
    if (!(spec->min_coverage > 0.0 && spec->min_coverage <= 1.0))
        return SLOWSCAN_EINVAL;
    if (!(spec->dt > 0.0) || !isfinite(spec->dt))
        return SLOWSCAN_EINVAL;
    if (spec->recovery != RECOVERY_LOG_AR1 && spec->recovery != RECOVERY_INCREMENTS)
        return SLOWSCAN_EINVAL;
    for (size_t k = 0; k < nkinds; k++) {
        if ((unsigned)kinds[k] >= (unsigned)INDICATOR_COUNT || !out[k])
            return SLOWSCAN_EINVAL;
        if (slowscan_indicator_needs_level(kinds[k]) && !level)
            return SLOWSCAN_EINVAL;
        if (slowscan_indicator_per_window(kinds[k]) && !per_window_ready(spec, kinds[k]))
            return SLOWSCAN_EINVAL;
    }
    return SLOWSCAN_OK;
}

/* ceil(min_coverage * W), computed so that a product that is an integer in exact arithmetic
 * (0.8 * 10) is not pushed to the next integer by its rounding. */
static size_t coverage_needed(const rolling_spec *spec)
{
    double need = ceil(spec->min_coverage * (double)spec->window * (1.0 - 1e-12));
    return need < 1.0 ? 1 : (size_t)need;
}

/* The moment indicators among kinds at every window; the per-window ones are left alone. */
static void moment_pass(const rolling_spec *spec, const double *residual, const double *level,
                        size_t n, const indicator_kind *kinds, size_t nkinds, double *const *out)
{
    int high = 0, pairs = 0, uses_level = 0;
    size_t moments[INDICATOR_COUNT], count = 0; /* which of kinds stream: tested once, not per step */
    for (size_t k = 0; k < nkinds; k++) {
        if (!slowscan_indicator_per_window(kinds[k]))
            moments[count++] = k;
        high |= kinds[k] == INDICATOR_SKEWNESS || kinds[k] == INDICATOR_KURTOSIS;
        pairs |= kinds[k] == INDICATOR_LAG1 || kinds[k] == INDICATOR_AR1 ||
                 kinds[k] == INDICATOR_RECOVERY;
        uses_level |= slowscan_indicator_needs_level(kinds[k]);
    }
    if (count == 0)
        return;
    size_t W = spec->window, need = coverage_needed(spec);
    window_sums s;
    wsums_init(&s, residual, uses_level ? level : NULL, n, W, high, pairs);
    for (size_t i = 0; i + 1 < W; i++)
        for (size_t m = 0; m < count; m++)
            out[moments[m]][i] = NAN;
    for (size_t i = W - 1; i < n; i++) {
        /* The first full window starts from exact sums (no need to stream the samples
         * before it); later ones slide and follow the re-centring policy. */
        if (i + 1 == W) {
            s.end = i;
            wsums_refresh(&s);
        } else {
            wsums_push(&s, i);
            wsums_maintain(&s);
        }
        int covered = s.n >= need;
        for (size_t m = 0; m < count; m++)
            out[moments[m]][i] = covered ? evaluate(kinds[moments[m]], &s, spec) : NAN;
    }
}

/* A moment indicator on a step above 1 (--step): the windows off the step become NaN. The
 * streaming pass costs O(1) per window, so computing them all and dropping some is cheaper
 * than restarting the sums at each evaluated window. */
static void thin_moments(const rolling_spec *spec, size_t n, const indicator_kind *kinds,
                         size_t nkinds, double *const *out)
{
    for (size_t k = 0; k < nkinds; k++) {
        size_t step = slowscan_rolling_step(spec, kinds[k], n);
        if (slowscan_indicator_per_window(kinds[k]) || step == 1)
            continue;
        for (size_t i = spec->window - 1; i < n; i++)
            if (!rolling_evaluated(step, n, i))
                out[k][i] = NAN;
    }
}

int slowscan_rolling_compute_with(const rolling_spec *spec, rolling_scratch *scratch,
                         const double *residual, const double *level, size_t n,
                         const indicator_kind *kinds, size_t nkinds, double *const *out)
{
    int status = validate(spec, residual, level, n, kinds, nkinds, out);
    if (status != SLOWSCAN_OK)
        return status;
    moment_pass(spec, residual, level, n, kinds, nkinds, out);
    thin_moments(spec, n, kinds, nkinds, out);
    return rolling_per_window_pass(spec, scratch, residual, n, kinds, nkinds, out);
}

int slowscan_rolling_compute(const rolling_spec *spec, const double *residual, const double *level,
                    size_t n, const indicator_kind *kinds, size_t nkinds, double *const *out)
{
    int per_window = 0;
    for (size_t k = 0; k < nkinds && kinds; k++)
        per_window |= slowscan_indicator_per_window(kinds[k]);
    if (!per_window || !spec)
        return slowscan_rolling_compute_with(spec, NULL, residual, level, n, kinds, nkinds, out);
    rolling_scratch *scratch = slowscan_rolling_scratch_alloc(spec->window);
    if (!scratch)
        return SLOWSCAN_ENOMEM;
    int status = slowscan_rolling_compute_with(spec, scratch, residual, level, n, kinds, nkinds, out);
    slowscan_rolling_scratch_free(scratch);
    return status;
}
