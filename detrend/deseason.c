/* slowscan detrend — removal of a fixed seasonal cycle.
 *
 * Sample i has phase i mod P, P = round(period/dt). The mean cycle is estimated from the
 * series minus its centred one-period moving average — taking phase means of the raw series
 * instead would fold any trend into a sawtooth "cycle". The cycle is normalised to mean zero
 * before it is subtracted, so the series keeps its level, which matters for indicators such
 * as the coefficient of variation that divide by the mean. Missing samples stay missing. */
#include "slowscan/detrend.h"

#include "detrend_internal.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>

#define PERIOD_REL_TOL 1e-6 /* period/dt must be this close to an integer */

/* P from the header's rules, or 0 if period and dt do not give a usable one. */
static size_t cycle_length(double dt, double period, size_t n)
{
    if (!(dt > 0.0) || !isfinite(dt) || !(period > 0.0) || !isfinite(period))
        return 0;
    double ratio = period / dt, p = round(ratio);
    if (!isfinite(ratio) || fabs(ratio - p) > PERIOD_REL_TOL * ratio)
        return 0;
    if (p < 2.0 || p > (double)n / 2.0) /* need two full cycles to estimate one */
        return 0;
    return (size_t)p;
}

/* Centred moving average over one period (the 2xP average for even P, so the window stays
 * centred): in the trend it leaves, every phase is equally represented, so the cycle is not
 * mistaken for trend nor the trend for cycle. NaN where the window is incomplete or holds a
 * missing sample. Values are recentred on `centre` so a large offset keeps its digits. */
static void period_average(const double *x, size_t n, size_t p, double centre, double *ma)
{
    size_t half = p / 2;
    for (size_t i = 0; i < n; i++) {
        ma[i] = NAN;
        if (i < half || i + half >= n)
            continue;
        double sum = 0.0;
        for (size_t j = i - half; j <= i + half; j++) {
            double w = (p % 2 == 0 && (j == i - half || j == i + half)) ? 0.5 : 1.0;
            sum += w * (x[j] - centre);
        }
        ma[i] = sum / (double)p; /* NaN if any sample in the window is missing */
    }
}

/* anomaly[k] = mean over phase k of (x - period average), minus the mean over phases: the
 * additive classical decomposition (as statsmodels.tsa.seasonal.seasonal_decompose). Cost
 * O(n P), paid once per series. */
static int cycle_anomaly(const double *x, size_t n, size_t p, double *anomaly, size_t *count,
                         double *ma)
{
    double centre = detrend_finite_mean(x, n);
    period_average(x, n, p, centre, ma);
    for (size_t k = 0; k < p; k++) {
        anomaly[k] = 0.0;
        count[k] = 0;
    }
    for (size_t i = 0; i < n; i++) {
        if (isfinite(x[i]) && isfinite(ma[i])) {
            anomaly[i % p] += x[i] - centre - ma[i];
            count[i % p]++;
        }
    }
    double grand = 0.0;
    for (size_t k = 0; k < p; k++) {
        if (count[k] == 0)
            return SLOWSCAN_ESHORT;
        anomaly[k] /= (double)count[k];
        grand += anomaly[k];
    }
    grand /= (double)p;
    for (size_t k = 0; k < p; k++)
        anomaly[k] -= grand;
    return SLOWSCAN_OK;
}

int detrend_deseason(double dt, double period, double *x, size_t n)
{
    if (!x && n > 0)
        return SLOWSCAN_EINVAL;
    size_t p = cycle_length(dt, period, n);
    if (p == 0)
        return SLOWSCAN_EINVAL;
    double *anomaly = malloc(p * sizeof *anomaly), *ma = malloc(n * sizeof *ma);
    size_t *count = malloc(p * sizeof *count);
    int status = SLOWSCAN_ENOMEM;
    if (anomaly && count && ma) {
        /* x is only modified once every phase is known to be estimable */
        status = cycle_anomaly(x, n, p, anomaly, count, ma);
        if (status == SLOWSCAN_OK)
            for (size_t i = 0; i < n; i++)
                if (isfinite(x[i]))
                    x[i] -= anomaly[i % p];
    }
    free(anomaly);
    free(count);
    free(ma);
    return status;
}
