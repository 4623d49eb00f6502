/* The time axis: cutting to a span, checking the grid is regular, resampling onto one, and
 * taking logarithms (which needs the file rows for its messages). */
#include "io_internal.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

/* Relative tolerance on each time step (DESIGN §3). */
static const double GRID_TOLERANCE = 1e-6;
/* Slack, in steps, for rounding in t_first + k*step: the last grid point may land a hair
 * past t_last, and a grid point this close to a sample counts as hitting it. */
static const double GRID_SLACK = 1e-9;
/* More grid points than this is a mistaken step, not a plan (8 GB per series). */
static const double MAX_GRID_POINTS = 1e9;

/* "--from 3 --until 5", "--from 3" or "--until 5". */
static void span_text(double from, double until, char *buf, size_t size)
{
    if (!isnan(from) && !isnan(until))
        snprintf(buf, size, "--from %.15g --until %.15g", from, until);
    else if (!isnan(from))
        snprintf(buf, size, "--from %.15g", from);
    else
        snprintf(buf, size, "--until %.15g", until);
}

int slowscan_table_select_span(series_table *t, double from, double until, io_error *err)
{
    const char *name = io_display_name(t->source);
    char opts[128];
    span_text(from, until, opts, sizeof opts);
    if (!isnan(from) && !isnan(until) && from > until)
        return io_fail(err, SLOWSCAN_EINVAL, "%s: options %s: the start is after the end", name,
                       opts);
    size_t lo = 0, hi = t->n; /* the kept rows are contiguous since time increases */
    while (lo < t->n && !isnan(from) && t->time[lo] < from)
        lo++;
    while (hi > lo && !isnan(until) && t->time[hi - 1] > until)
        hi--;
    if (hi - lo < 2) {
        if (t->n == 0)
            return io_fail(err, SLOWSCAN_ESHORT, "%s: options %s: the table has no rows", name, opts);
        return io_fail(err, SLOWSCAN_ESHORT, "%s: options %s leave %zu row%s of data, at least 2 "
                       "are needed (the times run from %.15g to %.15g)", name, opts, hi - lo,
                       hi - lo == 1 ? "" : "s", t->time[0], t->time[t->n - 1]);
    }
    size_t n = hi - lo;
    memmove(t->time, t->time + lo, n * sizeof *t->time);
    if (t->rows)
        memmove(t->rows, t->rows + lo, n * sizeof *t->rows);
    for (size_t k = 0; k < t->nseries; k++)
        memmove(t->values[k], t->values[k] + lo, n * sizeof **t->values);
    t->n = n;
    return SLOWSCAN_OK;
}

int slowscan_table_check_grid(const series_table *t, double *dt, io_error *err)
{
    const char *name = io_display_name(t->source);
    if (t->n < 2)
        return io_fail(err, SLOWSCAN_ESHORT, "%s: %zu row%s of data cannot define a time step "
                       "(at least 2 are needed)", name, t->n, t->n == 1 ? "" : "s");
    double step = (t->time[t->n - 1] - t->time[0]) / (double)(t->n - 1);
    for (size_t i = 1; i < t->n; i++) {
        double d = t->time[i] - t->time[i - 1];
        if (fabs(d - step) > GRID_TOLERANCE * step) {
            char where[64];
            io_sample_where(t, i, where, sizeof where);
            return io_fail(err, SLOWSCAN_EINVAL, "%s: %s: the time step %.15g (from time %.15g to "
                           "%.15g) is not the regular step %.15g that the span and the number of "
                           "rows imply (relative tolerance 1e-6); use --resample STEP to "
                           "interpolate onto a regular grid", name, where, d, t->time[i - 1],
                           t->time[i], step);
        }
    }
    if (dt)
        *dt = step;
    return SLOWSCAN_OK;
}

/* Linear interpolation of one series at the grid points, walking both axes once. A grid
 * point within `tol` of a sample takes that sample (missing if it is missing); otherwise a
 * missing neighbour makes it missing (NaN propagates through the weighted sum). */
/* Linear interpolation of x(t) at the grid points; a point between two samples more than
 * `max_span` apart (a gap) stays missing, unless it hits a sample. */
