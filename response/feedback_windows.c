/* The windows of a feedback run from what the user asked (slowscan_feedback_windows,
 * feedback.h): defaults and checks in one place, so that the command and the Python package
 * cannot drift apart; they only word the refusals. */
#include "slowscan/feedback.h"
#include "slowscan/status.h"
#include "modes_internal.h"

#include <math.h>

feedback_request slowscan_feedback_request_default(void)
{
    const screen_length none = {NAN, 0, LENGTH_AXIS};
    feedback_request q = {.skip = none, .window = none, .stride = none, .span = 0,
                          .span_from = NAN, .span_until = NAN};
    return q;
}

static int refuse(feedback_windows_detail *d, feedback_refusal why, int status)
{
    d->refusal = why;
    return status;
}

/* A given length in time units: percent of `of`, else converted on the axis. */
static int resolve(const screen_length *len, feedback_length which, const time_axis *axis,
                   double of, double *out, feedback_windows_detail *d)
{
    screen_length on;
    if (slowscan_screen_length_on_axis(len, axis, &on) != SLOWSCAN_OK) {
        d->length = which;
        return refuse(d, FEEDBACK_REFUSAL_UNIT, SLOWSCAN_EINVAL);
    }
    *out = on.percent ? on.amount / 100 * of : on.amount;
    return SLOWSCAN_OK;
}

static int given(const screen_length *len)
{
    return !isnan(len->amount);
}

/* One fit over the span: increasing, and inside the record within a millionth of a step
 * (the ends are times of samples, read back from text). */
static int span(const double *time, size_t n, const feedback_request *q, feedback_config *c,
                feedback_windows_detail *d)
{
    double dt = d->step;
    c->span_from = q->span_from;
    c->span_until = q->span_until;
    if (!(c->span_from < c->span_until) || c->span_from < time[0] - 1e-6 * dt ||
        c->span_until > time[n - 1] + 1e-6 * dt)
        return refuse(d, FEEDBACK_REFUSAL_SPAN, SLOWSCAN_EINVAL);
    return SLOWSCAN_OK;
}

/* The window: 50% of the record after skip, at most 100 time units, when not given (common
 * practice, no source: a century of a forced run, two windows' worth of record at least). */
static int window(const time_axis *axis, const feedback_request *q, feedback_config *c,
                  feedback_windows_detail *d)
{
    double dt = d->step, rest = d->rest;
    if (given(&q->window)) {
        int st = resolve(&q->window, FEEDBACK_LENGTH_WINDOW, axis, rest, &c->window, d);
        if (st != SLOWSCAN_OK)
            return st;
    } else
        c->window = fmin(50.0 / 100 * rest, 100);
    if (c->window > rest + 1e-6 * dt)
        return refuse(d, FEEDBACK_REFUSAL_WINDOW_LONG, SLOWSCAN_EINVAL);
    /* W = round(window/dt) + 1 samples: 3 steps make the 4 a line and its error need */
    if (c->window < 3 * dt * (1 - 1e-9))
        return refuse(d, FEEDBACK_REFUSAL_WINDOW_SHORT, SLOWSCAN_EINVAL);
    return SLOWSCAN_OK;
}

int slowscan_feedback_windows(const double *time, size_t n, const time_axis *axis,
                              const feedback_request *q, feedback_config *c,
                              feedback_windows_detail *d)
{
    *d = (feedback_windows_detail){FEEDBACK_REFUSAL_NONE, FEEDBACK_LENGTH_SKIP, NAN, NAN};
    if (!time || n < 4)
        return refuse(d, FEEDBACK_REFUSAL_SAMPLES, SLOWSCAN_ESHORT);
    double whole = time[n - 1] - time[0];
    d->step = modes_mean_step(time, n);
    if (q->span)
        return span(time, n, q, c, d);
    double dt = d->step;
    c->skip = 0;
    if (given(&q->skip)) {
        int st = resolve(&q->skip, FEEDBACK_LENGTH_SKIP, axis, whole, &c->skip, d);
        if (st != SLOWSCAN_OK)
            return st;
    }
    d->rest = whole - c->skip;
    if (!(d->rest >= 3 * dt))
        return refuse(d, FEEDBACK_REFUSAL_SKIP, SLOWSCAN_EINVAL);
    int st = window(axis, q, c, d);
    if (st != SLOWSCAN_OK)
        return st;
    /* a tenth of the window: ten starts per window length (common practice, no source) */
    c->stride = fmax(c->window / 10, dt);
    if (given(&q->stride)) {
        st = resolve(&q->stride, FEEDBACK_LENGTH_STRIDE, axis, d->rest, &c->stride, d);
        if (st == SLOWSCAN_OK && c->stride < dt * (1 - 1e-6))
            st = refuse(d, FEEDBACK_REFUSAL_STRIDE_SHORT, SLOWSCAN_EINVAL);
    }
    return st;
}
