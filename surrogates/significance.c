/* Surrogate p-values, Benjamini-Hochberg q-values, and stream seeds. */
#include "slowscan/significance.h"
#include "slowscan/sequential.h"
#include "slowscan/status.h"

#include <gsl/gsl_cdf.h>
#include <gsl/gsl_errno.h>
#include <math.h>
#include <stdint.h>
#include <stdlib.h>

static int exceeds(double s, double observed, significance_alternative alt)
{
    switch (alt) {
    case ALTERNATIVE_INCREASING: return s >= observed;
    case ALTERNATIVE_DECREASING: return s <= observed;
    default: return fabs(s) >= fabs(observed);
    }
}

double slowscan_significance_p_value(double observed, const double *null, size_t count,
                            significance_alternative alternative, size_t *used)
{
    size_t m = 0, hits = 0;
    for (size_t j = 0; j < count; j++)
        if (isfinite(null[j])) {
            m++;
            hits += (size_t)exceeds(null[j], observed, alternative);
        }
    if (used)
        *used = m;
    if (isnan(observed) || m == 0)
        return NAN;
    return (1.0 + (double)hits) / ((double)m + 1.0);
}

/* qsort has no context argument in C11: sort indices by a key array through a pair. */
typedef struct {
    double p;
    size_t index;
} ranked_p;

static int by_p(const void *a, const void *b)
{
    const ranked_p *x = a, *y = b;
    if (x->p != y->p)
        return x->p < y->p ? -1 : 1;
    return x->index < y->index ? -1 : (x->index > y->index); /* stable: ties by position */
}

int slowscan_significance_bh(const double *p, size_t count, double *q, size_t *order)
{
    ranked_p *r = malloc((count ? count : 1) * sizeof *r);
    if (!r)
        return SLOWSCAN_ENOMEM;
    size_t m = 0;
    for (size_t i = 0; i < count; i++) {
        q[i] = NAN;
        if (!isnan(p[i]))
            r[m++] = (ranked_p){p[i], i};
    }
    qsort(r, m, sizeof *r, by_p);
    /* Step-up: walk from the largest p down, keeping the running minimum of p m / rank. */
    double running = 1.0;
    for (size_t k = m; k-- > 0;) {
        double v = r[k].p * (double)m / (double)(k + 1);
        running = fmin(running, v);
        q[r[k].index] = running;
        if (order)
            order[k] = r[k].index;
    }
    free(r);
    return SLOWSCAN_OK;
}

unsigned long slowscan_stream_seed(unsigned long seed, const char *series, const char *purpose,
                          unsigned long block)
{
    uint64_t h = 1469598103934665603ULL; /* FNV-1a 64-bit offset basis */
    const uint64_t prime = 1099511628211ULL;
    for (int b = 0; b < 8; b++)
        h = (h ^ ((seed >> (8 * b)) & 0xff)) * prime;
    for (const char *s = series; s && *s; s++)
        h = (h ^ (unsigned char)*s) * prime;
    h = (h ^ 0x1f) * prime; /* separator: ("ab","c") and ("a","bc") differ */
    for (const char *s = purpose; s && *s; s++)
        h = (h ^ (unsigned char)*s) * prime;
    h = (h ^ 0x1f) * prime;
    for (int b = 0; b < 8; b++)
        h = (h ^ ((block >> (8 * b)) & 0xff)) * prime;
    /* GSL's generators take 32 bits of the seed; fold the high half in. */
    return (unsigned long)((h ^ (h >> 32)) & 0xffffffffUL);
}

/* The p quantile of Beta(a, b); the handler is off around the inversion so a caller that
 * keeps GSL's aborting default still gets the bisection, not abort(). */
static double beta_quantile(double p, double a, double b)
{
    gsl_error_handler_t *old = gsl_set_error_handler_off();
    double x = gsl_cdf_beta_Pinv(p, a, b);
    gsl_set_error_handler(old);
    if (isfinite(x))
        return x;
    double lo = 0.0, hi = 1.0;
    for (int i = 0; i < 200 && hi - lo > 1e-15; i++) {
        double mid = 0.5 * (lo + hi);
        *(gsl_cdf_beta_P(mid, a, b) < p ? &lo : &hi) = mid;
    }
    return 0.5 * (lo + hi);
}

void slowscan_sequential_interval(size_t hits, size_t trials, double alpha, double *lo,
                                  double *hi)
{
    double k = (double)hits, s = (double)trials;
    *lo = hits == 0 || trials == 0 ? 0.0 : beta_quantile(alpha / 2, k, s - k + 1);
    *hi = hits >= trials ? 1.0 : beta_quantile(1 - alpha / 2, k + 1, s - k);
}

void slowscan_significance_binomial_interval(size_t hits, size_t trials, double *lo, double *hi)
{
    slowscan_sequential_interval(hits, trials, 0.05, lo, hi);
}
