/* The screening overview: per test, each series' statistic against -log10(q), the FDR level
 * as a dashed line, and the strongest flagged series labelled. The CSV is the table; this is
 * the picture of where the run's evidence lies. */
#include "report_internal.h"
#include "slowscan/status.h"

#include <math.h>
#include <plplot.h>
#include <stdio.h>
#include <stdlib.h>

static void overview_layout(const void *data, report_layout *layout)
{
    const report_overview_data *d = data;
    slowscan_report_layout_grid(layout, d->ntests, 2, REPORT_TALL_ROW_HEIGHT);
}

static double minus_log_q(double q)
{
    return -log10(q > 1e-300 ? q : 1e-300);
}

/* Points of test j with a q-value, as (x, y). */
static size_t collect(const report_overview_data *d, size_t j, double *x, double *y, size_t *idx)
{
    size_t k = 0;
    for (size_t i = 0; i < d->npoints; i++) {
        const report_overview_point *p = &d->points[i];
        if (p->test != j || !isfinite(p->statistic) || !isfinite(p->q_value))
            continue;
        x[k] = p->statistic;
        y[k] = minus_log_q(p->q_value);
        idx[k++] = i;
    }
    return k;
}

/* Strongest first: smallest q, then the larger statistic. */
static int by_strength(const void *a, const void *b)
{
    const report_overview_point *p = a, *q = b;
    if (p->q_value != q->q_value)
        return p->q_value < q->q_value ? -1 : 1;
    return (p->statistic < q->statistic) - (p->statistic > q->statistic);
}

/* Marks and names the strongest flagged points among idx[k]; `scratch` holds k points. */
static void label_flagged(const report_overview_data *d, const size_t *idx, size_t k,
                          report_overview_point *scratch)
{
    size_t flagged = 0;
    for (size_t i = 0; i < k; i++)
        if (d->points[idx[i]].flagged)
            scratch[flagged++] = d->points[idx[i]];
    qsort(scratch, flagged, sizeof *scratch, by_strength);
    PLFLT x0, x1, y0, y1;
    plgvpw(&x0, &x1, &y0, &y1);
    for (size_t i = 0; i < flagged && i < REPORT_OVERVIEW_LABELS; i++) {
        PLFLT x = scratch[i].statistic, y = minus_log_q(scratch[i].q_value);
        plcol0(INK_MARK);
        plpoin(1, &x, &y, 17);
        plcol0(INK_TEXT);
        /* Ties in q are common (p has steps of 1/(M+1)): stagger the labels downwards. */
        /* Labels run away from the nearer side, so none is cut off by the frame. */
        int right_half = x > 0.5 * (x0 + x1);
        report_text(x + (right_half ? -0.015 : 0.015) * (x1 - x0),
                    y - (double)(i % 5) * 0.05 * (y1 - y0), right_half ? 1.0 : 0.0,
                    scratch[i].series);
    }
}

static int test_panel(report_figure *fig, const report_overview_data *d, size_t j, size_t cols)
{
    double *x = malloc((d->npoints + 1) * sizeof *x), *y = malloc((d->npoints + 1) * sizeof *y);
    size_t *idx = malloc((d->npoints + 1) * sizeof *idx);
    report_overview_point *scratch = malloc((d->npoints + 1) * sizeof *scratch);
    if (!x || !y || !idx || !scratch) {
        free(x);
        free(y);
        free(idx);
        free(scratch);
        return SLOWSCAN_ENOMEM;
    }
    size_t k = collect(d, j, x, y, idx);
    double threshold = minus_log_q(d->fdr), y_lo = 0, y_hi = 0, x_lo, x_hi;
    const double *xs[1] = {x}, *ys[2] = {y, &threshold};
    report_range(xs, 1, k, &x_lo, &x_hi);
    report_range(ys, 1, k, &y_lo, &y_hi);
    y_hi = fmax(1.08 * y_hi, 1.15 * threshold);
    report_panel(fig, j / cols, j % cols, x_lo, x_hi, 0, y_hi, REPORT_X_NUMBERS);
    report_hline(threshold, INK_MARK, 1);
    plcol0(INK_NULL);
    if (k > 0)
        plpoin((PLINT)k, x, y, 17);
    else
        report_text(0.5 * (x_lo + x_hi), 0.5 * y_hi, 0.5, "no q-values (no surrogates)");
    label_flagged(d, idx, k, scratch);
    char title[200];
    snprintf(title, sizeof title, "%s: %zu series; dashed: q = %g", d->labels[j], k, d->fdr);
    report_labels(title, "-log10(q)", d->statistic_names[j]);
    free(x);
    free(y);
    free(idx);
    free(scratch);
    return SLOWSCAN_OK;
}

static int overview_draw(report_figure *fig, const void *data)
{
    const report_overview_data *d = data;
    const report_layout *layout = slowscan_report_figure_layout(fig);
    report_heading("screening overview (labelled: flagged series, at most 20, smallest q first)");
    int st = SLOWSCAN_OK;
    for (size_t j = 0; st == SLOWSCAN_OK && j < d->ntests; j++)
        st = test_panel(fig, d, j, layout->cols[0]);
    return st;
}

const report_figure_type slowscan_report_overview_figure = {"overview", overview_layout, overview_draw};
