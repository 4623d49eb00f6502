/* Drawing helpers shared by the figure types of report/ (not a public interface). */
#ifndef SLOWSCAN_REPORT_INTERNAL_H
#define SLOWSCAN_REPORT_INTERNAL_H

#include "slowscan/report.h"

#include <stddef.h>

/* Our palette: PLplot colour-map-0 indices, set per stream in figure.c. Data colours are all
 * clearly chromatic and text/axes neutral, so data can be told from furniture by hue (the
 * pixel tests rely on it); the blue/orange pairs stay distinct for red-green colour blindness. */
enum {
    INK_BACKGROUND = 0,
    INK_TEXT,      /* near-black: axes, labels */
    INK_FAINT,     /* light grey: zero lines, grid */
    INK_SERIES,    /* deep blue */
    INK_TREND,     /* orange */
    INK_RESIDUAL,  /* slate blue */
    INK_INDICATOR, /* blue-green */
    INK_MARK,      /* vermilion: the observed statistic, flagged series, extrapolation */
    INK_BAND,      /* pale blue: confidence bands */
    INK_SPAN,      /* warm off-white: the analysed span */
    INK_NULL,      /* grey-blue: null histograms, plain points */
    INK_MISSING,   /* mid grey: NA cells */
    INK_COUNT
};

/* How a panel's frame is drawn: numbers on the y axis always, on the x axis only with
 * REPORT_X_NUMBERS; REPORT_LABELLED_GRID: a bare frame (the caller labels the cells). */
enum { REPORT_X_NUMBERS = 1, REPORT_LABELLED_GRID = 2 };

/* Sets the viewport to a cell of the layout and the world window to [x0,x1] x [y0,y1], and
 * draws the frame (`numbers`: the flags above). */
void report_panel(const report_figure *fig, size_t row, size_t col, double x0, double x1,
                  double y0, double y1, int numbers);
/* Redraws the frame of the current panel (after fills that covered it). */
void report_frame(int numbers);
/* The figure's heading, centred at the top of the page. */
void report_heading(const char *text);
/* Text size relative to PLplot's default, the same in every figure. */
#define REPORT_TEXT_SCALE 0.78

/* Left-aligned panel title, the y label and (when not NULL) the x label. Text is escaped. */
void report_labels(const char *title, const char *ylabel, const char *xlabel);
/* plmtex with the text escaped. */
void report_mtex(const char *side, double disp, double pos, double just, const char *text);
/* Text at world (x, y), justification 0 (left) .. 1 (right), escaped. */
void report_text(double x, double y, double just, const char *text);

/* A polyline through the finite points, broken at NaN. */
void report_path(size_t n, const double *x, const double *y, int colour);
/* The area between lo and hi, filled where both are finite. */
void report_band(size_t n, const double *x, const double *lo, const double *hi, int colour);
/* Horizontal / vertical lines across the current window; dashed when `dashed`. */
void report_hline(double y, int colour, int dashed);
void report_vline(double x, int colour, int dashed);
/* A filled rectangle in world coordinates. */
void report_rect(double x0, double x1, double y0, double y1, int colour);
/* The rectangle's outline, line width `width`. */
void report_outline(double x0, double x1, double y0, double y1, int colour, double width);

/* Finite min and max over several arrays, widened by 5% (a flat or empty range gets +-1). */
void report_range(const double *const *arrays, size_t narrays, size_t n, double *lo, double *hi);

/* "%.3g"-style number or "NA" into buf (size 32). */
const char *report_number(char buf[32], double v);

#endif
