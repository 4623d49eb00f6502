/* Drawing helpers on the current PLplot stream: paths (decimated per pixel column), bands,
 * lines and marks. */
#include "report_internal.h"

#include <math.h>
#include <plplot.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

void report_heading(report_figure *fig, const char *fmt, ...)
{
    char heading[REPORT_TEXT_MAX], fitted[REPORT_TEXT_MAX];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(heading, sizeof heading, fmt, ap);
    va_end(ap);
    report_say(fig, report_fit(fig, heading, REPORT_SIZE_HEADING, REPORT_PAGE_WIDTH - 20, fitted),
               REPORT_SIZE_HEADING, 0.5, 0.5 * REPORT_PAGE_WIDTH, 10, INK_TEXT);
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

static size_t put(double *px, double *py, size_t k, double x, double y)
{
    px[k] = x;
    py[k] = y;
    return k + 1;
}

static long column_of(const report_axes *a, double x)
{
    return (long)floor(report_px_x(a, x));
}

/* Each pixel column's samples reduced to their first, minimum, maximum and last, in time
 * order; a missing sample still breaks the line. Returns the count written. */
static size_t decimate(const report_axes *a, size_t n, const double *x, const double *y, double *px,
                       double *py)
{
    size_t k = 0, i = 0;
    while (i < n) {
        if (!isfinite(y[i]) || !isfinite(x[i])) {
            if (k > 0 && isfinite(py[k - 1]))
                k = put(px, py, k, x[i], NAN);
            i++;
            continue;
        }
        long column = column_of(a, x[i]);
        size_t first = i, lo = i, hi = i, last = i;
        for (i++; i < n && isfinite(y[i]) && isfinite(x[i]) && column_of(a, x[i]) == column; i++) {
            lo = y[i] < y[lo] ? i : lo;
            hi = y[i] > y[hi] ? i : hi;
            last = i;
        }
        size_t mid0 = lo < hi ? lo : hi, mid1 = lo < hi ? hi : lo;
        k = put(px, py, k, x[first], y[first]);
        if (mid0 != first)
            k = put(px, py, k, x[mid0], y[mid0]);
        if (mid1 != mid0 && mid1 != first)
            k = put(px, py, k, x[mid1], y[mid1]);
        if (last != mid1 && last != first)
            k = put(px, py, k, x[last], y[last]);
    }
    return k;
}

void report_path(const report_axes *a, size_t n, const double *x, const double *y, int colour,
                 double width)
{
    plcol0(colour);
    plwidth(width);
    /* Each sample is kept at most once and followed by at most one break. */
    size_t room = 2 * n;
    double *px = n > 4 * (size_t)(a->area.x1 - a->area.x0) ? malloc(2 * room * sizeof *px) : NULL;
    if (px) {
        size_t k = decimate(a, n, x, y, px, px + room);
        for_each_run(k, both_finite, px + room, NULL, line_run, px);
        free(px);
    } else { /* short paths (or no memory for the reduction): every point */
        for_each_run(n, both_finite, y, NULL, line_run, x);
    }
    plwidth(1.0);
}

void report_path_stepped(const report_axes *a, size_t n, const double *x, const double *y, int colour,
                         double width)
{
    size_t step = 0, last = n, m = 0;
    for (size_t i = 0; i < n; i++)
        if (isfinite(y[i])) {
            if (last < n && (step == 0 || i - last < step))
                step = i - last;
            last = i;
        }
    double *px = step > 1 ? malloc(4 * n * sizeof *px) : NULL;
    if (!px) { /* values at every sample (or no memory): the path as it is */
        report_path(a, n, x, y, colour, width);
        return;
    }
    double *py = px + 2 * n;
    last = n;
    for (size_t i = 0; i < n; i++) {
        if (!isfinite(y[i]))
            continue;
        if (last < n && i - last > step) { /* a real gap: missing windows */
            px[m] = x[i];
            py[m++] = NAN;
        }
        px[m] = x[i];
        py[m++] = y[i];
        last = i;
    }
    report_path(a, m, px, py, colour, width);
    free(px);
}

void report_segment(double x0, double y0, double x1, double y1, int colour, double width)
{
    PLFLT x[2] = {x0, x1}, y[2] = {y0, y1};
    if (colour != REPORT_CURRENT_COLOUR)
        plcol0(colour);
    plwidth(width);
    plline(2, x, y);
    plwidth(1.0);
}

void report_dot(const report_axes *a, double x, double y, double r, int colour, int filled)
{
    enum { SIDES = 24 };
    PLFLT px[SIDES + 1], py[SIDES + 1];
    double rx = r * (a->x1 - a->x0) / (a->area.x1 - a->area.x0);
    double ry = r * (a->y1 - a->y0) / (a->area.y1 - a->area.y0);
    for (int k = 0; k <= SIDES; k++) {
        double angle = 6.283185307179586 * k / SIDES;
        px[k] = x + rx * cos(angle);
        py[k] = y + ry * sin(angle);
    }
    if (colour != REPORT_CURRENT_COLOUR)
        plcol0(colour);
    if (filled)
        plfill(SIDES, px, py);
    plwidth(1.3);
    plline(SIDES + 1, px, py);
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

void report_page_line(report_figure *fig, double x0, double y0, double x1, double y1, int colour,
                      double width)
{
    report_page_view view = report_page_enter(fig);
    double height = view.height;
    report_segment(x0, height - y0, x1, height - y1, colour, width);
    report_page_leave(&view);
}

void report_page_patch(report_figure *fig, report_rect_px r, int colour)
{
    report_page_view view = report_page_enter(fig);
    double height = view.height;
    report_rect(r.x0, r.x1, height - r.y1, height - r.y0, colour);
    report_page_leave(&view);
}

double report_key(report_figure *fig, const report_key_item *items, size_t count, double x, double top)
{
    double line = report_line_height(fig, REPORT_SIZE_SMALL), middle = top + 0.5 * line;
    for (size_t k = 0; k < count; k++) {
        const report_key_item *it = &items[k];
        if (it->patch)
            report_page_patch(fig, (report_rect_px){x, x + 14, middle - 5, middle + 5}, it->colour);
        else
            report_page_line(fig, x, middle, x + 14, middle, it->colour, 2.0);
        report_rect_px box = report_say(fig, it->text, REPORT_SIZE_SMALL, 0.0, x + 18, top, INK_TEXT);
        x = box.x1 + 14;
    }
    return x;
}

const char *report_fit(report_figure *fig, const char *text, report_size size, double width,
                       char out[REPORT_TEXT_MAX])
{
    snprintf(out, REPORT_TEXT_MAX, "%s", text);
    size_t len = strlen(out);
    while (len > 4 && report_text_width(fig, out, size) > width) {
        len = len > 12 ? len - len / 8 : len - 1; /* a few measurements, not one per letter */
        while (len > 0 && ((unsigned char)out[len] & 0xC0) == 0x80)
            len--; /* not inside a UTF-8 character */
        snprintf(out + len, REPORT_TEXT_MAX - len, "...");
    }
    return out;
}
