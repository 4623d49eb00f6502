/* slowscan detrend — centred moving mean.
 *
 * A span of `bandwidth` time units is h = round(bandwidth / (2 dt)) samples either side; the
 * trend at i is the mean of the finite samples in [i-h, i+h], the window simply truncated at
 * the ends of the series (NaN if it holds no finite sample).
 *
 * O(n): one running sum slides along the series, adding the sample that enters and removing
 * the one that leaves. A plain running sum accumulates round-off with every step, so it runs
 * on values recentred on the series mean (small numbers for a series with a large offset) and
 * with Neumaier compensation, which keeps the error near one rounding of the window sum. */
#include "detrend_internal.h"
#include "slowscan/status.h"

#include <math.h>

typedef struct {
    double sum, carry; /* value = sum + carry; carry collects the low-order bits lost */
    size_t count;      /* finite samples in the window */
} window_sum;

static void compensated_add(window_sum *w, double v)
{
    double t = w->sum + v;
    if (fabs(w->sum) >= fabs(v))
        w->carry += (w->sum - t) + v;
    else
        w->carry += (v - t) + w->sum;
    w->sum = t;
}

static void window_enter(window_sum *w, double x, double mean)
{
    if (isfinite(x)) {
        compensated_add(w, x - mean);
        w->count++;
    }
}

static void window_leave(window_sum *w, double x, double mean)
{
    if (isfinite(x)) {
        compensated_add(w, -(x - mean));
        if (--w->count == 0)
            w->sum = w->carry = 0.0; /* an empty window sums to exactly zero, not residue */
    }
}

int detrend_moving_trend(double bandwidth, double dt, const double *x, size_t n,
                         double *trend)
{
    size_t h = detrend_clamp_count(round(bandwidth / (2.0 * dt)), n);
    double mean = detrend_finite_mean(x, n);
    window_sum w = {0.0, 0.0, 0};
    /* the window of i = 0 is [0, h] */
    for (size_t j = 0; j <= h && j < n; j++)
        window_enter(&w, x[j], mean);
    for (size_t i = 0; i < n; i++) {
        trend[i] = w.count ? mean + (w.sum + w.carry) / (double)w.count : NAN;
        if (i + 1 + h < n)
            window_enter(&w, x[i + 1 + h], mean);
        if (i >= h)
            window_leave(&w, x[i - h], mean);
    }
    return SLOWSCAN_OK;
}
