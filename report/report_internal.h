/* Drawing helpers shared by the figure types of report/ (not a public interface).
 *
 * Layout works in page units (pixels of the PNG, points of SVG/PDF), x from the left and y
 * from the top, as report_rect_px. Text is measured before it is placed (text.c) and every
 * string and panel drawn is recorded on the figure, so a figure can be checked for clipped
 * or overprinted text (the box manifest, slowscan_report_batch_record_boxes). */
#ifndef SLOWSCAN_REPORT_INTERNAL_H
#define SLOWSCAN_REPORT_INTERNAL_H

#include "slowscan/report.h"

#include <stddef.h>

/* Our palette: PLplot colour-map-0 indices, set per stream in figure.c. Data colours are all
 * clearly chromatic and text/axes neutral, so data can be told from furniture by hue (the
 * pixel tests rely on it). */
enum {
    INK_BACKGROUND = 0,
    INK_TEXT,     /* near-black: axes, labels */
    INK_FAINT,    /* light grey: zero lines, grid */
    INK_SERIES,   /* ink blue: the record */
    INK_TREND,    /* amber: its trend */
    INK_MARK,     /* crimson: flagged results, the observed statistic when flagged */
    INK_BAND,     /* pale blue: confidence bands */
    INK_WINDOW,   /* pale gold: the first window on the time axis */
    INK_NULL,     /* blue-grey: null intervals, plain points */
    INK_MISSING,  /* mid grey: NA */
    INK_DIM,      /* mid grey text: secondary notes */
    INK_AHEAD,    /* pale lilac: time beyond the record (extrapolation) */
    INK_TRACE0,   /* the indicator traces: INK_TRACE0 + k, REPORT_TRACES of them */
    REPORT_TRACES = 11,
    INK_COUNT = INK_TRACE0 + REPORT_TRACES
};

/* Sizes of text, in millimetres in text.c (so they do not change with the page size). */
typedef enum { REPORT_SIZE_BODY, REPORT_SIZE_SMALL, REPORT_SIZE_HEADING, REPORT_SIZE_COUNT } report_size;
enum { REPORT_DPI = 90, REPORT_TEXT_MAX = 512 };

void report_set_size(report_size size);

/* A rectangle of the page in page units, y from the top. */
typedef struct {
    double x0, x1, y0, y1;
} report_rect_px;
int report_rects_meet(report_rect_px a, report_rect_px b);

/* ---- the figure being drawn (figure.c) -------------------------------------------------- */

typedef struct text_meter text_meter;
text_meter *report_meter_alloc(void);
void report_meter_free(text_meter *m);

text_meter *report_figure_meter(report_figure *fig);
double report_figure_height(const report_figure *fig);
typedef enum { REPORT_BOX_TEXT, REPORT_BOX_PANEL } report_box_kind;
/* Notes a drawn box for the manifest (a no-op when nobody asked for one). */
void report_record(report_figure *fig, report_box_kind kind, report_rect_px r, const char *what);
/* The page-unit rectangle of row `row` (its full height, the page's full width). */
report_rect_px report_row_rect(const report_figure *fig, size_t row);
/* Cell `col` of a row: the row split evenly across the page less its right margin. */
report_rect_px report_cell_rect(const report_figure *fig, size_t row, size_t col);

/* ---- text (text.c) ---------------------------------------------------------------------- */

/* A string to place: x is the anchor, just 0 (left) .. 1 (right) along the line; y is the
 * line's reference height (PLplot's: about half a capital). `vertical`: reads upwards. */
typedef struct {
    const char *text;
    report_size size;
    double just;
    int vertical;
} report_textspec;

/* Where the text would cover, drawn at anchor (x, y): its ink widened to the full line. */
report_rect_px report_text_box(report_figure *fig, const report_textspec *t, double x, double y);
double report_text_width(report_figure *fig, const char *text, report_size size);
double report_line_height(report_figure *fig, report_size size);
/* Draws and records the text; returns its box. Text is escaped for PLplot. */
report_rect_px report_text_draw(report_figure *fig, const report_textspec *t, double x, double y,
                                int colour);
/* Horizontal text whose box's top is at `top` (the common case of stacked lines). */
report_rect_px report_say(report_figure *fig, const char *text, report_size size, double just,
                          double x, double top, int colour);
/* The anchor y that puts a line's box top at `top`, or centres it on `middle`. */
double report_anchor_below(report_figure *fig, report_size size, double top);
double report_anchor_centred(report_figure *fig, report_size size, double middle);

/* ---- axes and panels (axes.c) ----------------------------------------------------------- */

enum { REPORT_MAX_TICKS = 16 };
typedef struct {
    size_t count;
    double value[REPORT_MAX_TICKS];
    char label[REPORT_MAX_TICKS][32];
} report_ticks;

/* Round ticks (1, 2, 5 x 10^k) inside [lo, hi], at most `most` of them, labelled with the
 * digits the step needs. */
void report_ticks_round(report_ticks *t, double lo, double hi, size_t most);
/* Round ticks whose labels, `size` text, fit along `length` page units without touching. */
void report_ticks_fitting(report_figure *fig, report_ticks *t, double lo, double hi, double length,
                          int vertical);
