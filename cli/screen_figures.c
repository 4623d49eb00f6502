/* screen --figures DIR: a figure per series (series, trend, residual, indicator paths, the
 * null histograms) and, for more than one series, the screening overview.
 *
 * The figures need the q-values, which exist only once every series is tested. Rather than
 * keep every series' paths until then (memory would grow with the number of series), the
 * series are prepared again after the run — detrending and rolling indicators are cheap and
 * deterministic — and only each test's null distribution is kept from the run, binned, with
 * the series' record in the run's store. */
#include "screen.h"
#include "slowscan/status.h"

#include <gsl/gsl_histogram.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

int cli_screen_bin_null(const double *null, size_t m, screen_null_bins *bins)
{
    double lo = INFINITY, hi = -INFINITY;
    for (size_t j = 0; j < m; j++)
        if (isfinite(null[j])) {
            lo = fmin(lo, null[j]);
            hi = fmax(hi, null[j]);
        }
    bins->present = 0;
    if (!(lo <= hi))
        return EXIT_OK;
    /* gsl_histogram bins are [a, b): widen a little so the largest draw is counted. */
    double pad = hi > lo ? 1e-9 * (hi - lo) : 0.5 * fmax(fabs(lo), 1e-3);
    gsl_histogram *h = gsl_histogram_alloc(SCREEN_NULL_BINS);
    if (!h || gsl_histogram_set_ranges_uniform(h, lo - (hi > lo ? 0 : pad), hi + pad) != 0) {
        gsl_histogram_free(h);
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    for (size_t j = 0; j < m; j++)
        if (isfinite(null[j]))
            gsl_histogram_increment(h, null[j]);
    bins->present = 1;
    bins->lo = gsl_histogram_min(h);
    bins->hi = gsl_histogram_max(h);
    memcpy(bins->counts, h->bin, sizeof bins->counts);
    gsl_histogram_free(h);
    return EXIT_OK;
}

static report_series_test test_of(const screen_row *row, const double *path)
{
    int drift = !slowscan_screen_test_rolling(row->result.kind);
    report_series_test t = {slowscan_screen_test_name(row->result.kind), drift ? "t(a1)" : "tau",
                            path, row->result.statistic, row->result.p_value, row->q_value, 0,
                            NAN, NAN, NULL};
    if (row->bins) {
        t.nbins = SCREEN_NULL_BINS;
        t.bin_lo = row->bins->lo;
        t.bin_hi = row->bins->hi;
        t.counts = row->bins->counts;
    }
    return t;
}

static int draw_series(const cli_options *opts, const prepared_series *ps, void *context)
{
    screen_run *run = context;
    screen_row rows[SCREEN_MAX_TESTS];
    int rc = EXIT_OK;
    size_t k = run->figure_series++, tests = 0;
    if (k < slowscan_screen_store_count(run->store))
        tests = cli_screen_series_rows(run, k, rows, &rc);
    if (rc != EXIT_OK)
        return rc;
    if (tests != slowscan_screen_test_count(&run->cfg) || strcmp(rows[0].series, ps->name) != 0) {
        cli_error("internal error: screen figures out of step with the summary at '%s'", ps->name);
        return EXIT_INTERNAL;
    }
    double *values[INDICATOR_COUNT] = {NULL};
    /* A constant series has no paths (and was warned about in the run). */
    if (!ps->constant)
        rc = cli_indicator_values(opts, ps, values);
    report_series_test list[SCREEN_MAX_TESTS];
    for (size_t j = 0; j < tests; j++)
        list[j] = test_of(&rows[j], j < opts->nindicators ? values[j] : NULL);
    report_series_data data = {ps->name, ps->time_name, ps->source, ps->n, ps->time, ps->value,
                               ps->trend, ps->residual, ps->window, list, tests};
    if (rc == EXIT_OK)
        rc = cli_figure_draw(run->figures, &slowscan_report_series_figure, &data, "screen", ps->name);
    if (!ps->constant)
        cli_indicator_values_free(opts, values);
    return rc;
}

/* Every row as a point of the overview, its series name copied out of the store. */
typedef struct {
    report_overview_point *points;
    char **names;
    size_t tests;
    const char *labels[SCREEN_MAX_TESTS];
} overview_points;

static int add_point(const screen_row *row, size_t index, void *context)
{
    overview_points *o = context;
    size_t j = index % o->tests;
    if (j == 0 && !(o->names[index / o->tests] = strdup(row->series))) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    o->labels[j] = slowscan_screen_test_name(row->result.kind);
    o->points[index] = (report_overview_point){o->names[index / o->tests], j,
                                               row->result.statistic, row->q_value,
                                               row->flag == SCREEN_FLAG_RISING ||
                                                   row->flag == SCREEN_FLAG_FALLING};
    return EXIT_OK;
}

static int draw_overview(const cli_options *opts, screen_run *run)
{
    size_t tests = slowscan_screen_test_count(&run->cfg);
    size_t rows = slowscan_screen_store_tests(run->store);
    size_t series = slowscan_screen_store_count(run->store);
    const char *stats[SCREEN_MAX_TESTS];
    for (size_t j = 0; j < tests; j++)
        stats[j] = j < opts->nindicators ? "Kendall tau" : "t(a1)";
    overview_points o = {malloc((rows + 1) * sizeof *o.points),
                         calloc(series + 1, sizeof *o.names), tests, {NULL}};
    int rc = o.points && o.names ? EXIT_OK : EXIT_INTERNAL;
    if (rc != EXIT_OK)
        cli_error("out of memory");
    if (rc == EXIT_OK)
        rc = cli_screen_each_row(run, add_point, &o);
    report_overview_data data = {o.labels, stats, tests, o.points, rows, opts->fdr};
    if (rc == EXIT_OK)
        rc = cli_figure_draw(run->figures, &slowscan_report_overview_figure, &data, "",
                             "screen-overview");
    for (size_t k = 0; o.names && k < series; k++)
        free(o.names[k]);
    free(o.names);
    free(o.points);
    return rc;
}

int cli_screen_figures(const cli_options *opts, const cli_inputs *in, void *context)
{
    screen_run *run = context;
    cli_options quiet = *opts;
    quiet.progress = 0; /* the run's progress line has already reached its end */
    run->figure_series = 0;
    int rc = cli_for_each_series(&quiet, in, draw_series, run);
    if (rc == EXIT_OK && cli_inputs_series_count(in) > 1)
        rc = draw_overview(opts, run);
    return rc;
}
