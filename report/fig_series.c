/* The per-series figure: series and trend, residual, one panel per indicator path, and a row
 * of null histograms with the observed statistic. The time panels share one time axis. */
#include "report_internal.h"
#include "slowscan/status.h"

#include <math.h>
#include <plplot.h>
#include <stdio.h>

static size_t path_count(const report_series_data *d)
{
    size_t k = 0;
    for (size_t j = 0; j < d->ntests; j++)
        k += d->tests[j].path != NULL;
    return k;
}

static void series_layout(const void *data, report_layout *layout)
{
    const report_series_data *d = data;
    layout->rows = 2 + path_count(d) + 1;
    for (size_t r = 0; r + 1 < layout->rows; r++)
        layout->cols[r] = 1;
    layout->cols[layout->rows - 1] = d->ntests ? d->ntests : 1;
    layout->row_height = REPORT_ROW_HEIGHT;
}

static void first_window_bracket(const report_series_data *d)
{
    PLFLT x0, x1, y0, y1;
    plgvpw(&x0, &x1, &y0, &y1);
    double t0 = d->time[0], t1 = d->time[d->window - 1 < d->n ? d->window - 1 : d->n - 1];
    double y = y1 - 0.10 * (y1 - y0), tick = 0.05 * (y1 - y0);
    PLFLT bx[4] = {t0, t0, t1, t1}, by[4] = {y - tick, y, y, y - tick};
    plcol0(INK_TEXT);
    plline(4, bx, by);
    report_text(t1 + 0.01 * (x1 - x0), y - 0.5 * tick, 0.0, "first window");
}

/* The rows sharing the time axis; `last` gets the axis numbers and label. */
static void time_panel(report_figure *fig, size_t row, const report_series_data *d,
                       const double *const *paths, size_t npaths, int last)
{
    double lo, hi;
    report_range(paths, npaths, d->n, &lo, &hi);
    report_panel(fig, row, 0, d->time[0], d->time[d->n - 1], lo, hi, last ? REPORT_X_NUMBERS : 0);
}

static void draw_series_rows(report_figure *fig, const report_series_data *d, size_t rows)
{
    char title[400];
    const double *both[2] = {d->value, d->trend};
    time_panel(fig, 0, d, both, 2, 0);
    /* The analysed span of the indicators: where the trailing windows are complete. */
    size_t first = d->window - 1 < d->n ? d->window - 1 : 0;
    PLFLT x0, x1, y0, y1;
    plgvpw(&x0, &x1, &y0, &y1);
    report_rect(d->time[first], d->time[d->n - 1], y0, y1, INK_SPAN);
    report_frame(0);
    report_path(d->n, d->time, d->value, INK_SERIES);
    report_path(d->n, d->time, d->trend, INK_TREND);
    snprintf(title, sizeof title, "%s (blue) and its trend (orange); shaded: span of the "
             "indicators", d->name);
    report_labels(title, d->name, NULL);

    time_panel(fig, 1, d, &d->residual, 1, rows == 2);
    report_hline(0.0, INK_FAINT, 0);
    report_path(d->n, d->time, d->residual, INK_RESIDUAL);
    report_labels("residual (series minus trend)", "residual", rows == 2 ? d->time_name : NULL);

    size_t row = 2;
    for (size_t j = 0; j < d->ntests; j++) {
        const report_series_test *t = &d->tests[j];
        if (!t->path)
            continue;
        char a[32], b[32], c[32];
        int last = row + 1 == rows;
        time_panel(fig, row, d, &t->path, 1, last);
        report_path(d->n, d->time, t->path, INK_INDICATOR);
        first_window_bracket(d);
        snprintf(title, sizeof title, "%s: Kendall tau = %s, p = %s, q = %s", t->label,
                 report_number(a, t->statistic), report_number(b, t->p_value),
                 report_number(c, t->q_value));
        report_labels(title, t->label, last ? d->time_name : NULL);
        row++;
    }
}

static void histogram_cell_scaled(report_figure *fig, size_t row, size_t col,
                                  const report_series_test *t);

/* A third of the page wide: smaller text (ticks and labels alike) keeps it inside its cell. */
static void histogram_cell(report_figure *fig, size_t row, size_t col, const report_series_test *t)
{
    plschr(0, 0.85 * REPORT_TEXT_SCALE);
    histogram_cell_scaled(fig, row, col, t);
    plschr(0, REPORT_TEXT_SCALE);
}

static void histogram_cell_scaled(report_figure *fig, size_t row, size_t col,
                                  const report_series_test *t)
{
    char title[200], a[32];
    if (!t->counts || t->nbins == 0) {
        report_panel(fig, row, col, 0, 1, 0, 1, 0);
        report_text(0.5, 0.5, 0.5, "no null distribution");
        snprintf(title, sizeof title, "%s", t->label);
        report_labels(title, NULL, t->statistic_name);
        return;
    }
    double top = 0;
    for (size_t k = 0; k < t->nbins; k++)
        top = fmax(top, t->counts[k]);
    double x0 = fmin(t->bin_lo, t->statistic), x1 = fmax(t->bin_hi, t->statistic);
    double pad = 0.04 * (x1 - x0 > 0 ? x1 - x0 : 1);
    report_panel(fig, row, col, x0 - pad, x1 + pad, 0, 1.12 * (top > 0 ? top : 1), REPORT_X_NUMBERS);
    double width = (t->bin_hi - t->bin_lo) / (double)t->nbins;
    for (size_t k = 0; k < t->nbins; k++)
        if (t->counts[k] > 0)
            report_rect(t->bin_lo + (double)k * width, t->bin_lo + (double)(k + 1) * width, 0,
                        t->counts[k], INK_NULL);
    report_frame(REPORT_X_NUMBERS);
    if (isfinite(t->statistic)) {
        plwidth(2.2);
        report_vline(t->statistic, INK_MARK, 0);
        plwidth(1.0);
    }
    if (isfinite(t->p_value)) /* two digits: the cell is narrow, and p is a count ratio */
        snprintf(title, sizeof title, "%s: p = %.2g", t->label, t->p_value);
    else
        snprintf(title, sizeof title, "%s: p = NA", t->label);
    char xlabel[64];
    snprintf(xlabel, sizeof xlabel, "%s; line: observed %s", t->statistic_name,
             report_number(a, t->statistic));
    report_labels(title, col == 0 ? "surrogates" : NULL, xlabel);
}

static int series_draw(report_figure *fig, const void *data)
{
    const report_series_data *d = data;
    if (d->n < 2)
        return SLOWSCAN_ESHORT;
    const report_layout *layout = slowscan_report_figure_layout(fig);
    char heading[400];
    snprintf(heading, sizeof heading, "%s  (%s)", d->name, d->source);
    report_heading(heading);
    draw_series_rows(fig, d, layout->rows - 1);
    for (size_t j = 0; j < d->ntests; j++)
        histogram_cell(fig, layout->rows - 1, j, &d->tests[j]);
    return SLOWSCAN_OK;
}

const report_figure_type slowscan_report_series_figure = {"series", series_layout, series_draw};
