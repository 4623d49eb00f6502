/* Ensembles: the split test of the members' final values and the pooled surrogate test
 * (ensemble.h). */
#include "slowscan/ensemble.h"
#include "slowscan/status.h"

#include <gsl/gsl_sort.h>
#include <gsl/gsl_statistics_double.h>
#include <math.h>
#include <stdlib.h>

double slowscan_ensemble_final_value(const double *x, size_t n, double share)
{
    if (n == 0)
        return NAN;
    double want = round(share * (double)n);
    size_t last = want < 1 ? 1 : want > (double)n ? n : (size_t)want;
    double sum = 0;
    size_t used = 0;
    for (size_t i = n - last; i < n; i++)
        if (isfinite(x[i]))
            sum += x[i], used++;
    return used ? sum / (double)used : NAN;
}

double slowscan_ensemble_bimodality(const double *x, size_t m)
{
    if (m < 4)
        return NAN;
    double mean = gsl_stats_mean(x, 1, m), sd = gsl_stats_sd_m(x, 1, m, mean);
    if (!(sd > 0))
        return NAN;
    /* GSL standardises with the (m-1) standard deviation; the moment ratios g1, g2 use the
     * m-denominator one, hence the factors r^(3/2) and r^2 */
    double n = (double)m, r = n / (n - 1);
    double g1 = gsl_stats_skew_m_sd(x, 1, m, mean, sd) * pow(r, 1.5);
    double g2 = (gsl_stats_kurtosis_m_sd(x, 1, m, mean, sd) + 3) * r * r - 3;
    double big_g1 = g1 * sqrt(n * (n - 1)) / (n - 2);
    double big_g2 = (n - 1) / ((n - 2) * (n - 3)) * ((n + 1) * g2 + 6);
    return (big_g1 * big_g1 + 1) / (big_g2 + 3 * (n - 1) * (n - 1) / ((n - 2) * (n - 3)));
}

ensemble_split_options slowscan_ensemble_split_options_default(void)
{
    return (ensemble_split_options){.final_share = 0.1, .bimodality_limit = 5.0 / 9.0,
                                    .gap_ratio = 4};
}

/* Sum of squared deviations of x[0..m) from their mean. */
static double squares(const double *x, size_t m)
{
    return m > 1 ? gsl_stats_variance(x, 1, m) * (double)(m - 1) : 0;
}

/* The widest gap of the sorted values x[0..m) leaving at least two on each side. */
static void widest_gap(const double *x, size_t m, ensemble_split *out)
{
    out->gap = out->spread = out->cut = NAN;
    for (size_t i = 2; i + 2 <= m; i++)
        if (!(x[i] - x[i - 1] <= out->gap)) { /* the first, or wider */
            out->gap = x[i] - x[i - 1];
            out->cut = 0.5 * (x[i] + x[i - 1]);
            out->lower = i, out->upper = m - i;
        }
    if (isnan(out->gap))
        return;
    out->spread = sqrt((squares(x, out->lower) + squares(x + out->lower, out->upper)) /
                       (double)(m - 2));
}

int slowscan_ensemble_split_test(const double *const *members, size_t nmembers, size_t n,
                                 const ensemble_split_options *o, ensemble_split *out)
{
    *out = (ensemble_split){.bimodality = NAN, .gap = NAN, .spread = NAN, .cut = NAN};
    double *finals = malloc((nmembers + 1) * sizeof *finals);
    if (!finals)
        return SLOWSCAN_ENOMEM;
    for (size_t m = 0; m < nmembers; m++) {
        double v = slowscan_ensemble_final_value(members[m], n, o->final_share);
        if (isfinite(v))
            finals[out->members++] = v;
    }
    size_t m = out->members;
    gsl_sort(finals, 1, m);
    out->bimodality = slowscan_ensemble_bimodality(finals, m);
    widest_gap(finals, m, out);
    free(finals);
    if (out->bimodality > o->bimodality_limit)
        out->flags |= ENSEMBLE_SPLIT_BIMODAL;
    /* a spread of 0 (each group one value repeated) and any gap is a split too */
    if (out->gap > o->gap_ratio * out->spread)
        out->flags |= ENSEMBLE_SPLIT_GAP;
    return SLOWSCAN_OK;
}

int slowscan_ensemble_pooled_test(const double *statistics, const double *const *nulls,
                                  size_t nmembers, size_t replicates,
                                  significance_alternative alternative, ensemble_pooled *out,
                                  double *pooled_null)
{
    *out = (ensemble_pooled){.statistic = NAN, .p_value = NAN};
    if (nmembers == 0)
        return SLOWSCAN_OK;
    double sum = 0;
    int complete = 1;
    for (size_t m = 0; m < nmembers; m++) {
        sum += statistics[m];
        complete &= nulls[m] != NULL;
    }
    out->statistic = sum / (double)nmembers; /* NaN when a member has none */
    if (!complete || replicates == 0 || isnan(out->statistic))
        return SLOWSCAN_OK;
    double *pooled = pooled_null ? pooled_null : malloc(replicates * sizeof *pooled);
    if (!pooled)
        return SLOWSCAN_ENOMEM;
    for (size_t j = 0; j < replicates; j++) {
        double s = 0;
        for (size_t m = 0; m < nmembers; m++)
            s += nulls[m][j]; /* NaN in any member: the replicate is left out */
        pooled[j] = s / (double)nmembers;
    }
    out->p_value = slowscan_significance_p_value(out->statistic, pooled, replicates,
                                                 alternative, &out->null_used);
    if (pooled != pooled_null)
        free(pooled);
    return SLOWSCAN_OK;
}
