/* The screening overview: per test, each series' statistic against -log10(q), the FDR level
 * as a dashed line, and the flagged series named. Names are placed where they fit (beside
 * their point, or moved off with a leader line), never over another name or a flagged
 * point; the strongest come first, and those that find no room are counted in a box in the
 * emptiest corner. The CSV is the table; this is the picture of where the evidence lies. */
#include "report_internal.h"
#include "slowscan/status.h"

#include <math.h>
#include <plplot.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Names beyond REPORT_OVERVIEW_LABELS are placed only right beside their point. */
enum { MOST_LABELS = 40, MARK_RADIUS = 4, GAP = 6 };

static void overview_layout(const void *data, report_layout *layout)
{
    const report_overview_data *d = data;
    memset(layout, 0, sizeof *layout);
    slowscan_report_layout_grid(layout, d->ntests, 2, REPORT_TALL_ROW_HEIGHT + 40);
}

static double minus_log_q(double q)
{
    return -log10(q > 1e-300 ? q : 1e-300);
}

/* Strongest first: smallest q, then the larger |statistic|, then the name (a stable order). */
static int by_strength(const void *a, const void *b)
{
    const report_overview_point *p = *(const report_overview_point *const *)a;
    const report_overview_point *q = *(const report_overview_point *const *)b;
    if (p->q_value != q->q_value)
        return p->q_value < q->q_value ? -1 : 1;
    if (fabs(p->statistic) != fabs(q->statistic))
        return fabs(p->statistic) > fabs(q->statistic) ? -1 : 1;
    return strcmp(p->series, q->series);
}

/* What a panel's names must keep clear of: the names placed so far, the flagged marks and
 * the corner box. */
typedef struct {
    report_rect_px *taken;
    size_t ntaken;
    report_rect_px area;
} room;

static int fits(const room *r, report_rect_px box)
{
    if (box.x0 < r->area.x0 + 1 || box.x1 > r->area.x1 - 1 || box.y0 < r->area.y0 + 1 ||
        box.y1 > r->area.y1 - 1)
        return 0;
    for (size_t i = 0; i < r->ntaken; i++)
        if (report_rects_meet(box, r->taken[i]))
            return 0;
    return 1;
}

/* Tries places for a name around its mark, nearest first: beside it, then rows above and
 * below and further out, with a leader line. Returns 1 and the anchor when one is free. */
static int place_name(report_figure *fig, room *r, const char *name, double px, double py, int far,
                      double *ax, double *ay, report_rect_px *box)
{
    double width = report_text_width(fig, name, REPORT_SIZE_SMALL);
    double pitch = report_line_height(fig, REPORT_SIZE_SMALL) + 2;
    int rows = far ? 14 : 1, cols = far ? 4 : 1;
    for (int ring = 0; ring <= rows + cols; ring++)
        for (int dy = -ring; dy <= ring; dy++)
            for (int side = 0; side < 2 * cols + 1; side++) {
                int dx = side == 2 * cols ? 0 : (side / 2 + 1) * (side % 2 ? -1 : 1);
                if (abs(dy) + abs(dx) - (dx != 0) != ring || abs(dy) > rows || (dx == 0 && dy == 0))
                    continue;
                double cx = dx == 0 ? px
                                    : px + (dx > 0 ? 1 : -1) *
                                               (0.5 * width + MARK_RADIUS + 4 + (abs(dx) - 1) * 0.6 * width);
                double cy = py + dy * pitch;
                report_textspec t = {name, REPORT_SIZE_SMALL, 0.5, 0};
                double y = report_anchor_centred(fig, REPORT_SIZE_SMALL, cy);
                report_rect_px b = report_text_box(fig, &t, cx, y);
                if (fits(r, b)) {
                    *ax = cx;
                    *ay = y;
                    *box = b;
                    return 1;
                }
            }
    return 0;
}

static report_rect_px mark_box(double px, double py)
{
    return (report_rect_px){px - MARK_RADIUS - 1, px + MARK_RADIUS + 1, py - MARK_RADIUS - 1,
                            py + MARK_RADIUS + 1};
}