/* The widest label of t. */
double report_ticks_widest(report_figure *fig, const report_ticks *t);

/* A panel: its plotting area on the page and the world window shown there. */
typedef struct {
    report_rect_px area;
    double x0, x1, y0, y1;
} report_axes;

/* World to page units. */
double report_px_x(const report_axes *a, double x);
double report_px_y(const report_axes *a, double y);
/* Makes the panel current (viewport and world window), no drawing. */
void report_axes_enter(const report_axes *a);
/* Enters the panel, draws its frame with inward tick marks at xt and yt (either may be NULL)
 * and their labels outside (not x's with REPORT_NO_X_LABELS: a panel sharing the time axis
 * of the one below), and records the panel as `name`. */
enum { REPORT_NO_X_LABELS = 1 };
void report_axes_draw(report_figure *fig, const report_axes *a, const report_ticks *xt,
                      const report_ticks *yt, int flags, const char *name);
/* A panel filling cell (row, col) of the layout: a title line above, x tick labels and an
 * x label below, y tick labels and a y label to the left, sized from the ticks (made here to
 * fit the area). */
report_axes report_cell_axes(report_figure *fig, size_t row, size_t col, double x0, double x1,
                             double y0, double y1, report_ticks *xt, report_ticks *yt);
/* Its title (shortened to fit), x label and y label (either may be NULL). */
void report_cell_labels(report_figure *fig, const report_axes *a, size_t row, size_t col,
                        const char *title, const char *xlabel, const char *ylabel);
/* A y label reading upwards, its left edge at `left`, centred on the area's height. */
void report_y_label(report_figure *fig, const report_rect_px *area, double left, const char *text);
/* Page units for drawing outside panels (x from the left, y from the bottom: height - y),
 * and back to the panel that was current (none when none was set). */
typedef struct {
    double vx0, vx1, vy0, vy1, wx0, wx1, wy0, wy1, height;
} report_page_view;
report_page_view report_page_enter(const report_figure *fig);
void report_page_leave(const report_page_view *v);
/* The frame again, over fills that covered it. */
void report_frame(void);

/* "%.3g"-like text for a value, at least three significant digits and more when fewer would
 * print one of avoid[] (or -1, 0, 1) though v is not equal to it; "NA" when not finite. */
const char *report_number_avoiding(char buf[32], double v, const double *avoid, size_t navoid);
const char *report_number(char buf[32], double v);

/* ---- paths and marks (draw.c) ----------------------------------------------------------- */

/* A polyline through the finite points, broken at NaN; more points than the panel has pixel
 * columns are reduced to each column's first, minimum, maximum and last (the drawn shape is
 * the same and the file does not grow with n). */
void report_path(const report_axes *a, size_t n, const double *x, const double *y, int colour,
                 double width);
/* A path with values every k-th sample (indicators computed on a coarser step): joined
 * from value to value, broken only where more than k samples lack one. */
void report_path_stepped(const report_axes *a, size_t n, const double *x, const double *y, int colour,
                         double width);
/* The area between lo and hi, filled where both are finite. */
void report_band(size_t n, const double *x, const double *lo, const double *hi, int colour);
/* Horizontal / vertical lines across the current window; dashed when `dashed`. */
void report_hline(double y, int colour, int dashed);
void report_vline(double x, int colour, int dashed);
/* A filled rectangle in world coordinates. */
void report_rect(double x0, double x1, double y0, double y1, int colour);
/* The rectangle's outline, line width `width`. */
void report_outline(double x0, double x1, double y0, double y1, int colour, double width);
/* A line segment in world coordinates; REPORT_CURRENT_COLOUR keeps the colour already set
 * (a colour-map-1 shade). */
enum { REPORT_CURRENT_COLOUR = -1 };
void report_segment(double x0, double y0, double x1, double y1, int colour, double width);
/* A disc (filled) or ring of radius r page units at world (x, y). */
void report_dot(const report_axes *a, double x, double y, double r, int colour, int filled);

/* Lines and patches given in page units (leaders, key swatches), outside any panel. */
void report_page_line(report_figure *fig, double x0, double y0, double x1, double y1, int colour,
                      double width);
void report_page_patch(report_figure *fig, report_rect_px r, int colour);

/* A key: swatch (a short line, or a patch) and words, left to right from x with the line's
 * box top at `top`; returns where it ends. */
typedef struct {
    int colour, patch;
    const char *text;
} report_key_item;
double report_key(report_figure *fig, const report_key_item *items, size_t count, double x, double top);

/* text, shortened with "..." until it is at most `width` wide in `size`. */
const char *report_fit(report_figure *fig, const char *text, report_size size, double width,
                       char out[REPORT_TEXT_MAX]);

/* Finite min and max over several arrays, widened by 5% (a flat or empty range gets +-1). */
void report_range(const double *const *arrays, size_t narrays, size_t n, double *lo, double *hi);

/* The page heading, printf-style, shortened with "..." to the page's width and centred in
 * the top strip. */
void report_heading(report_figure *fig, const char *fmt, ...) __attribute__((format(printf, 2, 3)));

#endif
