/* What an emulation is compared with (emulate.h): the forcing's grid against the step run's,
 * the compared run placed on the forcing's grid, and the step run's own noise estimate. One
 * rule each, for the emulate command and the Python package alike. */
#include "slowscan/emulate.h"
#include "slowscan/status.h"
#include "modes_internal.h"

#include <math.h>

int slowscan_emulate_same_step(const double *ftime, size_t nf, const double *stime, size_t ns,
                               double *fstep, double *sstep)
{
    *fstep = modes_mean_step(ftime, nf);
    *sstep = modes_mean_step(stime, ns);
    /* NaN steps fail the comparison */
    return fabs(*fstep - *sstep) <= 1e-6 * fabs(*sstep) ? SLOWSCAN_OK : SLOWSCAN_EINVAL;
}

int slowscan_emulate_align(const double *grid, size_t n, const double *time,
                           const double *values, size_t m, double *actual, double *step,
                           size_t *bad)
{
    *step = modes_mean_step(grid, n);
    *bad = 0;
    if (!(*step > 0))
        return SLOWSCAN_EINVAL;
    for (size_t j = 0; j < n; j++)
        actual[j] = NAN;
    for (size_t i = 0; i < m; i++) {
        double at = (time[i] - grid[0]) / *step;
        /* outside [-1, n] lround's value would not fit; such a sample is off the grid anyway */
        long j = at >= -1 && at <= (double)n ? lround(at) : -1;
        if (!(fabs(at - (double)j) <= 1e-6) || j < 0 || (size_t)j >= n) {
            *bad = i;
            return SLOWSCAN_EINVAL;
        }
        actual[j] = values[i];
    }
    return SLOWSCAN_OK;
}

int slowscan_emulate_fit_noise(const timescales_result *fit, const double *y, size_t n,
                               double *sd, double *r1)
{
    *sd = fit->sigma;
    *r1 = fit->r1;
    double scale = 0;
    for (size_t i = 0; i < n; i++)
        scale = fmax(scale, fabs(y[i]));
    /* residuals at round-off (a noise-free model run) are no noise estimate */
    return *sd > 1e-8 * scale ? SLOWSCAN_OK : SLOWSCAN_ECONST;
}
