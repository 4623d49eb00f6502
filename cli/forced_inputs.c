/* The inputs of feedback, timescales and emulate made ready by one mechanism (forced_inputs.h):
 * their shared options, the run's columns as a table of their own with annual means, and
 * anomalies against a baseline (control) run through the library's
 * slowscan_feedback_anomalies. */
#include "forced_inputs.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

void cli_forced_defaults(cli_options *o)
{
    memset(&o->forced, 0, sizeof o->forced);
    o->forced.baseline_offset = NAN;
    o->forced.baseline_mode = FEEDBACK_BASELINE_MEAN;
}

int cli_forced_choice(const char *n, const char *v, const char *a, const char *b, int *out)
{
    if (strcmp(v, a) != 0 && strcmp(v, b) != 0) {
        cli_error("option %s: '%s' is neither '%s' nor '%s'", n, v, a, b);
        return EXIT_BAD_INPUT;
    }
    *out = strcmp(v, b) == 0;
    return EXIT_OK;
}

int cli_forced_set(cli_options *o, const char *n, const char *v)
{
    cli_forced_options *f = &o->forced;
    int rc = EXIT_OK, drift = 0;
    if (!strcmp(n, "--flux"))
        f->flux = v;
    else if (!strcmp(n, "--response"))
        f->response = v;
    else if (!strcmp(n, "--skip")) {
        /* one parser for every command: N%, time units, or N with y, mon, d */
        cli_length l;
        rc = cli_parse_length(n, v, &l);
        f->skip = (cli_forced_length){l.amount, l.percent, (int)l.unit, v};
    } else if (!strcmp(n, "--baseline"))
        f->baseline = v;
    else if (!strcmp(n, "--baseline-mode")) {
        rc = cli_forced_choice(n, v, "mean", "drift", &drift);
        f->baseline_mode = drift ? FEEDBACK_BASELINE_DRIFT : FEEDBACK_BASELINE_MEAN;
        f->baseline_mode_given = 1;
    } else if (!strcmp(n, "--baseline-offset"))
        rc = cli_parse_number(n, v, &f->baseline_offset);
    else if (!strcmp(n, "--annual"))
        f->annual = 1;
    return rc;
}

int cli_forced_check(const cli_options *o)
{
    const cli_forced_options *f = &o->forced;
    const char *needs_baseline = f->baseline_mode_given ? "--baseline-mode"
                               : !isnan(f->baseline_offset) ? "--baseline-offset" : NULL;
    if (needs_baseline && !f->baseline) {
        cli_error("option %s needs --baseline FILE (the control run)", needs_baseline);
        return EXIT_BAD_INPUT;
    }
    return EXIT_OK;
}

int cli_forced_unmeasurable(const char *option, const char *text, const time_axis *axis)
{
    cli_error("option %s: %s cannot be measured on this time axis (%s)", option, text,
              axis->unit == TIME_AXIS_NUMBER ? "plain numbers: give time units" : "use its own unit");
    return EXIT_BAD_INPUT;
}

screen_length cli_forced_request(double amount, int percent, int unit, const char *text)
{
    screen_length l = {text ? amount : NAN, percent, (length_unit)unit};
    return l;
}

int cli_forced_column(const series_table *t, const char *option, const char *name,
                      const char *what, size_t *k)
{
    for (*k = 0; *k < t->nseries; (*k)++)
        if (strcmp(t->names[*k], name) == 0)
            return EXIT_OK;
    cli_error("option %s: %s has no column '%s'%s", option, what, name,
              t->nseries == 2 ? "" : " (or it holds text)");
    return EXIT_BAD_INPUT;
}

/* Annual means (by month length) of every column of the monthly table out, in place. */
static int annual(const char *what, series_table *out)
{
    if (out->axis.unit != TIME_AXIS_MONTHS) {
        cli_error("option --annual: %s is not a monthly record (its time column is not on "
                  "months)", what);
        return EXIT_BAD_INPUT;
    }
    size_t cap = out->n / 12 + 2, ny = 0;
    double *year = malloc(cap * sizeof *year);
    int st = year ? SLOWSCAN_OK : SLOWSCAN_ENOMEM;
    for (size_t k = 0; k < out->nseries && st == SLOWSCAN_OK; k++) {
        double *means = malloc(cap * sizeof *means);
        st = means ? slowscan_feedback_annual_means(out->axis.calendar, out->time, out->values[k],
                                                    out->n, year, means, &ny)
                   : SLOWSCAN_ENOMEM;
        free(out->values[k]);
        out->values[k] = means;
    }
    if (st != SLOWSCAN_OK) {
        free(year);
        if (st == SLOWSCAN_ENOMEM)
            return EXIT_INTERNAL;
        cli_error("option --annual: %s holds no whole calendar year (January to December)", what);
        return EXIT_BAD_INPUT;
    }
    free(out->time);
    out->time = year;
    out->n = ny;
    free(out->rows);
    out->rows = NULL;
    out->axis.unit = TIME_AXIS_YEARS;
    out->axis.precision = DATE_YEAR;
    return EXIT_OK;
}

