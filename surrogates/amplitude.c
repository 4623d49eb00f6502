/* Surrogates that keep the set of values exactly:
 *   aaft  — amplitude-adjusted Fourier transform (Theiler et al. 1992, Physica D 58:77):
 *           a Gaussian series with the data's rank order is phase-randomised and the data's
 *           values are put back in the new rank order;
 *   iaaft — iterated AAFT (Schreiber & Schmitz 1996, Phys. Rev. Lett. 77:635): alternately
 *           impose the data's Fourier amplitudes and its values until the spectrum stops
 *           improving. */
#include "slowscan/status.h"
#include "surrogate_internal.h"

#include <gsl/gsl_randist.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

static const double TWO_PI = 6.283185307179586476925;

static int by_value(const void *a, const void *b)
{
    const surrogate_ranked *x = a, *y = b;
    if (x->value != y->value)
        return x->value < y->value ? -1 : 1;
    return (x->index > y->index) - (x->index < y->index); /* ties: a fixed order */
}

static int by_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

void surrogate_rank_order(surrogate_source *s, const double *key, double *out)
{
    for (size_t i = 0; i < s->n; i++)
        s->pairs[i] = (surrogate_ranked){key[i], i};
    qsort(s->pairs, s->n, sizeof *s->pairs, by_value);
    for (size_t k = 0; k < s->n; k++)
        out[s->pairs[k].index] = s->sorted[k];
}

int surrogate_amplitude_prepare(surrogate_source *s)
{
    int st = surrogate_phase_prepare(s); /* the data's Fourier amplitudes, for iaaft */
    for (size_t i = 0; i < s->n; i++)
        s->pairs[i] = (surrogate_ranked){s->filled[i], i};
    qsort(s->pairs, s->n, sizeof *s->pairs, by_value);
    for (size_t k = 0; k < s->n; k++) {
        s->sorted[k] = s->pairs[k].value;
        s->rank[s->pairs[k].index] = k;
    }
    return st;
}

/* Rotates the phase of every frequency 1 .. ceil(n/2)-1 of s->spectrum by a uniform angle:
 * the result has uniformly distributed phases and the same amplitudes. */
static void rotate_phases(surrogate_source *s, gsl_rng *rng)
{
    for (size_t k = 1; k < (s->n + 1) / 2; k++) {
        double a = TWO_PI * gsl_rng_uniform(rng), c = cos(a), d = sin(a);
        double re = s->spectrum[k][0], im = s->spectrum[k][1];
        s->spectrum[k][0] = re * c - im * d;
        s->spectrum[k][1] = re * d + im * c;
    }
}

int surrogate_aaft_draw(surrogate_source *s, gsl_rng *rng, double *out)
{
    for (size_t i = 0; i < s->n; i++)
        s->work[i] = gsl_ran_gaussian_ziggurat(rng, 1.0);
    qsort(s->work, s->n, sizeof *s->work, by_double);
    for (size_t i = 0; i < s->n; i++) /* Gaussian values in the data's rank order */
        s->aligned[i] = s->work[s->rank[i]];
    fftw_execute_dft_r2c(s->plan->forward, s->aligned, s->spectrum);
    rotate_phases(s, rng);
    fftw_execute_dft_c2r(s->plan->backward, s->spectrum, s->aligned);
    surrogate_rank_order(s, s->aligned, out);
    return SLOWSCAN_OK;
}

/* Relative distance of s->spectrum (unnormalised) from the data's amplitudes. */
static double spectral_error(const surrogate_source *s)
{
    double num = 0, den = 0, n = (double)s->n;
    for (size_t k = 0; k < s->nfreq; k++) {
        double d = hypot(s->spectrum[k][0], s->spectrum[k][1]) / n - s->amplitude[k];
        num += d * d;
        den += s->amplitude[k] * s->amplitude[k];
    }
    return den > 0 ? sqrt(num / den) : 0.0;
}

/* Replaces every amplitude by the data's, keeping the phases. */
static void impose_amplitudes(surrogate_source *s)
{
    double n = (double)s->n;
    for (size_t k = 0; k < s->nfreq; k++) {
        double m = hypot(s->spectrum[k][0], s->spectrum[k][1]);
        double f = m > 0 ? s->amplitude[k] * n / m : 0.0;
        s->spectrum[k][0] = m > 0 ? s->spectrum[k][0] * f : s->amplitude[k] * n;
        s->spectrum[k][1] *= f;
    }
}

int surrogate_iaaft_draw(surrogate_source *s, gsl_rng *rng, double *out)
{
    memcpy(out, s->sorted, s->n * sizeof *out);
    gsl_ran_shuffle(rng, out, s->n, sizeof *out);
    double previous = INFINITY, error = INFINITY;
    int it = 0, converged = 0;
    while (it < s->options.iaaft_max_iterations) {
        memcpy(s->aligned, out, s->n * sizeof *out);
        fftw_execute_dft_r2c(s->plan->forward, s->aligned, s->spectrum);
        error = spectral_error(s);
        if (error == 0.0 || (isfinite(previous) && previous - error <= s->options.iaaft_tolerance * previous)) {
            converged = 1;
            break;
        }
        previous = error;
        impose_amplitudes(s);
        fftw_execute_dft_c2r(s->plan->backward, s->spectrum, s->aligned);
        surrogate_rank_order(s, s->aligned, out);
        it++;
    }
    s->last_iterations = it;
    s->last_error = error;
    s->unconverged += !converged;
    return SLOWSCAN_OK;
}
