/* slowscan screen: the row and run state shared by cmd_screen.c, screen_json.c and
 * cli_screen_figures.c. */
#ifndef SLOWSCAN_CLI_SCREEN_H
#define SLOWSCAN_CLI_SCREEN_H

#include "cli.h"

#include "slowscan/netcdf_maps.h"
#include "slowscan/screen_batch.h"
#include "slowscan/screen_store.h"
#include "slowscan/screen_sequential.h"

#include <stdint.h>


/* Where a series came from: its input and, in a NetCDF grid, its place (grid_position). */
typedef struct {
    size_t input;      /* index of its input file */
    int gridded;       /* 0: a CSV column (position unused) */
    grid_position position;
} screen_origin;

/* One row of the summary: a test of a series, read back from the run's store (series and
 * bins point into the store until its next read). */
typedef struct {
    const char *series;
    size_t n;
    double window, bandwidth, q_value;
    screen_test result; /* kind, tau, p, the null's quantiles */
    screen_flag flag;
    int harmonics; /* the cycle removed: -1 none, 0 the mean cycle, K harmonics */
    detrend_leakage leakage; /* the series' trend-leakage test (valid when leakage_tested) */
    int leakage_tested;
    const char *file;      /* the input it came from (as the store holds it) */
    const char *time_unit; /* of window and bandwidth: days, months, years, or "" (the time
                              column's own numbers) */
    screen_origin origin;
    /* --ensemble (screen_ensemble.c): "series", "member", "mean" or "pooled"; NULL without
     * it. share_flagged: a pooled row's share of members flagged (NaN on other rows). */
    const char *role;
    double share_flagged;
    double p_low, p_high; /* --surrogates auto: the 95% interval of the Monte Carlo p */
} screen_row;


/* The series of the inputs in order, as the batch driver takes them. A grid's cells come a
 * table at a time, and a table is gone when the next is read, so each of its series is
 * copied for the workers until the driver releases it. */
typedef struct {
    char *name, *source, *time_name;
    double *time, *values;
} series_copy;

typedef struct {
    cli_cursor cursor;
    screen_input *controls; /* one per series with --null control (borrowed arrays) */
    series_copy *copies;    /* one per series of a grid, freed on release */
    screen_origin *origins; /* one per series: where it came from */
    size_t rank, ranks;     /* a shared run: this process takes series i with i mod ranks = rank */
    size_t walked;          /* series of the inputs walked so far */
    const struct cli_share *share; /* a shared run: asked between series whether to stop */
    size_t skip;            /* series the journal gave back (--resume): skipped */
    int rc;                 /* the cursor's own failure (its message printed) */
} input_source;

/* The batch driver's source over src (screen_batch.h): series `index` of the walk, skipping
 * the journal's and other processes'; its copy (a grid's series) freed on release. */
int cli_screen_next_series(void *state, size_t index, screen_input *out, screen_detail *detail);
void cli_screen_release_series(void *state, size_t index);
/* src's arrays for `all` series (message printed on failure); and their end, with the cursor. */
int cli_screen_source_arrays(const cli_inputs *in, input_source *src, size_t all);
void cli_screen_source_end(input_source *src, size_t all);

typedef struct {
    FILE *out, *rolling;
    cli_resume resume;   /* --resume: the run's journal */
    screen_store *store; /* every series' record until the q-values are known */
    int name_width;      /* the longest series name with a row (the table's first column) */
    int several;         /* more than one input: rows name their file */
    screen_config cfg;
    FILE *json;
    report_batch *figures; /* --figures DIR */
    netcdf_maps *maps;     /* --maps FILE (owned by the run's outputs) */
    size_t maps_input;     /* the input the maps are of */
    size_t figure_series;  /* series drawn so far */
    struct cli_ensemble_run *ensemble; /* --ensemble, else NULL */
    struct cli_sequential *seq;        /* --surrogates auto, else NULL */
} screen_run;

/* --surrogates auto (screen_sequential.c): the library's rounds (screen_sequential.h) over
 * every series before the run's one ordinary pass, which carries no surrogates of its own;
 * around them what only the command does (a round's walk of the inputs, the sums over
 * processes, the journal). */
typedef struct cli_sequential {
    screen_sequential *run; /* the library's state: counts, decisions */
    size_t series;
    void **journaled;       /* --resume: the rounds the journal gave back, in order */
    size_t *journaled_size, njournaled;
    /* a round's hooks */
    const cli_options *opts;
    const cli_inputs *in;
    screen_run *screen;
    int (*refuse)(const cli_options *, const screen_batch_failure *);
    input_source src;  /* the round's walk of the inputs */
    size_t failed_at;  /* the series this process failed at */
    int rc;            /* the exit code a hook ended the rounds with (message printed) */
    FILE *held, *before; /* a shared run: the round's messages, held until the processes agree */
    char *text;
    size_t len;
} cli_sequential;

/* Checks the options that do not go with --surrogates auto (message printed). */
int cli_sequential_check(const cli_options *opts);
/* run->seq for a run of `series` series (message printed on failure). */
int cli_sequential_start(const cli_options *opts, screen_run *run, size_t series);
/* A journal record (--resume) kept when it is a round of run->seq's: 1; not one: 0; -1: out
 * of memory. */
