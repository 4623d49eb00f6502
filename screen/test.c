/* The trend statistics of one prepared series — Kendall tau of each indicator path, the
 * drifting-AR(1) t-value — and their surrogate null: p-values and null quantiles. */
#include "screen_internal.h"
#include "slowscan/significance.h"
#include "slowscan/status.h"

#include <fftw3.h>
#include <gsl/gsl_statistics_double.h>
#include <math.h>
#include <stdlib.h>

/* Kendall tau on fewer values says little and its null distribution is coarse. */
enum { MIN_TREND_VALUES = 8 };

/* Kendall tau of one indicator path against time; NaN with a reason when it cannot be had. */
static double trend_of(screen_workspace *ws, const screen_prepared *ps, const double *values,
                       screen_reason *reason)
{
    double tau = NAN;
    size_t used = 0;
    if (ws->kendall_n < ps->n) {
        slowscan_kendall_free(ws->kendall);
        ws->kendall = slowscan_kendall_alloc(ps->n);
        ws->kendall_n = ws->kendall ? ps->n : 0;
    }
    if (!ws->kendall) {
        *reason = SCREEN_REASON_NO_MEMORY;
        return NAN;
    }
    int st = slowscan_kendall_tau_b(ws->kendall, ps->time, values, ps->n, &tau, &used);
    if (st == SLOWSCAN_ECONST)
        *reason = SCREEN_REASON_CONSTANT_PATH;
    else if (st != SLOWSCAN_OK || used < MIN_TREND_VALUES)
        *reason = SCREEN_REASON_FEW_VALUES;
    return used < MIN_TREND_VALUES ? NAN : tau;
}

/* The drift statistic of the observed residual: the t-value of a1. */
static double drift_of(screen_workspace *ws, const screen_config *cfg, const screen_prepared *ps,
                       screen_reason *reason, double *model)
{
    if (ws->drift_n != ps->n) {
        slowscan_ar1_drift_free(ws->drift);
        ws->drift = slowscan_ar1_drift_alloc(ps->n);
        ws->drift_n = ws->drift ? ps->n : 0;
    }
    ar1_drift_fit fit;
    if (ws->drift)
        slowscan_ar1_drift_set_noise_trend(ws->drift, cfg->noise_trend);
    int st = ws->drift ? slowscan_ar1_drift_estimate(ws->drift, ps->residual, ps->n, &fit) : SLOWSCAN_ENOMEM;
    if (st == SLOWSCAN_OK && isfinite(fit.t_a1)) {
        *model = fit.t_a1_model;
        return fit.t_a1;
    }
    *reason = st == SLOWSCAN_ESHORT ? SCREEN_REASON_FEW_PAIRS : SCREEN_REASON_NO_FIT;
    return NAN;
}

/* The replicates this series draws: [first, first + count), from its input's range when it
 * has one (a round of --surrogates auto), else [0, cfg->surrogates). */
static size_t null_first(const screen_config *cfg, const screen_prepared *ps)
{
    (void)cfg;
    return ps->null_range ? ps->null_first : 0;
}

static size_t null_count(const screen_config *cfg, const screen_prepared *ps)
{
    return ps->null_range ? ps->null_count : cfg->surrogates;
}

/* Everything sized by the series length is remade only when the length changes. */
static int ready_null(screen_workspace *ws, const screen_config *cfg, size_t n, size_t tests,
                      size_t first, size_t m)
{
    if (ws->null_n != n || ws->null_kinds < cfg->nindicators) {
        slowscan_surrogate_plan_free(ws->plan);
        for (size_t k = 0; k < ws->threads; k++) {
            slowscan_null_trend_free(ws->null_ws[k]);
            ws->null_ws[k] = NULL;
        }
        ws->null_n = ws->null_kinds = 0;
        ws->plan = slowscan_surrogate_plan_alloc(n, FFTW_ESTIMATE);
        int missing = !ws->plan;
        for (size_t k = 0; k < ws->threads; k++)
            missing |= !(ws->null_ws[k] = slowscan_null_trend_alloc(n, cfg->nindicators));
        if (missing)
            return SLOWSCAN_ENOMEM;
        ws->null_n = n;
        ws->null_kinds = cfg->nindicators;
    }
    size_t stride = first + m; /* replicate j sits at column j, as when drawn from 0 */
    if (ws->null_cap < tests * stride) {
        free(ws->null);
        ws->null_cap = (ws->null = malloc(tests * stride * sizeof *ws->null)) ? tests * stride : 0;
    }
    if (ws->sorted_cap < m) {
        free(ws->sorted);
        ws->sorted_cap = (ws->sorted = malloc(m * sizeof *ws->sorted)) ? m : 0;
    }
    return ws->null && ws->sorted ? SLOWSCAN_OK : SLOWSCAN_ENOMEM;
}

