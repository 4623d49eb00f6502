/* The per-series figure, laid out for the questions a reader brings to it: what the record
 * and its trend look like and where the indicators can start (the first window shaded on the
 * time axis); whether the indicators rise together (all on one standardised panel, each
 * named at its end); and, per test, how far the observed statistic lies from what the
 * surrogates give (nested null intervals and a point) with p, q and the verdict in words.
 * Margins come from the measured labels, so nothing is cut or overprinted. */
#include "report_internal.h"
#include "slowscan/status.h"

#include <math.h>
#include <plplot.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Heights in page units: the two time panels, and a test's line in the summaries. */
enum { RECORD_ROW = 190, TRACES_ROW = 240, TEST_PITCH = 20, SUMMARY_FURNITURE = 70, GAP = 6 };
enum { MAX_TESTS = 16 }; /* more than the library has tests */

static size_t rolling_count(const report_series_data *d)
{
    size_t k = 0;
    for (size_t j = 0; j < d->ntests; j++)
        k += strcmp(d->tests[j].statistic_name, "tau") == 0;
    return k;
}

static void series_layout(const void *data, report_layout *layout)
{
    const report_series_data *d = data;
    size_t rolling = rolling_count(d), model = d->ntests - rolling;
    memset(layout, 0, sizeof *layout);
    layout->rows = 2 + (rolling > 0) + (model > 0);
    layout->heights[0] = RECORD_ROW;
    layout->heights[1] = TRACES_ROW;
    size_t r = 2;
    if (rolling)
        layout->heights[r++] = SUMMARY_FURNITURE + TEST_PITCH * (int)rolling;
    if (model)
        layout->heights[r++] = SUMMARY_FURNITURE + TEST_PITCH * (int)model;
    for (size_t k = 0; k < layout->rows; k++)
        layout->cols[k] = 1;
    layout->row_height = RECORD_ROW;
}

/* What the figure's margins must hold, measured once before anything is drawn. */
typedef struct {
    report_ticks time, record_y, traces_y;
    double left, right;        /* page units from each edge to the plotting areas */
    double z_lo, z_hi;         /* the standardised panel's range */
    double *z[MAX_TESTS]; /* standardised paths (NULL where a test has none) */
    char stats[MAX_TESTS][160];
} series_plan;

static int trace_colour(size_t k)
{
    return INK_TRACE0 + (int)(k % REPORT_TRACES);
}

/* A path minus its mean over its sd (finite values); NULL when it has none or is flat. */
static double *standardised(const double *path, size_t n)
{
    double sum = 0, sum2 = 0;
    size_t m = 0;
    for (size_t i = 0; i < n; i++)
        if (isfinite(path[i])) {
            sum += path[i];
            m++;
        }
    if (m < 2)
        return NULL;
    double mean = sum / (double)m;
    for (size_t i = 0; i < n; i++)
        if (isfinite(path[i]))
            sum2 += (path[i] - mean) * (path[i] - mean);
    double sd = sqrt(sum2 / (double)(m - 1));
    double *z = sd > 0 ? malloc(n * sizeof *z) : NULL;
    for (size_t i = 0; z && i < n; i++)
        z[i] = (path[i] - mean) / sd;
    return z;
}

/* "tau 0.412   p 0.0140   q 0.0420   rising" */
static void stats_text(const report_series_test *t, char *out, size_t size)
{
    char a[32], b[32], c[32];
    double floor_p = t->surrogates ? 1.0 / ((double)t->surrogates + 1) : NAN;
    snprintf(out, size, "%s %s   p %s   q %s%s%s", t->statistic_name, report_number(a, t->statistic),
             report_number_avoiding(b, t->p_value, &floor_p, 1),
             report_number_avoiding(c, t->q_value, &floor_p, 1), t->verdict ? "   " : "",
             t->verdict ? t->verdict : "");
}

static void plan_free(series_plan *p)
{
    for (size_t j = 0; j < MAX_TESTS; j++)
        free(p->z[j]);
}

