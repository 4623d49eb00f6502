/* The robustness heat-maps: per detrending method and indicator, tau over the window x
 * bandwidth grid on one symmetric colour scale (white at tau = 0), cells with p <= 0.05
 * dotted, the default choice outlined; recovery_trend (no window) as one column of cells over
 * bandwidth on a scale of its own, each cell carrying its t-value. Grid values need not be
 * evenly spaced, so cells are drawn by index and labelled with the values as given. */
#include "report_internal.h"
#include "slowscan/status.h"

#include <math.h>
#include <string.h>
#include <plplot.h>
#include <stdio.h>

enum { COLOUR_BAR_ROOM = 96 };

static size_t tests_of(const report_robustness_data *d)
{
    return d->nindicators + (d->drift != 0);
}

/* A row per method while the tests fit three to a row; otherwise two to a row, widened only
 * when the page would run out of rows. */
static size_t columns(const report_robustness_data *d)
{
    size_t tests = tests_of(d), panels = (d->ndetrends ? d->ndetrends : 1) * tests;
    size_t cols = tests >= 1 && tests <= 3 ? tests : 2;
    while ((panels + cols - 1) / cols > REPORT_MAX_ROWS && cols < REPORT_MAX_COLS)
        cols++;
    return cols;
}

static void robustness_layout(const void *data, report_layout *layout)
{
    const report_robustness_data *d = data;
    slowscan_report_layout_grid(layout, (d->ndetrends ? d->ndetrends : 1) * tests_of(d), columns(d),
                       REPORT_TALL_ROW_HEIGHT);
    layout->right_margin = COLOUR_BAR_ROOM;
}

static size_t cell_index(const report_robustness_data *d, size_t i, size_t j, size_t w, size_t b)
{
    return ((i * d->nindicators + j) * d->nwindows + w) * d->nbandwidths + b;
}

/* Half-width of a symmetric colour scale: the largest |value| rounded up to `unit` (at least
 * one unit, at most `cap`). */
static double symmetric_scale(const double *v, size_t n, double unit, double cap)
{
    double top = unit;
    for (size_t i = 0; i < n; i++)
        if (isfinite(v[i]))
            top = fmax(top, fabs(v[i]));
    return fmin(cap, ceil(top / unit - 1e-9) * unit);
}

/* Every k-th grid value along one side, so that at most `most` labels share an axis. */
static void grid_labels(const char *side, size_t n, const char *const *labels, size_t most)
{
    size_t step = (n + most - 1) / most;
    for (size_t i = 0; i < n; i += step) {
        double pos = ((double)i + 0.5) / (double)n;
        if (side[0] == 'b')
            report_mtex("b", 1.3, pos, 0.5, labels[i]);
        else
            report_mtex("lv", 0.8, pos, 1.0, labels[i]);
    }
}

