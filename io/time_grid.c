/* The time axis: cutting to a span, checking the grid is regular, resampling onto one, and
 * taking logarithms (which needs the file rows for its messages). */
#include "io_internal.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

/* Relative tolerance on each time step (DESIGN §3). */
static const double GRID_TOLERANCE = 1e-6;

int table_select_span(series_table *t, double from, double until, io_error *err)
{
    size_t lo = 0, hi = t->n;
    while (lo < t->n && !isnan(from) && t->time[lo] < from)
        lo++;
    while (hi > lo && !isnan(until) && t->time[hi - 1] > until)
        hi--;
    if (hi - lo < 2)
        return io_fail(err, SLOWSCAN_ESHORT, "%s: options --from/--until leave %zu sample%s "
                       "(times in the file run from %.12g to %.12g)", t->source, hi - lo,
                       hi - lo == 1 ? "" : "s", t->time[0], t->time[t->n - 1]);
    size_t n = hi - lo;
    memmove(t->time, t->time + lo, n * sizeof *t->time);
    if (t->rows)
        memmove(t->rows, t->rows + lo, n * sizeof *t->rows);
    for (size_t k = 0; k < t->nseries; k++)
        memmove(t->values[k], t->values[k] + lo, n * sizeof **t->values);
    t->n = n;
    return SLOWSCAN_OK;
}

int table_check_grid(const series_table *t, double *dt, io_error *err)
{
    if (t->n < 2)
        return io_fail(err, SLOWSCAN_ESHORT, "%s: fewer than 2 samples", t->source);
    double step = (t->time[t->n - 1] - t->time[0]) / (double)(t->n - 1);
    for (size_t i = 1; i < t->n; i++) {
        double d = t->time[i] - t->time[i - 1];
        if (fabs(d - step) > GRID_TOLERANCE * step) {
            size_t row = t->rows ? t->rows[i] : i + 2;
            return io_fail(err, SLOWSCAN_EINVAL, "%s: row %zu: time step %.12g differs from the "
                           "mean step %.12g; the series must be on a regular grid (use --resample "
                           "STEP to interpolate onto one)", t->source, row, d, step);
        }
    }
    *dt = step;
    return SLOWSCAN_OK;
}

/* Linear interpolation of one series at the grid points, walking both axes once. */
static void interpolate(const double *t, const double *x, size_t n, const double *grid,
                        size_t m, double *out)
{
    size_t j = 0;
    for (size_t g = 0; g < m; g++) {
        while (j + 1 < n && t[j + 1] <= grid[g])
            j++;
        if (t[j] == grid[g] || j + 1 >= n)
            out[g] = t[j] == grid[g] ? x[j] : NAN;
        else {
            double w = (grid[g] - t[j]) / (t[j + 1] - t[j]);
            /* A missing neighbour makes the point missing: NaN propagates through the sum. */
            out[g] = x[j] + w * (x[j + 1] - x[j]);
        }
    }
}

int table_resample(series_table *t, double step, io_error *err)
{
    double span = t->time[t->n - 1] - t->time[0];
    if (!(step > 0) || step > span)
        return io_fail(err, SLOWSCAN_EINVAL, "%s: option --resample %.12g must be positive and at "
                       "most the span %.12g", t->source, step, span);
    double count = floor(span / step + 1e-9) + 1;
    if (count > 1e9)
        return io_fail(err, SLOWSCAN_EINVAL, "%s: option --resample %.12g gives more than 10^9 "
                       "samples", t->source, step);
    size_t m = (size_t)count;
    double *grid = malloc(m * sizeof *grid);
    double **values = calloc(t->nseries, sizeof *values);
    int bad = !grid || !values;
    for (size_t k = 0; k < t->nseries && !bad; k++)
        bad = !(values[k] = malloc(m * sizeof **values));
    if (bad) {
        for (size_t k = 0; values && k < t->nseries; k++)
            free(values[k]);
        free(values);
        free(grid);
        return io_fail(err, SLOWSCAN_ENOMEM, "%s: out of memory resampling", t->source);
    }
    for (size_t g = 0; g < m; g++) /* the last point may overshoot t_last by rounding */
        grid[g] = fmin(t->time[0] + (double)g * step, t->time[t->n - 1]);
    for (size_t k = 0; k < t->nseries; k++) {
        interpolate(t->time, t->values[k], t->n, grid, m, values[k]);
        free(t->values[k]);
    }
    free(t->values);
    free(t->time);
    free(t->rows);
    t->values = values;
    t->time = grid;
    t->rows = NULL;
    t->n = m;
    return SLOWSCAN_OK;
}

int table_log(series_table *t, io_error *err)
{
    for (size_t k = 0; k < t->nseries; k++)
        for (size_t i = 0; i < t->n; i++) {
            double v = t->values[k][i];
            if (isnan(v))
                continue;
            if (!(v > 0)) {
                if (t->rows)
                    return io_fail(err, SLOWSCAN_EINVAL, "%s: row %zu, column '%s': option --log "
                                   "needs positive values, found %.12g", t->source, t->rows[i],
                                   t->names[k], v);
                return io_fail(err, SLOWSCAN_EINVAL, "%s: time %.12g, column '%s': option --log "
                               "needs positive values, found %.12g", t->source, t->time[i],
                               t->names[k], v);
            }
        }
    for (size_t k = 0; k < t->nseries; k++)
        for (size_t i = 0; i < t->n; i++)
            t->values[k][i] = log(t->values[k][i]);
    return SLOWSCAN_OK;
}
