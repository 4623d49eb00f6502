/* The series table: its release, and the small helpers every io file shares (messages,
 * strings). */
#include "io_internal.h"

#include <math.h>
#include <stdarg.h>
#include <stdlib.h>
#include <string.h>

void slowscan_series_table_free(series_table *t)
{
    if (!t)
        return;
    for (size_t k = 0; k < t->nseries; k++) {
        if (t->names)
            free(t->names[k]);
        if (t->values)
            free(t->values[k]);
    }
    free(t->names);
    for (size_t k = 0; k < t->nskipped; k++)
        free(t->skipped[k]);
    free(t->skipped);
    free(t->values);
    free(t->grid);
    free(t->time);
    free(t->rows);
    free(t->source);
    free(t->time_name);
    memset(t, 0, sizeof *t);
}

int io_fail(io_error *err, int status, const char *fmt, ...)
{
    if (err) {
        va_list ap;
        va_start(ap, fmt);
        vsnprintf(err->message, sizeof err->message, fmt, ap);
        va_end(ap);
    }
    return status;
}

char *io_strdup(const char *s)
{
    size_t n = strlen(s) + 1;
    char *d = malloc(n);
    if (d)
        memcpy(d, s, n);
    return d;
}

const char *io_display_name(const char *source)
{
    return !source || strcmp(source, "-") == 0 ? "standard input" : source;
}

const char *io_strerror(int errnum, char *buf, size_t size)
{
    /* The XSI strerror_r (the one _POSIX_C_SOURCE selects) returns 0 on success. */
    if (strerror_r(errnum, buf, size) != 0)
        snprintf(buf, size, "error %d", errnum);
    return buf;
}

void io_sample_where(const series_table *t, size_t i, char *buf, size_t size)
{
    if (t->rows)
        snprintf(buf, size, "row %zu", t->rows[i]);
    else
        snprintf(buf, size, "time %.15g", t->time[i]);
}

int io_compare_doubles(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

double io_median_step(const double *time, size_t n)
{
    double *steps = n >= 2 ? malloc((n - 1) * sizeof *steps) : NULL;
    if (!steps)
        return NAN;
    for (size_t i = 1; i < n; i++)
        steps[i - 1] = time[i] - time[i - 1];
    qsort(steps, n - 1, sizeof *steps, io_compare_doubles);
    double median = steps[(n - 1) / 2];
    free(steps);
    return median;
}

int io_missing_code(const csv_read_options *o, double v)
{
    for (size_t c = 0; c < o->nmissing; c++)
        if (fabs(v - o->missing[c]) <= 1e-7 * fabs(o->missing[c]))
            return 1;
    return 0;
}
