/* slowscan feedback: the two columns of a run taken from its table, annual means of monthly
 * records, and anomalies against a baseline (control) run. */
#include "feedback_run.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

/* Index of column `name` in t, or an exit code with a message naming option and file. */
static int find_column(const series_table *t, const char *option, const char *name,
                       const char *what, size_t *k)
{
    for (*k = 0; *k < t->nseries; (*k)++)
        if (strcmp(t->names[*k], name) == 0)
            return EXIT_OK;
    cli_error("option %s: %s has no column '%s'%s", option, what, name,
              t->nseries == 2 ? "" : " (or it holds text)");
    return EXIT_BAD_INPUT;
}

/* Annual means (by month length) of a monthly column pair, in place of run's arrays. */
static int annual(const cli_options *o, const series_table *t, const char *what,
                  cli_feedback_run *run)
{
    if (t->axis.unit != TIME_AXIS_MONTHS) {
        cli_error("option --annual: %s is not a monthly record (its time column is not on "
                  "months)", what);
        return EXIT_BAD_INPUT;
    }
    size_t cap = t->n / 12 + 2, ny = 0;
    double *buf = malloc(3 * cap * sizeof *buf);
    if (!buf)
        return EXIT_INTERNAL;
    double *series[] = {run->flux, run->response};
    int st = SLOWSCAN_OK;
    for (int s = 0; s < 2 && st == SLOWSCAN_OK; s++)
        st = slowscan_feedback_annual_means(t->axis.calendar, run->time, series[s], run->n, buf,
                                            buf + (s + 1) * cap, &ny);
    if (st != SLOWSCAN_OK) {
        free(buf);
        cli_error("option --annual: %s holds no whole calendar year (January to December)",
                  what);
        return EXIT_BAD_INPUT;
    }
    memcpy(run->time, buf, ny * sizeof *buf);
    memcpy(run->flux, buf + cap, ny * sizeof *buf);
    memcpy(run->response, buf + 2 * cap, ny * sizeof *buf);
    free(buf);
    run->n = ny;
    run->axis.unit = TIME_AXIS_YEARS;
    run->axis.precision = DATE_YEAR;
    (void)o;
    return EXIT_OK;
}

static int take_columns(const cli_options *o, const series_table *t, const char *option,
                        const char *what, cli_feedback_run *run)
{
    size_t kf, kr;
    int rc = find_column(t, option, o->feedback.flux, what, &kf);
    if (rc == EXIT_OK)
        rc = find_column(t, option, o->feedback.response, what, &kr);
    if (rc != EXIT_OK)
        return rc;
    run->n = t->n;
    run->axis = t->axis;
    run->time = malloc(t->n * sizeof(double));
    run->flux = malloc(t->n * sizeof(double));
    run->response = malloc(t->n * sizeof(double));
    if (!run->time || !run->flux || !run->response)
        return EXIT_INTERNAL;
    memcpy(run->time, t->time, t->n * sizeof(double));
    memcpy(run->flux, t->values[kf], t->n * sizeof(double));
    memcpy(run->response, t->values[kr], t->n * sizeof(double));
    return o->feedback.annual ? annual(o, t, what, run) : EXIT_OK;
}

int cli_feedback_take(const cli_options *o, const series_table *t, cli_feedback_run *run)
{
    memset(run, 0, sizeof *run);
    run->source = cli_source_name(t->source);
    run->noise_ratio = o->feedback.noise_ratio;
    run->baseline_offset = NAN;
    char what[600];
    snprintf(what, sizeof what, "%s", run->source);
    int rc = take_columns(o, t, o->feedback.flux ? "--flux" : "--response", what, run);
    return rc;
}

/* A day number as a time of the run's axis (a dated axis: day numbers, month indices or
 * years; decimal for a day inside a month or year). */
static double axis_time(const time_axis *axis, double day)
{
    time_axis days = *axis;
    days.unit = TIME_AXIS_DAYS;
    double year = slowscan_time_axis_decimal_year(&days, day);
    return axis->unit == TIME_AXIS_DAYS ? day : axis->unit == TIME_AXIS_MONTHS ? 12 * year : year;
}

/* --baseline-offset, else the CF branch times of a NetCDF run (the parent's time at the
 * branch minus the run's own), else 0: the baseline's time at the run's time 0. */
static double baseline_offset(const cli_options *o, cli_feedback_run *run)
{
    double offset = o->feedback.baseline_offset;
    if (isnan(offset) && run->has_branch && run->axis.unit != TIME_AXIS_NUMBER)
        offset = axis_time(&run->axis, run->branch_parent_day) -
                 axis_time(&run->axis, run->branch_child_day);
    run->baseline_offset = isnan(offset) ? 0 : offset;
    return run->baseline_offset;
}

int cli_feedback_anomalies(const cli_options *o, const series_table *baseline,
                           cli_feedback_run *run)
{
    const cli_feedback_options *f = &o->feedback;
    cli_feedback_run b = {0};
    char what[600];
    snprintf(what, sizeof what, "the baseline run %s", f->baseline);
    int rc = take_columns(o, baseline, "--baseline", what, &b);
    double offset = baseline_offset(o, run);
    double *series[] = {run->flux, run->response};
    const double *bseries[] = {b.flux, b.response};
    for (int s = 0; s < 2 && rc == EXIT_OK; s++) {
        int st = slowscan_feedback_anomalies(run->time, series[s], run->n, b.time, bseries[s],
                                             b.n, offset, f->baseline_mode);
        if (st != SLOWSCAN_OK) {
            cli_error("option --baseline: %s has too few values of '%s' over the period of %s "
                      "(times %.12g to %.12g after --baseline-offset %.12g)", f->baseline,
                      s ? f->response : f->flux, run->source, run->time[0] + offset,
                      run->time[run->n - 1] + offset, offset);
            rc = st == SLOWSCAN_ENOMEM ? EXIT_INTERNAL : EXIT_BAD_INPUT;
        }
    }
    if (rc == EXIT_OK && f->fit == FEEDBACK_TLS && isnan(f->noise_ratio)) {
        int st = slowscan_feedback_noise_ratio(b.time, b.flux, b.response, b.n,
                                               run->time[0] + offset,
                                               run->time[run->n - 1] + offset, &run->noise_ratio);
        run->ratio_estimated = 1;
        if (st != SLOWSCAN_OK) {
            cli_error("option --fit tls: the noise ratio cannot be estimated from %s (%s); give "
                      "--noise-ratio", f->baseline, slowscan_strerror(st));
            rc = EXIT_BAD_INPUT;
        }
    }
    cli_feedback_run_free(&b);
    return rc;
}

void cli_feedback_run_free(cli_feedback_run *run)
{
    free(run->time);
    free(run->flux);
    free(run->response);
    run->time = run->flux = run->response = NULL;
}