static void plan_margins(report_figure *fig, const report_series_data *d, series_plan *p)
{
    double line = report_line_height(fig, REPORT_SIZE_BODY);
    double widest_y = fmax(report_ticks_widest(fig, &p->record_y), report_ticks_widest(fig, &p->traces_y));
    double widest_name = 0, widest_stats = 0, widest_end = 0;
    for (size_t j = 0; j < d->ntests && j < MAX_TESTS; j++) {
        widest_name = fmax(widest_name, report_text_width(fig, d->tests[j].label, REPORT_SIZE_BODY));
        stats_text(&d->tests[j], p->stats[j], sizeof p->stats[j]);
        widest_stats = fmax(widest_stats, report_text_width(fig, p->stats[j], REPORT_SIZE_SMALL));
        if (p->z[j])
            widest_end = fmax(widest_end, report_text_width(fig, d->tests[j].label, REPORT_SIZE_SMALL));
    }
    p->left = fmax(10 + line + 6 + widest_y + 8, 10 + widest_name + 10);
    p->right = fmax(widest_end + 22, widest_stats + 16);
    /* A narrow page for long labels: the plotting area keeps at least half the width. */
    double most = 0.5 * REPORT_PAGE_WIDTH;
    if (p->left + p->right > most) {
        double scale = most / (p->left + p->right);
        p->left *= scale;
        p->right *= scale;
    }
}

static int plan_series(report_figure *fig, const report_series_data *d, series_plan *p)
{
    memset(p, 0, sizeof *p);
    double lo, hi;
    const double *both[2] = {d->value, d->trend};
    report_range(both, 2, d->n, &lo, &hi);
    report_ticks_fitting(fig, &p->record_y, lo, hi, RECORD_ROW - 60, 1);
    p->z_lo = -1;
    p->z_hi = 1;
    for (size_t j = 0; j < d->ntests && j < MAX_TESTS; j++) {
        if (!d->tests[j].path)
            continue;
        p->z[j] = standardised(d->tests[j].path, d->n);
        const double *one[1] = {p->z[j]};
        if (p->z[j]) {
            report_range(one, 1, d->n, &lo, &hi);
            p->z_lo = fmin(p->z_lo, lo);
            p->z_hi = fmax(p->z_hi, hi);
        }
    }
    report_ticks_fitting(fig, &p->traces_y, p->z_lo, p->z_hi, TRACES_ROW - 90, 1);
    plan_margins(fig, d, p);
    report_ticks_fitting(fig, &p->time, d->time[0], d->time[d->n - 1],
                         REPORT_PAGE_WIDTH - p->left - p->right, 0);
    return SLOWSCAN_OK;
}

/* The plotting area of a row: the margins, a title line above, `below` under it. */
static report_rect_px area_of(report_figure *fig, const series_plan *p, size_t row, double below)
{
    report_rect_px r = report_row_rect(fig, row);
    double title = report_line_height(fig, REPORT_SIZE_BODY) + GAP;
    return (report_rect_px){p->left, REPORT_PAGE_WIDTH - p->right, r.y0 + title + GAP, r.y1 - below};
}

static void shade_first_window(const report_series_data *d, const report_axes *a)
{
    size_t last = d->window >= 1 && d->window - 1 < d->n ? d->window - 1 : d->n - 1;
    report_rect(d->time[0], d->time[last], a->y0, a->y1, INK_WINDOW);
}

static void draw_record(report_figure *fig, const report_series_data *d, const series_plan *p)
{
    double lo, hi;
    const double *both[2] = {d->value, d->trend};
    report_range(both, 2, d->n, &lo, &hi);
    report_axes a = {area_of(fig, p, 0, 8), d->time[0], d->time[d->n - 1], lo, hi};
    report_axes_enter(&a);
    shade_first_window(d, &a);
    report_axes_draw(fig, &a, &p->time, &p->record_y, REPORT_NO_X_LABELS, "record");
    report_path(&a, d->n, d->time, d->value, INK_SERIES, 1.1);
    report_path(&a, d->n, d->time, d->trend, INK_TREND, 2.0);
    char window[96];
    snprintf(window, sizeof window, "first window (%zu samples)", d->window);
    report_key_item key[3] = {{INK_SERIES, 0, "record"}, {INK_TREND, 0, "trend"}, {INK_WINDOW, 1, window}};
    report_rect_px row = report_row_rect(fig, 0);
    report_key(fig, key, 3, a.area.x0, row.y0 + GAP);
    report_y_label(fig, &a.area, 10, d->name);
}

/* End labels: wanted at each trace's last value, pushed apart to one line each, kept inside
 * the panel's height; a leader joins a moved label to its trace. */
