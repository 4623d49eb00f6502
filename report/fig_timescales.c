/* The timescales figure: the step response with its fitted modes (each mode's own curve,
 * the sum over them), then the residuals under it on the same time axis. */
#include "report_internal.h"
#include "slowscan/status.h"

#include <math.h>
#include <plplot.h>
#include <stdio.h>
#include <string.h>

static void timescales_layout(const void *data, report_layout *layout)
{
    (void)data;
    memset(layout, 0, sizeof *layout);
    layout->rows = 2;
    layout->cols[0] = layout->cols[1] = 1;
    layout->heights[0] = REPORT_TALL_ROW_HEIGHT;
    layout->heights[1] = REPORT_ROW_HEIGHT;
    layout->row_height = REPORT_ROW_HEIGHT;
}

static void draw_modes(report_figure *fig, const report_timescales_data *d)
{
    const double *all[2 + REPORT_TRACES] = {d->data, d->fit};
    size_t shown = d->nmodes < REPORT_TRACES ? d->nmodes : REPORT_TRACES;
    for (size_t k = 0; k < shown; k++)
        all[2 + k] = d->modes[k];
    double lo, hi;
    report_range(all, 2 + shown, d->n, &lo, &hi);
    report_ticks xt, yt;
    report_axes a = report_cell_axes(fig, 0, 0, d->time[0], d->time[d->n - 1], lo, hi, &xt, &yt);
    report_axes_enter(&a);
    report_axes_draw(fig, &a, &xt, &yt, 0, "modes");
    for (size_t i = 0; i < d->n; i++)
        report_dot(&a, d->time[i], d->data[i], 1.6, INK_NULL, 1);
    for (size_t k = 0; k < shown; k++)
        report_path(&a, d->n, d->time, d->modes[k], INK_TRACE0 + (int)k, 1.2);
    report_path(&a, d->n, d->time, d->fit, INK_TREND, 2.2);
    char title[300], eq[32], taus[160] = "";
    size_t used = 0;
    for (size_t k = 0; k < d->nmodes && used < sizeof taus; k++) {
        char t[32];
        used += (size_t)snprintf(taus + used, sizeof taus - used, "%s%s", k ? ", " : "",
                                 report_number(t, d->taus[k]));
    }
    snprintf(title, sizeof title, "data (dots), sum of %zu modes (thick), each mode (thin); "
             "tau = %s; equilibrium %s (extrapolated); flags: %s", d->nmodes, taus,
             report_number(eq, d->equilibrium), d->flags);
    char fitted[REPORT_TEXT_MAX];
    report_cell_labels(fig, &a, 0, 0,
                       report_fit(fig, title, REPORT_SIZE_BODY, a.area.x1 - a.area.x0, fitted),
                       d->time_name, "response");
}

static void draw_residuals(report_figure *fig, const report_timescales_data *d)
{
    const double *all[1] = {d->residual};
    double lo, hi;
    report_range(all, 1, d->n, &lo, &hi);
    report_ticks xt, yt;
    report_axes a = report_cell_axes(fig, 1, 0, d->time[0], d->time[d->n - 1], lo, hi, &xt, &yt);
    report_axes_enter(&a);
    report_axes_draw(fig, &a, &xt, &yt, 0, "residuals");
    report_hline(0.0, INK_FAINT, 0);
    report_path(&a, d->n, d->time, d->residual, INK_SERIES, 1.0);
    report_cell_labels(fig, &a, 1, 0, "residuals (data - fitted modes)", d->time_name, "residual");
}

static int timescales_draw(report_figure *fig, const void *data)
{
    const report_timescales_data *d = data;
    if (d->n < 2)
        return SLOWSCAN_ESHORT;
    report_heading(fig, "%s: relaxation modes of the step response", d->name);
    draw_modes(fig, d);
    draw_residuals(fig, d);
    return SLOWSCAN_OK;
}

const report_figure_type slowscan_report_timescales_figure = {"timescales", timescales_layout,
                                                              timescales_draw};
