/* Private helpers of io/. */
#ifndef SLOWSCAN_IO_INTERNAL_H
#define SLOWSCAN_IO_INTERNAL_H

#include "slowscan/io.h"
#include "slowscan/status.h"

/* Formats the message into err and returns status. */
int io_fail(io_error *err, int status, const char *fmt, ...) __attribute__((format(printf, 3, 4)));
char *io_strdup(const char *s);
int io_reserve(double **array, size_t *capacity, size_t need);

#endif