static void end_labels(report_figure *fig, const report_series_data *d, const series_plan *p,
                       const report_axes *a)
{
    size_t order[MAX_TESTS], count = 0;
    double want[MAX_TESTS], at[MAX_TESTS];
    for (size_t j = 0; j < d->ntests && j < MAX_TESTS; j++) {
        if (!p->z[j])
            continue;
        size_t i = d->n;
        while (i > 0 && !isfinite(p->z[j][i - 1]))
            i--;
        if (i == 0)
            continue;
        want[j] = report_px_y(a, p->z[j][i - 1]);
        size_t k = count++;
        for (; k > 0 && want[order[k - 1]] > want[j]; k--)
            order[k] = order[k - 1];
        order[k] = j;
    }
    double pitch = report_line_height(fig, REPORT_SIZE_SMALL) + 1;
    double top = a->area.y0 + 0.5 * pitch, bottom = a->area.y1 - 0.5 * pitch;
    for (size_t k = 0; k < count; k++) /* downwards from the top */
        at[order[k]] = fmax(want[order[k]], k ? at[order[k - 1]] + pitch : top);
    for (size_t k = count; k-- > 0;) /* and back up from the bottom */
        at[order[k]] = fmin(at[order[k]], k + 1 < count ? at[order[k + 1]] - pitch : bottom);
    for (size_t k = 0; k < count; k++) {
        size_t j = order[k];
        report_page_line(fig, a->area.x1 + 2, want[j], a->area.x1 + 10, at[j], trace_colour(j), 1.2);
        report_textspec t = {d->tests[j].label, REPORT_SIZE_SMALL, 0.0, 0};
        report_text_draw(fig, &t, a->area.x1 + 13, report_anchor_centred(fig, REPORT_SIZE_SMALL, at[j]),
                         trace_colour(j));
    }
}

static void draw_traces(report_figure *fig, const report_series_data *d, const series_plan *p)
{
    double below = 10 + 2 * report_line_height(fig, REPORT_SIZE_BODY);
    report_axes a = {area_of(fig, p, 1, below), d->time[0], d->time[d->n - 1], p->z_lo, p->z_hi};
    report_axes_enter(&a);
    shade_first_window(d, &a);
    report_hline(0.0, INK_FAINT, 0);
    report_axes_draw(fig, &a, &p->time, &p->traces_y, 0, "indicators");
    size_t drawn = 0;
    for (size_t j = 0; j < d->ntests && j < MAX_TESTS; j++)
        if (p->z[j]) {
            report_path_stepped(&a, d->n, d->time, p->z[j], trace_colour(j), 1.4);
            drawn++;
        }
    end_labels(fig, d, p, &a);
    report_rect_px row = report_row_rect(fig, 1);
    report_say(fig, drawn ? "indicators, each standardised (minus its mean, over its sd), "
                            "from the end of the first window"
                          : "no indicator path (the series does not vary)",
               REPORT_SIZE_BODY, 0.0, a.area.x0, row.y0 + GAP, INK_TEXT);
    char fitted[REPORT_TEXT_MAX];
    report_say(fig, report_fit(fig, d->time_name, REPORT_SIZE_BODY, a.area.x1 - a.area.x0, fitted),
               REPORT_SIZE_BODY, 0.5, 0.5 * (a.area.x0 + a.area.x1),
               a.area.y1 + 6 + report_line_height(fig, REPORT_SIZE_SMALL), INK_TEXT);
    report_y_label(fig, &a.area, 10, "standardised");
}

/* The test lines of one summary panel: the rolling tests (tau) or the model test (t). */
static size_t summary_tests(const report_series_data *d, int rolling, size_t *idx)
{
    size_t count = 0;
    for (size_t j = 0; j < d->ntests && j < MAX_TESTS; j++)
        if ((strcmp(d->tests[j].statistic_name, "tau") == 0) == (rolling != 0))
            idx[count++] = j;
    return count;
}

/* The axis of a summary: every observed value and null interval, zero, and for tau no more
 * than [-1, 1]. */
static void summary_range(const report_series_data *d, const size_t *idx, size_t count, int rolling,
                          double *lo, double *hi)
{
    double a = 0, b = 0;
    for (size_t k = 0; k < count; k++) {
        const report_series_test *t = &d->tests[idx[k]];
        const double v[3] = {t->statistic, t->null_q01, t->null_q99};
        for (int i = 0; i < 3; i++)
            if (isfinite(v[i])) {
                a = fmin(a, v[i]);
                b = fmax(b, v[i]);
            }
    }
    double pad = b > a ? 0.06 * (b - a) : 1.0;
    *lo = a - pad;
    *hi = b + pad;
    if (rolling) { /* no further than [-1, 1], with room for a dot at either end */
        *lo = fmax(*lo, -1.0);
        *hi = fmin(*hi, 1.0);
        double room = 0.03 * (*hi - *lo);
        *lo -= room;
        *hi += room;
    }
}

