/* Ensembles for the tests (test_ensemble.c, test_ensemble_cli.c): members that share a forced
 * relaxation and differ by their own red noise, optionally split by a threshold that half of
 * them cross. */
#ifndef SLOWSCAN_TESTS_ENSEMBLE_CHECK_H
#define SLOWSCAN_TESTS_ENSEMBLE_CHECK_H

#include "check.h"

#include <stddef.h>

/* Null ensembles behind the split rate of make check (a bigger hand run: see help). */
enum { ENSEMBLE_SPLIT_NULL_RUNS = 400 };

/* x[m * n + i]: member m at step i: 2 (1 - exp(-i / (n/4))) plus AR(1) noise (phi 0.7,
 * innovation sd 0.3, started stationary); with split, the odd members also rise by 2 along a
 * logistic step centred at 0.7 n (a threshold crossed by half the ensemble). */
void ensemble_draw(check_rng *rng, size_t members, size_t n, int split, double *x);

/* x[m * n + i]: members approaching a fold, dx = (a - x^2) dt + 0.03 dW with a ramped from 1
 * to 0.02 over the record (the saddle-node normal form; Strogatz 1994, Nonlinear Dynamics
 * and Chaos, 3.1), each member with its own noise: their memory and variance rise. */
void ensemble_draw_fold(check_rng *rng, size_t members, size_t n, double *x);

typedef struct {
    size_t runs, hits;   /* ensembles tested, flagged split */
    size_t bimodal, gap; /* flagged by each criterion */
} ensemble_rate;
/* The split test's flags over `runs` ensembles drawn with ensemble_draw. */
ensemble_rate ensemble_split_rate(size_t runs, size_t members, size_t n, int split,
                                  unsigned long seed);

/* screen --ensemble through the binary (test_ensemble_cli.c). */
void ensemble_cli_tests(void);

#endif
