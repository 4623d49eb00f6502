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

static void draw_crossing(const report_recovery_data *d, double y_lo, double y_hi)
{
    const report_crossing *c = d->crossing;
    double last = d->time[d->n - 1];
    PLFLT x0, x1, y0, y1;
    plgvpw(&x0, &x1, &y0, &y1);
    if (c->beyond_horizon) {
        draw_extension(c);
        plcol0(INK_MARK);
        report_text(x0 + 0.98 * (x1 - x0), y_lo + 0.06 * (y_hi - y_lo), 1.0,
                    "extrapolation: no crossing of lambda = 0 within twice the record");
        return;
    }
    if (!c->has_crossing)
        return;
    report_rect(last, x1, y0, y1, INK_SPAN);
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
    plcol0(INK_MARK);
    char text[200], a[32], b[32], e[32];
    snprintf(text, sizeof text, "extrapolation, not a forecast: lambda = 0 at %s (95%%: %s to %s)",
             report_number(a, c->time), report_number(b, c->lo),
             isfinite(c->hi) ? report_number(e, c->hi) : "beyond");
    report_text(x0 + 0.98 * (x1 - x0), y_lo + 0.06 * (y_hi - y_lo), 1.0, text);
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
    char heading[300], title[300], a[32], b[32];
    snprintf(heading, sizeof heading, "%s: recovery rate of the drifting AR(1)", d->name);
    report_heading(heading);
    report_panel(fig, 0, 0, d->time[0], time_end(d), lo, hi, REPORT_X_NUMBERS);
    if (d->crossing)
        draw_crossing(d, lo, hi);
    report_band(d->n, d->time, d->lo, d->hi, INK_BAND);
    report_frame(REPORT_X_NUMBERS);
    report_hline(0.0, INK_TEXT, 0);
    report_path(d->n, d->time, d->lambda, INK_SERIES);
    snprintf(title, sizeof title, "lambda(t) with its pointwise 95%% band; t(a1) = %s, "
             "surrogate p = %s", report_number(a, d->t_a1), report_number(b, d->p_value));
    char ylabel[200];
    snprintf(ylabel, sizeof ylabel, "lambda (1/%s)", d->time_name);
    report_labels(title, ylabel, d->time_name);
    return SLOWSCAN_OK;
}

const report_figure_type slowscan_report_recovery_figure = {"recovery", recovery_layout, recovery_draw};