/* One cell at (x, y): coloured by value/scale, grey when NA, dotted when p <= 0.05. */
static void heat_cell(double x, double y, double value, double scale, double p)
{
    if (isfinite(value)) {
        plcol1(0.5 + 0.5 * fmax(-1.0, fmin(1.0, value / scale)));
        PLFLT px[4] = {x - 0.5, x + 0.5, x + 0.5, x - 0.5}, py[4] = {y - 0.5, y - 0.5, y + 0.5, y + 0.5};
        plfill(4, px, py);
    } else {
        report_rect(x - 0.5, x + 0.5, y - 0.5, y + 0.5, INK_MISSING);
    }
    if (p <= 0.05) {
        PLFLT px = x, py = y;
        plcol0(INK_TEXT);
        plpoin(1, &px, &py, 17);
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

/* Which test and method a panel shows, and where it sits. */
typedef struct {
    size_t method, test, row, col, cols;
    double tau_scale, t_scale;
} panel_place;

static void heat_panel(report_figure *fig, const report_robustness_data *d, const panel_place *at)
{
    static const char *const no_bandwidth[1] = {"none"};
    int drift = at->test >= d->nindicators;
    size_t nw = drift ? 1 : d->nwindows;
    int has_bw = !d->detrend_has_bandwidth || d->detrend_has_bandwidth[at->method];
    size_t nb = has_bw ? d->nbandwidths : 1;
    report_panel(fig, at->row, at->col, -0.5, (double)nw - 0.5, -0.5, (double)nb - 0.5,
                 REPORT_LABELLED_GRID);
    for (size_t w = 0; w < nw; w++)
        for (size_t b = 0; b < nb; b++) {
            size_t k = drift ? at->method * d->nbandwidths + b : cell_index(d, at->method, at->test, w, b);
            double v = drift ? d->drift_t[k] : d->tau[k];
            double p = !d->have_p ? NAN : drift ? d->drift_p[k] : d->p_value[k];
            heat_cell((double)w, (double)b, v, drift ? at->t_scale : at->tau_scale, p);
            char buf[32];
            if (drift) { /* the t-value itself: its colour scale differs from tau's */
                plcol0(INK_TEXT);
                report_text(0.0, (double)b + 0.2, 0.5, report_number(buf, v));
            }
        }
    long w0 = drift ? 0 : d->default_window;
    if ((long)at->method == d->default_detrend && w0 >= 0 && d->default_bandwidth >= 0)
        report_outline((double)w0 - 0.5, (double)w0 + 0.5, (double)d->default_bandwidth - 0.5,
                       (double)d->default_bandwidth + 0.5, INK_TEXT, 3.0);
    report_frame(REPORT_LABELLED_GRID);
    static const char *const one_window[1] = {"-"};
    /* Panels three or more to a row have room for fewer window labels. */
    grid_labels("b", nw, drift ? one_window : d->window_labels, at->cols <= 2 ? 12 : 5);
    grid_labels("l", nb, has_bw ? d->bandwidth_labels : no_bandwidth, 12);
    char title[300], xlabel[200];
    const char *method = d->ndetrends ? d->detrend_labels[at->method] : "";
    if (drift)
        snprintf(title, sizeof title, "recovery_trend | %s: t(a1)", method);
    else
        snprintf(title, sizeof title, "%s | %s: tau", d->indicator_labels[at->test], method);
    report_labels(title, NULL, NULL);
    /* The ticks are the grid as given: a percent of the span, or a length in time units. */
    int percent = d->nwindows > 0 && strchr(d->window_labels[0], '%') != NULL;
    if (drift) /* its own colour scale, so say what the strongest colour means */
        snprintf(xlabel, sizeof xlabel, "no window; colour |t| <= %g", at->t_scale);
    else
        snprintf(xlabel, sizeof xlabel, "window (%s)", percent ? "% of the span" : d->time_name);
    report_mtex("b", 2.5, 0.5, 0.5, xlabel);
    plmtex("l", 4.6, 0.5, 0.5, "bandwidth");
}

static int robustness_draw(report_figure *fig, const void *data)
{
    const report_robustness_data *d = data;
    size_t tests = tests_of(d), methods = d->ndetrends ? d->ndetrends : 1;
    if (d->nwindows == 0 || d->nbandwidths == 0 || tests == 0)
        return SLOWSCAN_EINVAL;
    char heading[400];
    snprintf(heading, sizeof heading, "%s: trend robustness; %sbox: own choice", d->name,
             d->have_p ? "dot: p <= 0.05, " : "");
    report_heading(heading);
    panel_place at = {0, 0, 0, 0, slowscan_report_figure_layout(fig)->cols[0], 0.05, 1.0};
    at.tau_scale = symmetric_scale(d->tau, methods * d->nindicators * d->nwindows * d->nbandwidths,
                                   0.05, 1.0);
    if (d->drift)
        at.t_scale = symmetric_scale(d->drift_t, methods * d->nbandwidths, 1.0, INFINITY);
    size_t cols = at.cols;
    for (size_t k = 0; k < methods * tests; k++) {
        at.method = k / tests;
        at.test = k % tests;
        at.row = k / cols;
        at.col = k % cols;
        heat_panel(fig, d, &at);
        if (d->nindicators > 0 && (k + 1 == cols || (methods * tests < cols && k + 1 == methods * tests)))
            colour_bar(at.tau_scale);
    }
    return SLOWSCAN_OK;
}

const report_figure_type slowscan_report_robustness_figure = {"robustness", robustness_layout,
                                                     robustness_draw};
