/* A CSV too wide to hold: read once, its series' values copied row by row into an unnamed
 * temporary file, and handed out as tables of a few series at a time
 * (slowscan_csv_open_columns, include/slowscan/io.h). Memory then holds the time column, the
 * names and one table of series, whatever the number of columns. */
#include "io_internal.h"

#include <errno.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

struct csv_column_store {
    series_table header; /* time, file rows, names, axis; every values[k] NULL */
    FILE *rows;          /* the values, row-major in file order, `width` doubles a row */
    size_t width;        /* series in the file's header (text columns included) */
    size_t *column;      /* per series kept: its column in `rows` */
    int backward;        /* the table's row i is the file's row n-1-i (ages, youngest first) */
};

int slowscan_csv_open_columns(const char *path, const csv_read_options *options,
                              const char *temp_dir, csv_column_store **out, io_error *err)
{
    *out = NULL;
    csv_column_store *s = calloc(1, sizeof *s);
    if (!s)
        return io_fail(err, SLOWSCAN_ENOMEM, "%s: out of memory", path);
    int made = io_unnamed_temporary(temp_dir, "slowscan-columns", &s->rows, err);
    if (made != SLOWSCAN_OK) {
        free(s);
        return made;
    }
    int st = csv_read(path, options, &s->header, s->rows, &s->column, &s->backward, err);
    if (st == SLOWSCAN_OK && fflush(s->rows) != 0)
        st = io_fail(err, SLOWSCAN_EIO, "%s: cannot write the temporary copy of the table", path);
    if (st != SLOWSCAN_OK) {
        slowscan_csv_columns_close(s);
        return st;
    }
    /* the file's width: the largest column kept, or more when text columns ended the row */
    s->width = s->header.nseries + s->header.nskipped;
    *out = s;
    return SLOWSCAN_OK;
}

const series_table *slowscan_csv_columns_header(const csv_column_store *s)
{
    return &s->header;
}

/* The table's frame: the time, file rows and axis of the header, names of the series. */
static int frame(const csv_column_store *s, size_t first, size_t count, series_table *t)
{
    const series_table *h = &s->header;
    t->n = h->n;
    t->axis = h->axis;
    t->source = io_strdup(h->source);
    t->time_name = io_strdup(h->time_name);
    t->time = malloc(h->n * sizeof *t->time);
    t->rows = malloc(h->n * sizeof *t->rows);
    t->names = calloc(count, sizeof *t->names);
    t->values = calloc(count, sizeof *t->values);
    if (!t->source || !t->time_name || !t->time || !t->rows || !t->names || !t->values)
        return SLOWSCAN_ENOMEM;
    memcpy(t->time, h->time, h->n * sizeof *t->time);
    memcpy(t->rows, h->rows, h->n * sizeof *t->rows);
    t->nseries = count;
    for (size_t k = 0; k < count; k++)
        if (!(t->names[k] = io_strdup(h->names[first + k])) ||
            !(t->values[k] = malloc(h->n * sizeof **t->values)))
            return SLOWSCAN_ENOMEM;
    return SLOWSCAN_OK;
}

/* Reads, row by row, the span of file columns that holds series first..first+count-1. */
static int fill(csv_column_store *s, size_t first, size_t count, series_table *t, double *span)
{
    size_t lo = s->column[first], hi = s->column[first + count - 1], m = hi - lo + 1;
    for (size_t i = 0; i < t->n; i++) {
        size_t row = s->backward ? t->n - 1 - i : i;
        off_t at = (off_t)((row * s->width + lo) * sizeof(double));
        if (fseeko(s->rows, at, SEEK_SET) != 0 || fread(span, sizeof *span, m, s->rows) != m)
            return SLOWSCAN_EIO;
        for (size_t k = 0; k < count; k++)
            t->values[k][i] = span[s->column[first + k] - lo];
    }
    return SLOWSCAN_OK;
}

int slowscan_csv_columns_table(csv_column_store *s, size_t first, size_t count,
                               series_table *t, io_error *err)
{
    memset(t, 0, sizeof *t);
    if (first >= s->header.nseries || count == 0)
        return io_fail(err, SLOWSCAN_EINVAL, "%s: no series %zu", io_display_name(s->header.source),
                       first);
    if (count > s->header.nseries - first)
        count = s->header.nseries - first;
    size_t span = s->column[first + count - 1] - s->column[first] + 1;
    double *buffer = malloc(span * sizeof *buffer);
    int st = buffer ? frame(s, first, count, t) : SLOWSCAN_ENOMEM;
    if (st == SLOWSCAN_OK)
        st = fill(s, first, count, t, buffer);
    free(buffer);
    if (st != SLOWSCAN_OK) {
        slowscan_series_table_free(t);
        return st == SLOWSCAN_ENOMEM ? io_fail(err, st, "out of memory")
                                     : io_fail(err, st, "%s: cannot read the temporary copy of "
                                               "the table back", io_display_name(s->header.source));
    }
    return SLOWSCAN_OK;
}

void slowscan_csv_columns_close(csv_column_store *s)
{
    if (!s)
        return;
    if (s->rows)
        fclose(s->rows);
    slowscan_series_table_free(&s->header);
    free(s->column);
    free(s);
}
