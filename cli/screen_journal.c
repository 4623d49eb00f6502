/* screen --resume: a finished series as one journal record and back — the plain record that
 * the store (and a shared run's gathering) takes (cmd_screen.c's series_record), then its
 * --rolling rows. Layout: the record's length (8 bytes), the record, the rows. The record
 * holds the result as bytes: the journal's identity includes the version, so only the same
 * build reads it back. */
#include "screen.h"

#include <stdint.h>
#include <stdlib.h>
#include <string.h>

int cli_screen_encode(const void *series, size_t series_size, const char *rows,
                      size_t rows_size, void **record, size_t *size)
{
    uint64_t length = series_size;
    *size = sizeof length + series_size + rows_size;
    unsigned char *out = malloc(*size);
    if (!(*record = out))
        return EXIT_INTERNAL;
    memcpy(out, &length, sizeof length);
    memcpy(out + sizeof length, series, series_size);
    if (rows_size)
        memcpy(out + sizeof length + series_size, rows, rows_size);
    return EXIT_OK;
}

int cli_screen_unjournal(const void *record, size_t size, const void **series,
                         size_t *series_size, const char **rows, size_t *rows_size)
{
    uint64_t length;
    if (size < sizeof length)
        return EXIT_BAD_INPUT;
    memcpy(&length, record, sizeof length);
    if (length > size - sizeof length)
        return EXIT_BAD_INPUT;
    *series = (const char *)record + sizeof length;
    *series_size = (size_t)length;
    *rows = (const char *)record + sizeof length + length;
    *rows_size = size - sizeof length - (size_t)length;
    return EXIT_OK;
}
