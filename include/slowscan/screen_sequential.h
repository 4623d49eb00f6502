/* slowscan — the rounds of sequential Monte Carlo testing over many series (`screen
 * --surrogates auto`; module prefix: screen_sequential_).
 *
 * The decisions are sequential.h's; this is the driver that feeds them. Each round passes a
 * series source (screen_batch.h) once through the batch driver, handing it only the series
 * still open, each with its replicate range [drawn, drawn + add) (screen_input.null_range),
 * so replicate j of a series is the j-th draw of a fixed --surrogates run however the rounds
 * fall. A round's counts are plain uint64 words that a caller may add word for word (the
 * processes of a shared run each draw their own series and sum) and store (a journal, to
 * give a round back on a restart instead of drawing it). After the rounds the open tests are
 * settled against BH's threshold (slowscan_sequential_finish); the run's ordinary pass then
 * draws no surrogates and takes each series' p-values, counts and warnings from here
 * (slowscan_screen_sequential_patch), its flags from the decisions
 * (slowscan_screen_sequential_flag). The rounds depend on the counts alone: the same for any
 * thread or process count.
 *
 * Plain data, no I/O; statuses from status.h. */
#ifndef SLOWSCAN_SCREEN_SEQUENTIAL_H
#define SLOWSCAN_SCREEN_SEQUENTIAL_H

#include "slowscan/export.h"

#include "slowscan/screen.h"
#include "slowscan/screen_batch.h"
#include "slowscan/sequential.h"

#include <stddef.h>
#include <stdint.h>

/* The run's state: every test's counts and decision, every series' draws. */
typedef struct screen_sequential screen_sequential;

/* What one round did and what comes next (for a caller's trace), after its decisions. The
 * ratios and p are over the open tests with a statistic, NaN when none is open. */
typedef struct {
    size_t round;        /* rounds done, this one included (1 for the first) */
    size_t drew;         /* surrogates drawn in it */
    size_t open_tests, open_series, at_cap; /* at_cap: open tests at max_per_series */
    double ratio_median, ratio_max;         /* upper / lower limit of their intervals */
    double p_min, p_max;                    /* their (1 + hits) / (1 + drawn) */
    size_t asked, given, cut; /* the next round: surrogates asked, given within the budget,
                                 series given less than they asked */
    size_t budget_left;
} screen_sequential_round;

/* The whole run, after slowscan_screen_sequential_run. */
typedef struct {
    sequential_config config;
    size_t series, per_series; /* as made: tests are series x per_series */
    size_t budget;     /* the run's budget (slowscan_sequential_budget of the tested) */
    size_t spent;      /* surrogates drawn over every series */
    size_t rounds, max_rounds;
    size_t tested;     /* tests with a statistic: BH's family */
    size_t undecided;  /* tests the budget could not settle */
} screen_sequential_summary;

/* What only some callers do around a round; every field may be zero/NULL. */
typedef struct {
    /* Words the caller keeps at the front of each round's vector (zeroed before a round;
     * e.g. the processes' failures of a shared run, summed with the counts). */
    size_t reserve;
    /* A shared run: this process draws series g with g mod ranks == rank, and its source
     * hands out only those, in order (ranks 0 is taken as 1). */
    size_t rank, ranks;
    /* Before round `round` (0 for the first) is drawn: *taken = 1 when the caller filled its
     * counts (ncounts words, the vector after the reserve) from a journal, so it is not
     * drawn (left 0: it is drawn). A status other than SLOWSCAN_OK ends the run. */
    int (*replay)(void *context, size_t round, uint64_t *counts, size_t ncounts, int *taken);
    /* Before the source is walked for a round (the caller may restart its walk). A status
     * other than SLOWSCAN_OK ends the run. */
    int (*begin)(void *context, size_t round);
    /* After this process drew its share of a round: `status` the batch driver's, with
     * *failure and `series` (the series that failed) when it is not SLOWSCAN_OK. The caller
     * may sum words[nwords] (reserve included) over processes and store the counts after
     * the reserve; SLOWSCAN_OK goes on with the words as they are then, anything else ends
     * the run with that status. Without it a failed draw ends the run. */
    int (*end)(void *context, size_t round, int status, const screen_batch_failure *failure,
               size_t series, uint64_t *words, size_t nwords);
    /* After each round's decisions. */
    void (*decided)(void *context, const screen_sequential_round *round);
    /* Surrogates drawn inside a series (as screen_sink.progress; progress->index is the
     * round's batch index). */
    screen_progress_fn progress;
    void *context;
} screen_sequential_hooks;

/* Every field zero or NULL: a lone process, no journal, no trace. */
SLOWSCAN_API
screen_sequential_hooks slowscan_screen_sequential_hooks_default(void);

/* The state of a run of `series` series screened with cfg (its tests per series), deciding
 * by seq. NULL when out of memory or seq is unusable (fdr or epsilon outside (0, 1),
 * max_per_series below first_round, block 0). */
SLOWSCAN_API
screen_sequential *slowscan_screen_sequential_alloc(const sequential_config *seq,
                                                    const screen_config *cfg, size_t series);
SLOWSCAN_API
void slowscan_screen_sequential_free(screen_sequential *run);

/* The order of the run's inputs when the source walks its series in another (a grid read a
 * block of cells at a time): order[k] is the index of the k-th series in input order, a
 * permutation of 0..series-1 (NULL: index order). It decides only who gets what is left of a
 * short budget after the common cap (slowscan_sequential_next_in_order), so that the rounds
 * are those of the command, which walks its inputs in order. Before the rounds; SLOWSCAN_OK,
 * SLOWSCAN_EINVAL (not a permutation, or the rounds have begun) or SLOWSCAN_ENOMEM. */
SLOWSCAN_API
int slowscan_screen_sequential_order(screen_sequential *run, const size_t *order);

/* The rounds: every series of `source` (this process's, in order; walked again each round)
 * through the batch driver with cfg until every test is settled, the budget is spent or the
 * rounds run out, then the open tests settled against BH's threshold. SLOWSCAN_OK; the
 * status of a series that failed (described in *failure, as slowscan_screen_batch_run
 * describes it) or the hooks' status; SLOWSCAN_ENOMEM. Call once per state. */
SLOWSCAN_API
int slowscan_screen_sequential_run(screen_sequential *run, const screen_config *cfg,
                                   screen_source *source, const screen_sequential_hooks *hooks,
                                   screen_batch_failure *failure);

/* Series g's result of the ordinary pass (drawn without surrogates) made the rounds': each
 * tested test's p, null count and surrogates, the reason and warning of a series without a
 * null, the count of unconverged iaaft draws. */
SLOWSCAN_API
void slowscan_screen_sequential_patch(const screen_sequential *run, size_t g,
                                      screen_result *res);

/* The flag of test j of series g: rising or falling when rejected (by the statistic's sign),
 * none when accepted, undecided when left open; `stored` (the store's) for an untested one. */
SLOWSCAN_API
screen_flag slowscan_screen_sequential_flag(const screen_sequential *run, size_t g, size_t j,
                                            const screen_test *test, screen_flag stored);

/* The 95% Clopper-Pearson interval of the Monte Carlo p of test j of series g (NaN when it
 * has no draws). */
SLOWSCAN_API
void slowscan_screen_sequential_interval(const screen_sequential *run, size_t g, size_t j,
                                         double *lo, double *hi);

SLOWSCAN_API
screen_sequential_summary slowscan_screen_sequential_summary(const screen_sequential *run);

#endif