static char *copy_text(const char *s)
{
    char *c = malloc(strlen(s ? s : "") + 1);
    if (c)
        strcpy(c, s ? s : "");
    return c;
}

static double *copy_values(const double *v, size_t n)
{
    double *c = malloc((n ? n : 1) * sizeof *c);
    if (c && n)
        memcpy(c, v, n * sizeof *c);
    return c;
}

int cli_forced_table(const cli_options *o, const series_table *t, const size_t *cols,
                     size_t ncols, const char *what, series_table *out)
{
    memset(out, 0, sizeof *out);
    out->n = t->n;
    out->axis = t->axis;
    out->source = copy_text(t->source);
    out->time_name = copy_text(t->time_name);
    out->time = copy_values(t->time, t->n);
    out->rows = t->rows ? malloc((t->n ? t->n : 1) * sizeof *out->rows) : NULL;
    out->names = calloc(ncols + 1, sizeof *out->names);
    out->values = calloc(ncols + 1, sizeof *out->values);
    int made = out->source && out->time_name && out->time && (out->rows || !t->rows) &&
               out->names && out->values;
    if (made && t->rows)
        memcpy(out->rows, t->rows, t->n * sizeof *out->rows);
    for (size_t j = 0; made && j < ncols; j++, out->nseries++)
        made = (out->names[j] = copy_text(t->names[cols[j]])) &&
               (out->values[j] = copy_values(t->values[cols[j]], t->n));
    int rc = made ? EXIT_OK : EXIT_INTERNAL;
    if (!made)
        cli_error("out of memory");
    if (rc == EXIT_OK && o->forced.annual)
        rc = annual(what, out);
    if (rc != EXIT_OK)
        slowscan_series_table_free(out);
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

double cli_forced_offset(const cli_options *o, const time_axis *axis, const double *branch)
{
    double offset = o->forced.baseline_offset;
    if (isnan(offset) && branch && axis->unit != TIME_AXIS_NUMBER)
        offset = axis_time(axis, branch[0]) - axis_time(axis, branch[1]);
    return isnan(offset) ? 0 : offset;
}

/* Column k of run t minus baseline column bv (of table b) over the run's period. */
static int anomaly(const cli_options *o, const series_table *b, const double *bv,
                   double offset, series_table *t, size_t k)
{
    const cli_forced_options *f = &o->forced;
    double from = t->time[0] + offset, until = t->time[t->n - 1] + offset, first, last;
    if (slowscan_feedback_baseline_covers(t->time, t->n, b->time, bv, b->n, offset, &first,
                                          &last) != SLOWSCAN_OK) {
        cli_error("option --baseline: %s does not cover the period of %s for column '%s' (it "
                  "has values from %.12g to %.12g; the run needs %.12g to %.12g after "
                  "--baseline-offset %.12g)", f->baseline, cli_source_name(t->source),
                  t->names[k], first, last, from, until, offset);
        return EXIT_BAD_INPUT;
    }
    int st = slowscan_feedback_anomalies(t->time, t->values[k], t->n, b->time, bv, b->n, offset,
                                         f->baseline_mode);
    if (st == SLOWSCAN_OK)
        return EXIT_OK;
    if (st == SLOWSCAN_ENOMEM) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    cli_error("option --baseline: %s has too few values of '%s' over the period of %s (times "
              "%.12g to %.12g after --baseline-offset %.12g)", f->baseline, t->names[k],
              cli_source_name(t->source), from, until, offset);
    return EXIT_BAD_INPUT;
}

int cli_forced_anomalies(const cli_options *o, const series_table *baseline, double offset,
                         series_table *t)
{
    char what[600];
    snprintf(what, sizeof what, "the baseline run %s", o->forced.baseline);
    size_t *cols = malloc((t->nseries + 1) * sizeof *cols);
    if (!cols) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    int rc = EXIT_OK;
    for (size_t k = 0; rc == EXIT_OK && k < t->nseries; k++)
        rc = cli_forced_column(baseline, "--baseline", t->names[k], what, &cols[k]);
    series_table b;
    if (rc == EXIT_OK)
        rc = cli_forced_table(o, baseline, cols, t->nseries, what, &b);
    free(cols);
    if (rc != EXIT_OK)
        return rc;
    for (size_t k = 0; rc == EXIT_OK && k < t->nseries; k++)
        rc = anomaly(o, &b, b.values[k], offset, t, k);
    slowscan_series_table_free(&b);
    return rc;
}

int cli_forced_load_baseline(const cli_options *o, const cli_outputs *outs,
                             series_table *baseline, int *loaded)
{
    *loaded = 0;
    if (!o->forced.baseline)
        return EXIT_OK;
    if (cli_output_clashes(outs, o, o->forced.baseline, "--baseline"))
        return EXIT_BAD_INPUT;
    int rc = cli_load_whole_table(o, o->forced.baseline, "--baseline", "a baseline run", baseline);
    *loaded = rc == EXIT_OK;
    return rc;
}
