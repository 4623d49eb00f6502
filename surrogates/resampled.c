/* Surrogates from a fitted model or by resampling:
 *   ar1   — the AR(1) fitted by least squares to the series' adjacent pairs (coefficient,
 *           intercept, innovation variance), simulated from its stationary distribution so
 *           no burn-in is needed (a stationary start is the limit of an infinite burn-in);
 *   block — the moving-block bootstrap (Kunsch 1989, Ann. Statist. 17:1217): blocks of L
 *           consecutive samples from uniformly drawn starts, laid end to end. */
#include "slowscan/status.h"
#include "surrogate_internal.h"

#include <gsl/gsl_fit.h>
#include <gsl/gsl_randist.h>
#include <math.h>
#include <string.h>

int surrogate_ar1_prepare(surrogate_source *s)
{
    /* Pairs of present samples only: a filled gap is not an observation. */
    size_t m = 0;
    for (size_t i = 0; i + 1 < s->n; i++)
        if (!s->missing[i] && !s->missing[i + 1]) {
            s->work[m] = s->filled[i];
            s->aligned[m] = s->filled[i + 1];
            m++;
        }
    double c0, c1, cov00, cov01, cov11, sumsq;
    if (m < 4 || gsl_fit_linear(s->work, 1, s->aligned, 1, m, &c0, &c1, &cov00, &cov01, &cov11,
                                &sumsq) != 0)
        return SLOWSCAN_ESHORT;
    /* |phi| >= 1 has no stationary distribution to draw from: not an AR(1) null. */
    if (!(fabs(c1) < 1.0) || !(sumsq > 0))
        return SLOWSCAN_ENUMERIC;
    s->ar_phi = c1;
    s->ar_sigma = sqrt(sumsq / (double)(m - 2));
    s->ar_mean = c0 / (1.0 - c1);
    return SLOWSCAN_OK;
}

int surrogate_ar1_draw(surrogate_source *s, gsl_rng *rng, double *out)
{
    double phi = s->ar_phi, sigma = s->ar_sigma;
    double x = gsl_ran_gaussian_ziggurat(rng, sigma / sqrt(1.0 - phi * phi));
    for (size_t i = 0; i < s->n; i++) {
        out[i] = s->ar_mean + x;
        x = phi * x + gsl_ran_gaussian_ziggurat(rng, sigma);
    }
    return SLOWSCAN_OK;
}

int surrogate_block_prepare(surrogate_source *s)
{
    size_t L = s->options.block_length;
    if (L == 0)
        L = (size_t)lround(cbrt((double)s->n));
    if (L < 1)
        L = 1;
    if (L > s->n)
        return SLOWSCAN_EINVAL;
    s->block = L;
    return SLOWSCAN_OK;
}

int surrogate_block_draw(surrogate_source *s, gsl_rng *rng, double *out)
{
    size_t L = s->block, starts = s->n - L + 1;
    for (size_t i = 0; i < s->n; i += L) {
        size_t from = gsl_rng_uniform_int(rng, starts), take = s->n - i < L ? s->n - i : L;
        memcpy(out + i, s->filled + from, take * sizeof *out);
    }
    return SLOWSCAN_OK;
}
