/* slowscan — the batch driver: many series through the per-series pipeline (screen.h), threads
 * over whole series, results handed on in input order (module prefix: screen_batch_).
 *
 *     source (one series at a time) -> workers (slowscan_screen_series) -> reorder buffer -> sink
 *
 * - Threads take whole series; a reorder buffer of a few series per thread hands results to
 *   the sink in input order, from one thread at a time, so the sink needs no locking.
 * - When the run has fewer series than threads (the source's count says so), series go one
 *   at a time and each series' surrogates are shared among the threads instead (today's
 *   screen). Either way the numbers are the same: every random stream is seeded by (seed,
 *   series name, purpose, block), never by thread.
 * - Memory is bounded by the threads and the longest series, not by the number of series:
 *   the source is asked for a series only when the buffer has room for its result.
 * - The first series that fails (in input order) ends the run: every result before it has
 *   reached the sink, none after it does, and the failure comes back with its detail.
 *
 * Nothing here prints; the sink decides what to write. */
#ifndef SLOWSCAN_SCREEN_BATCH_H
#define SLOWSCAN_SCREEN_BATCH_H

#include "slowscan/export.h"

#include "slowscan/screen.h"

#include <stddef.h>

/* Status of a source that has no more series. */
enum { SCREEN_BATCH_END = -1 };

/* Hands out series in input order, one call at a time (never concurrently). */
typedef struct {
    /* Fills *in with the next series (arrays borrowed until `release` for the same index, or
     * until the run ends); returns SLOWSCAN_OK, SCREEN_BATCH_END, or a status that fails the
     * run at this index (its detail in *detail, SCREEN_RULE_NONE when the source says it
     * itself). */
    int (*next)(void *state, size_t index, screen_input *in, screen_detail *detail);
    /* Optional: the series of `index` is no longer needed — the sink has had it (called from
     * the thread that delivers; never for the series a run failed at, which the failure
     * still names: free that one, and any a stopped run never delivered, after the run). */
    void (*release)(void *state, size_t index);
    size_t count; /* series the source will give, 0 when unknown (then threads go over series) */
    void *state;
} screen_source;

/* One screened series as the sink sees it. */
typedef struct {
    size_t index;
    const screen_input *input;       /* as the source gave it */
    const screen_result *result;     /* plain data */
    const screen_prepared *prepared; /* with keep_series: value, trend, residual; else the
                                        arrays are NULL */
    const double *const *paths;      /* with keep_series: the rolling paths (prepared->n each) */
    const double *const *nulls;      /* with keep_series: per test its null distribution
                                        (result->tests[j].surrogates values), or NULL */
} screen_batch_item;

/* Receives every series in input order, from one thread at a time. A status other than
 * SLOWSCAN_OK ends the run (with SCREEN_RULE_NONE in the failure). */
typedef struct {
    int (*put)(void *state, const screen_batch_item *item);
    void *state;
    int keep_series; /* also hand on the prepared arrays and paths (costs their copy) */
    /* Optional: surrogates drawn within a series not yet handed on (progress->index says
     * which), after each block. Called from worker threads, but never from two at once nor
     * during `put`, so it shares put's state without locking; it only watches. */
    screen_progress_fn progress;
} screen_sink;

/* Why a run ended early: the series (by index and input) and the rule. */
typedef struct {
    size_t index;
    screen_input input;        /* the failing series as the source gave it (borrowed) */
    screen_prepared prepared;  /* what was known of it (window, harmonics); arrays NULL */
    screen_result result;      /* what was known of its results: the warnings so far */
    screen_detail detail;
} screen_batch_failure;

/* Screens every series of `source` with `cfg` on cfg->threads threads and hands the results
 * to `sink` in order. Returns SLOWSCAN_OK, or the status of the first failure (described in
 * *failure), or SLOWSCAN_ENOMEM. */
SLOWSCAN_API
int slowscan_screen_batch_run(const screen_config *cfg, screen_source *source, screen_sink *sink,
                     screen_batch_failure *failure);

#endif
