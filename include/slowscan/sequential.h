/* slowscan — sequential Monte Carlo testing of many tests at once, under Benjamini-Hochberg
 * (module prefix: sequential_).
 *
 * Surrogates are drawn in rounds. After each round every test i has S_i surrogate statistics
 * at least as extreme as its own (by the test's direction) among n_i drawn. Its unknown
 * Monte Carlo p (the chance one surrogate is at least as extreme) lies in a Clopper-Pearson
 * interval [L_i, U_i]. By default (joint = 0) the risk epsilon is per test, spent over its
 * draws as Gandy (2009, J. Am. Stat. Assoc. 104:1504) spends a test's resampling risk over
 * its samples and Gandy & Hahn's MMCTest over its testing times: a test's interval made at n
 * draws, after one at n' (0: none), has two-sided level epsilon (F(n) - F(n')), F(n) = n / K
 * (K = max_per_series), so its intervals together fail with probability at most
 * epsilon F(n_last) <= epsilon (the expected number of tests with a failed interval is at
 * most epsilon x the tests). The risk goes where the draws go: a test settled at 64 draws
 * spends little, one still open near K has most of epsilon for its last intervals, where
 * the decisions near the threshold are made (SEQUENTIAL_SPEND_ROUNDS: the former even
 * split, epsilon / R per round, R the largest number of rounds). With joint = 1, epsilon
 * is divided by the m tests too (Bonferroni): every interval of every test holds with
 * probability 1 - epsilon, at a far higher cost in surrogates.
 * Benjamini-Hochberg at level q applied to the upper limits rejects a set A of tests, applied
 * to the lower limits a set B containing A (BH's rejection set only grows as p-values fall):
 * the tests in A would be rejected, those outside B accepted, whatever the p-values inside
 * the intervals are; the rest are open and get more surrogates in the next round. A test
 * whose finite surrogate statistics reach max_per_series K has become the fixed-K Monte Carlo
 * test (Besag & Clifford 1991, Biometrika 78:301): its interval is the point
 * (1 + hits) / (1 + K), the p of a --surrogates K run (replicate j is the same draw), so BH
 * settles it as that run would, and a run capped at a fixed run's M reproduces the fixed
 * run's p for every test it carries to the cap (not 'undecided'). This is the
 * idea of Gandy & Hahn's MMCTest (Scand. J. Stat. 2014), and the per-test risk with a fixed
 * total budget that of their QuickMMCTest (both recalled from memory, not checked; their
 * intervals and spending of epsilon may differ). When the budget is spent,
 * slowscan_sequential_finish settles the open tests against BH's threshold on the reported
 * p; those whose interval still straddles it are undecided.
 *
 * Surrogates are per series: one surrogate gives a statistic for every test of its series,
 * so a series draws on while any of its tests is open. Round sizes depend only on the counts
 * (never on scheduling) and are whole blocks of `block` replicates, so replicate j of a
 * series is the same draw however the rounds fall.
 *
 * Plain data, no I/O; statuses from status.h. */
#ifndef SLOWSCAN_SEQUENTIAL_H
#define SLOWSCAN_SEQUENTIAL_H

#include "slowscan/export.h"

#include <stddef.h>

/* How a test's risk is spread over its intervals. */
typedef enum {
    SEQUENTIAL_SPEND_ROUNDS = 0, /* epsilon / R for each round's interval */
    SEQUENTIAL_SPEND_DRAWS       /* epsilon (F(n) - F(n')), F(n) = n / K: the default */
} sequential_spending;

typedef struct {
    double fdr;            /* q of Benjamini-Hochberg: 0.05 */
    double epsilon;        /* resampling risk (--risk): 1e-2; per test, or for the whole
                              run with joint */
    size_t max_per_series; /* K, surrogates of one series at most: 100000 */
    size_t budget;         /* surrogates of the whole run (summed over series); 0: 200 per
                              test with a statistic */
    size_t first_round;    /* surrogates of every series in round 1: 64 */
    size_t block;          /* round sizes are multiples of this (the stream block): 64 */
    int joint;             /* 0: epsilon per test (default); 1: for all tests jointly */
    sequential_spending spending; /* SEQUENTIAL_SPEND_DRAWS */
} sequential_config;

SLOWSCAN_API
sequential_config slowscan_sequential_config_default(void);

typedef enum {
    SEQUENTIAL_OPEN = 0,   /* not settled yet (at the end: undecided) */
    SEQUENTIAL_REJECTED,   /* BH rejects it whatever its p inside the interval */
    SEQUENTIAL_ACCEPTED,   /* BH accepts it whatever its p inside the interval */
    SEQUENTIAL_UNTESTED    /* no statistic: not in the family */
} sequential_decision;

