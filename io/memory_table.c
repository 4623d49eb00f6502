/* A series table from a caller's arrays in memory (a binding's numpy columns): the time
 * column goes through the CSV reader's own cell reader (time_column.c), so numbers, dates on
 * a calendar and numbers in CF units give the axis a file with the same cells would give,
 * and the same refusals (missing or non-increasing time, an infinite value) apply. */
#include "io_internal.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

static int copy_names(series_table *t, const char *source, const char *time_name,
                      const char *const *names, size_t nseries)
{
    t->source = io_strdup(source ? source : "input");
    t->time_name = io_strdup(time_name ? time_name : "time");
    t->names = calloc(nseries ? nseries : 1, sizeof *t->names);
    t->values = calloc(nseries ? nseries : 1, sizeof *t->values);
    if (!t->source || !t->time_name || !t->names || !t->values)
        return SLOWSCAN_ENOMEM;
    t->nseries = nseries;
    for (size_t k = 0; k < nseries; k++)
        if (!(t->names[k] = io_strdup(names[k])) ||
            !(t->values[k] = malloc((t->n ? t->n : 1) * sizeof(double))))
            return SLOWSCAN_ENOMEM;
    return SLOWSCAN_OK;
}

/* The time cells into t->time, each checked as the CSV reader checks a row's time. */
static int read_times(series_table *t, time_reader *tr, const char *const *cells,
                      io_error *err)
{
    const char *name = io_display_name(t->source);
    for (size_t i = 0; i < t->n; i++) {
        char why[256];
        if (time_reader_cell(tr, cells[i], &t->time[i], why, sizeof why) != SLOWSCAN_OK)
            return io_fail(err, SLOWSCAN_EINVAL, "%s: %s[%zu] '%s' %s", name, t->time_name, i,
                           cells[i], why);
        if (isnan(t->time[i]))
            return io_fail(err, SLOWSCAN_EINVAL, "%s: %s[%zu]: the time is missing", name,
                           t->time_name, i);
        if (i > 0 && !(t->time[i] > t->time[i - 1])) {
            char now[64], before[64];
            time_reader_text(tr, t->time[i], now, sizeof now);
            time_reader_text(tr, t->time[i - 1], before, sizeof before);
            return io_fail(err, SLOWSCAN_EINVAL, "%s: %s[%zu] = %s is not greater than the "
                           "previous time %s (times must increase)", name, t->time_name, i,
                           now, before);
        }
    }
    time_reader_settle(tr, t->time, t->n, &t->axis);
    return SLOWSCAN_OK;
}

/* The values, missing-value codes made NaN, infinite values refused. */
static int read_values(series_table *t, const csv_read_options *o,
                       const double *const *values, io_error *err)
{
    for (size_t k = 0; k < t->nseries; k++)
        for (size_t i = 0; i < t->n; i++) {
            double v = values[k][i];
            if (isinf(v))
                return io_fail(err, SLOWSCAN_EINVAL, "%s: series '%s', sample %zu: an "
                               "infinite value", io_display_name(t->source), t->names[k], i);
            if (!isnan(v) && io_missing_code(o, v)) {
                v = NAN;
                t->coded_missing++;
            }
            t->values[k][i] = v;
        }
    return SLOWSCAN_OK;
}

int slowscan_table_from_memory(const char *source, const char *time_name,
                               const char *const *time_cells, size_t n,
                               const char *const *names, const double *const *values,
                               size_t nseries, const csv_read_options *options,
                               series_table *table, io_error *err)
{
    memset(table, 0, sizeof *table);
    csv_read_options defaults = slowscan_csv_read_options_default();
    const csv_read_options *o = options ? options : &defaults;
    if (o->age)
        return io_fail(err, SLOWSCAN_EINVAL, "%s: ages are not read from memory; give the "
                       "times as they run forward", source ? source : "input");
    table->n = n;
    table->time = malloc((n ? n : 1) * sizeof *table->time);
    int st = table->time ? copy_names(table, source, time_name, names, nseries)
                         : SLOWSCAN_ENOMEM;
    if (st != SLOWSCAN_OK) {
        slowscan_series_table_free(table);
        return io_fail(err, st, "out of memory");
    }
    time_reader tr;
    time_reader_init(&tr, o);
    st = read_times(table, &tr, time_cells, err);
    if (st == SLOWSCAN_OK)
        st = read_values(table, o, values, err);
    if (st != SLOWSCAN_OK)
        slowscan_series_table_free(table);
    return st;
}
