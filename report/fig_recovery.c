/* The recovery-rate figure: lambda(t) of the drifting AR(1) with its pointwise 95% band and
 * the zero line (lambda = 0: no recovery). A projected crossing, when given, lies beyond the
 * data and is drawn as such: a shaded, labelled extrapolation region, dashed lines only. */
#include "report_internal.h"
#include "slowscan/status.h"

#include <math.h>
#include <plplot.h>
#include <stdio.h>

static void recovery_layout(const void *data, report_layout *layout)
{
    (void)data;
    slowscan_report_layout_grid(layout, 1, 1, REPORT_TALL_ROW_HEIGHT);
}

/* The time axis reaches the end of the crossing's interval when there is one. */
static double time_end(const report_recovery_data *d)
{
    double end = d->time[d->n - 1];
    const report_crossing *c = d->crossing;
    for (size_t i = 0; c && i < c->path_n; i++)
        end = fmax(end, c->path_time[i]);
    if (c && c->has_crossing && isinf(c->hi) && isfinite(c->horizon))
        end = fmax(end, c->horizon);
    if (c && c->has_crossing)
        for (int k = 0; k < 3; k++) {
            double t = k == 0 ? c->time : k == 1 ? c->lo : c->hi;
            if (isfinite(t) && t > end)
                end = t;
        }
    return end;
}

/* The straight-line trend of the coefficient carried on past the record, dashed. */
static void draw_extension(const report_crossing *c)
{
    if (c->path_n < 2)
        return;
    plcol0(INK_SERIES);
    pllsty(3);
    plline((PLINT)c->path_n, c->path_time, c->path_lambda);
    pllsty(1);
}

/* Room under the x label for the note on the extrapolation, page units. */
enum { NOTE_ROOM = 24 };

/* The note on the extrapolation, on its own line under the panel's x label (inside the
 * panel it would cross the lines it explains). */
static void extrapolation_note(report_figure *fig, const report_axes *a, const char *text)
{
    char fitted[REPORT_TEXT_MAX];
    double top = a->area.y1 + NOTE_ROOM + 6 + report_line_height(fig, REPORT_SIZE_SMALL);
    report_say(fig, report_fit(fig, text, REPORT_SIZE_BODY, a->area.x1 - a->area.x0, fitted),
               REPORT_SIZE_BODY, 1.0, a->area.x1, top, INK_MARK);
}

static void draw_crossing(report_figure *fig, const report_axes *a, const report_recovery_data *d)
{
    const report_crossing *c = d->crossing;
    double last = d->time[d->n - 1];
    PLFLT x0, x1, y0, y1;
    plgvpw(&x0, &x1, &y0, &y1);
    if (c->beyond_horizon) {
        draw_extension(c);
        extrapolation_note(fig, a, "extrapolation: no crossing of lambda = 0 within twice the record");
        return;
    }
    if (!c->has_crossing)
        return;
    report_rect(last, x1, y0, y1, INK_AHEAD);
    draw_extension(c);
    if (isfinite(c->lo) && !isnan(c->hi)) { /* an interval open above runs off the panel */
        PLFLT bx[2] = {fmax(c->lo, x0), fmin(c->hi, x1)}, by[2] = {0.0, 0.0};
        plcol0(INK_MARK);
        plwidth(4.0);
        plline(2, bx, by);
        plwidth(1.0);
    }
    report_vline(last, INK_TEXT, 1);
    if (isfinite(c->time)) {
        plwidth(1.6);
        report_vline(c->time, INK_MARK, 1);
        plwidth(1.0);
    }
    char text[200], t[32], lo[32], hi[32];
    snprintf(text, sizeof text, "extrapolation, not a forecast: lambda = 0 at %s (95%%: %s to %s)",
             report_number(t, c->time), report_number(lo, c->lo),
             isfinite(c->hi) ? report_number(hi, c->hi) : "beyond");
    extrapolation_note(fig, a, text);
}

static int recovery_draw(report_figure *fig, const void *data)
{
    const report_recovery_data *d = data;
    if (d->n < 2)
        return SLOWSCAN_ESHORT;
    const double *all[3] = {d->lambda, d->lo, d->hi};
    double lo, hi;
    report_range(all, 3, d->n, &lo, &hi);
    lo = fmin(lo, 0.0);
    hi = fmax(hi, 0.05 * (hi - lo)); /* the zero line always shows */
    char title[300], ylabel[200], a1[32], p[32];
    report_heading(fig, "%s: recovery rate of the drifting AR(1)", d->name);
    report_ticks xt, yt;
    report_axes a = report_cell_axes(fig, 0, 0, d->time[0], time_end(d), lo, hi, &xt, &yt);
    a.area.y1 -= NOTE_ROOM;
    report_axes_enter(&a);
    if (d->crossing)
        draw_crossing(fig, &a, d);
    report_band(d->n, d->time, d->lo, d->hi, INK_BAND);
    report_axes_draw(fig, &a, &xt, &yt, 0, "recovery");
    report_hline(0.0, INK_TEXT, 0);
    report_path(&a, d->n, d->time, d->lambda, INK_SERIES, 1.3);
    snprintf(title, sizeof title, "lambda(t) with its pointwise 95%% band; t(a1) = %s, "
             "surrogate p = %s", report_number(a1, d->t_a1), report_number(p, d->p_value));
    snprintf(ylabel, sizeof ylabel, "lambda (1/%s)", d->time_name);
    report_cell_labels(fig, &a, 0, 0, title, d->time_name, ylabel);
    return SLOWSCAN_OK;
}

const report_figure_type slowscan_report_recovery_figure = {"recovery", recovery_layout, recovery_draw};
