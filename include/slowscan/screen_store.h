/* slowscan — what a screening run keeps for its run-wide decision (module prefix:
 * screen_store_).
 *
 * The q-values (Benjamini-Hochberg) and flags need every test's p-value of the whole run, so
 * the rows of a summary can only be written once every series is screened. The store keeps
 * in memory only what the decision needs — one p-value per test (and the spill store's
 * offset per series) — and each series' full record (its name, its screen_result, and a
 * block of the caller's own plain data, such as a figure's binned null) in a record spill
 * store (io.h): in memory for the first `spill_after` series, then in an unnamed temporary
 * file. 10^6 series of three tests then need about 32 MB of memory, not 10^6 full records.
 *
 *     add (series in order) ... -> decide (q, flags) -> read (series k, any order, any times)
 *
 * Records are plain data and carry each test's own count of surrogates (screen_test), so
 * series screened with different numbers of surrogates can share one store. One thread at a
 * time. */
#ifndef SLOWSCAN_SCREEN_STORE_H
#define SLOWSCAN_SCREEN_STORE_H

#include "slowscan/export.h"

#include "slowscan/io.h"
#include "slowscan/screen.h"

#include <stddef.h>

/* Series kept in memory before a store spills to its file, unless told otherwise. */
enum { SCREEN_STORE_SPILL_AFTER = 4096 };

typedef struct screen_store screen_store;

/* spill_after and dir as slowscan_spill_alloc takes them. NULL: no memory. */
SLOWSCAN_API
screen_store *slowscan_screen_store_alloc(size_t spill_after, const char *dir);
SLOWSCAN_API
void slowscan_screen_store_free(screen_store *store);

/* Appends a series: its name, its result, and extra_size bytes of the caller's plain data
 * (extra may be NULL when extra_size is 0), read back 16-byte aligned. SLOWSCAN_EINVAL after
 * slowscan_screen_store_decide; SLOWSCAN_ENOMEM, SLOWSCAN_EIO with a message in *err. */
SLOWSCAN_API
int slowscan_screen_store_add(screen_store *store, const char *name, const screen_result *result,
                              const void *extra, size_t extra_size, io_error *err);
/* Series added, and tests over all of them. */
SLOWSCAN_API
size_t slowscan_screen_store_count(const screen_store *store);
SLOWSCAN_API
size_t slowscan_screen_store_tests(const screen_store *store);

/* The q-values of every test of the store and, on reading, the flags: exactly what
 * slowscan_screen_decide gives for the same tests in the same order. Again: new flags for
 * another fdr. SLOWSCAN_ENOMEM. */
SLOWSCAN_API
int slowscan_screen_store_decide(screen_store *store, double fdr);

/* Series `index` as it was added, with its tests' q-values and flags (before the decision:
 * q NaN, flags SCREEN_FLAG_UNTESTED). name and extra point into the store, valid until
 * the next read or the store is freed. SLOWSCAN_EINVAL for an index past the end;
 * SLOWSCAN_EIO, SLOWSCAN_ENOMEM with a message in *err. */
typedef struct {
    const char *name;
    screen_result result;
    double q_value[SCREEN_MAX_TESTS];
    screen_flag flag[SCREEN_MAX_TESTS];
    const void *extra;
    size_t extra_size;
} screen_stored;
SLOWSCAN_API
int slowscan_screen_store_read(screen_store *store, size_t index, screen_stored *out,
                               io_error *err);

#endif
