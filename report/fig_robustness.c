/* The robustness heat-map: per indicator, tau over the window x bandwidth grid on one
 * symmetric colour scale (white at tau = 0), cells with p <= 0.05 dotted, the default
 * choice outlined. Grid values need not be evenly spaced, so cells are drawn by index and
 * labelled with the values as given. */
#include "report_internal.h"
#include "slowscan/status.h"

#include <math.h>
#include <string.h>
#include <plplot.h>
#include <stdio.h>

enum { COLOUR_BAR_ROOM = 96 };

static void robustness_layout(const void *data, report_layout *layout)
{
    const report_robustness_data *d = data;
    report_layout_grid(layout, d->nindicators, 2, REPORT_TALL_ROW_HEIGHT);
    layout->right_margin = COLOUR_BAR_ROOM;
}

static size_t cell_index(const report_robustness_data *d, size_t j, size_t w, size_t b)
{
    return (j * d->nwindows + w) * d->nbandwidths + b;
}

/* Half-width of the colour scale: the largest |tau| rounded up to 0.05 (at least 0.05). */
static double tau_scale(const report_robustness_data *d)
{
    double top = 0.05;
    size_t cells = d->nindicators * d->nwindows * d->nbandwidths;
    for (size_t i = 0; i < cells; i++)
        if (isfinite(d->tau[i]))
            top = fmax(top, fabs(d->tau[i]));
    return fmin(1.0, ceil(top * 20.0 - 1e-9) / 20.0);
}

/* Every k-th grid value along one side, so that at most ~12 labels share an axis. */
static void grid_labels(const char *side, size_t n, const char *const *labels)
{
    size_t step = (n + 11) / 12;
    for (size_t i = 0; i < n; i += step) {
        double pos = ((double)i + 0.5) / (double)n;
        if (side[0] == 'b')
            report_mtex("b", 1.3, pos, 0.5, labels[i]);
        else
            report_mtex("lv", 0.8, pos, 1.0, labels[i]);
    }
}

static void cells(const report_robustness_data *d, size_t j, double scale)
{
    for (size_t w = 0; w < d->nwindows; w++)
        for (size_t b = 0; b < d->nbandwidths; b++) {
            double tau = d->tau[cell_index(d, j, w, b)];
            double x = (double)w, y = (double)b;
            if (isfinite(tau)) {
                plcol1(0.5 + 0.5 * fmax(-1.0, fmin(1.0, tau / scale)));
                PLFLT px[4] = {x - 0.5, x + 0.5, x + 0.5, x - 0.5}, py[4] = {y - 0.5, y - 0.5, y + 0.5, y + 0.5};
                plfill(4, px, py);
            } else {
                report_rect(x - 0.5, x + 0.5, y - 0.5, y + 0.5, INK_MISSING);
            }
            if (d->have_p && d->p_value[cell_index(d, j, w, b)] <= 0.05) {
                PLFLT px = x, py = y;
                plcol0(INK_TEXT);
                plpoin(1, &px, &py, 17);
            }
        }
}

/* The bar is drawn as shades, not as a cairo gradient: PLplot's cairo driver does not free
 * the gradient pattern it makes (12 kB a figure, which adds up over many series). */
enum { BAR_LEVELS = 41 };

static void colour_bar(double scale)
{
    PLFLT width, height, levels[BAR_LEVELS];
    for (int k = 0; k < BAR_LEVELS; k++)
        levels[k] = -scale + 2.0 * scale * k / (BAR_LEVELS - 1);
    const PLFLT *values[1] = {levels};
    PLINT n_values[1] = {BAR_LEVELS}, label_opts[1] = {PL_COLORBAR_LABEL_RIGHT}, sub_ticks[1] = {0};
    PLFLT ticks[1] = {0.0};
    const char *labels[1] = {"Kendall tau"}, *axis_opts[1] = {"bcvtm"};
    plcol0(INK_TEXT);
    plcolorbar(&width, &height, PL_COLORBAR_SHADE, PL_POSITION_RIGHT | PL_POSITION_OUTSIDE,
               0.03, 0.0, 0.05, 0.9, INK_BACKGROUND, INK_TEXT, 1, 0.0, 0.0, 0, 0.0, 1,
               label_opts, labels, 1, axis_opts, ticks, sub_ticks, n_values, values);
}

static void indicator_panel(report_figure *fig, const report_robustness_data *d, size_t j,
                            size_t cols, double scale)
{
    report_panel(fig, j / cols, j % cols, -0.5, (double)d->nwindows - 0.5, -0.5,
                 (double)d->nbandwidths - 0.5, REPORT_LABELLED_GRID);
    cells(d, j, scale);
    if (d->default_window >= 0 && d->default_bandwidth >= 0) {
        double x = (double)d->default_window, y = (double)d->default_bandwidth;
        report_outline(x - 0.5, x + 0.5, y - 0.5, y + 0.5, INK_TEXT, 3.0);
    }
    report_frame(REPORT_LABELLED_GRID);
    grid_labels("b", d->nwindows, d->window_labels);
    grid_labels("l", d->nbandwidths, d->bandwidth_labels);
    char title[300];
    snprintf(title, sizeof title, "%s: tau by window and bandwidth%s", d->indicator_labels[j],
             d->have_p ? "; dot: p <= 0.05" : " (no surrogates: no p)");
    report_labels(title, NULL, NULL);
    char xlabel[200];
    /* The ticks are the grid as given: a percent of the span, or a length in time units. */
    int percent = d->nwindows > 0 && strchr(d->window_labels[0], '%') != NULL;
    snprintf(xlabel, sizeof xlabel, "window (%s); outlined: the default choice",
             percent ? "% of the span" : d->time_name);
    report_mtex("b", 2.8, 0.5, 0.5, xlabel);
    plmtex("l", 4.6, 0.5, 0.5, "bandwidth");
    if (j + 1 == cols || (d->nindicators < cols && j + 1 == d->nindicators))
        colour_bar(scale);
}

static int robustness_draw(report_figure *fig, const void *data)
{
    const report_robustness_data *d = data;
    if (d->nwindows == 0 || d->nbandwidths == 0)
        return SLOWSCAN_EINVAL;
    char heading[300];
    snprintf(heading, sizeof heading, "%s: robustness of the trend to window and bandwidth", d->name);
    report_heading(heading);
    double scale = tau_scale(d);
    size_t cols = report_figure_layout(fig)->cols[0];
    for (size_t j = 0; j < d->nindicators; j++)
        indicator_panel(fig, d, j, cols, scale);
    return SLOWSCAN_OK;
}

const report_figure_type report_robustness_figure = {"robustness", robustness_layout,
                                                     robustness_draw};
