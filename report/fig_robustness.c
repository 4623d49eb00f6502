/* The robustness figure: small multiples, one panel per detrending method and test. In an
 * indicator's panel tau is drawn against the window, one line per bandwidth (light to dark as
 * the bandwidth grows), so a reader sees at once whether the sign holds over the grid and
 * which choice moves it; a filled point has p <= 0.05, an open one not, and a crimson ring
 * marks the run's own choice. recovery_trend (no window) is its t-value against the
 * bandwidth. All tau panels share one axis. Grid values need not be evenly spaced, so points
 * sit at grid positions labelled with the values as given. */
#include "report_internal.h"
#include "slowscan/status.h"

#include <math.h>
#include <plplot.h>
#include <stdio.h>
#include <string.h>

enum { KEY_ROWS_MAX = 12, GAP = 6 };

static size_t tests_of(const report_robustness_data *d)
{
    return d->nindicators + (d->drift != 0);
}

/* Three panels to a row while a method's tests fit, else two, more only when the page would
 * run out of rows. */
static size_t columns(const report_robustness_data *d)
{
    size_t tests = tests_of(d), panels = (d->ndetrends ? d->ndetrends : 1) * tests;
    size_t cols = tests >= 1 && tests <= 3 ? tests : 2;
    while ((panels + cols - 1) / cols > REPORT_MAX_ROWS && cols < REPORT_MAX_COLS)
        cols++;
    return cols;
}

/* Room on the right for the key: the widest of its lines, estimated from the text length
 * here (the layout is fixed before a stream exists to measure with) and generous. */
static int key_room(const report_robustness_data *d)
{
    size_t widest = strlen("own choice (ring)");
    for (size_t b = 0; b < d->nbandwidths && d->bandwidth_labels; b++)
        widest = strlen(d->bandwidth_labels[b]) > widest ? strlen(d->bandwidth_labels[b]) : widest;
    return 40 + 8 * (int)widest;
}

static void robustness_layout(const void *data, report_layout *layout)
{
    const report_robustness_data *d = data;
    memset(layout, 0, sizeof *layout);
    slowscan_report_layout_grid(layout, (d->ndetrends ? d->ndetrends : 1) * tests_of(d), columns(d),
                                REPORT_TALL_ROW_HEIGHT);
    layout->right_margin = key_room(d);
}

static size_t cell_index(const report_robustness_data *d, size_t i, size_t j, size_t w, size_t b)
{
    return ((i * d->nindicators + j) * d->nwindows + w) * d->nbandwidths + b;
}

/* Line colour of bandwidth b of nb: colour map 1 from light to dark. */
static void bandwidth_colour(size_t b, size_t nb)
{
    plcol1(nb > 1 ? 0.25 + 0.75 * (double)b / (double)(nb - 1) : 0.8);
}

/* Grid labels as ticks at positions 0..n-1, every k-th so that they do not touch. */
static void grid_ticks(report_figure *fig, report_ticks *t, size_t n, const char *const *labels,
                       double length)
{
    double widest = 0;
    for (size_t i = 0; i < n; i++)
        widest = fmax(widest, report_text_width(fig, labels[i], REPORT_SIZE_SMALL));
    size_t step = 1;
    while (step < n && length * (double)step / (double)n < widest + 8)
        step++;
    t->count = 0;
    for (size_t i = 0; i < n && t->count < REPORT_MAX_TICKS; i += step) {
        t->value[t->count] = (double)i;
        snprintf(t->label[t->count++], sizeof t->label[0], "%s", labels[i]);
    }
}

typedef struct {
    size_t method, test, row, col;
    double tau_lo, tau_hi;
} panel_place;

/* A grid point in its line's colour (set by the caller): filled when p <= 0.05 (or when
 * there is no p), a ring otherwise; the run's own choice ringed in crimson. */
static void mark(const report_axes *a, double x, double y, double p, int have_p, int own)
{
    if (!isfinite(y))
        return;
    report_dot(a, x, y, 3.4, REPORT_CURRENT_COLOUR, !have_p || p <= 0.05);
    if (own)
        report_dot(a, x, y, 6.5, INK_MARK, 0);
}

