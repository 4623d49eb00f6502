/* slowscan detrend — the trend-leakage diagnostic.
 *
 * A smoother that cannot follow the trend near the record's ends (a bandwidth too wide for
 * the curvature there, a fit that lags) leaves a smooth ramp in the residual just where
 * slowing down is looked for; rolling indicators and the drift test read such a ramp as
 * growing memory or variance, and surrogates, which spread it over the whole record, never
 * contain it. The ramp shows as a residual mean away from zero over an edge span, so each
 * edge's mean is tested against zero.
 *
 * The standard error of an edge mean uses the effective sample size of an AR(1) residual,
 * m (1 - r1) / (1 + r1) (Bretherton et al. 1999, J. Climate 12:1990, eq. 31), with r1 the
 * residual's lag-1 autocorrelation over the whole record (the edge spans are too short to
 * estimate it) and the residual's standard deviation over the whole record. r1 is taken as
 * at least 0 so that an edge never counts as more samples than it has. The two edges are
 * tested at level/2 each (Bonferroni), so a series is called leaking with probability at most
 * `level` when its residual has mean zero at both ends. A well-fitting local-linear smoother
 * follows the data at the ends, so its residual edge means are shrunk toward zero and the
 * test is conservative there. */
#include "slowscan/detrend.h"
#include "slowscan/status.h"

#include <gsl/gsl_cdf.h>
#include <math.h>

/* Mean, standard deviation and lag-1 autocorrelation (pairs present) of the finite values. */
static int residual_moments(const double *r, size_t n, double *mean, double *sd, double *r1)
{
    double sum = 0, count = 0;
    for (size_t i = 0; i < n; i++)
        if (isfinite(r[i]))
            sum += r[i], count++;
    if (count < 3)
        return SLOWSCAN_ESHORT;
    *mean = sum / count;
    double ss = 0, cross = 0;
    for (size_t i = 0; i < n; i++) {
        if (!isfinite(r[i]))
            continue;
        ss += (r[i] - *mean) * (r[i] - *mean);
        if (i + 1 < n && isfinite(r[i + 1]))
            cross += (r[i] - *mean) * (r[i + 1] - *mean);
    }
    if (!(ss > 0))
        return SLOWSCAN_ECONST;
    *sd = sqrt(ss / (count - 1));
    *r1 = cross / ss;
    return SLOWSCAN_OK;
}

/* One edge span [first, first + edge): its mean, z and two-sided p. */
static void edge_test(const double *r, size_t first, size_t edge, double sd, double r1,
                      detrend_edge *out)
{
    double sum = 0;
    size_t count = 0;
    for (size_t i = first; i < first + edge; i++)
        if (isfinite(r[i]))
            sum += r[i], count++;
    double rho = fmin(fmax(r1, 0.0), 0.999);
    double effective = (double)count * (1.0 - rho) / (1.0 + rho);
    *out = (detrend_edge){.mean = count ? sum / (double)count : NAN, .z = NAN, .p = NAN,
                          .samples = count, .effective = effective};
    if (effective < 2.0)
        return; /* one effective sample says nothing about a mean */
    out->z = out->mean / (sd / sqrt(effective));
    out->p = 2.0 * gsl_cdf_ugaussian_Q(fabs(out->z));
}

int slowscan_detrend_leakage_test(const double *residual, size_t n, size_t edge, double level,
                         detrend_leakage *out)
{
    if (!residual || !out || edge < 2 || edge > n || !(level > 0 && level < 1))
        return SLOWSCAN_EINVAL;
    double mean, sd, r1;
    int st = residual_moments(residual, n, &mean, &sd, &r1);
    *out = (detrend_leakage){.r1 = NAN, .level = level, .leaking = 0};
    if (st != SLOWSCAN_OK)
        return st;
    out->r1 = r1;
    edge_test(residual, 0, edge, sd, r1, &out->first);
    edge_test(residual, n - edge, edge, sd, r1, &out->last);
    out->leaking = out->first.p < level / 2 || out->last.p < level / 2;
    return SLOWSCAN_OK;
}