/* One test of the run. */
typedef struct {
    size_t series;  /* its series (tests of a series are next to each other) */
    int tested;     /* 0: no statistic or no null, not in the family */
    size_t hits;    /* surrogate statistics at least as extreme */
    size_t drawn;   /* finite surrogate statistics */
    sequential_decision decision;
    /* the joint Clopper-Pearson interval of the last decision, kept so that a test with no new
       draws is not inverted again; interval_at: the drawn count it was made at (0: none) */
    double lo, hi;
    size_t interval_at;
} sequential_test;

/* Rounds a series can take from first_round doubling up to max_per_series: the rounds the
 * error epsilon is spread over. A run takes no more rounds than this (a series cut short by
 * the budget then ends below max_per_series), so no test gets more intervals than the
 * risk was spread over. */
SLOWSCAN_API
size_t slowscan_sequential_max_rounds(const sequential_config *cfg);

/* The budget of a run with `tested` tests (cfg->budget, or 200 per test when 0). */
SLOWSCAN_API
size_t slowscan_sequential_budget(const sequential_config *cfg, size_t tested);

/* Clopper-Pearson interval of a binomial share hits/trials at two-sided level alpha
 * (GSL's beta quantiles, with bisection where they fail); trials 0 gives [0, 1]. */
SLOWSCAN_API
void slowscan_sequential_interval(size_t hits, size_t trials, double alpha, double *lo,
                                  double *hi);

/* Decides every tested test of tests[count] from its counts (writes .decision); *open
 * receives the number still open. SLOWSCAN_ENOMEM. */
SLOWSCAN_API
int slowscan_sequential_decide(const sequential_config *cfg, sequential_test *tests,
                               size_t count, size_t *open);

/* The per-round two-sided level of a test's interval among `tested` tests under
 * SEQUENTIAL_SPEND_ROUNDS: epsilon / R, or epsilon / (tested R) with cfg->joint. */
SLOWSCAN_API
double slowscan_sequential_alpha(const sequential_config *cfg, size_t tested);

/* The two-sided level of a test's interval made at `to` draws after one at `from` (0: none),
 * among `tested` tests, by cfg->spending (per test, or divided by `tested` with joint). */
SLOWSCAN_API
double slowscan_sequential_alpha_at(const sequential_config *cfg, size_t tested, size_t from,
                                    size_t to);

/* After the last round: BH at level fdr on the reported p of all tested tests gives k
 * rejections and the threshold t = fdr max(k, 1) / m; an open test whose last interval lies
 * at or below t is rejected, one whose interval lies above t accepted, the others stay
 * open (undecided). Decided tests keep their decisions. *open: those still open.
 * SLOWSCAN_ENOMEM. */
SLOWSCAN_API
int slowscan_sequential_finish(const sequential_config *cfg, sequential_test *tests,
                               size_t count, size_t *open);

/* The reported p of a test: (1 + hits) / (1 + drawn) (the usual Monte Carlo p, Davison &
 * Hinkley 1997), and the 95% Clopper-Pearson interval of the Monte Carlo p from hits of
 * drawn. NaN when the test has no draws. */
SLOWSCAN_API
void slowscan_sequential_p(const sequential_test *t, double *p, double *lo, double *hi);

/* The next round: add[s] more surrogates for each of `series` series, from drawn[s] drawn so
 * far and open[s] (non-zero: a test of series s is open), within what is left of the budget
 * after `spent`. Doubling (first_round for a series with none), capped by max_per_series;
 * when the requests exceed what is left, every request is cut to one common cap c (the
 * largest multiple of block whose cut requests fit), and what is left after that goes a block
 * at a time to the series cut, in series order: no open series is starved for others (the
 * strongly significant series, which ask for the most, need it most). Depends on the counts
 * only. *total: the sum of add[] (0: the procedure ends). */
SLOWSCAN_API
void slowscan_sequential_next(const sequential_config *cfg, size_t series,
                              const size_t *drawn, const int *open, size_t spent,
                              size_t budget, size_t *add, size_t *total);
/* The same, what is left after the common cap handed out in the order order[0], order[1], ...
 * (a permutation of the series; NULL: index order). A caller that walks its series in another
 * order than the run's inputs (a grid read by blocks) passes the inputs' order, so its rounds
 * are those of a walk in input order. */
SLOWSCAN_API
void slowscan_sequential_next_in_order(const sequential_config *cfg, size_t series,
                                       const size_t *drawn, const int *open, size_t spent,
                                       size_t budget, const size_t *order, size_t *add,
                                       size_t *total);

#endif
