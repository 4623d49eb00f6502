/* The feedback figure of a forced run: above, the flux against the response with every
 * window's line drawn only over the response's range in its window (a Gregory-type plot);
 * below, lambda at each window's middle time with its interval, weak windows as rings and
 * reversed ones in the flag colour, and the zero line (no restoring feedback). */
#include "report_internal.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdio.h>

/* feedback.h's flag bits, repeated here: the report library does not include the core's
 * response module headers. */
enum { WEAK = 1, REVERSED = 2 };

static void feedback_layout(const void *data, report_layout *layout)
{
    (void)data;
    slowscan_report_layout_grid(layout, 2, 1, REPORT_TALL_ROW_HEIGHT);
}

static void scatter_panel(report_figure *fig, const report_feedback_data *d)
{
    const double *xs[1] = {d->response}, *ys[1] = {d->flux};
    double x0, x1, y0, y1;
    report_range(xs, 1, d->n, &x0, &x1);
    report_range(ys, 1, d->n, &y0, &y1);
    report_ticks xt, yt;
    report_axes a = report_cell_axes(fig, 0, 0, x0, x1, y0, y1, &xt, &yt);
    report_axes_draw(fig, &a, &xt, &yt, 0, "scatter");
    report_hline(0.0, INK_FAINT, 1);
    for (size_t i = 0; i < d->n; i++)
        if (isfinite(d->flux[i]) && isfinite(d->response[i]))
            report_dot(&a, d->response[i], d->flux[i], 1.2, INK_NULL, 1);
    for (size_t j = 0; j < d->windows; j++) {
        if (!isfinite(d->lambda[j]) || !isfinite(d->t_min[j]))
            continue;
        int colour = d->flags[j] ? INK_MARK : INK_TRACE0 + (int)(j % REPORT_TRACES);
        report_segment(d->t_min[j], d->forcing[j] + d->lambda[j] * d->t_min[j], d->t_max[j],
                       d->forcing[j] + d->lambda[j] * d->t_max[j], colour, 1.4);
    }
    char title[300];
    snprintf(title, sizeof title, "%s against %s, each window's fitted line over its range",
             d->flux_name, d->response_name);
    report_cell_labels(fig, &a, 0, 0, title, d->response_name, d->flux_name);
}

static void lambda_panel(report_figure *fig, const report_feedback_data *d)
{
    const double *all[3] = {d->lambda, d->lo, d->hi};
    double lo, hi, t0 = d->middle[0], t1 = d->middle[d->windows - 1];
    report_range(all, 3, d->windows, &lo, &hi);
    hi = fmax(hi, 0.05 * (hi - lo)); /* the zero line always shows */
    if (!(t1 > t0))
        t0 -= 1, t1 += 1;
    double pad = 0.04 * (t1 - t0);
    report_ticks xt, yt;
    report_axes a = report_cell_axes(fig, 1, 0, t0 - pad, t1 + pad, lo, hi, &xt, &yt);
    report_axes_draw(fig, &a, &xt, &yt, 0, "lambda");
    report_hline(0.0, INK_TEXT, 1);
    for (size_t j = 0; j < d->windows; j++) {
        if (!isfinite(d->lambda[j]))
            continue;
        int colour = d->flags[j] & REVERSED ? INK_MARK : INK_SERIES;
        if (isfinite(d->lo[j]) && isfinite(d->hi[j]))
            report_segment(d->middle[j], d->lo[j], d->middle[j], d->hi[j], INK_BAND, 2.4);
        report_dot(&a, d->middle[j], d->lambda[j], 2.2, colour, !(d->flags[j] & WEAK));
    }
    char title[300];
    snprintf(title, sizeof title, "lambda per window (95%% interval); ring: weak, red: "
             "reversed; drift test: %s", d->verdict);
    report_cell_labels(fig, &a, 1, 0, title, d->time_name, "lambda");
}

static int feedback_draw(report_figure *fig, const void *data)
{
    const report_feedback_data *d = data;
    if (d->n < 2 || d->windows < 1)
        return SLOWSCAN_ESHORT;
    report_heading(fig, "%s: feedback N = F + lambda T in sliding windows", d->name);
    scatter_panel(fig, d);
    lambda_panel(fig, d);
    return SLOWSCAN_OK;
}

const report_figure_type slowscan_report_feedback_figure = {"feedback", feedback_layout,
                                                             feedback_draw};
