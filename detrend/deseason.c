/* slowscan detrend — removal of a seasonal cycle, fixed or following a changing one.
 *
 * Both estimates start from d = x - (centred moving average over one period), never from x:
 * phase means of the raw series would fold any trend into a sawtooth "cycle". When the
 * period P is not a whole number of steps a one-period average does not exist, and an
 * average over m = round(P) steps lets a small part of the cycle through (about |P - m|/P of
 * it). We keep that average — it removes a locally linear trend exactly and needs no model of
 * the trend — and undo its leak instead: on any sample where the average is complete, a
 * sinusoid of frequency f comes out of x - average multiplied by exactly 1 - H(f), H the
 * average's (real, symmetric) response, and |H(k/P)| < 1 below the Nyquist frequency. So a
 * harmonic fit to d, each pair divided by 1 - H(k/P), recovers the cycle of x without bias;
 * a pure sinusoid is removed to round-off whatever P is. (The alternative, fitting a
 * polynomial trend jointly with the harmonics, ties the result to a trend shape and makes the
 * design depend on the window, which rules out running sums.) An intercept is fitted with the
 * harmonics so the average's offset on a curved trend does not leak into them.
 *
 * The window follows the rule of detrend.h: W samples centred on i, shifted inward at the
 * record's ends so that the estimate's variance does not jump there — the ends are where a
 * loss of resilience is looked for. The models keep running sums over the window (per phase,
 * or the normal equations of the harmonic fit); every W moves they are rebuilt from scratch
 * so rounding errors of the add/remove updates cannot accumulate (amortised O(1) a move). */
#include "slowscan/detrend.h"

#include "detrend_internal.h"
#include "slowscan/status.h"

#include <gsl/gsl_math.h> /* M_PI, which strict C11 lacks */
#include <math.h>
#include <stdint.h>
#include <stdlib.h>

#define PERIOD_REL_TOL 1e-6 /* period/dt this close to an integer counts as whole */
#define LENGTH_REL_TOL 1e-9 /* window lengths compared in time units */

deseason_spec slowscan_detrend_deseason_default(void)
{
    return (deseason_spec){0.0, 0, 0.0};
}

static int whole_steps(double steps)
{
    return fabs(steps - round(steps)) <= PERIOD_REL_TOL * steps;
}

static deseason_problem find_problem(const deseason_spec *s, double dt, size_t n, int *k)
{
    double steps = s->period / dt;
    if (!(dt > 0.0) || !isfinite(dt) || !(s->period > 0.0) || !isfinite(steps) ||
        steps < 2.0 * (1.0 - PERIOD_REL_TOL) || steps > (double)n / 2.0 * (1.0 + PERIOD_REL_TOL))
        return DESEASON_BAD_PERIOD; /* two full cycles are needed to estimate one */
    *k = s->harmonics;
    if (*k == 0 && !whole_steps(steps))
        *k = DETREND_DESEASON_HARMONICS;
    if (*k < 0 || 2.0 * *k >= steps * (1.0 - PERIOD_REL_TOL))
        return DESEASON_BAD_HARMONICS;
    if (!(s->window >= 0.0) || !isfinite(s->window))
        return DESEASON_BAD_WINDOW;
    if (s->window > 0.0 && (s->window < 2.0 * s->period * (1.0 - LENGTH_REL_TOL) ||
                            s->window > (double)(n - 1) * dt * (1.0 + LENGTH_REL_TOL)))
        return DESEASON_BAD_WINDOW;
    return DESEASON_FINE;
}

int slowscan_detrend_deseason_check(const deseason_spec *spec, double dt, size_t n,
                           deseason_problem *problem, int *harmonics)
{
    int k = 0;
    deseason_problem found = spec ? find_problem(spec, dt, n, &k) : DESEASON_BAD_PERIOD;
    if (problem)
        *problem = found;
    if (harmonics)
        *harmonics = found == DESEASON_FINE ? k : 0;
    return found == DESEASON_FINE ? SLOWSCAN_OK : SLOWSCAN_EINVAL;
}

/* d = x - centre - (centred average over m steps, 2 x m for even m), NaN where the average's
 * span holds a missing sample or leaves the record. Prefix sums make it O(n) for any m;
 * values are recentred on `centre` so a large offset keeps its digits. */
static void period_difference(const double *x, size_t n, size_t m, double centre, double *cs,
                              size_t *bad, double *d)
{
    cs[0] = 0.0;
    bad[0] = 0;
    for (size_t i = 0; i < n; i++) {
        int ok = isfinite(x[i]);
        cs[i + 1] = cs[i] + (ok ? x[i] - centre : 0.0);
        bad[i + 1] = bad[i] + !ok;
    }
    size_t h = m / 2; /* taps i-h .. i+h; for even m the two end taps weigh one half */
    for (size_t i = 0; i < n; i++) {
        d[i] = NAN;
        if (i < h || i + h >= n || bad[i + h + 1] != bad[i - h] || !isfinite(x[i]))
            continue;
        double sum = cs[i + h + 1] - cs[i - h];
        if (m % 2 == 0)
            sum -= 0.5 * ((x[i - h] - centre) + (x[i + h] - centre));
        d[i] = x[i] - centre - sum / (double)m;
    }
}

/* 1 - H(k/steps) for k = 1..K, H the response of the average above. */
static void average_gain(size_t m, double steps, int harmonics, double *gain)
{
    size_t h = m / 2;
    for (int k = 1; k <= harmonics; k++) {
        double f = (double)k / steps, response = 1.0;
        for (size_t t = 1; t <= h; t++)
            response += (m % 2 == 0 && t == h ? 1.0 : 2.0) * cos(2.0 * M_PI * f * (double)t);
        gain[k - 1] = 1.0 - response / (double)m;
    }
}

