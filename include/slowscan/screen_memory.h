/* slowscan — screening a table held in memory into a store (module prefix: screen_memory_).
 *
 * For a caller that already holds its series (a binding's arrays made into a series_table by
 * slowscan_table_from_memory): every series of the table goes through the batch driver
 * (screen_batch.h: threads over series, results in input order) into a screen_store, whose
 * decision (slowscan_screen_store_decide) then gives the q-values over everything added —
 * over several tables when they are added one after another (the blocks of a field too large
 * to hold at once; with rounds of surrogates, which need the whole field in one run, the
 * blocks come from the caller's source instead). Nothing here prints or reads files. */
#ifndef SLOWSCAN_SCREEN_MEMORY_H
#define SLOWSCAN_SCREEN_MEMORY_H

#include "slowscan/export.h"

#include "slowscan/io.h"
#include "slowscan/screen.h"
#include "slowscan/screen_batch.h"
#include "slowscan/screen_sequential.h"
#include "slowscan/screen_store.h"

#include <stddef.h>

typedef struct {
    const series_table *table; /* the series, screened in their order */
    const char *source;        /* how results and messages name it; NULL: table->source */
    screen_store *store;       /* receives each series (name, result; no extra block) */
    /* Optional: called with each block of surrogates of a running series (progress->index is
     * the series' index in the table), and with done == total == 0 once a series is in the
     * store. Never from two threads at once; it only watches. */
    screen_progress_fn progress;
    void *context;
    size_t stored;             /* out: series added to the store by this run */
    io_error error;            /* out: the store's failure (SLOWSCAN_EIO, ENOMEM) */
    /* Optional (--surrogates auto): a state made for table->nseries series with cfg. The
     * table is then the whole run: its rounds (slowscan_screen_sequential_run) come first,
     * then the ordinary pass without surrogates (cfg->surrogates is not used), each result
     * patched from the rounds before it goes into the store; the flags come from
     * slowscan_screen_sequential_flag (series g = the table's index). Progress reports the
     * ordinary pass only. */
    screen_sequential *sequential;
    /* Optional (--null control, with slowscan_screen_config_control): the control run, a
     * table readied as the inputs are. Each series gets its series of the same name
     * (slowscan_screen_control_input) as screen_input.control; a refusal of it comes back
     * with failure->detail.control set and failure->input.control NULL (the control lives
     * only as long as the run). control_source names it (NULL: control->source). */
    const series_table *control;
    const char *control_source;
    /* Optional, instead of table: the series from the caller's source (a field read a block
     * of cells at a time, too large to hold at once), asked from index 0 again for every
     * round of `sequential` and for the ordinary pass, so all its series are one run (series
     * g = the source's index). Its count must be the series it gives (the state's series;
     * with no state, 0 when unknown). `table` and `source` are then not used. */
    screen_source *series;
} screen_memory_run;

/* Every field zero or NULL. */
SLOWSCAN_API
screen_memory_run slowscan_screen_memory_default(void);

/* The series `name` of a control run as screen_input.control of a series of that name:
 * the control's time and axis, its values NULL when it has no such series (which
 * slowscan_screen_attach_control refuses, SCREEN_RULE_CONTROL_MISSING). Names match
 * exactly, as the command matches a CSV's columns. source NULL: control->source. */
SLOWSCAN_API
screen_input slowscan_screen_control_input(const series_table *control, const char *name,
                                           const char *source);

/* Screens every series of run->table (or run->series) with cfg (cfg->threads threads) into
 * run->store (with run->sequential: its rounds first). SLOWSCAN_OK; the status of the first
 * series refused (described in *failure, as slowscan_screen_batch_run describes it; series
 * before it are in the store); or the store's failure (SCREEN_RULE_NONE in failure->detail,
 * the message in run->error). */
SLOWSCAN_API
int slowscan_screen_memory_run(const screen_config *cfg, screen_memory_run *run,
                               screen_batch_failure *failure);

#endif