static void interpolate(const double *t, const double *x, size_t n, const double *grid,
                        size_t m, double tol, double max_span, double *out)
{
    size_t j = 0;
    for (size_t g = 0; g < m; g++) {
        double at = fmin(grid[g], t[n - 1]); /* the slack may put the last point past t_last */
        while (j + 2 < n && t[j + 1] <= at)
            j++;
        if (fabs(at - t[j]) <= tol)
            out[g] = x[j];
        else if (fabs(t[j + 1] - at) <= tol)
            out[g] = x[j + 1];
        else if (t[j + 1] - t[j] > max_span) {
            out[g] = NAN;
        } else {
            double w = (at - t[j]) / (t[j + 1] - t[j]);
            out[g] = (1 - w) * x[j] + w * x[j + 1];
        }
    }
}

static void free_columns(double **values, size_t nseries, double *grid)
{
    for (size_t k = 0; values && k < nseries; k++)
        free(values[k]);
    free(values);
    free(grid);
}

static int resample_onto(series_table *t, double step, double max_span, io_error *err);

int slowscan_table_resample_within(series_table *t, double step, double max_gap, io_error *err)
{
    const char *name = io_display_name(t->source);
    if (t->n >= 2 && isfinite(max_gap)) {
        double median = io_median_step(t->time, t->n);
        if (isnan(median))
            return io_fail(err, SLOWSCAN_ENOMEM, "%s: out of memory resampling", name);
        if (step < median * (1.0 - 1e-9))
            return io_fail(err, SLOWSCAN_EINVAL, "%s: option --resample %.15g: the step is finer "
                           "than the data's median step %.15g; interpolating onto it would "
                           "create memory (lag-1 autocorrelation) the data do not have: use a "
                           "step of at least %.15g", name, step, median, median);
        return resample_onto(t, step, max_gap * median, err);
    }
    return resample_onto(t, step, INFINITY, err);
}

int slowscan_table_resample(series_table *t, double step, io_error *err)
{
    return slowscan_table_resample_within(t, step, INFINITY, err);
}

static int resample_onto(series_table *t, double step, double max_span, io_error *err)
{
    const char *name = io_display_name(t->source);
    if (t->n < 2)
        return io_fail(err, SLOWSCAN_ESHORT, "%s: option --resample: %zu row%s of data cannot be "
                       "resampled (at least 2 are needed)", name, t->n, t->n == 1 ? "" : "s");
    double first = t->time[0], span = t->time[t->n - 1] - first;
    double count = step > 0 && isfinite(step) ? floor(span / step + GRID_SLACK) + 1 : 0;
    if (count < 2)
        return io_fail(err, SLOWSCAN_EINVAL, "%s: option --resample %.15g: the step must be "
                       "positive and at most the span %.15g of the data", name, step, span);
    if (count > MAX_GRID_POINTS)
        return io_fail(err, SLOWSCAN_EINVAL, "%s: option --resample %.15g: the step would give "
                       "%.3g grid points (more than 1e9)", name, step, count);
    size_t m = (size_t)count;
    double *grid = malloc(m * sizeof *grid);
    double **values = calloc(t->nseries, sizeof *values);
    int bad = !grid || !values;
    for (size_t k = 0; k < t->nseries && !bad; k++)
        bad = !(values[k] = malloc(m * sizeof **values));
    if (bad) {
        free_columns(values, t->nseries, grid);
        return io_fail(err, SLOWSCAN_ENOMEM, "%s: out of memory resampling", name);
    }
    for (size_t g = 0; g < m; g++) /* first + g*step, not a running sum: no drift */
        grid[g] = first + (double)g * step;
    for (size_t k = 0; k < t->nseries; k++)
        interpolate(t->time, t->values[k], t->n, grid, m, GRID_SLACK * step, max_span,
                    values[k]);
    free_columns(t->values, t->nseries, t->time);
    free(t->rows);
    t->values = values;
    t->time = grid;
    t->rows = NULL;
    t->n = m;
    return SLOWSCAN_OK;
}

int slowscan_table_log(series_table *t, io_error *err)
{
    /* Check everything first so that a failure leaves the table as it was. */
    for (size_t k = 0; k < t->nseries; k++)
        for (size_t i = 0; i < t->n; i++) {
            double v = t->values[k][i];
            if (!isnan(v) && !(v > 0)) {
                char where[64];
                io_sample_where(t, i, where, sizeof where);
                return io_fail(err, SLOWSCAN_EINVAL, "%s: %s, column '%s': the value %.15g is not "
                               "positive, so option --log cannot take its logarithm",
                               io_display_name(t->source), where, t->names[k], v);
            }
        }
    for (size_t k = 0; k < t->nseries; k++)
        for (size_t i = 0; i < t->n; i++)
            t->values[k][i] = log(t->values[k][i]);
    return SLOWSCAN_OK;
}
