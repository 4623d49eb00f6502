/* NetCDF cells as series tables of bounded size (slowscan_netcdf_next_table), so that
 * everything that reads a table (the span, the grid, logs, the commands) reads a grid the
 * same way, a table at a time. */
#include "netcdf_internal.h"

#include <stdlib.h>
#include <string.h>

/* A table holding the file's time axis and room for `max` series. */
static int start_table(netcdf_reader *r, size_t max, series_table *t, io_error *err)
{
    memset(t, 0, sizeof *t);
    t->n = r->nt;
    t->axis = r->axis;
    t->source = io_strdup(r->path);
    t->time_name = io_strdup(r->time_name);
    t->time = malloc(r->nt * sizeof *t->time);
    t->names = calloc(max, sizeof *t->names);
    t->values = calloc(max, sizeof *t->values);
    t->grid = calloc(max, sizeof *t->grid);
    if (!t->source || !t->time_name || !t->time || !t->names || !t->values || !t->grid) {
        slowscan_series_table_free(t);
        return netcdf_fail(r, err, SLOWSCAN_ENOMEM, "out of memory");
    }
    memcpy(t->time, r->time, r->nt * sizeof *t->time);
    return SLOWSCAN_OK;
}

static int add_series(netcdf_reader *r, series_table *t, const netcdf_series *s, io_error *err)
{
    size_t k = t->nseries;
    t->names[k] = io_strdup(s->name);
    t->values[k] = malloc(s->n * sizeof **t->values);
    t->grid[k] = (grid_position){.variable = s->variable_index, .cell = s->cell};
    t->nseries++; /* counted at once, so that the table's release frees what was made */
    if (!t->names[k] || !t->values[k])
        return netcdf_fail(r, err, SLOWSCAN_ENOMEM, "out of memory");
    memcpy(t->values[k], s->values, s->n * sizeof **t->values);
    return SLOWSCAN_OK;
}

int slowscan_netcdf_next_table(netcdf_reader *r, size_t max_series, series_table *t,
                               size_t *all_missing, io_error *err)
{
    memset(t, 0, sizeof *t);
    if (max_series == 0)
        max_series = 1;
    int st = SLOWSCAN_OK;
    int started = 0;
    netcdf_series s;
    while (st == SLOWSCAN_OK && (!started || t->nseries < max_series)) {
        st = slowscan_netcdf_next(r, &s, err);
        if (st != SLOWSCAN_OK)
            break;
        if (s.all_missing) {
            if (all_missing)
                (*all_missing)++;
            continue;
        }
        if (!started && (st = start_table(r, max_series, t, err)) != SLOWSCAN_OK)
            return st;
        started = 1;
        st = add_series(r, t, &s, err);
    }
    if (st == NETCDF_END && started)
        st = SLOWSCAN_OK;
    if (st != SLOWSCAN_OK && started)
        slowscan_series_table_free(t);
    return st;
}