int cli_sequential_replay(cli_sequential *seq, const void *record, size_t size);
/* The rounds over every series of `in` (those the journal holds taken from it; in a shared
 * run each process draws for its own series and the counts are summed), then run->seq holds
 * the decisions. refuse: how a series that fails is told (the ordinary run's words). */
int cli_sequential_run(const cli_options *opts, const cli_inputs *in, screen_run *run,
                       int (*refuse)(const cli_options *, const screen_batch_failure *));
/* Warnings at the end, in the library's words: no discovery possible, tests undecided. */
void cli_sequential_report(const cli_sequential *seq);
/* The procedure and its parameters, as members of the JSON's parameters object. */
void cli_sequential_json(FILE *fp, const cli_sequential *seq);
void cli_sequential_free(cli_sequential *seq);

/* The rows of stored series k into rows[SCREEN_MAX_TESTS]; returns how many, or 0 with the
 * message printed and *rc set. */
size_t cli_screen_series_rows(screen_run *run, size_t k, screen_row *rows, int *rc);
/* Calls visit for every row of the run in order (index counts rows); stops at the first exit
 * code other than EXIT_OK and returns it. */
typedef int (*screen_row_visitor)(const screen_row *row, size_t index, void *context);
int cli_screen_each_row(screen_run *run, screen_row_visitor visit, void *context);

/* screen --tail (screen_tail.c): the refusal of too few surrogates (message printed); the
 * summary's extra column (",p_source" with --tail, else "") and a test's cell after
 * `separator`; the JSON's tail parameters and a test's fit. Without --tail all write nothing,
 * so outputs stay as they were. */
int cli_screen_tail_check(const cli_options *o);
const char *cli_screen_tail_columns(const cli_options *o);
void cli_screen_tail_cell(FILE *fp, const cli_options *o, const char *separator,
                          const screen_test *t);
void cli_screen_tail_parameters(FILE *fp, const cli_options *o);
void cli_screen_tail_json(FILE *fp, const cli_options *o, const screen_test *t);
/* A figure's verdict for test t, saying when its p is the tail estimate. */
const char *cli_screen_tail_verdict(const char *verdict, const screen_test *t);

/* Writes the run as JSON: every parameter needed to reproduce it, then the rows. */
int cli_screen_json(FILE *fp, const cli_options *opts, screen_run *run);

/* screen --figures (screen_figures.c): after the q-values, one figure per series (its tests'
 * nulls summarised by the quantiles of the rows, so memory stays bounded for many series)
 * and the overview. */
int cli_screen_figures(const cli_options *opts, const cli_inputs *in, void *context);

/* screen --maps FILE (screen_maps.c): checked and opened with the other outputs (the inputs
 * must hold exactly one NetCDF grid), filled from the stored records once the q-values are
 * known, committed with the other outputs. */
int cli_screen_maps_open(const cli_options *opts, cli_outputs *outs, screen_run *run);
int cli_screen_maps_fill(screen_run *run);
/* With --figures too: a map figure per variable with two horizontal dimensions. */
int cli_screen_maps_figures(screen_run *run);

/* --resume (screen_journal.c): a series' record (its plain record, then its --rolling rows)
 * as one journal record and back; journaling it (cmd_screen.c). */
int cli_screen_encode(const void *series, size_t series_size, const char *rows,
                      size_t rows_size, void **record, size_t *size);
int cli_screen_unjournal(const void *record, size_t size, const void **series,
                         size_t *series_size, const char **rows, size_t *rows_size);
int cli_screen_journal(screen_run *run, const void *series, size_t series_size,
                       const char *rows, size_t rows_size);

/* screen --ensemble (screen_ensemble.c). Before the run: groups every table's NAME.MEMBER
 * columns (or --members), warns of split ensembles, appends each ensemble's mean as a
 * column NAME[mean] and, with --member-anomalies, replaces the members by their anomalies;
 * refuses what it does not support (several processes, --resume, --maps, --figures, NetCDF
 * and streamed inputs). EXIT_OK (run->ensemble set), or an exit code (message printed). */
int cli_ensemble_start(const cli_options *opts, cli_inputs *in, screen_run *run);
void cli_ensemble_free(screen_run *run);
/* The store a screened series goes to: the ensemble means' own (their own BH family), else
 * the run's. */
screen_store *cli_ensemble_store_for(screen_run *run, size_t input, const char *name);
/* A screened series before it enters its store: a member's statistics and nulls are kept
 * for the pooled test. EXIT_OK or EXIT_INTERNAL (message printed). */
int cli_ensemble_collect(screen_run *run, size_t input, const screen_batch_item *item);
/* After the run's decision: the means' q-values, the pooled tests, their q and flags. */
int cli_ensemble_finish(const cli_options *opts, screen_run *run);
/* The role of a stored series' rows. */
const char *cli_ensemble_role(const screen_run *run, size_t input, const char *name);
/* The ensemble means' store (NULL without --ensemble); the pooled rows after every stored
 * row (index continues the run's count). */
screen_store *cli_ensemble_means(const screen_run *run);
int cli_ensemble_pooled_rows(screen_run *run, screen_row_visitor visit, void *context,
                             size_t index);
/* Rows the ensembles add: the means' and the pooled rows. */
size_t cli_ensemble_rows(const screen_run *run);
/* --json: the ensembles and their split tests (nothing without --ensemble). */
void cli_ensemble_json(FILE *fp, const screen_run *run);

#endif