/* Test j's alternative: the setting, else the indicator's direction; the drift test looks for
 * a growing memory (a1 > 0). */
static significance_alternative alternative_of(const screen_config *cfg, size_t j)
{
    if (cfg->alternative >= 0)
        return (significance_alternative)cfg->alternative;
    if (j >= cfg->nindicators || slowscan_indicator_direction(cfg->indicators[j]) > 0)
        return ALTERNATIVE_INCREASING;
    return ALTERNATIVE_TWO_SIDED;
}

int slowscan_screen_test_alternative(const screen_config *cfg, size_t j)
{
    return (int)alternative_of(cfg, j);
}

static int by_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

void slowscan_screen_null_quantiles(const double *null, size_t m, double *sorted, screen_test *t)
{
    size_t k = 0;
    for (size_t j = 0; j < m; j++)
        if (isfinite(null[j]))
            sorted[k++] = null[j];
    t->null_used = k;
    qsort(sorted, k, sizeof *sorted, by_double);
    for (int q = 0; q < SCREEN_QUANTILES && k > 0; q++)
        t->quantile[q] = gsl_stats_quantile_from_sorted_data(sorted, 1, k,
                                                              screen_quantile_levels[q]);
    for (int q = 0; q < SCREEN_TAIL_QUANTILES && k > 0; q++)
        t->quantile_tail[q] = gsl_stats_quantile_from_sorted_data(sorted, 1, k,
                                                                  screen_tail_levels[q]);
}

/* Quantiles of the finite null values. */
static void null_quantiles(screen_workspace *ws, const double *null, size_t m, screen_test *t)
{
    slowscan_screen_null_quantiles(null, m, ws->sorted, t);
}

static void warn(screen_result *out, screen_warning_kind kind, size_t count, size_t total,
                 int status)
{
    if (out->nwarnings < SCREEN_MAX_WARNINGS)
        out->warnings[out->nwarnings++] = (screen_warning){kind, count, total, status};
}

/* Draws the null of every test over the surrogates of ps->null_source. */
static int draw_null(screen_workspace *ws, const screen_config *cfg, const screen_prepared *ps,
                     screen_result *out, size_t tests)
{
    rolling_spec spec;
    screen_detail ignored;
    int st = screen_rolling_ready(ws, cfg, ps, &spec, &ignored);
    if (st != SLOWSCAN_OK)
        return st; /* the paths were made with the same spec: this does not happen */
    size_t first = null_first(cfg, ps), m = null_count(cfg, ps);
    st = ready_null(ws, cfg, ps->n, tests, first, m);
    int need_level = 0;
    for (size_t j = 0; j < cfg->nindicators; j++)
        need_level |= slowscan_indicator_needs_level(cfg->indicators[j]);
    null_trend_job job = {&spec, cfg->indicators, cfg->nindicators, ps->time,
                          need_level ? ps->trend : NULL, cfg->seed, ps->name,
                          cfg->null_name ? cfg->null_name : slowscan_surrogate_name(cfg->null_kind),
                          cfg->drift_test ? 1 + cfg->noise_trend : 0};
    screen_null_task task = {.plan = ws->plan, .kind = cfg->null_kind,
                             .options = &cfg->null_options, .residual = ps->null_source,
                             .job = &job, .first = first, .m = m, .stride = first + m,
                             .null = ws->null, .progress = ws->progress,
                             .progress_context = ws->progress_context, .series = ps->name};
    size_t threads = cfg->threads < ws->threads ? cfg->threads : ws->threads;
    if (st == SLOWSCAN_OK)
        st = screen_null_parallel(&task, ws->null_ws, threads ? threads : 1);
    if (task.unconverged)
        warn(out, SCREEN_WARN_IAAFT_UNCONVERGED, task.unconverged, m, 0);
    return st;
}

/* The tail estimate of test j (tail.h): its null and statistic turned so that larger is
 * more extreme, as the test's alternative counts "at least as extreme". With it, p_value is
 * the estimate where one is used. */
static int tail_estimate(screen_workspace *ws, const screen_config *cfg, size_t j,
                         const double *null, size_t m, screen_test *t)
{
    significance_alternative alt = alternative_of(cfg, j);
    double sign = alt == ALTERNATIVE_DECREASING ? -1.0 : 1.0;
    for (size_t k = 0; k < m; k++)
        ws->sorted[k] = alt == ALTERNATIVE_TWO_SIDED ? fabs(null[k]) : sign * null[k];
    double observed = alt == ALTERNATIVE_TWO_SIDED ? fabs(t->statistic) : sign * t->statistic;
    int st = slowscan_tail_estimate(&cfg->tail, ws->sorted, m, observed, t->p_value, &t->tail);
    t->p_value = t->tail.p;
    return st;
}