static void test_line(report_figure *fig, const report_axes *a, const report_series_test *t, double y,
                      int name_colour, const char *stats)
{
    if (isfinite(t->null_q01) && isfinite(t->null_q99))
        report_segment(t->null_q01, y, t->null_q99, y, INK_NULL, 1.4);
    if (isfinite(t->null_q05) && isfinite(t->null_q95))
        report_rect(t->null_q05, t->null_q95, y - 0.17, y + 0.17, INK_NULL);
    if (isfinite(t->null_q50))
        report_segment(t->null_q50, y - 0.3, t->null_q50, y + 0.3, INK_TEXT, 1.4);
    if (isfinite(t->statistic))
        report_dot(a, t->statistic, y, 4.2, t->flagged ? INK_MARK : INK_TEXT, 1);
    double middle = report_px_y(a, y);
    report_textspec name = {t->label, REPORT_SIZE_BODY, 1.0, 0};
    report_text_draw(fig, &name, a->area.x0 - 6, report_anchor_centred(fig, REPORT_SIZE_BODY, middle),
                     name_colour);
    report_textspec numbers = {stats, REPORT_SIZE_SMALL, 0.0, 0};
    report_text_draw(fig, &numbers, a->area.x1 + 8,
                     report_anchor_centred(fig, REPORT_SIZE_SMALL, middle),
                     t->flagged ? INK_MARK : INK_TEXT);
}

static void draw_summary(report_figure *fig, const report_series_data *d, const series_plan *p,
                         size_t row, int rolling)
{
    size_t idx[MAX_TESTS], count = summary_tests(d, rolling, idx);
    double lo, hi;
    summary_range(d, idx, count, rolling, &lo, &hi);
    report_rect_px r = report_row_rect(fig, row);
    double line = report_line_height(fig, REPORT_SIZE_BODY), top = r.y0 + GAP + line + GAP;
    report_axes a = {{p->left, REPORT_PAGE_WIDTH - p->right, top, top + (double)count * TEST_PITCH},
                     lo, hi, 0, (double)count};
    report_ticks xt;
    report_ticks_fitting(fig, &xt, lo, hi, a.area.x1 - a.area.x0, 0);
    report_axes_enter(&a);
    if (lo < 0 && hi > 0)
        report_vline(0.0, INK_FAINT, 0);
    report_axes_draw(fig, &a, &xt, NULL, 0, rolling ? "tau tests" : "model tests");
    for (size_t k = 0; k < count; k++)
        test_line(fig, &a, &d->tests[idx[k]], (double)(count - k) - 0.5,
                  rolling && d->tests[idx[k]].path ? trace_colour(idx[k]) : INK_TEXT,
                  p->stats[idx[k]]);
    char fitted[REPORT_TEXT_MAX];
    const char *title = rolling ? "trend of each indicator: observed tau (dot, crimson when flagged) "
                                  "and the surrogate null (bar 5-95%, line 1-99%, tick median)"
                                : "drift of the AR(1) coefficient: observed t (dot) and the "
                                  "surrogate null (bar 5-95%, line 1-99%, tick median)";
    report_say(fig, report_fit(fig, title, REPORT_SIZE_BODY, REPORT_PAGE_WIDTH - 20, fitted),
               REPORT_SIZE_BODY, 0.0, 10, r.y0 + GAP, INK_TEXT);
    const char *xlabel = rolling ? "Kendall tau of the indicator against time"
                                 : "t-value of the trend in the AR(1) coefficient (recovery_trend)";
    report_say(fig, xlabel, REPORT_SIZE_BODY, 0.5, 0.5 * (a.area.x0 + a.area.x1),
               a.area.y1 + 6 + report_line_height(fig, REPORT_SIZE_SMALL), INK_TEXT);
}

static int series_draw(report_figure *fig, const void *data)
{
    const report_series_data *d = data;
    if (d->n < 2 || d->ntests > MAX_TESTS)
        return d->n < 2 ? SLOWSCAN_ESHORT : SLOWSCAN_EINVAL;
    series_plan p;
    int st = plan_series(fig, d, &p);
    if (st != SLOWSCAN_OK)
        return st;
    report_heading(fig, "%s  (%s)", d->name, d->source);
    draw_record(fig, d, &p);
    draw_traces(fig, d, &p);
    size_t row = 2;
    if (rolling_count(d) > 0)
        draw_summary(fig, d, &p, row++, 1);
    if (rolling_count(d) < d->ntests)
        draw_summary(fig, d, &p, row, 0);
    plan_free(&p);
    return SLOWSCAN_OK;
}

const report_figure_type slowscan_report_series_figure = {"series", series_layout, series_draw};
