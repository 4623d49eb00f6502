/* Panels: the plotting area, its frame and tick marks, and tick labels drawn as our own
 * measured text (PLplot's plbox labels cannot be measured, and were what got clipped). */
#include "report_internal.h"

#include <math.h>
#include <plplot.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Tick mark length and the gap between a frame and its labels, page units. */
enum { TICK_LENGTH = 4, LABEL_GAP = 3 };

/* Step 1, 2 or 5 x 10^k giving at most `most` ticks in [lo, hi]. */
static double round_step(double lo, double hi, size_t most)
{
    double span = hi - lo, raw = span / (double)(most > 1 ? most - 1 : 1);
    double decade = pow(10.0, floor(log10(raw)));
    static const double mantissa[] = {1, 2, 5, 10};
    for (size_t k = 0; k < 4; k++)
        if (mantissa[k] * decade >= raw * (1 - 1e-9))
            return mantissa[k] * decade;
    return 10 * decade;
}

void report_ticks_round(report_ticks *t, double lo, double hi, size_t most)
{
    t->count = 0;
    if (!(hi > lo) || !isfinite(lo) || !isfinite(hi))
        return;
    if (most > REPORT_MAX_TICKS)
        most = REPORT_MAX_TICKS;
    double step = round_step(lo, hi, most);
    int decimals = step >= 1 ? 0 : (int)ceil(-log10(step) - 1e-9);
    int scientific = fmax(fabs(lo), fabs(hi)) >= 1e7 || (step < 1e-4);
    for (double k = ceil(lo / step - 1e-9); k * step <= hi * (1 + 1e-12) + 1e-12 * step &&
                                           t->count < REPORT_MAX_TICKS; k++) {
        double v = k * step;
        if (fabs(v) < 1e-9 * step)
            v = 0; /* no "-0" */
        t->value[t->count] = v;
        if (scientific)
            snprintf(t->label[t->count], sizeof t->label[0], "%.3g", v);
        else
            snprintf(t->label[t->count], sizeof t->label[0], "%.*f", decimals, v);
        t->count++;
    }
}

double report_ticks_widest(report_figure *fig, const report_ticks *t)
{
    double w = 0;
    for (size_t k = 0; k < t->count; k++)
        w = fmax(w, report_text_width(fig, t->label[k], REPORT_SIZE_SMALL));
    return w;
}

void report_ticks_fitting(report_figure *fig, report_ticks *t, double lo, double hi, double length,
                          int vertical)
{
    for (size_t most = 8; most >= 2; most--) {
        report_ticks_round(t, lo, hi, most);
        if (t->count < 2)
            return;
        double spacing = length * (t->value[1] - t->value[0]) / (hi - lo);
        double need = vertical ? 1.6 * report_line_height(fig, REPORT_SIZE_SMALL)
                               : report_ticks_widest(fig, t) + 12;
        if (spacing >= need)
            return;
    }
}

double report_px_x(const report_axes *a, double x)
{
    return a->area.x0 + (x - a->x0) / (a->x1 - a->x0) * (a->area.x1 - a->area.x0);
}

double report_px_y(const report_axes *a, double y)
{
    return a->area.y1 - (y - a->y0) / (a->y1 - a->y0) * (a->area.y1 - a->area.y0);
}

void report_axes_enter(const report_axes *a)
{
    PLFLT vx0, vx1, vy0, vy1;
    plgvpd(&vx0, &vx1, &vy0, &vy1); /* any viewport, to read the page height from */
    PLFLT xmin, xmax, ymin, ymax;
    plgspa(&xmin, &xmax, &ymin, &ymax);
    double height = (ymax - ymin) / (xmax - xmin) * REPORT_PAGE_WIDTH;
    plvpor(a->area.x0 / REPORT_PAGE_WIDTH, a->area.x1 / REPORT_PAGE_WIDTH, 1 - a->area.y1 / height,
           1 - a->area.y0 / height);
    plwind(a->x0, a->x1, a->y0, a->y1);
}

