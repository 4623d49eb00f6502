/* screen --resume: a finished series as one journal record and back — its name, its result
 * (plain data), the record's extra block (origin, time unit, file) and its --rolling rows.
 * Layout: four lengths (name, result, extra, rows; 8 bytes each) then the four parts. The
 * result is copied as bytes: the journal's identity includes the version, so only the same
 * build reads it back. */
#include "screen.h"

#include <stdint.h>
#include <stdlib.h>
#include <string.h>

int cli_screen_encode(const char *name, const screen_result *res, const char *extra,
                      size_t extra_size, const char *rows, size_t rows_size, void **record,
                      size_t *size)
{
    uint64_t len[4] = {strlen(name) + 1, sizeof *res, extra_size, rows_size};
    const void *part[4] = {name, res, extra, rows};
    *size = sizeof len + len[0] + len[1] + len[2] + len[3];
    unsigned char *out = malloc(*size);
    if (!(*record = out))
        return EXIT_INTERNAL;
    memcpy(out, len, sizeof len);
    out += sizeof len;
    for (int k = 0; k < 4; k++) {
        if (len[k])
            memcpy(out, part[k], len[k]);
        out += len[k];
    }
    return EXIT_OK;
}

int cli_screen_unjournal(const void *record, size_t size, journaled *j)
{
    uint64_t len[4];
    if (size < sizeof len)
        return EXIT_BAD_INPUT;
    memcpy(len, record, sizeof len);
    const char *at = (const char *)record + sizeof len;
    uint64_t total = sizeof len;
    for (int k = 0; k < 4; k++) {
        if (len[k] > size || total + len[k] > size)
            return EXIT_BAD_INPUT;
        total += len[k];
    }
    if (total != size || len[0] == 0 || at[len[0] - 1] != '\0' || len[1] != sizeof j->result ||
        len[2] < sizeof(screen_origin) + 2 || len[2] > SCREEN_EXTRA)
        return EXIT_BAD_INPUT;
    j->name = at;
    memcpy(&j->result, at + len[0], sizeof j->result);
    j->extra = at + len[0] + len[1];
    j->extra_size = len[2];
    j->rows = at + len[0] + len[1] + len[2];
    j->rows_size = len[3];
    return EXIT_OK;
}