/* One line through the grid positions (NaN breaks it), in the current colour-map-1 colour. */
static void grid_line(const double *v, size_t n, size_t stride)
{
    for (size_t i = 0; i + 1 < n; i++) {
        PLFLT x[2] = {(double)i, (double)(i + 1)}, y[2] = {v[i * stride], v[(i + 1) * stride]};
        if (isfinite(y[0]) && isfinite(y[1]))
            plline(2, x, y);
    }
}

/* A panel's title: the test, and the detrending method when the figure has several (one
 * method is named in the heading). */
static void panel_title(const report_robustness_data *d, size_t method, const char *test, char *out,
                        size_t size)
{
    if (d->ndetrends > 1)
        snprintf(out, size, "%s | %s", test, d->detrend_labels[method]);
    else
        snprintf(out, size, "%s", test);
}

static void indicator_panel(report_figure *fig, const report_robustness_data *d, const panel_place *at)
{
    int has_bw = !d->detrend_has_bandwidth || d->detrend_has_bandwidth[at->method];
    size_t nb = has_bw ? d->nbandwidths : 1, nw = d->nwindows;
    report_ticks xt, yt;
    report_axes a = report_cell_axes(fig, at->row, at->col, -0.5, (double)nw - 0.5, at->tau_lo,
                                     at->tau_hi, &xt, &yt);
    grid_ticks(fig, &xt, nw, d->window_labels, a.area.x1 - a.area.x0);
    report_axes_enter(&a);
    report_hline(0.0, INK_FAINT, 0);
    report_axes_draw(fig, &a, &xt, &yt, 0, d->indicator_labels[at->test]);
    const double *tau = d->tau + cell_index(d, at->method, at->test, 0, 0);
    const double *p = d->p_value + cell_index(d, at->method, at->test, 0, 0);
    for (size_t b = 0; b < nb; b++) {
        bandwidth_colour(b, nb);
        plwidth(2.0);
        grid_line(tau + b, nw, d->nbandwidths);
        plwidth(1.0);
    }
    for (size_t b = 0; b < nb; b++)
        for (size_t w = 0; w < nw; w++) {
            size_t k = w * d->nbandwidths + b;
            bandwidth_colour(b, nb);
            int own = (long)at->method == d->default_detrend && (long)w == d->default_window &&
                      (long)b == d->default_bandwidth;
            mark(&a, (double)w, tau[k], p[k], d->have_p, own);
        }
    char title[300];
    panel_title(d, at->method, d->indicator_labels[at->test], title, sizeof title);
    int percent = nw > 0 && strchr(d->window_labels[0], '%') != NULL;
    char xlabel[200];
    snprintf(xlabel, sizeof xlabel, "window (%s)", percent ? "% of the span" : d->time_name);
    report_cell_labels(fig, &a, at->row, at->col, title, xlabel, "Kendall tau");
}

static void drift_panel(report_figure *fig, const report_robustness_data *d, const panel_place *at)
{
    static const char *const no_bandwidth[1] = {"none"};
    int has_bw = !d->detrend_has_bandwidth || d->detrend_has_bandwidth[at->method];
    size_t nb = has_bw ? d->nbandwidths : 1;
    const double *t = d->drift_t + at->method * d->nbandwidths, *p = d->drift_p + at->method * d->nbandwidths;
    const double *ts[1] = {t};
    double lo, hi;
    report_range(ts, 1, nb, &lo, &hi);
    lo = fmin(lo, 0.0);
    hi = fmax(hi, 0.0);
    report_ticks xt, yt;
    report_axes a = report_cell_axes(fig, at->row, at->col, -0.5, (double)nb - 0.5, lo, hi, &xt, &yt);
    grid_ticks(fig, &xt, nb, has_bw ? d->bandwidth_labels : no_bandwidth, a.area.x1 - a.area.x0);
    report_axes_enter(&a);
    report_hline(0.0, INK_FAINT, 0);
    report_axes_draw(fig, &a, &xt, &yt, 0, "recovery_trend");
    plcol1(0.8);
    plwidth(2.0);
    grid_line(t, nb, 1);
    plwidth(1.0);
    for (size_t b = 0; b < nb; b++) {
        plcol1(0.8);
        mark(&a, (double)b, t[b], p[b], d->have_p,
             (long)at->method == d->default_detrend && (long)b == d->default_bandwidth);
    }
    char title[300];
    panel_title(d, at->method, "recovery_trend", title, sizeof title);
    report_cell_labels(fig, &a, at->row, at->col, title, "bandwidth", "t(a1)");
}