report_page_view report_page_enter(const report_figure *fig)
{
    report_page_view v;
    plgvpd(&v.vx0, &v.vx1, &v.vy0, &v.vy1);
    plgvpw(&v.wx0, &v.wx1, &v.wy0, &v.wy1);
    v.height = report_figure_height(fig);
    plvpor(0, 1, 0, 1);
    plwind(0, REPORT_PAGE_WIDTH, 0, v.height);
    return v;
}

void report_page_leave(const report_page_view *v)
{
    if (!(v->vx1 > v->vx0 && v->vy1 > v->vy0 && v->wx1 != v->wx0 && v->wy1 != v->wy0))
        return; /* nothing was set before */
    plvpor(v->vx0, v->vx1, v->vy0, v->vy1);
    plwind(v->wx0, v->wx1, v->wy0, v->wy1);
}

void report_frame(void)
{
    plcol0(INK_TEXT);
    plwidth(1.0);
    pllsty(1);
    plbox("bc", 0.0, 0, "bc", 0.0, 0);
}

/* Inward tick marks: TICK_LENGTH page units, converted to world units of the panel. */
static void tick_marks(const report_axes *a, const report_ticks *xt, const report_ticks *yt)
{
    double wx = TICK_LENGTH * (a->x1 - a->x0) / (a->area.x1 - a->area.x0);
    double wy = TICK_LENGTH * (a->y1 - a->y0) / (a->area.y1 - a->area.y0);
    for (size_t k = 0; xt && k < xt->count; k++) {
        report_segment(xt->value[k], a->y0, xt->value[k], a->y0 + wy, INK_TEXT, 1.0);
        report_segment(xt->value[k], a->y1, xt->value[k], a->y1 - wy, INK_TEXT, 1.0);
    }
    for (size_t k = 0; yt && k < yt->count; k++) {
        report_segment(a->x0, yt->value[k], a->x0 + wx, yt->value[k], INK_TEXT, 1.0);
        report_segment(a->x1, yt->value[k], a->x1 - wx, yt->value[k], INK_TEXT, 1.0);
    }
}

void report_axes_draw(report_figure *fig, const report_axes *a, const report_ticks *xt,
                      const report_ticks *yt, int flags, const char *name)
{
    report_axes_enter(a);
    report_frame();
    tick_marks(a, xt, yt);
    report_record(fig, REPORT_BOX_PANEL, a->area, name);
    report_rect_px below[REPORT_MAX_TICKS];
    size_t nbelow = 0;
    for (size_t k = 0; xt && !(flags & REPORT_NO_X_LABELS) && k < xt->count; k++) {
        report_textspec t = {xt->label[k], REPORT_SIZE_SMALL, 0.5, 0};
        double x = report_px_x(a, xt->value[k]);
        report_rect_px box = report_text_box(fig, &t, x, 0);
        /* The end labels stay on the page: shifted in rather than cut. */
        if (box.x1 > REPORT_PAGE_WIDTH - 2)
            x -= box.x1 - (REPORT_PAGE_WIDTH - 2);
        if (box.x0 < 2)
            x += 2 - box.x0;
        below[nbelow++] = report_text_draw(fig, &t, x, report_anchor_below(fig, REPORT_SIZE_SMALL,
                                                                             a->area.y1 + LABEL_GAP),
                                           INK_TEXT);
    }
    for (size_t k = 0; yt && k < yt->count; k++) {
        report_textspec t = {yt->label[k], REPORT_SIZE_SMALL, 1.0, 0};
        double y = report_anchor_centred(fig, REPORT_SIZE_SMALL, report_px_y(a, yt->value[k]));
        report_rect_px box = report_text_box(fig, &t, a->area.x0 - LABEL_GAP - 1, y);
        int clash = 0; /* the corner: the lowest y label can meet the first x label */
        for (size_t i = 0; i < nbelow && !clash; i++)
            clash = report_rects_meet(box, below[i]);
        if (!clash)
            report_text_draw(fig, &t, a->area.x0 - LABEL_GAP - 1, y, INK_TEXT);
    }
    report_axes_enter(a);
}

/* v at `digits` significant digits, trailing zeros kept (0.0100 says three digits were
 * meant), a bare trailing point dropped. */
