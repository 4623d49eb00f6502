/* The samples of a step-forced run that a fit of its modes uses (slowscan_timescales_select,
 * timescales.h): the onset's default, skip, the complete-record and sample-count checks, in
 * one place for the timescales and emulate commands and the Python package. */
#include "slowscan/timescales.h"
#include "slowscan/status.h"
#include "modes_internal.h"

#include <math.h>

static int refuse(timescales_selection *s, timescales_refusal why, int status)
{
    s->refusal = why;
    return status;
}

/* skip in time units: a percentage of the record's span, else converted on the axis. */
static int skip_length(const double *time, size_t n, const time_axis *axis,
                       const screen_length *skip, double *out)
{
    *out = 0;
    if (!skip || isnan(skip->amount) || n == 0)
        return SLOWSCAN_OK;
    screen_length on;
    if (slowscan_screen_length_on_axis(skip, axis, &on) != SLOWSCAN_OK)
        return SLOWSCAN_EINVAL;
    *out = on.percent ? on.amount / 100 * (time[n - 1] - time[0]) : on.amount;
    return SLOWSCAN_OK;
}

int slowscan_timescales_select(const double *time, const double *y, const double *f, size_t n,
                               const time_axis *axis, double onset, const screen_length *skip,
                               size_t max_modes, double *since, timescales_selection *out)
{
    timescales_selection *s = out;
    *s = (timescales_selection){.onset = onset, .dt = 1.0, .need = 3 * max_modes + 3,
                                .refusal = TIMESCALES_REFUSAL_NONE};
    if (n > 1)
        s->dt = modes_mean_step(time, n);
    /* a step just before the record: its first sample is one step into the response
     * (common practice, no source) */
    if (isnan(onset) && n > 0)
        s->onset = time[0] - s->dt;
    if (skip_length(time, n, axis, skip, &s->skip) != SLOWSCAN_OK)
        return refuse(s, TIMESCALES_REFUSAL_UNIT, SLOWSCAN_EINVAL);
    s->first = n;
    for (size_t i = 0; i < n && s->first == n; i++) {
        double from = time[i] - s->onset;
        if (from >= 0 && from >= s->skip)
            s->first = i;
    }
    s->count = n - s->first;
    for (size_t i = s->first; i < n; i++) {
        /* the fit takes a complete record: a gap would be read as the response's shape */
        if (isnan(y[i]) || (f && isnan(f[i]))) {
            s->sample = i;
            s->column = !isnan(y[i]);
            return refuse(s, TIMESCALES_REFUSAL_MISSING, SLOWSCAN_EINVAL);
        }
        if (since)
            since[i - s->first] = time[i] - s->onset;
    }
    if (s->count < s->need)
        return refuse(s, TIMESCALES_REFUSAL_SAMPLES, SLOWSCAN_ESHORT);
    return SLOWSCAN_OK;
}
