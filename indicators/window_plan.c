/* The per-window indicators' plan (one per window length, shared read-only by threads), their
 * scratch (one per thread), their step, and the pass that evaluates them window by window. */
#include "per_window.h"
#include "slowscan/status.h"

#include <limits.h>
#include <math.h>
#include <stdlib.h>

void slowscan_rolling_plan_free(rolling_plan *plan)
{
    if (!plan)
        return;
    if (plan->r2c)
        fftw_destroy_plan(plan->r2c);
    spectral_design_free(plan);
    dfa_design_free(&plan->dfa);
    free(plan);
}

int slowscan_rolling_plan_matches(const rolling_plan *plan, const rolling_spec *spec)
{
    return plan && spec && plan->window == spec->window && plan->dt == spec->dt &&
           plan->band_lo == spec->band_lo && plan->band_hi == spec->band_hi;
}

static fftw_plan make_r2c(size_t W)
{
    double *real = fftw_alloc_real(W);
    fftw_complex *spectrum = fftw_alloc_complex(W / 2 + 1);
    /* FFTW_ESTIMATE: planning does not touch the arrays, and the plan is executed on the
     * scratch arrays of every thread (same alignment: all from fftw_alloc). */
    fftw_plan p = real && spectrum ? fftw_plan_dft_r2c_1d((int)W, real, spectrum, FFTW_ESTIMATE)
                                   : NULL;
    fftw_free(real);
    fftw_free(spectrum);
    return p;
}

int slowscan_rolling_plan_alloc(const rolling_spec *spec, rolling_plan **out)
{
    if (!spec || !out)
        return SLOWSCAN_EINVAL;
    *out = NULL;
    if (spec->window < 3 || spec->window > (size_t)INT_MAX || !(spec->dt > 0.0) ||
        !isfinite(spec->dt))
        return SLOWSCAN_EINVAL;
    rolling_plan *plan = calloc(1, sizeof *plan);
    if (!plan)
        return SLOWSCAN_ENOMEM;
    plan->window = spec->window;
    plan->dt = spec->dt;
    plan->band_lo = spec->band_lo;
    plan->band_hi = spec->band_hi;
    int st = spectral_design_init(plan, spec->band_lo, spec->band_hi);
    if (st == SLOWSCAN_OK)
        st = dfa_design_init(&plan->dfa, spec->window);
    if (st == SLOWSCAN_OK && !(plan->r2c = make_r2c(spec->window)))
        st = SLOWSCAN_ENOMEM;
    if (st != SLOWSCAN_OK) {
        slowscan_rolling_plan_free(plan);
        return st;
    }
    *out = plan;
    return SLOWSCAN_OK;
}

void slowscan_rolling_scratch_free(rolling_scratch *s)
{
    if (!s)
        return;
    fftw_free(s->real);
    fftw_free(s->spectrum);
    free(s->power);
    free(s->profile);
    free(s);
}

rolling_scratch *slowscan_rolling_scratch_alloc(size_t max_window)
{
    rolling_scratch *s = calloc(1, sizeof *s);
    if (!s || max_window == 0) {
        free(s);
        return NULL;
    }
    s->capacity = max_window;
    s->real = fftw_alloc_real(max_window);
    s->spectrum = fftw_alloc_complex(max_window / 2 + 1);
    s->power = malloc((max_window / 2 + 1) * sizeof *s->power);
    s->profile = malloc(max_window * sizeof *s->profile);
    if (!s->real || !s->spectrum || !s->power || !s->profile) {
        slowscan_rolling_scratch_free(s);
        return NULL;
    }
    return s;
}

size_t slowscan_rolling_step(const rolling_spec *spec, indicator_kind kind, size_t n)
{
    if (spec->step > 0)
        return spec->step;
    if (!slowscan_indicator_per_window(kind) || n < spec->window)
        return 1;
    return (n - spec->window) / ROLLING_MAX_WINDOWS + 1;
}

static int fits(const rolling_plan *plan, rolling_scratch *scratch, const double *x)
{
    return plan && scratch && x && scratch->capacity >= plan->window;
}

int slowscan_rolling_periodogram(const rolling_plan *plan, rolling_scratch *scratch, const double *x,
                        double *power)
{
    if (!fits(plan, scratch, x) || !power)
        return SLOWSCAN_EINVAL;
    spectral_power(plan, scratch, x);
    for (size_t k = 0; k <= plan->window / 2; k++)
        power[k] = scratch->power[k];
    return SLOWSCAN_OK;
}

int slowscan_rolling_dfa_fluctuation(const rolling_plan *plan, rolling_scratch *scratch, const double *x,
                            size_t *sizes, double *F, size_t max, size_t *count)
{
    if (!fits(plan, scratch, x) || !sizes || !F || !count || plan->dfa.count == 0 ||
        plan->dfa.count > max)
        return SLOWSCAN_EINVAL;
    dfa_fluctuations(plan, scratch, x, F);
    for (size_t j = 0; j < plan->dfa.count; j++)
        sizes[j] = plan->dfa.sizes[j];
    *count = plan->dfa.count;
    return SLOWSCAN_OK;
}

static int window_complete(const double *x, size_t W)
{
    for (size_t j = 0; j < W; j++)
        if (!isfinite(x[j]))
            return 0;
    return 1;
}

/* Every per-window indicator of one window; the periodogram is shared by redness and
 * spectral_exponent. */
static void evaluate_window(const rolling_plan *plan, rolling_scratch *scratch, const double *x,
                            const indicator_kind *kinds, size_t nkinds, double *const *out,
                            size_t i)
{
    int complete = window_complete(x, plan->window), have_power = 0;
    for (size_t k = 0; k < nkinds; k++) {
        if (!slowscan_indicator_per_window(kinds[k]))
            continue;
        double v = NAN;
        if (complete && kinds[k] == INDICATOR_DFA) {
            v = dfa_exponent(plan, scratch, x);
        } else if (complete) {
            if (!have_power)
                spectral_power(plan, scratch, x);
            have_power = 1;
            v = kinds[k] == INDICATOR_REDNESS ? spectral_redness(plan, scratch)
                                              : spectral_exponent(plan, scratch);
        }
        out[k][i] = v;
    }
}

int rolling_per_window_pass(const rolling_spec *spec, rolling_scratch *scratch, const double *x,
                            size_t n, const indicator_kind *kinds, size_t nkinds,
                            double *const *out)
{
    size_t W = spec->window, step = 0;
    for (size_t k = 0; k < nkinds; k++)
        if (slowscan_indicator_per_window(kinds[k])) {
            step = slowscan_rolling_step(spec, kinds[k], n); /* the same for every per-window kind */
            for (size_t i = 0; i < n; i++)
                out[k][i] = NAN;
        }
    if (step == 0)
        return SLOWSCAN_OK;
    if (!fits(spec->plan, scratch, x))
        return SLOWSCAN_EINVAL;
    for (size_t i = n - 1;; i -= step) {
        evaluate_window(spec->plan, scratch, x + i + 1 - W, kinds, nkinds, out, i);
        if (i < W - 1 + step)
            break;
    }
    return SLOWSCAN_OK;
}