static void format_digits(char *out, size_t size, double v, int digits)
{
    snprintf(out, size, "%#.*g", digits, v);
    size_t len = strlen(out);
    if (len > 0 && out[len - 1] == '.')
        out[len - 1] = '\0';
}

/* Whether v and target print alike at `digits` significant digits (the p floor 1/(M+1)
 * has no short exact form, so the texts are compared, not the values read back). */
static int prints_as(double v, int digits, double target)
{
    char a[40], b[40];
    format_digits(a, sizeof a, v, digits);
    format_digits(b, sizeof b, target, digits);
    return strcmp(a, b) == 0;
}

const char *report_number_avoiding(char buf[32], double v, const double *avoid, size_t navoid)
{
    if (!isfinite(v))
        return "NA";
    static const double always[3] = {-1.0, 0.0, 1.0};
    int digits = 3;
    for (int clash = 1; clash && digits < 17;) {
        clash = 0;
        for (size_t k = 0; k < 3 + navoid && !clash; k++) {
            double target = k < 3 ? always[k] : avoid[k - 3];
            clash = v != target && isfinite(target) && prints_as(v, digits, target);
        }
        if (clash)
            digits++;
    }
    /* Large values are times or t-values: whole numbers read better than 8.77e+03. */
    if (fabs(v) >= 1e3 && fabs(v) < 1e9 && digits <= (int)floor(log10(fabs(v))) + 1)
        snprintf(buf, 32, "%.0f", v);
    else
        format_digits(buf, 32, v, digits);
    return buf;
}

const char *report_number(char buf[32], double v)
{
    return report_number_avoiding(buf, v, NULL, 0);
}

/* Space between a cell's edges and what it holds. */
enum { CELL_GAP = 6 };

report_axes report_cell_axes(report_figure *fig, size_t row, size_t col, double x0, double x1,
                             double y0, double y1, report_ticks *xt, report_ticks *yt)
{
    report_rect_px cell = report_cell_rect(fig, row, col);
    double body = report_line_height(fig, REPORT_SIZE_BODY), small = report_line_height(fig, REPORT_SIZE_SMALL);
    report_axes a = {{0, cell.x1 - 14, cell.y0 + body + 2 * CELL_GAP,
                      cell.y1 - (2 * CELL_GAP + small + body + 4)},
                     x0, x1, y0, y1};
    report_ticks_fitting(fig, yt, y0, y1, a.area.y1 - a.area.y0, 1);
    a.area.x0 = cell.x0 + 8 + body + 6 + report_ticks_widest(fig, yt) + 6;
    report_ticks_fitting(fig, xt, x0, x1, a.area.x1 - a.area.x0, 0);
    return a;
}

void report_cell_labels(report_figure *fig, const report_axes *a, size_t row, size_t col,
                        const char *title, const char *xlabel, const char *ylabel)
{
    report_rect_px cell = report_cell_rect(fig, row, col);
    char fitted[REPORT_TEXT_MAX];
    report_say(fig, report_fit(fig, title, REPORT_SIZE_BODY, cell.x1 - a->area.x0 - 4, fitted),
               REPORT_SIZE_BODY, 0.0, a->area.x0, cell.y0 + CELL_GAP, INK_TEXT);
    if (xlabel)
        report_say(fig, report_fit(fig, xlabel, REPORT_SIZE_BODY, a->area.x1 - a->area.x0, fitted),
                   REPORT_SIZE_BODY, 0.5, 0.5 * (a->area.x0 + a->area.x1),
                   a->area.y1 + CELL_GAP + report_line_height(fig, REPORT_SIZE_SMALL), INK_TEXT);
    if (ylabel)
        report_y_label(fig, &a->area, cell.x0 + 8, ylabel);
}

void report_y_label(report_figure *fig, const report_rect_px *area, double left, const char *text)
{
    char fitted[REPORT_TEXT_MAX];
    report_textspec t = {report_fit(fig, text, REPORT_SIZE_BODY, area->y1 - area->y0, fitted),
                         REPORT_SIZE_BODY, 0.5, 1};
    double middle = 0.5 * (area->y0 + area->y1);
    report_rect_px probe = report_text_box(fig, &t, 0, middle);
    report_text_draw(fig, &t, left - probe.x0, middle, INK_TEXT);
}