/* The corner box's place: the corner of the panel with the fewest points under it. */
static report_rect_px corner(const report_axes *a, const double *x, const double *y, size_t k,
                             double width, double height)
{
    report_rect_px best = {0, 0, 0, 0};
    size_t fewest = (size_t)-1;
    for (int c = 0; c < 4; c++) {
        double x0 = c % 2 ? a->area.x1 - 4 - width : a->area.x0 + 4;
        double y0 = c / 2 ? a->area.y1 - 4 - height : a->area.y0 + 4;
        report_rect_px box = {x0, x0 + width, y0, y0 + height};
        size_t under = 0;
        for (size_t i = 0; i < k; i++) {
            double px = report_px_x(a, x[i]), py = report_px_y(a, y[i]);
            under += px >= box.x0 && px <= box.x1 && py >= box.y0 && py <= box.y1;
        }
        if (under < fewest) {
            fewest = under;
            best = box;
        }
    }
    return best;
}

/* Names the flagged points (sorted strongest first); returns how many found no room. */
static size_t name_flagged(report_figure *fig, const report_axes *a, room *r,
                           report_overview_point **flagged, size_t nflagged)
{
    size_t named = 0, left_out = 0;
    for (size_t i = 0; i < nflagged; i++) {
        double px = report_px_x(a, flagged[i]->statistic), py = report_px_y(a, minus_log_q(flagged[i]->q_value));
        double ax, ay;
        report_rect_px box;
        int far = i < REPORT_OVERVIEW_LABELS;
        if (named >= MOST_LABELS || !place_name(fig, r, flagged[i]->series, px, py, far, &ax, &ay, &box)) {
            left_out++;
            continue;
        }
        double cy = 0.5 * (box.y0 + box.y1);
        if (fabs(cy - py) > box.y1 - box.y0 || fabs(0.5 * (box.x0 + box.x1) - px) > box.x1 - box.x0) {
            double lx = px < box.x0 ? box.x0 : px > box.x1 ? box.x1 : px;
            double ly = py < box.y0 ? box.y0 : py > box.y1 ? box.y1 : cy;
            report_page_line(fig, px, py, lx, ly, INK_FAINT, 1.0);
        }
        report_textspec t = {flagged[i]->series, REPORT_SIZE_SMALL, 0.5, 0};
        report_text_draw(fig, &t, ax, ay, INK_TEXT);
        r->taken[r->ntaken++] = box;
        named++;
    }
    return left_out;
}

/* The box of names left out: drawn over the panel (a white patch), counted. */
static void left_out_box(report_figure *fig, report_rect_px box, size_t count, size_t nflagged)
{
    char line1[96];
    snprintf(line1, sizeof line1, "%zu of %zu flagged not named", count, nflagged);
    report_page_patch(fig, box, INK_BACKGROUND);
    report_page_line(fig, box.x0, box.y0, box.x1, box.y0, INK_DIM, 1.0);
    report_page_line(fig, box.x0, box.y1, box.x1, box.y1, INK_DIM, 1.0);
    report_page_line(fig, box.x0, box.y0, box.x0, box.y1, INK_DIM, 1.0);
    report_page_line(fig, box.x1, box.y0, box.x1, box.y1, INK_DIM, 1.0);
    double line = report_line_height(fig, REPORT_SIZE_SMALL);
    report_say(fig, line1, REPORT_SIZE_SMALL, 0.0, box.x0 + 5, box.y0 + 3, INK_TEXT);
    report_say(fig, "(all are in the summary)", REPORT_SIZE_SMALL, 0.0, box.x0 + 5, box.y0 + 4 + line,
               INK_DIM);
}

typedef struct {
    double *x, *y;
    report_overview_point **flagged;
    report_rect_px *taken;
} panel_memory;

static void panel_memory_free(panel_memory *m)
{
    free(m->x);
    free(m->y);
    free(m->flagged);
    free(m->taken);
}

static int panel_memory_alloc(panel_memory *m, size_t n)
{
    m->x = malloc((n + 1) * sizeof *m->x);
    m->y = malloc((n + 1) * sizeof *m->y);
    m->flagged = malloc((n + 1) * sizeof *m->flagged);
    m->taken = malloc((2 * n + 2) * sizeof *m->taken);
    if (m->x && m->y && m->flagged && m->taken)
        return SLOWSCAN_OK;
    panel_memory_free(m);
    return SLOWSCAN_ENOMEM;
}