/* The mean cycle: running sums per phase, and the sum of the phase means kept up to date. */
typedef struct {
    deseason_model base;
    size_t p, empty; /* phases, phases without a sample in the window */
    double grand;    /* sum over phases of the phase means */
    double *sum;
    size_t *count;
} mean_model;

static void mean_reset(deseason_model *model)
{
    mean_model *m = (mean_model *)model;
    for (size_t k = 0; k < m->p; k++) {
        m->sum[k] = 0.0;
        m->count[k] = 0;
    }
    m->empty = m->p;
    m->grand = 0.0;
}

static void mean_add(deseason_model *model, size_t j, double d, double sign)
{
    mean_model *m = (mean_model *)model;
    size_t k = j % m->p;
    if (m->count[k] > 0)
        m->grand -= m->sum[k] / (double)m->count[k];
    m->sum[k] += sign * d;
    m->count[k] = sign > 0 ? m->count[k] + 1 : m->count[k] - 1;
    if (m->count[k] == 0)
        m->sum[k] = 0.0; /* exactly, whatever rounding left */
    else
        m->grand += m->sum[k] / (double)m->count[k];
    m->empty += m->count[k] == 0 ? 1 : 0;
    m->empty -= sign > 0 && m->count[k] == 1 ? 1 : 0;
}

static int mean_solve(deseason_model *model, int rebuilt)
{
    mean_model *m = (mean_model *)model;
    if (m->empty > 0)
        return SLOWSCAN_ESHORT;
    if (rebuilt) { /* the exact sum, not the one carried through updates */
        m->grand = 0.0;
        for (size_t k = 0; k < m->p; k++)
            m->grand += m->sum[k] / (double)m->count[k];
    }
    return SLOWSCAN_OK;
}

static double mean_cycle(const deseason_model *model, size_t i)
{
    const mean_model *m = (const mean_model *)model;
    size_t k = i % m->p;
    return m->sum[k] / (double)m->count[k] - m->grand / (double)m->p;
}

/* Slides the window of `len` samples along d and writes each sample's cycle value. */
static int sweep(deseason_model *model, const double *d, size_t n, size_t len, double *cycle)
{
    size_t lo = (len - 1) / 2, last = n - len, since = len;
    for (size_t a = 0; a <= last; a++) {
        int rebuilt = since >= len;
        if (rebuilt) {
            model->reset(model);
            for (size_t j = a; j < a + len; j++)
                if (isfinite(d[j]))
                    model->add(model, j, d[j], 1.0);
            since = 0;
        } else {
            if (isfinite(d[a - 1]))
                model->add(model, a - 1, d[a - 1], -1.0);
            if (isfinite(d[a + len - 1]))
                model->add(model, a + len - 1, d[a + len - 1], 1.0);
        }
        since++;
        int status = model->solve(model, rebuilt);
        if (status != SLOWSCAN_OK)
            return status;
        /* the samples whose (shifted) window starts at a */
        size_t first = a == 0 ? 0 : a + lo, end = a == last ? n : a + lo + 1;
        for (size_t i = first; i < end; i++)
            cycle[i] = model->cycle(model, i);
    }
    return SLOWSCAN_OK;
}

static int mean_sweep(size_t p, const double *d, size_t n, size_t len, double *cycle)
{
    mean_model m = {{mean_reset, mean_add, mean_solve, mean_cycle}, p, p, 0.0,
                    malloc(p * sizeof(double)), malloc(p * sizeof(size_t))};
    int status = m.sum && m.count ? sweep(&m.base, d, n, len, cycle) : SLOWSCAN_ENOMEM;
    free(m.sum);
    free(m.count);
    return status;
}

static int harmonic_sweep(int k, double steps, size_t m, const double *d, size_t n,
                          size_t len, double *cycle)
{
    double *gain = malloc((size_t)k * sizeof *gain);
    deseason_model *model = NULL;
    if (gain) {
        average_gain(m, steps, k, gain);
        model = detrend_harmonic_model_alloc(k, steps, gain);
    }
    int status = model ? sweep(model, d, n, len, cycle) : SLOWSCAN_ENOMEM;
    detrend_harmonic_model_free(model);
    free(gain);
    return status;
}

int slowscan_detrend_deseason_apply(const deseason_spec *spec, double dt, double *x, size_t n)
{
    int k = 0;
    if ((!x && n > 0) || slowscan_detrend_deseason_check(spec, dt, n, NULL, &k) != SLOWSCAN_OK)
        return SLOWSCAN_EINVAL;
    double steps = spec->period / dt;
    size_t m = (size_t)round(steps);
    size_t len = spec->window > 0.0 ? detrend_clamp_count(round(spec->window / dt) + 1.0, n) : n;
    if (n > SIZE_MAX / (4 * sizeof(double)) - 1)
        return SLOWSCAN_ENOMEM;
    double *d = malloc(n * sizeof *d), *cycle = malloc(n * sizeof *cycle);
    double *cs = malloc((n + 1) * sizeof *cs);
    size_t *bad = malloc((n + 1) * sizeof *bad);
    int status = SLOWSCAN_ENOMEM;
    if (d && cycle && cs && bad) {
        period_difference(x, n, m, detrend_finite_mean(x, n), cs, bad, d);
        status = k == 0 ? mean_sweep(m, d, n, len, cycle)
                        : harmonic_sweep(k, steps, m, d, n, len, cycle);
    }
    /* x is only modified once every window is known to be estimable */
    for (size_t i = 0; status == SLOWSCAN_OK && i < n; i++)
        if (isfinite(x[i]))
            x[i] -= cycle[i];
    free(d);
    free(cycle);
    free(cs);
    free(bad);
    return status;
}