/* The null distribution of every test over the surrogates, and the p-values. */
static int test_null(screen_workspace *ws, const screen_config *cfg, const screen_prepared *ps,
                     screen_result *out, screen_detail *d)
{
    size_t block = cfg->null_options.block_length, tests = out->ntests;
    size_t first = null_first(cfg, ps), m = null_count(cfg, ps);
    if (cfg->null_kind == SURROGATE_BLOCK && block > ps->n / 2) {
        /* With blocks longer than half the record there are too few distinct starts for a
         * null distribution (at L = n every replicate is the series itself). */
        *d = (screen_detail){SCREEN_RULE_BLOCK_LENGTH, SCREEN_OPTION_NULL, SLOWSCAN_EINVAL, 0,
                             block, ps->n, 0, 0, 0};
        return SLOWSCAN_EINVAL;
    }
    int st = draw_null(ws, cfg, ps, out, tests);
    if (st == SLOWSCAN_ESHORT || st == SLOWSCAN_ECONST) {
        /* This series cannot carry a null (too few samples, or none varying): its tests are
         * insufficient, the run goes on. */
        warn(out, SCREEN_WARN_NO_SURROGATES, 0, m, st);
        for (size_t j = 0; j < tests; j++)
            out->tests[j].reason = SCREEN_REASON_NO_SURROGATES;
        return SLOWSCAN_OK;
    }
    if (st != SLOWSCAN_OK) {
        int ar1 = st == SLOWSCAN_ENUMERIC && cfg->null_kind == SURROGATE_AR1;
        *d = (screen_detail){ar1 ? SCREEN_RULE_AR1_NONSTATIONARY : SCREEN_RULE_NULL_FAILED,
                             SCREEN_OPTION_NULL, st, 0, 0, 0, 0, 0, 0};
        return st;
    }
    ws->null_tests = tests;
    ws->null_stride = first + m;
    ws->null_first = first;
    for (size_t j = 0; j < tests; j++) {
        screen_test *t = &out->tests[j];
        const double *null = ws->null + j * (first + m) + first;
        if (!isnan(t->statistic))
            t->p_value = slowscan_significance_p_value(t->statistic, null, m,
                                              alternative_of(cfg, j), &t->null_used);
        int tail_st = cfg->tail.method != TAIL_OFF && !isnan(t->p_value)
                          ? tail_estimate(ws, cfg, j, null, m, t) : SLOWSCAN_OK;
        st = st != SLOWSCAN_OK ? st : tail_st; /* only options out of their domain fail */
        null_quantiles(ws, null, m, t);
    }
    return st;
}

int slowscan_screen_test_series(screen_workspace *ws, const screen_config *cfg, const screen_prepared *ps,
                       double *const *paths, screen_result *out, screen_detail *d)
{
    screen_describe(cfg, ps, out);
    out->ntests = slowscan_screen_test_count(cfg);
    ws->null_tests = 0;
    int any = 0;
    for (size_t j = 0; j < out->ntests; j++) {
        screen_test *t = &out->tests[j];
        *t = (screen_test){.kind = slowscan_screen_test_of(cfg, j), .tau = NAN, .statistic = NAN,
                           .statistic_model = NAN, .p_value = NAN,
                           .surrogates = null_count(cfg, ps),
                           .quantile = {NAN, NAN, NAN, NAN, NAN},
                           .quantile_tail = {NAN, NAN},
                           .reason = SCREEN_REASON_NO_VARIATION,
                           .tail = {.p = NAN, .p_surrogates = NAN, .xi = NAN, .sigma = NAN,
                                    .threshold = NAN, .ad = NAN, .ad_critical = NAN,
                                    .ad_p = NAN, .p_point = NAN, .p_upper = NAN,
                                    .p_predictive = NAN, .p_exponential = NAN}};
        if (!ps->constant) {
            if (j < cfg->nindicators)
                t->tau = t->statistic = trend_of(ws, ps, paths[j], &t->reason);
            else
                t->statistic = drift_of(ws, cfg, ps, &t->reason, &t->statistic_model);
        }
        if (!isnan(t->statistic))
            t->reason = SCREEN_REASON_NONE;
        any |= !isnan(t->statistic);
    }
    if (null_count(cfg, ps) > 0 && any)
        return test_null(ws, cfg, ps, out, d);
    return SLOWSCAN_OK;
}

const double *slowscan_screen_workspace_null(const screen_workspace *ws, size_t j)
{
    return j < ws->null_tests ? ws->null + j * ws->null_stride + ws->null_first : NULL;
}
