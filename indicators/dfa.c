/* dfa: detrended fluctuation analysis of each window (Peng et al. 1994, Phys. Rev. E 49:1685;
 * definition in include/slowscan/indicators.h). Box sizes, the centred box abscissa's sum of
 * squares and the regression weights of ln s depend only on W: they are made once per plan,
 * so a window costs one profile and, per box size, one pass over the profile. */
#include "per_window.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>

/* Four box sizes per octave: enough points for a stable slope, few enough that the cost per
 * window stays a small multiple of W. */
#define SIZES_PER_OCTAVE 4.0
#define SMALLEST_BOX 4

void dfa_design_free(dfa_design *d)
{
    free(d->sizes);
    free(d->box_sxx);
    free(d->weights);
    *d = (dfa_design){0, NULL, NULL, NULL};
}

/* Sizes round(4 (smax/4)^(j/(K-1))), j = 0 .. K-1, K = round(4 log2(smax/4)) + 1, with the
 * duplicates that rounding makes at small sizes dropped. */
static size_t box_sizes(size_t smax, size_t *sizes)
{
    double octaves = log2((double)smax / SMALLEST_BOX);
    size_t K = (size_t)floor(SIZES_PER_OCTAVE * octaves + 0.5) + 1, count = 0;
    for (size_t j = 0; j < K; j++) {
        double s = K > 1 ? SMALLEST_BOX * pow((double)smax / SMALLEST_BOX, (double)j / (double)(K - 1))
                         : SMALLEST_BOX;
        size_t size = (size_t)floor(s + 0.5);
        if (count == 0 || size > sizes[count - 1])
            sizes[count++] = size;
    }
    return count;
}

int dfa_design_init(dfa_design *d, size_t window)
{
    *d = (dfa_design){0, NULL, NULL, NULL};
    if (window < DFA_MIN_WINDOW)
        return SLOWSCAN_OK; /* no dfa at this W; slowscan_rolling_compute refuses it */
    size_t smax = window / 4, cap = (size_t)(SIZES_PER_OCTAVE * log2((double)smax)) + 2;
    d->sizes = malloc(cap * sizeof *d->sizes);
    d->box_sxx = malloc(cap * sizeof *d->box_sxx);
    d->weights = malloc(cap * sizeof *d->weights);
    double *logs = malloc(cap * sizeof *logs);
    if (!d->sizes || !d->box_sxx || !d->weights || !logs) {
        free(logs);
        dfa_design_free(d);
        return SLOWSCAN_ENOMEM;
    }
    d->count = box_sizes(smax, d->sizes);
    for (size_t j = 0; j < d->count; j++) {
        double s = (double)d->sizes[j];
        d->box_sxx[j] = s * (s * s - 1.0) / 12.0;
        logs[j] = log(s);
    }
    rolling_slope_weights(logs, d->count, d->weights);
    free(logs);
    return SLOWSCAN_OK;
}

/* Residual sum of squares of the least-squares line through y[0..s) against j = 0 .. s-1:
 * S_yy - S_jy^2 / S_jj, S_jj from the design. One pass over the box with the sums taken about
 * its first value, which keeps the profile's large offset out of them (and, unlike a running
 * mean, costs no division per sample: this loop is the whole cost of dfa). */
static double box_rss(const double *y, size_t s, double sxx)
{
    double origin = y[0], sum = 0.0, sum2 = 0.0, jsum = 0.0;
    for (size_t j = 0; j < s; j++) {
        double d = y[j] - origin;
        sum += d;
        sum2 += d * d;
        jsum += (double)j * d;
    }
    double n = (double)s, centre = 0.5 * (n - 1.0);
    double syy = sum2 - sum * sum / n, sxy = jsum - centre * sum;
    double rss = syy - sxy * sxy / sxx;
    return rss > 0.0 ? rss : 0.0;
}

void dfa_fluctuations(const rolling_plan *plan, rolling_scratch *scratch, const double *x,
                      double *F)
{
    size_t W = plan->window;
    const dfa_design *d = &plan->dfa;
    double mean = window_mean(x, W), sum = 0.0;
    double *profile = scratch->profile;
    for (size_t i = 0; i < W; i++) {
        sum += x[i] - mean;
        profile[i] = sum;
    }
    for (size_t j = 0; j < d->count; j++) {
        size_t s = d->sizes[j], boxes = W / s;
        double rss = 0.0;
        for (size_t b = 0; b < boxes; b++)
            rss += box_rss(profile + b * s, s, d->box_sxx[j]);
        F[j] = sqrt(rss / (double)(boxes * s));
    }
}

double dfa_exponent(const rolling_plan *plan, rolling_scratch *scratch, const double *x)
{
    const dfa_design *d = &plan->dfa;
    /* F goes into the power buffer: W/2 + 1 entries, more than the box sizes. */
    double *F = scratch->power, slope = 0.0;
    dfa_fluctuations(plan, scratch, x, F);
    for (size_t j = 0; j < d->count; j++) {
        if (!(F[j] > 0.0))
            return NAN;
        slope += d->weights[j] * log(F[j]);
    }
    return slope;
}
