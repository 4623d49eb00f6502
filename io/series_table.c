/* The series table: allocation helpers shared by the readers, and its release. */
#include "io_internal.h"

#include <stdarg.h>
#include <stdlib.h>
#include <string.h>

void series_table_free(series_table *t)
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
    free(t->values);
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

/* Grows a double array to hold at least `need` entries (doubling). */
int io_reserve(double **a, size_t *cap, size_t need)
{
    if (need <= *cap)
        return 0;
    size_t c = *cap ? *cap : 256;
    while (c < need)
        c *= 2;
    double *b = realloc(*a, c * sizeof **a);
    if (!b)
        return -1;
    *a = b;
    *cap = c;
    return 0;
}
