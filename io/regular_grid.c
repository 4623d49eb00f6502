/* A regular grid with missing rows: the base step, the gaps, and the times put exactly on
 * the grid (slowscan_table_regularize, include/slowscan/io.h).
 *
 * Times written with few decimals (decimal years to 3 places: steps of 0.083 and 0.084) are
 * regular only to the precision printed, so the tolerance follows the decimals the column
 * was written with; a column with exponents or many decimals keeps the relative tolerance of
 * DESIGN §3 (1e-6 of the step). */
#include "io_internal.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

static const double RELATIVE_TOLERANCE = 1e-6;
/* A grid of more rows than this is a mistaken base step, not a record. */
static const double MAX_GRID_ROWS = 1e8;

/* How far a written time may sit from the grid: its rounding, plus float slack. */
static double position_tolerance(const series_table *t, double step)
{
    double written = 0.0;
    if (t->axis.unit == TIME_AXIS_NUMBER && t->axis.decimals >= 0)
        written = 1.01 * pow(10.0, -t->axis.decimals);
    return fmax(written, RELATIVE_TOLERANCE * step);
}

/* The most common step: steps sorted, grouped while within `tol` of the group's first, the
 * largest group wins (the smaller step on a tie); its median. */
static double most_common_step(const double *sorted, size_t m, const series_table *t)
{
    size_t best_start = 0, best_count = 0;
    for (size_t i = 0; i < m;) {
        double tol = position_tolerance(t, sorted[i]);
        size_t j = i;
        while (j < m && sorted[j] - sorted[i] <= tol)
            j++;
        if (j - i > best_count)
            best_start = i, best_count = j - i;
        i = j;
    }
    return sorted[best_start + best_count / 2];
}

static double base_step(const series_table *t)
{
    size_t m = t->n - 1;
    double *steps = malloc(m * sizeof *steps);
    if (!steps)
        return NAN;
    for (size_t i = 0; i < m; i++)
        steps[i] = t->time[i + 1] - t->time[i];
    qsort(steps, m, sizeof *steps, io_compare_doubles);
    double step = most_common_step(steps, m, t);
    free(steps);
    return step;
}

/* Grid index of every row against `step`; SLOWSCAN_EINVAL naming the first row off the grid. */
static int grid_positions(const series_table *t, double step, long *position, io_error *err)
{
    double tol = position_tolerance(t, step);
    for (size_t i = 0; i < t->n; i++) {
        double k = round((t->time[i] - t->time[0]) / step);
        double off = t->time[i] - (t->time[0] + k * step);
        if (fabs(off) > 2.0 * tol || (i > 0 && k <= (double)position[i - 1]) ||
            k > MAX_GRID_ROWS) {
            char where[64], now[64], before[64], base[64];
            io_sample_where(t, i, where, sizeof where);
            slowscan_time_axis_format(&t->axis, t->time[i], now, sizeof now);
            slowscan_time_axis_format(&t->axis, t->time[i - (i > 0)], before, sizeof before);
            slowscan_time_axis_format(&(time_axis){TIME_AXIS_NUMBER, CALENDAR_STANDARD, DATE_YEAR, -1, 0}, step, base,
                                      sizeof base);
            return io_fail(err, SLOWSCAN_EINVAL, "%s: %s: the step from time %s to %s is not a "
                           "whole number of the base step %s (the most common step): the grid "
                           "is irregular; use --resample STEP to interpolate onto a regular "
                           "grid", io_display_name(t->source), where, before, now, base);
        }
        position[i] = (long)k;
    }
    return SLOWSCAN_OK;
}

/* Spreads the rows onto a grid of `rows` points; the missing ones are NaN, file row 0. */
static int spread_rows(series_table *t, const long *position, size_t rows, double step)
{
    double *time = malloc(rows * sizeof *time);
    size_t *file_rows = t->rows ? calloc(rows, sizeof *file_rows) : NULL;
    double **values = calloc(t->nseries ? t->nseries : 1, sizeof *values);
    int bad = !time || (t->rows && !file_rows) || !values;
    for (size_t k = 0; !bad && k < t->nseries; k++)
        bad = !(values[k] = malloc(rows * sizeof **values));
    if (bad) {
        for (size_t k = 0; values && k < t->nseries; k++)
            free(values[k]);
        free(values), free(time), free(file_rows);
        return SLOWSCAN_ENOMEM;
    }
    for (size_t j = 0; j < rows; j++) {
        time[j] = t->time[0] + (double)j * step;
        for (size_t k = 0; k < t->nseries; k++)
            values[k][j] = NAN;
    }
    for (size_t i = 0; i < t->n; i++)
        for (size_t k = 0; k < t->nseries; k++)
            values[k][position[i]] = t->values[k][i];
    for (size_t i = 0; file_rows && i < t->n; i++)
        file_rows[position[i]] = t->rows[i];
    for (size_t k = 0; k < t->nseries; k++) {
        free(t->values[k]);
        t->values[k] = values[k];
    }
    free(values), free(t->time), free(t->rows);
    t->time = time, t->rows = file_rows, t->n = rows;
    return SLOWSCAN_OK;
}

int slowscan_table_regularize(series_table *t, size_t *gaps, io_error *err)
{
    if (gaps)
        *gaps = 0;
    if (t->n < 2)
        return slowscan_table_check_grid(t, NULL, err); /* its message for too few rows */
    double step = base_step(t);
    long *position = malloc(t->n * sizeof *position);
    if (!position || isnan(step)) {
        free(position);
        return io_fail(err, SLOWSCAN_ENOMEM, "%s: out of memory", io_display_name(t->source));
    }
    int st = grid_positions(t, step, position, err);
    size_t rows = st == SLOWSCAN_OK ? (size_t)position[t->n - 1] + 1 : 0;
    /* the step that spreads the rows exactly from the first time to the last */
    double exact = st == SLOWSCAN_OK ? (t->time[t->n - 1] - t->time[0]) / (double)(rows - 1) : 0;
    if (st == SLOWSCAN_OK && gaps)
        *gaps = rows - t->n;
    /* a grid regular already to 1e-6 keeps its times bit for bit */
    if (st == SLOWSCAN_OK && rows == t->n && slowscan_table_check_grid(t, NULL, NULL) == SLOWSCAN_OK) {
        free(position);
        return SLOWSCAN_OK;
    }
    if (st == SLOWSCAN_OK && spread_rows(t, position, rows, exact) != SLOWSCAN_OK)
        st = io_fail(err, SLOWSCAN_ENOMEM, "%s: out of memory for %zu rows",
                     io_display_name(t->source), rows);
    free(position);
    return st;
}
