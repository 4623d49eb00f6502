/* Drawing helpers on the current PLplot stream: panels, labels, paths, bands, marks. */
#include "report_internal.h"

#include <math.h>
#include <plplot.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* PLplot reads '#' as the start of an escape sequence; "##" is a literal '#'. */
static const char *escaped(const char *text, char *out, size_t size)
{
    size_t k = 0;
    for (const char *c = text; *c && k + 2 < size; c++) {
        if (*c == '#')
            out[k++] = '#';
        out[k++] = *c;
    }
    out[k] = '\0';
    return out;
}

void report_panel(const report_figure *fig, size_t row, size_t col, double x0, double x1,
                  double y0, double y1, int numbers)
{
    report_box box = slowscan_report_cell(slowscan_report_figure_layout(fig), row, col);
    plvpor(box.x0, box.x1, box.y0, box.y1);
    plwind(x0, x1, y0, y1);
    report_frame(numbers);
}

void report_frame(int numbers)
{
    plcol0(INK_TEXT);
    plwidth(1.0);
    pllsty(1);
    if (numbers & REPORT_LABELLED_GRID)
        plbox("bc", 0.0, 0, "bc", 0.0, 0);
    else
        plbox(numbers & REPORT_X_NUMBERS ? "bcnst" : "bcst", 0.0, 0, "bcnstv", 0.0, 0);
}

void report_heading(const char *text)
{
    char buf[512];
    plvpor(0.0, 1.0, 0.0, 1.0);
    plwind(0.0, 1.0, 0.0, 1.0);
    plcol0(INK_TEXT);
    plschr(0, 1.0);
    plmtex("t", -1.6, 0.5, 0.5, escaped(text, buf, sizeof buf));
    plschr(0, REPORT_TEXT_SCALE);
}

void report_mtex(const char *side, double disp, double pos, double just, const char *text)
{
    char buf[512];
    plmtex(side, disp, pos, just, escaped(text, buf, sizeof buf));
}

void report_labels(const char *title, const char *ylabel, const char *xlabel)
{
    plcol0(INK_TEXT);
    if (title)
        report_mtex("t", 0.7, 0.0, 0.0, title);
    if (ylabel)
        report_mtex("l", 5.2, 0.5, 0.5, ylabel);
    if (xlabel)
        report_mtex("b", 2.6, 0.5, 0.5, xlabel);
}

void report_text(double x, double y, double just, const char *text)
{
    char buf[512];
    plptex(x, y, 1.0, 0.0, just, escaped(text, buf, sizeof buf));
}

/* Calls `run` on every maximal stretch [start, end) where keep(i) holds. */
static void for_each_run(size_t n, int (*keep)(size_t, const double *, const double *),
                         const double *a, const double *b,
                         void (*run)(size_t, size_t, const double *, const double *, const double *),
                         const double *x)
{
    size_t start = 0;
    while (start < n) {
        while (start < n && !keep(start, a, b))
            start++;
        size_t end = start;
        while (end < n && keep(end, a, b))
            end++;
        if (end > start)
            run(start, end, x, a, b);
        start = end;
    }
}

static int both_finite(size_t i, const double *a, const double *b)
{
    return isfinite(a[i]) && (!b || isfinite(b[i]));
}

static void line_run(size_t start, size_t end, const double *x, const double *y, const double *unused)
{
    (void)unused;
    if (end - start == 1)
        plstring(1, x + start, y + start, "·");
    else
        plline((PLINT)(end - start), x + start, y + start);
}

void report_path(size_t n, const double *x, const double *y, int colour)
{
    plcol0(colour);
    plwidth(1.2);
    for_each_run(n, both_finite, y, NULL, line_run, x);
    plwidth(1.0);
}

/* One polygon: along lo forwards, back along hi. */
static void band_run(size_t start, size_t end, const double *x, const double *lo, const double *hi)
{
    size_t m = end - start;
    if (m < 2)
        return;
    PLFLT *px = malloc(4 * m * sizeof *px), *py = px + 2 * m;
    if (!px)
        return; /* the band is decoration; the path is still drawn */
    for (size_t i = 0; i < m; i++) {
        px[i] = x[start + i];
        py[i] = lo[start + i];
        px[2 * m - 1 - i] = x[start + i];
        py[2 * m - 1 - i] = hi[start + i];
    }
    plfill((PLINT)(2 * m), px, py);
    free(px);
}

void report_band(size_t n, const double *x, const double *lo, const double *hi, int colour)
{
    plcol0(colour);
    for_each_run(n, both_finite, lo, hi, band_run, x);
}

static void straight(double x0, double x1, double y0, double y1, int colour, int dashed)
{
    PLFLT x[2] = {x0, x1}, y[2] = {y0, y1};
    plcol0(colour);
    pllsty(dashed ? 3 : 1);
    plline(2, x, y);
    pllsty(1);
}

void report_hline(double y, int colour, int dashed)
{
    PLFLT x0, x1, y0, y1;
    plgvpw(&x0, &x1, &y0, &y1);
    straight(x0, x1, y, y, colour, dashed);
}

void report_vline(double x, int colour, int dashed)
{
    PLFLT x0, x1, y0, y1;
    plgvpw(&x0, &x1, &y0, &y1);
    straight(x, x, y0, y1, colour, dashed);
}

void report_rect(double x0, double x1, double y0, double y1, int colour)
{
    PLFLT x[4] = {x0, x1, x1, x0}, y[4] = {y0, y0, y1, y1};
    plcol0(colour);
    plfill(4, x, y);
}

void report_outline(double x0, double x1, double y0, double y1, int colour, double width)
{
    PLFLT x[5] = {x0, x1, x1, x0, x0}, y[5] = {y0, y0, y1, y1, y0};
    plcol0(colour);
    plwidth(width);
    plline(5, x, y);
    plwidth(1.0);
}

void report_range(const double *const *arrays, size_t narrays, size_t n, double *lo, double *hi)
{
    double a = INFINITY, b = -INFINITY;
    for (size_t k = 0; k < narrays; k++)
        for (size_t i = 0; arrays[k] && i < n; i++)
            if (isfinite(arrays[k][i])) {
                a = fmin(a, arrays[k][i]);
                b = fmax(b, arrays[k][i]);
            }
    if (!(a < b)) {
        double mid = isfinite(a) ? a : 0.0;
        a = mid - 1;
        b = mid + 1;
    }
    double pad = 0.05 * (b - a);
    *lo = a - pad;
    *hi = b + pad;
}

const char *report_number(char buf[32], double v)
{
    if (!isfinite(v))
        return "NA";
    /* Large values are times (days, years): whole numbers read better than 8.77e+03. */
    snprintf(buf, 32, fabs(v) >= 1e3 && fabs(v) < 1e9 ? "%.0f" : fabs(v) >= 1e-3 || v == 0 ? "%.3g" : "%.2e", v);
    return buf;
}
