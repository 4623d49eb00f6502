/* Fuzzing the CSV reader (io/csv_input.c and csv_header.c over libcsv, the time column of
 * io/time_column.c and calendar/, the grid steps of io/time_grid.c and regular_grid.c).
 *
 * Input: one byte of reading options, then the file's bytes.
 *   bits 0-2  calendar of dated time columns (modulo the number of calendars)
 *   bit 3     the time column holds ages (--age)
 *   bit 4     -999 and -9999 are missing-value codes (--missing)
 *   bit 5     dates are written "%Y%m%d" (--time-format)
 *   bit 6     numbers are "days since 1850-01-01" (--time-units)
 *   bit 7     also read through the column store (slowscan_csv_open_columns), which must give
 *             the same table as slowscan_csv_read_table, value for value
 * A table that reads is then put on its grid as screen does (regularize, check, suspect codes,
 * its first and last times formatted). */
#include "fuzz.h"

#include "slowscan/io.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

static const time_units *days_since_1850(void)
{
    static time_units units;
    static int state; /* 0 not tried, 1 parsed, -1 refused (no UDUNITS-2 database) */
    if (state == 0)
        state = slowscan_time_units_parse("days since 1850-01-01", CALENDAR_STANDARD, &units,
                                          NULL) == SLOWSCAN_OK ? 1 : -1;
    return state == 1 ? &units : NULL;
}

static int same_value(double a, double b)
{
    return (isnan(a) && isnan(b)) || a == b;
}

/* The column store hands out the series two at a time; each must equal the whole read's. */
static void compare_columns(const char *path, const csv_read_options *o, const series_table *whole)
{
    csv_column_store *store;
    io_error err;
    if (slowscan_csv_open_columns(path, o, NULL, &store, &err) != SLOWSCAN_OK)
        abort(); /* the whole read succeeded on the same bytes */
    const series_table *h = slowscan_csv_columns_header(store);
    if (h->n != whole->n || h->nseries != whole->nseries)
        abort();
    for (size_t first = 0; first < whole->nseries; first += 2) {
        series_table part = {0};
        if (slowscan_csv_columns_table(store, first, 2, &part, &err) != SLOWSCAN_OK)
            abort();
        for (size_t k = 0; k < part.nseries; k++) {
            if (strcmp(part.names[k], whole->names[first + k]) != 0)
                abort();
            for (size_t i = 0; i < part.n; i++)
                if (!same_value(part.values[k][i], whole->values[first + k][i]) ||
                    !same_value(part.time[i], whole->time[i]))
                    abort();
        }
        slowscan_series_table_free(&part);
    }
    slowscan_csv_columns_close(store);
}

/* What screen does next with a table: its grid, its codes, its stamps. */
static void use_table(series_table *t)
{
    size_t gaps;
    double dt;
    io_error err;
    char stamp[128];
    if (slowscan_table_regularize(t, &gaps, &err) == SLOWSCAN_OK)
        slowscan_table_check_grid(t, &dt, &err);
    for (size_t k = 0; k < t->nseries; k++) {
        suspect_code code;
        slowscan_table_suspect_code(t, k, &code);
    }
    if (t->n > 0) {
        slowscan_time_axis_format(&t->axis, t->time[0], stamp, sizeof stamp);
        slowscan_time_axis_format(&t->axis, t->time[t->n - 1], stamp, sizeof stamp);
    }
}

int FUZZ_ENTRY(csv)(const uint8_t *data, size_t size)
{
    static const double codes[] = {-999, -9999};
    if (size < 1)
        return 0;
    unsigned flags = data[0];
    csv_read_options o = slowscan_csv_read_options_default();
    o.calendar = (calendar_kind)((flags & 7u) % CALENDAR_COUNT);
    o.age = (flags & 8u) != 0;
    if (flags & 16u) {
        o.missing = codes;
        o.nmissing = 2;
    }
    if (flags & 32u)
        o.time_format = "%Y%m%d";
    if (flags & 64u)
        o.units = days_since_1850();
    char path[64];
    int fd = fuzz_memory_file(data + 1, size - 1, path, sizeof path);
    if (fd < 0)
        return 0;
    series_table table = {0};
    io_error err;
    if (slowscan_csv_read_table(path, &o, &table, &err) == SLOWSCAN_OK) {
        if (flags & 128u)
            compare_columns(path, &o, &table);
        use_table(&table);
    }
    slowscan_series_table_free(&table);
    close(fd);
    return 0;
}