/* The key in the right margin: a line per bandwidth, then what the marks mean. */
/* A line of the key, shortened to the room the layout estimated for it. */
static void key_text(report_figure *fig, const char *text, double x, double top, int colour)
{
    char fitted[REPORT_TEXT_MAX];
    report_say(fig, report_fit(fig, text, REPORT_SIZE_SMALL, REPORT_PAGE_WIDTH - 6 - x, fitted),
               REPORT_SIZE_SMALL, 0.0, x, top, colour);
}

static void draw_key(report_figure *fig, const report_robustness_data *d)
{
    const report_layout *layout = slowscan_report_figure_layout(fig);
    double x = REPORT_PAGE_WIDTH - layout->right_margin + 8, top = REPORT_PAGE_TOP + 30;
    double line = report_line_height(fig, REPORT_SIZE_SMALL) + 3;
    key_text(fig, "bandwidth", x, top, INK_TEXT);
    size_t shown = d->nbandwidths < KEY_ROWS_MAX ? d->nbandwidths : KEY_ROWS_MAX;
    for (size_t b = 0; b < shown; b++) {
        size_t which = shown < d->nbandwidths ? b * (d->nbandwidths - 1) / (shown - 1) : b;
        double y = top + (double)(b + 1) * line;
        key_text(fig, d->bandwidth_labels[which], x + 22, y, INK_TEXT);
        double middle = y + 0.5 * (line - 3);
        bandwidth_colour(which, d->nbandwidths);
        report_page_line(fig, x, middle, x + 16, middle, REPORT_CURRENT_COLOUR, 2.4);
    }
    double y = top + (double)(shown + 2) * line;
    key_text(fig, d->have_p ? "filled: p <= 0.05" : "no p (no surrogates)", x, y, INK_TEXT);
    key_text(fig, "ring: own choice", x, y + line, INK_MARK);
}

/* One axis for every tau panel, within [-1, 1]: the spread over the grid is what the figure
 * is for, so zero is shown (a faint line) only when the values come near it. */
static void tau_range(const report_robustness_data *d, size_t methods, double *lo, double *hi)
{
    const double *all[1] = {d->tau};
    report_range(all, 1, methods * d->nindicators * d->nwindows * d->nbandwidths, lo, hi);
    *lo = fmax(-1.0, *lo);
    *hi = fmin(1.0, *hi);
    double room = 0.04 * (*hi - *lo); /* a point at either end is drawn whole */
    *lo -= room;
    *hi += room;
}

static int robustness_draw(report_figure *fig, const void *data)
{
    const report_robustness_data *d = data;
    size_t tests = tests_of(d), methods = d->ndetrends ? d->ndetrends : 1;
    if (d->nwindows == 0 || d->nbandwidths == 0 || tests == 0)
        return SLOWSCAN_EINVAL;
    if (d->ndetrends == 1)
        report_heading(fig, "%s: does the trend hold over windows and bandwidths? (%s detrending)",
                       d->name, d->detrend_labels[0]);
    else
        report_heading(fig, "%s: does the trend hold over windows, bandwidths and detrending?",
                       d->name);
    panel_place at = {0, 0, 0, 0, -1, 1};
    tau_range(d, methods, &at.tau_lo, &at.tau_hi);
    size_t cols = slowscan_report_figure_layout(fig)->cols[0];
    for (size_t k = 0; k < methods * tests; k++) {
        at.method = k / tests;
        at.test = k % tests;
        at.row = k / cols;
        at.col = k % cols;
        if (at.test < d->nindicators)
            indicator_panel(fig, d, &at);
        else
            drift_panel(fig, d, &at);
    }
    draw_key(fig, d);
    return SLOWSCAN_OK;
}

const report_figure_type slowscan_report_robustness_figure = {"robustness", robustness_layout,
                                                              robustness_draw};