static int test_panel(report_figure *fig, const report_overview_data *d, size_t j, size_t cols)
{
    panel_memory m;
    if (panel_memory_alloc(&m, d->npoints) != SLOWSCAN_OK)
        return SLOWSCAN_ENOMEM;
    size_t k = 0, nflagged = 0;
    for (size_t i = 0; i < d->npoints; i++) {
        const report_overview_point *p = &d->points[i];
        if (p->test != j || !isfinite(p->statistic) || !isfinite(p->q_value))
            continue;
        m.x[k] = p->statistic;
        m.y[k++] = minus_log_q(p->q_value);
        if (p->flagged)
            m.flagged[nflagged++] = (report_overview_point *)p;
    }
    qsort(m.flagged, nflagged, sizeof *m.flagged, by_strength);
    double threshold = minus_log_q(d->fdr), x_lo, x_hi, y_lo, y_hi;
    const double *xs[1] = {m.x}, *ys[1] = {m.y};
    report_range(xs, 1, k, &x_lo, &x_hi);
    report_range(ys, 1, k, &y_lo, &y_hi);
    y_hi = fmax(1.08 * y_hi, 1.15 * threshold);
    report_ticks xt, yt;
    report_axes a = report_cell_axes(fig, j / cols, j % cols, x_lo, x_hi, 0, y_hi, &xt, &yt);
    report_axes_draw(fig, &a, &xt, &yt, 0, d->labels[j]);
    report_hline(threshold, INK_MARK, 1);
    if (k > 0) { /* one call for every point: thousands of series stay cheap to draw */
        plcol0(INK_NULL);
        plssym(0, 0.9);
        plpoin((PLINT)k, m.x, m.y, 17);
        plssym(0, 1.0);
    }
    room r = {m.taken, 0, a.area};
    for (size_t i = 0; i < nflagged; i++) {
        double px = report_px_x(&a, m.flagged[i]->statistic), py = report_px_y(&a, minus_log_q(m.flagged[i]->q_value));
        report_dot(&a, m.flagged[i]->statistic, minus_log_q(m.flagged[i]->q_value), MARK_RADIUS - 1, INK_MARK, 1);
        r.taken[r.ntaken++] = mark_box(px, py);
    }
    if (k == 0)
        report_say(fig, "no q-values (no surrogates)", REPORT_SIZE_BODY, 0.5,
                   0.5 * (a.area.x0 + a.area.x1), 0.5 * (a.area.y0 + a.area.y1), INK_TEXT);
    /* Room for the count first, sized for the worst case, so names keep clear of it. */
    char widest[96];
    snprintf(widest, sizeof widest, "%zu of %zu flagged not named", nflagged, nflagged);
    double line = report_line_height(fig, REPORT_SIZE_SMALL);
    report_rect_px box = corner(&a, m.x, m.y, k, report_text_width(fig, widest, REPORT_SIZE_SMALL) + 12,
                                2 * line + 8);
    int reserve = nflagged > REPORT_OVERVIEW_LABELS;
    if (reserve)
        r.taken[r.ntaken++] = box;
    size_t left_out = name_flagged(fig, &a, &r, m.flagged, nflagged);
    if (left_out > 0 && reserve)
        left_out_box(fig, box, left_out, nflagged);
    char title[300];
    snprintf(title, sizeof title, "%s: %zu series, %zu flagged; dashed: q = %g%s", d->labels[j], k,
             nflagged, d->fdr, left_out > 0 && !reserve ? " (some names left out)" : "");
    report_cell_labels(fig, &a, j / cols, j % cols, title, d->statistic_names[j], "-log10(q)");
    panel_memory_free(&m);
    return SLOWSCAN_OK;
}

static int overview_draw(report_figure *fig, const void *data)
{
    const report_overview_data *d = data;
    const report_layout *layout = slowscan_report_figure_layout(fig);
    report_heading(fig, "screening overview: every series' statistic against -log10(q); "
                        "flagged series in crimson, named");
    int st = SLOWSCAN_OK;
    for (size_t j = 0; st == SLOWSCAN_OK && j < d->ntests; j++)
        st = test_panel(fig, d, j, layout->cols[0]);
    return st;
}

const report_figure_type slowscan_report_overview_figure = {"overview", overview_layout, overview_draw};
