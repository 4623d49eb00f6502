/* slowscan — an append-only journal of finished work, for runs that must survive being killed
 * (module prefix: journal_).
 *
 * A journal starts with a header naming the run it belongs to (a 64-bit identity the caller
 * computes from everything that decides the results: options, inputs, version) and then holds
 * records, each its length, its bytes and a checksum, written and flushed to the disk
 * (fsync) one by one. Reopened, it gives back every whole record in order; a last record
 * torn by a kill (short, or failing its checksum) is cut off, so the run recomputes it. A
 * journal of another run (another identity) or a file that is no journal is refused.
 *
 * The records are the caller's bytes: the journal does not know what they mean. */
#ifndef SLOWSCAN_JOURNAL_H
#define SLOWSCAN_JOURNAL_H

#include "slowscan/export.h"

#include "slowscan/io.h"

#include <stddef.h>
#include <stdint.h>

typedef struct journal journal;

/* FNV-1a, 64 bits, of `size` bytes, continuing from `hash` (start with
 * SLOWSCAN_JOURNAL_HASH_START): for the caller's identity. */
#define SLOWSCAN_JOURNAL_HASH_START 14695981039346656037ULL
SLOWSCAN_API
uint64_t slowscan_journal_hash(uint64_t hash, const void *bytes, size_t size);

/* What a journal file held when it was opened. */
typedef enum {
    JOURNAL_NEW = 0,  /* there was none: a new one was started */
    JOURNAL_RESUMED,  /* one of this run: its records are given back */
    JOURNAL_TORN      /* one of this run whose last record was torn, and cut off */
} journal_state;

/* Called for each whole record, in order; a status other than SLOWSCAN_OK stops the replay
 * and is returned by slowscan_journal_open. */
typedef int (*journal_replay)(void *context, const void *record, size_t size);

/* Opens (or starts) the journal at `path` for the run `identity`, giving back every record
 * through `replay`. SLOWSCAN_EINVAL with a message when the file is no journal or another
 * run's; SLOWSCAN_EIO when it cannot be read or written. */
SLOWSCAN_API
int slowscan_journal_open(const char *path, uint64_t identity, journal_replay replay,
                          void *context, journal **out, journal_state *state, size_t *records,
                          io_error *err);
/* Appends a record and makes it durable (flush and fsync) before returning. */
SLOWSCAN_API
int slowscan_journal_append(journal *j, const void *record, size_t size, io_error *err);
/* Closes the journal; with `remove_file` (the run finished and its outputs are in place) the
 * file is removed. */
SLOWSCAN_API
void slowscan_journal_close(journal *j, int remove_file);

#endif
