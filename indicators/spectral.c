/* redness and spectral_exponent: the Hann-tapered periodogram of each window (definitions in
 * include/slowscan/indicators.h). The taper, the bins and the regression weights of ln f are
 * made once per window length in the plan, so a window costs one r2c and two sums. */
#include "per_window.h"
#include "slowscan/status.h"

#include <gsl/gsl_math.h> /* M_PI, which strict C11 lacks */
#include <gsl/gsl_statistics_double.h>
#include <math.h>
#include <stdlib.h>

/* Frequencies are compared with the band edges to this relative precision, so that an edge
 * written as a decimal (0.1 for k = 10 of W = 100) keeps its own bin. */
#define FREQUENCY_RESOLUTION 1e-9

void rolling_slope_weights(const double *u, size_t m, double *w)
{
    double mean = gsl_stats_mean(u, 1, m), tss = gsl_stats_tss_m(u, 1, m, mean);
    for (size_t k = 0; k < m; k++)
        w[k] = (u[k] - mean) / tss;
}

/* Bins k in 1 .. floor(W/2) with f_k = k / (W dt) in [lo, hi]; lo = hi = 0: all of them. */
static void band_bins(size_t window, double dt, double lo, double hi, size_t *first,
                      size_t *count)
{
    size_t npos = window / 2;
    if (lo == 0.0 && hi == 0.0) {
        *first = 1;
        *count = npos;
        return;
    }
    double scale = (double)window * dt; /* k = f * W dt */
    double a = ceil(lo * scale * (1.0 - FREQUENCY_RESOLUTION));
    double b = floor(hi * scale * (1.0 + FREQUENCY_RESOLUTION));
    if (a < 1.0)
        a = 1.0;
    if (b > (double)npos)
        b = (double)npos;
    *first = (size_t)a;
    *count = b >= a ? (size_t)(b - a) + 1 : 0;
}

size_t slowscan_rolling_band_count(size_t window, double dt, double lo, double hi)
{
    size_t first, count;
    band_bins(window, dt, lo, hi, &first, &count);
    return count;
}

static int band_valid(double dt, double lo, double hi)
{
    if (lo == 0.0 && hi == 0.0)
        return 1;
    double nyquist = 0.5 / dt;
    return isfinite(lo) && isfinite(hi) && lo > 0.0 && lo < hi &&
           hi <= nyquist * (1.0 + FREQUENCY_RESOLUTION);
}

int spectral_design_init(rolling_plan *plan, double band_lo, double band_hi)
{
    size_t W = plan->window;
    if (!band_valid(plan->dt, band_lo, band_hi))
        return SLOWSCAN_EINVAL;
    plan->npos = W / 2;
    plan->fifth = plan->npos / 5;
    band_bins(W, plan->dt, band_lo, band_hi, &plan->band_first, &plan->band_count);
    plan->taper = malloc(W * sizeof *plan->taper);
    size_t m = plan->band_count ? plan->band_count : 1;
    plan->band_weights = malloc(m * sizeof *plan->band_weights);
    double *logf = malloc(m * sizeof *logf);
    if (!plan->taper || !plan->band_weights || !logf) {
        free(logf);
        return SLOWSCAN_ENOMEM;
    }
    /* The periodic (DFT-even) Hann taper: its DFT has only three non-zero bins, so leakage
     * stays within two bins of a line and falls off fast for steep spectra. */
    const double two_pi = 2.0 * M_PI;
    for (size_t j = 0; j < W; j++)
        plan->taper[j] = 0.5 * (1.0 - cos(two_pi * (double)j / (double)W));
    for (size_t k = 0; k < plan->band_count; k++)
        logf[k] = log((double)(plan->band_first + k) / ((double)W * plan->dt));
    if (plan->band_count >= 2)
        rolling_slope_weights(logf, plan->band_count, plan->band_weights);
    free(logf);
    return SLOWSCAN_OK;
}

void spectral_design_free(rolling_plan *plan)
{
    free(plan->taper);
    free(plan->band_weights);
    plan->taper = plan->band_weights = NULL;
}

void spectral_power(const rolling_plan *plan, rolling_scratch *scratch, const double *x)
{
    size_t W = plan->window;
    double mean = window_mean(x, W);
    for (size_t j = 0; j < W; j++)
        scratch->real[j] = (x[j] - mean) * plan->taper[j];
    fftw_execute_dft_r2c(plan->r2c, scratch->real, scratch->spectrum);
    for (size_t k = 0; k <= W / 2; k++) {
        double re = scratch->spectrum[k][0], im = scratch->spectrum[k][1];
        scratch->power[k] = re * re + im * im;
    }
}

static double power_sum(const double *power, size_t first, size_t count)
{
    double sum = 0.0;
    for (size_t k = first; k < first + count; k++)
        sum += power[k];
    return sum;
}

double spectral_redness(const rolling_plan *plan, const rolling_scratch *scratch)
{
    size_t L = plan->fifth;
    double low = power_sum(scratch->power, 1, L);
    double high = power_sum(scratch->power, plan->npos - L + 1, L);
    return high > 0.0 ? low / high : NAN;
}

double spectral_exponent(const rolling_plan *plan, const rolling_scratch *scratch)
{
    double slope = 0.0;
    for (size_t k = 0; k < plan->band_count; k++) {
        double p = scratch->power[plan->band_first + k];
        if (!(p > 0.0)) /* a zero ordinate (a constant window): no logarithm, no slope */
            return NAN;
        slope += plan->band_weights[k] * log(p);
    }
    return -slope;
}
