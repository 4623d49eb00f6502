/* The record spill store (io.h): records appended in order, read back by index; in memory up
 * to a count, then in an unnamed temporary file.
 *
 * The file is unlinked the moment it is made, so it has no name anyone could see, clash with
 * or leave behind: the system frees it when the store closes it, or when the process ends
 * however it ends (a failed run, a signal, a crash). */
#include "io_internal.h"

#include <errno.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

enum { SPILL_LAST_NONE, SPILL_LAST_WRITE, SPILL_LAST_READ };

struct record_spill {
    size_t spill_after;
    char *dir;         /* where the file goes; NULL: $TMPDIR, else /tmp */
    size_t count;
    size_t *offset;    /* count + 1: record k is [offset[k], offset[k+1]) */
    size_t offset_cap;
    unsigned char *memory; /* the records while they are few */
    size_t memory_cap;
    FILE *fp;          /* the records once spilled */
    size_t position;   /* fp's position, to skip the seek of a sequential read */
    int last;          /* SPILL_LAST_*: C streams need a seek between writing and reading */
};

record_spill *slowscan_spill_alloc(size_t spill_after, const char *dir)
{
    record_spill *s = calloc(1, sizeof *s);
    if (!s)
        return NULL;
    s->spill_after = spill_after;
    s->offset = malloc(sizeof *s->offset);
    if (!s->offset || (dir && !(s->dir = io_strdup(dir)))) {
        slowscan_spill_free(s);
        return NULL;
    }
    s->offset[0] = 0;
    s->offset_cap = 1;
    return s;
}

void slowscan_spill_free(record_spill *s)
{
    if (!s)
        return;
    if (s->fp)
        fclose(s->fp);
    free(s->memory);
    free(s->offset);
    free(s->dir);
    free(s);
}

size_t slowscan_spill_count(const record_spill *s)
{
    return s->count;
}

int slowscan_spill_spilled(const record_spill *s)
{
    return s->fp != NULL;
}

static const char *spill_dir(const record_spill *s)
{
    const char *tmp = getenv("TMPDIR");
    return s->dir ? s->dir : tmp && *tmp ? tmp : "/tmp";
}

static int write_failed(const record_spill *s, int errnum, io_error *err)
{
    char why[128];
    return io_fail(err, SLOWSCAN_EIO, "cannot write the temporary file in %s: %s", spill_dir(s),
                   io_strerror(errnum ? errnum : EIO, why, sizeof why));
}

/* Moves the records kept in memory to a new unnamed temporary file. */
static int open_file(record_spill *s, io_error *err)
{
    int made = io_unnamed_temporary(s->dir, "slowscan-spill", &s->fp, err);
    if (made != SLOWSCAN_OK)
        return made;
    size_t bytes = s->offset[s->count];
    if (bytes && fwrite(s->memory, 1, bytes, s->fp) != bytes)
        return write_failed(s, errno, err);
    free(s->memory);
    s->memory = NULL;
    s->memory_cap = 0;
    s->position = bytes;
    s->last = SPILL_LAST_WRITE;
    return SLOWSCAN_OK;
}

static int append_to_memory(record_spill *s, const void *record, size_t size)
{
    if (size == 0)
        return SLOWSCAN_OK;
    size_t used = s->offset[s->count];
    if (used + size > s->memory_cap) {
        size_t cap = s->memory_cap ? s->memory_cap : 4096;
        while (cap < used + size)
            cap *= 2;
        unsigned char *grown = realloc(s->memory, cap);
        if (!grown)
            return SLOWSCAN_ENOMEM;
        s->memory = grown;
        s->memory_cap = cap;
    }
    memcpy(s->memory + used, record, size);
    return SLOWSCAN_OK;
}

static int append_to_file(record_spill *s, const void *record, size_t size, io_error *err)
{
    size_t end = s->offset[s->count];
    if ((s->last == SPILL_LAST_READ || s->position != end) &&
        fseeko(s->fp, (off_t)end, SEEK_SET) != 0)
        return write_failed(s, errno, err);
    s->last = SPILL_LAST_WRITE;
    s->position = end;
    if (size && fwrite(record, 1, size, s->fp) != size) {
        s->position = SIZE_MAX; /* unknown: the next access seeks */
        return write_failed(s, errno, err);
    }
    s->position += size;
    return SLOWSCAN_OK;
}

int slowscan_spill_append(record_spill *s, const void *record, size_t size, io_error *err)
{
    if (s->offset[s->count] > SIZE_MAX - size)
        return io_fail(err, SLOWSCAN_ENOMEM, "out of memory");
    void *offsets = s->offset; /* room for offset[count + 1] */
    if (slowscan_io_reserve(&offsets, &s->offset_cap, s->count + 1, sizeof *s->offset, 64) !=
        SLOWSCAN_OK)
        return io_fail(err, SLOWSCAN_ENOMEM, "out of memory");
    s->offset = offsets;
    int st = SLOWSCAN_OK;
    if (!s->fp && s->count >= s->spill_after)
        st = open_file(s, err);
    if (st == SLOWSCAN_OK)
        st = s->fp ? append_to_file(s, record, size, err) : append_to_memory(s, record, size);
    if (st == SLOWSCAN_ENOMEM)
        return io_fail(err, st, "out of memory");
    if (st != SLOWSCAN_OK)
        return st;
    s->offset[s->count + 1] = s->offset[s->count] + size;
    s->count++;
    return SLOWSCAN_OK;
}

size_t slowscan_spill_size(const record_spill *s, size_t index)
{
    return index < s->count ? s->offset[index + 1] - s->offset[index] : 0;
}

int slowscan_spill_read(record_spill *s, size_t index, void *out, io_error *err)
{
    if (index >= s->count)
        return io_fail(err, SLOWSCAN_EINVAL, "no record %zu in a store of %zu", index, s->count);
    size_t at = s->offset[index], size = s->offset[index + 1] - at;
    if (!s->fp) {
        memcpy(out, s->memory + at, size);
        return SLOWSCAN_OK;
    }
    char why[128];
    if ((s->last == SPILL_LAST_WRITE || s->position != at) &&
        fseeko(s->fp, (off_t)at, SEEK_SET) != 0)
        return io_fail(err, SLOWSCAN_EIO, "cannot read the temporary file in %s: %s",
                       spill_dir(s), io_strerror(errno, why, sizeof why));
    s->last = SPILL_LAST_READ;
    s->position = at;
    if (fread(out, 1, size, s->fp) != size) {
        int e = ferror(s->fp) ? errno : EIO;
        s->last = SPILL_LAST_NONE;
        s->position = SIZE_MAX; /* unknown: the next access seeks */
        return io_fail(err, SLOWSCAN_EIO, "cannot read the temporary file in %s: %s",
                       spill_dir(s), io_strerror(e, why, sizeof why));
    }
    s->position += size;
    return SLOWSCAN_OK;
}
