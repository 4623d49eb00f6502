/* Small helpers of response/: lag-1 autocorrelation, effective sample size, the mean step,
 * input checks. */
#include "modes_internal.h"

#include "slowscan/status.h"

#include <gsl/gsl_statistics_double.h>
#include <math.h>

double modes_lag1(const double *x, size_t n)
{
    if (n < 3)
        return 0.0;
    double r = gsl_stats_lag1_autocorrelation(x, 1, n);
    return isfinite(r) ? r : 0.0;
}

double modes_effective_n(size_t n, double r1)
{
    double ne = (double)n * (1.0 - r1) / (1.0 + r1);
    if (!(ne <= (double)n)) /* r1 <= 0, or NaN */
        ne = (double)n;
    return ne < 2.0 ? 2.0 : ne;
}

double modes_mean_step(const double *time, size_t n)
{
    return n > 1 ? (time[n - 1] - time[0]) / (double)(n - 1) : NAN;
}

int modes_check_series(const double *t, const double *y, size_t n)
{
    for (size_t i = 0; i < n; i++) {
        if (!isfinite(t[i]) || !isfinite(y[i]) || (i == 0 && t[i] < 0) ||
            (i > 0 && !(t[i] > t[i - 1])))
            return SLOWSCAN_EINVAL;
    }
    return SLOWSCAN_OK;
}
