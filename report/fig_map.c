/* Maps of a grid's screening (report_map_data): per test a raster of the statistic over the
 * two horizontal dimensions, flagged cells framed, and a colour bar per scale in the right
 * margin. The scale is ours: colour map 1 is replaced for this figure (its stream is its
 * own) by a diverging ramp, deep teal through pale stone to ochre and brick, so the sign
 * reads by hue and the size by depth, and grey (no value) stands apart from both ends. */
#include "report_internal.h"
#include "slowscan/status.h"

#include <math.h>
#include <plplot.h>
#include <stdio.h>
#include <string.h>

enum { KEY_WIDTH = 150, BAR_WIDTH = 14, BAR_HEIGHT = 150, FRAME = 2 };

static void map_layout(const void *data, report_layout *layout)
{
    const report_map_data *d = data;
    memset(layout, 0, sizeof *layout);
    slowscan_report_layout_grid(layout, d->ntests ? d->ntests : 1, d->ntests > 4 ? 3 : 2,
                                REPORT_TALL_ROW_HEIGHT);
    layout->right_margin = KEY_WIDTH;
}

static void diverging_scale(void)
{
    PLFLT pos[5] = {0.0, 0.25, 0.5, 0.75, 1.0};
    PLFLT r[5] = {16 / 255.0, 92 / 255.0, 238 / 255.0, 214 / 255.0, 140 / 255.0};
    PLFLT g[5] = {84 / 255.0, 160 / 255.0, 232 / 255.0, 160 / 255.0, 52 / 255.0};
    PLFLT b[5] = {96 / 255.0, 150 / 255.0, 214 / 255.0, 60 / 255.0, 30 / 255.0};
    plscmap1n(256);
    plscmap1l(1, 5, pos, r, g, b, NULL);
}

/* The edges of cell i along a coordinate: halfway to each neighbour (a lone cell: +-0.5). */
static void cell_edges(const double *c, size_t n, size_t i, double *lo, double *hi)
{
    double before = i > 0 ? c[i] - c[i - 1] : n > 1 ? c[1] - c[0] : 1.0;
    double after = i + 1 < n ? c[i + 1] - c[i] : before;
    *lo = c[i] - 0.5 * before;
    *hi = c[i] + 0.5 * after;
}

static void axis_range(const double *c, size_t n, double *lo, double *hi)
{
    double a, b, e, f;
    cell_edges(c, n, 0, &a, &b);
    cell_edges(c, n, n - 1, &e, &f);
    *lo = fmin(fmin(a, b), fmin(e, f));
    *hi = fmax(fmax(a, b), fmax(e, f));
}

/* The half-width of recovery_trend's scale: the largest |t|, at least 1. */
static double t_limit(const report_map_data *d)
{
    double most = 1.0;
    for (size_t j = 0; j < d->ntests; j++)
        for (size_t i = 0; !d->tests[j].rolling && i < d->nx * d->ny; i++)
            if (isfinite(d->tests[j].statistic[i]))
                most = fmax(most, fabs(d->tests[j].statistic[i]));
    return ceil(most);
}

static void fill_cell(double x0, double x1, double y0, double y1)
{
    PLFLT x[4] = {x0, x1, x1, x0}, y[4] = {y0, y0, y1, y1};
    plfill(4, x, y);
}

static void map_panel(report_figure *fig, const report_map_data *d, size_t j, double limit)
{
    const report_layout *layout = slowscan_report_figure_layout(fig);
    size_t row = j / layout->cols[0], col = j % layout->cols[0];
    double x0, x1, y0, y1;
    axis_range(d->x, d->nx, &x0, &x1);
    axis_range(d->y, d->ny, &y0, &y1);
    report_ticks xt, yt;
    report_axes a = report_cell_axes(fig, row, col, x0, x1, y0, y1, &xt, &yt);
    report_axes_enter(&a);
    const report_map_test *t = &d->tests[j];
    for (size_t iy = 0; iy < d->ny; iy++)
        for (size_t ix = 0; ix < d->nx; ix++) {
            double v = t->statistic[iy * d->nx + ix], cx0, cx1, cy0, cy1;
            cell_edges(d->x, d->nx, ix, &cx0, &cx1);
            cell_edges(d->y, d->ny, iy, &cy0, &cy1);
            if (isfinite(v))
                plcol1(0.5 + 0.5 * fmax(-1.0, fmin(1.0, v / limit)));
            else
                plcol0(INK_MISSING);
            fill_cell(cx0, cx1, cy0, cy1);
        }
    /* frames after every fill, so a neighbour's fill cannot cover one */
    for (size_t i = 0; i < d->nx * d->ny; i++) {
        if (!t->flagged || !t->flagged[i])
            continue;
        double cx0, cx1, cy0, cy1;
        cell_edges(d->x, d->nx, i % d->nx, &cx0, &cx1);
        cell_edges(d->y, d->ny, i / d->nx, &cy0, &cy1);
        double ix = 0.2 * (cx1 - cx0), iy = 0.2 * (cy1 - cy0);
        report_outline(cx0 + ix, cx1 - ix, cy0 + iy, cy1 - iy, INK_TEXT, FRAME);
    }
    report_axes_draw(fig, &a, &xt, &yt, 0, t->label);
    char title[300];
    snprintf(title, sizeof title, "%s: %s", t->label, t->rolling ? "Kendall tau" : "t(a1)");
    report_cell_labels(fig, &a, row, col, title, d->x_name, d->y_name);
}

