/* The append-only journal (include/slowscan/journal.h).
 *
 * Layout: "slowscan-journal 1\n", the identity (8 bytes, little-endian as written by this
 * machine), then records: length (8 bytes), the bytes, FNV-1a of the bytes (8 bytes). A
 * record is durable once slowscan_journal_append returns (fflush + fsync). Reopening reads
 * records while they are whole and their checksums hold; the first that is not (the one a
 * kill tore) and anything after it are cut off with ftruncate. */
#include "slowscan/journal.h"
#include "io_internal.h"

#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

static const char MAGIC[] = "slowscan-journal 1\n";
/* A record longer than this is no record of ours: a corrupt length. */
static const uint64_t MAX_RECORD = (uint64_t)1 << 32;

struct journal {
    FILE *fp;
    char *path;
};

uint64_t slowscan_journal_hash(uint64_t hash, const void *bytes, size_t size)
{
    const unsigned char *b = bytes;
    for (size_t i = 0; i < size; i++) {
        hash ^= b[i];
        hash *= 1099511628211ULL;
    }
    return hash;
}

static int fail_errno(io_error *err, const char *path, const char *doing)
{
    char why[128];
    return io_fail(err, SLOWSCAN_EIO, "%s: cannot %s the journal: %s", path, doing,
                   io_strerror(errno, why, sizeof why));
}

/* Reads the records after the header; *good is the offset after the last whole one. */
static int read_records(journal *j, journal_replay replay, void *context, size_t *records,
                        long *good, int *torn)
{
    *records = 0;
    *torn = 0;
    *good = ftell(j->fp);
    unsigned char *buffer = NULL;
    int st = SLOWSCAN_OK;
    for (;;) {
        uint64_t size, sum;
        if (fread(&size, sizeof size, 1, j->fp) != 1)
            break; /* the end, or a length cut short */
        unsigned char *grown = size <= MAX_RECORD ? realloc(buffer, size ? size : 1) : NULL;
        if (!grown || fread(grown, 1, size, j->fp) != size ||
            fread(&sum, sizeof sum, 1, j->fp) != 1 ||
            sum != slowscan_journal_hash(SLOWSCAN_JOURNAL_HASH_START, grown, size)) {
            if (grown)
                buffer = grown;
            *torn = 1;
            break;
        }
        buffer = grown;
        if (replay && (st = replay(context, buffer, size)) != SLOWSCAN_OK)
            break;
        (*records)++;
        *good = ftell(j->fp);
    }
    if (st == SLOWSCAN_OK && !feof(j->fp) && !*torn)
        *torn = 1; /* stopped short of the end: a length cut short */
    free(buffer);
    return st;
}

/* A journal file already there: its header, then its records. */
static int resume(journal *j, uint64_t identity, journal_replay replay, void *context,
                  journal_state *state, size_t *records, io_error *err)
{
    char magic[sizeof MAGIC - 1];
    uint64_t id;
    if (fread(magic, 1, sizeof magic, j->fp) != sizeof magic ||
        memcmp(magic, MAGIC, sizeof magic) != 0 || fread(&id, sizeof id, 1, j->fp) != 1)
        return io_fail(err, SLOWSCAN_EINVAL, "%s: not a slowscan journal; remove it, or give "
                       "another output", j->path);
    if (id != identity)
        return io_fail(err, SLOWSCAN_EINVAL, "%s: the journal of another run (other options, "
                       "inputs or version): remove it to start again", j->path);
    long good;
    int torn;
    int st = read_records(j, replay, context, records, &good, &torn);
    if (st != SLOWSCAN_OK)
        return st;
    if (torn && (fflush(j->fp) != 0 || ftruncate(fileno(j->fp), good) != 0))
        return fail_errno(err, j->path, "cut the torn end of");
    *state = torn ? JOURNAL_TORN : JOURNAL_RESUMED;
    return fseek(j->fp, 0, SEEK_END) == 0 ? SLOWSCAN_OK : fail_errno(err, j->path, "append to");
}

static int start(journal *j, uint64_t identity, io_error *err)
{
    if (fwrite(MAGIC, 1, sizeof MAGIC - 1, j->fp) != sizeof MAGIC - 1 ||
        fwrite(&identity, sizeof identity, 1, j->fp) != 1 || fflush(j->fp) != 0 ||
        fsync(fileno(j->fp)) != 0)
        return fail_errno(err, j->path, "write");
    return SLOWSCAN_OK;
}

int slowscan_journal_open(const char *path, uint64_t identity, journal_replay replay,
                          void *context, journal **out, journal_state *state, size_t *records,
                          io_error *err)
{
    *out = NULL;
    *records = 0;
    *state = JOURNAL_NEW;
    journal *j = calloc(1, sizeof *j);
    if (!j || !(j->path = io_strdup(path))) {
        free(j);
        return io_fail(err, SLOWSCAN_ENOMEM, "%s: out of memory", path);
    }
    j->fp = fopen(path, "r+b");
    int st;
    if (j->fp) {
        st = resume(j, identity, replay, context, state, records, err);
    } else if (errno == ENOENT && (j->fp = fopen(path, "w+b"))) {
        st = start(j, identity, err);
    } else {
        st = fail_errno(err, path, "open");
    }
    if (st != SLOWSCAN_OK) {
        slowscan_journal_close(j, 0);
        return st;
    }
    *out = j;
    return SLOWSCAN_OK;
}

int slowscan_journal_append(journal *j, const void *record, size_t size, io_error *err)
{
    uint64_t length = size, sum = slowscan_journal_hash(SLOWSCAN_JOURNAL_HASH_START, record, size);
    if (fwrite(&length, sizeof length, 1, j->fp) != 1 ||
        (size && fwrite(record, 1, size, j->fp) != size) ||
        fwrite(&sum, sizeof sum, 1, j->fp) != 1 || fflush(j->fp) != 0 ||
        fsync(fileno(j->fp)) != 0)
        return fail_errno(err, j->path, "write");
    return SLOWSCAN_OK;
}

void slowscan_journal_close(journal *j, int remove_file)
{
    if (!j)
        return;
    if (j->fp)
        fclose(j->fp);
    if (remove_file)
        unlink(j->path);
    free(j->path);
    free(j);
}
