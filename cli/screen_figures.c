/* screen --figures DIR: a figure per series (record and trend, the indicators together, each
 * test against its null) and, for more than one series, the screening overview.
 *
 * The figures need the q-values, which exist only once every series is tested. Rather than
 * keep every series' paths until then (memory would grow with the number of series), the
 * series are prepared again after the run — detrending and rolling indicators are cheap and
 * deterministic — and of each test's null only the quantiles of its result are kept, with
 * the series' record in the run's store. */
#include "screen.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

/* The flag in the figure's words: "none" alone would read as "no result". */
static const char *verdict(screen_flag flag)
{
    switch (flag) {
    case SCREEN_FLAG_RISING:
        return "flagged: rising";
    case SCREEN_FLAG_FALLING:
        return "flagged: falling";
    case SCREEN_FLAG_NONE:
        return "not flagged";
    default:
        return slowscan_screen_flag_name(flag);
    }
}

static report_series_test test_of(const screen_row *row, const double *path)
{
    const screen_test *r = &row->result;
    int rolling = slowscan_screen_test_rolling(r->kind), has_null = r->null_used > 0;
    report_series_test t = {slowscan_screen_test_name(r->kind), rolling ? "tau" : "t(a1)", path,
                            r->statistic, r->p_value, row->q_value,
                            has_null ? r->quantile_tail[0] : NAN, has_null ? r->quantile[0] : NAN,
                            has_null ? r->quantile[2] : NAN, has_null ? r->quantile[4] : NAN,
                            has_null ? r->quantile_tail[1] : NAN, r->null_used,
                            cli_screen_tail_verdict(verdict(row->flag), r),
                            row->flag == SCREEN_FLAG_RISING || row->flag == SCREEN_FLAG_FALLING};
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
    double *owned;
    char label[300];
    const double *x = cli_figure_times(ps, &owned, label, sizeof label);
    /* The series and trend in the input's units (a copy only for a scaled series, whose
     * paths are drawn standardised and need none). */
    double *plain = NULL;
    const double *value = ps->value, *trend = ps->trend;
    if (ps->scale_exp != 0 && (plain = malloc(2 * ps->n * sizeof *plain)) != NULL) {
        for (size_t i = 0; i < 2 * ps->n; i++)
            plain[i] = slowscan_screen_unscale(ps, i < ps->n ? ps->value[i] : ps->trend[i - ps->n], 1);
        value = plain, trend = plain + ps->n;
    }
    report_series_data data = {ps->name, label, ps->source, ps->n, x, value,
                               trend, ps->window, list, tests};
    if (rc == EXIT_OK && (!x || (ps->scale_exp != 0 && !plain)))
        rc = EXIT_INTERNAL;
    if (rc == EXIT_OK)
        rc = cli_figure_draw(run->figures, &slowscan_report_series_figure, &data, "screen", ps->name);
    free(owned);
    free(plain);
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
    quiet.repeat_walk = 1; /* nor are the inputs' notices said twice */
    run->figure_series = 0;
    int rc = cli_for_each_series(&quiet, in, draw_series, run);
    if (rc == EXIT_OK && cli_inputs_series_count(in) > 1)
        rc = draw_overview(opts, run);
    if (rc == EXIT_OK && run->maps)
        rc = cli_screen_maps_figures(run);
    return rc;
}
