/* The emulate figure: the linear emulation inside its noise band, the run it is compared
 * with, and the departure: a line at its first sample and the time after it shaded. */
#include "report_internal.h"
#include "slowscan/status.h"

#include <math.h>
#include <plplot.h>
#include <stdio.h>

static void emulate_layout(const void *data, report_layout *layout)
{
    (void)data;
    slowscan_report_layout_grid(layout, 1, 1, REPORT_TALL_ROW_HEIGHT);
}

static int emulate_draw(report_figure *fig, const void *data)
{
    const report_emulate_data *d = data;
    if (d->n < 2)
        return SLOWSCAN_ESHORT;
    const double *all[3] = {d->lower, d->upper, d->actual ? d->actual : d->emulated};
    double lo, hi;
    report_range(all, 3, d->n, &lo, &hi);
    char fitted[REPORT_TEXT_MAX], title[300];
    report_heading(fig, "%s: linear-response emulation against the run", d->name);
    report_ticks xt, yt;
    report_axes a = report_cell_axes(fig, 0, 0, d->time[0], d->time[d->n - 1], lo, hi, &xt, &yt);
    report_axes_enter(&a);
    if (d->departed)
        report_rect(d->departure_time, d->time[d->n - 1], lo, hi, INK_AHEAD);
    report_band(d->n, d->time, d->lower, d->upper, INK_BAND);
    report_axes_draw(fig, &a, &xt, &yt, 0, "emulation");
    report_path(&a, d->n, d->time, d->emulated, INK_TREND, 2.0);
    if (d->actual)
        report_path(&a, d->n, d->time, d->actual, INK_SERIES, 1.1);
    char t[32], size[32];
    if (d->departed) {
        plwidth(1.6);
        report_vline(d->departure_time, INK_MARK, 0);
        plwidth(1.0);
        snprintf(title, sizeof title, "emulation (amber) in its %g%% band, run (blue); departure "
                 "from %s, mean size %s", 100 * d->band_level, report_number(t, d->departure_time),
                 report_number(size, d->size));
    } else
        snprintf(title, sizeof title, "emulation (amber) in its %g%% band, run (blue); no "
                 "departure%s", 100 * d->band_level, d->actual ? "" : " test (no run compared)");
    report_cell_labels(fig, &a, 0, 0,
                       report_fit(fig, title, REPORT_SIZE_BODY, a.area.x1 - a.area.x0, fitted),
                       d->time_name, "response");
    return SLOWSCAN_OK;
}

const report_figure_type slowscan_report_emulate_figure = {"emulate", emulate_layout, emulate_draw};