/* A vertical colour bar of the scale -limit..limit with its ends and zero labelled; returns
 * the y below it. */
static double colour_bar(report_figure *fig, const char *title, double limit, double x, double top)
{
    double line = report_line_height(fig, REPORT_SIZE_SMALL);
    report_say(fig, title, REPORT_SIZE_SMALL, 0.0, x, top, INK_TEXT);
    double bar_top = top + 1.5 * line + 8, steps = 64; /* room for the half line of "+1" */
    report_page_view view = report_page_enter(fig);
    for (int k = 0; k < (int)steps; k++) {
        double y_hi = bar_top + BAR_HEIGHT * k / steps, y_lo = bar_top + BAR_HEIGHT * (k + 1) / steps;
        plcol1(1.0 - (k + 0.5) / steps);
        fill_cell(x, x + BAR_WIDTH, view.height - y_lo, view.height - y_hi);
    }
    report_page_leave(&view);
    report_record(fig, REPORT_BOX_PANEL, (report_rect_px){x, x + BAR_WIDTH, bar_top, bar_top + BAR_HEIGHT},
                  title);
    char text[32];
    const double at[3] = {limit, 0.0, -limit};
    for (int k = 0; k < 3; k++) {
        snprintf(text, sizeof text, "%+g", at[k] == 0 ? 0.0 : at[k]);
        double middle = bar_top + BAR_HEIGHT * k / 2.0;
        report_textspec spec = {at[k] == 0 ? "0" : text, REPORT_SIZE_SMALL, 0.0, 0};
        report_text_draw(fig, &spec, x + BAR_WIDTH + 6,
                         report_anchor_centred(fig, REPORT_SIZE_SMALL, middle), INK_TEXT);
    }
    return bar_top + BAR_HEIGHT + line + 12;
}

static void draw_key(report_figure *fig, const report_map_data *d, double limit)
{
    const report_layout *layout = slowscan_report_figure_layout(fig);
    double x = REPORT_PAGE_WIDTH - layout->right_margin + 12, top = REPORT_PAGE_TOP + 20;
    int rolling = 0, drift = 0;
    for (size_t j = 0; j < d->ntests; j++)
        rolling |= d->tests[j].rolling, drift |= !d->tests[j].rolling;
    if (rolling)
        top = colour_bar(fig, "Kendall tau", 1.0, x, top);
    if (drift)
        top = colour_bar(fig, "t(a1)", limit, x, top);
    double line = report_line_height(fig, REPORT_SIZE_SMALL);
    report_key_item items[] = {{INK_MISSING, 1, "no value"}};
    report_key(fig, items, 1, x, top);
    report_page_line(fig, x, top + line + 12, x + 14, top + line + 12, INK_TEXT, FRAME);
    report_say(fig, "framed: flagged", REPORT_SIZE_SMALL, 0.0, x + 20, top + line + 6, INK_TEXT);
}

static int map_draw(report_figure *fig, const void *data)
{
    const report_map_data *d = data;
    if (d->ntests == 0 || d->nx == 0 || d->ny == 0)
        return SLOWSCAN_EINVAL;
    diverging_scale();
    report_heading(fig, "%s: where does the screening find a trend?", d->name);
    double limit = t_limit(d);
    for (size_t j = 0; j < d->ntests; j++)
        map_panel(fig, d, j, d->tests[j].rolling ? 1.0 : limit);
    draw_key(fig, d, limit);
    return SLOWSCAN_OK;
}

const report_figure_type slowscan_report_map_figure = {"map", map_layout, map_draw};
