/* The calibration battery: null series that resemble real records (none slows down), the
 * size of screen's tests on them, and the binomial bounds that size is held to.
 *
 * A case is one row of a descriptor table (calibration_cases.c): a noise process, an
 * optional transform, slow mean, noise-amplitude ramp, seasonal cycle and missing samples,
 * and the extra screen options it is run with. One generator draws every case; one runner
 * (test_calibration.c) screens it and counts p <= 0.05 per test. `make check` runs the
 * battery at a small scale (suite "calibration"), `make validate` at a larger one with
 * several nulls (tests/validate/validate.c). */
#ifndef SLOWSCAN_TESTS_CALIBRATION_CASES_H
#define SLOWSCAN_TESTS_CALIBRATION_CASES_H

#include <stddef.h>

/* The tests measured in every case, in the order of the --indicators list. */
enum { CAL_VARIANCE, CAL_LAG1, CAL_RECOVERY, CAL_TESTS };
extern const char *const calibration_test_names[CAL_TESTS];

typedef enum {
    CAL_NOISE_ARMA,    /* ARMA(1,1) with Gaussian innovations (theta 0: AR(1)) */
    CAL_NOISE_ARMA_T3, /* the same with Student t (3 d.o.f.) innovations, unit variance */
    CAL_NOISE_PINK     /* 1/f: a sum of ten AR(1)s with octave-spaced time scales */
} calibration_noise;

typedef enum {
    CAL_MEAN_FLAT,
    CAL_MEAN_LINEAR,      /* change * u */
    CAL_MEAN_QUADRATIC,   /* change * u^2: accelerating */
    CAL_MEAN_EXPONENTIAL, /* change * (e^{4u} - 1) / (e^4 - 1) */
    CAL_MEAN_FOLD,        /* change * sqrt(1 - 0.95 u): steepest at the end, like a fold */
    CAL_MEAN_STEP         /* change from the middle sample on */
} calibration_mean;

typedef enum { CAL_GAPS_NONE, CAL_GAPS_RANDOM, CAL_GAPS_BLOCK } calibration_gaps;

/* u = i / (n - 1) in [0, 1] is the position in the record. */
typedef struct {
    const char *name;
    const char *what; /* one line for the tables */
    size_t n;
    calibration_noise noise;
    double phi, theta;
    double sd, sd_end;     /* stationary sd of the noise at u = 0 and u = 1 (linear ramp of
                              the innovations' sd; the memory phi stays constant) */
    int exp_transform;     /* the value is exp(noise): skewed, spread grows with the level */
    calibration_mean mean;
    double change;
    double period, amp0, amp1; /* seasonal cycle, amplitude amp0 -> amp1 quadratically in u */
    double second;             /* its second harmonic's amplitude, relative to the first */
    calibration_gaps gaps;
    double gap_share;      /* share of samples missing */
    const char *options;   /* extra screen options ("" for none) */
    const char *needs;     /* an option the binary may not have yet (NULL: none) */
    unsigned expected;     /* bit (1 << test): the tested quantity really changes */
    int ar1_mismatch;      /* the memory is not AR(1): the ar1 null cannot hold it */
} calibration_case;

extern const calibration_case calibration_cases[];
extern const size_t calibration_case_count;

/* Seed of a case: FNV-1a of its name mixed with salt (stable when cases are added). */
unsigned long calibration_seed(const calibration_case *c, unsigned long salt);

/* Draws `series` series of the case (GSL mt19937 seeded with `seed`) and writes them as one
 * CSV (t = 0, 1, ...; s0, s1, ...; missing samples NA). Returns 0, or -1 on failure. */
int calibration_write_case(const calibration_case *c, size_t series, unsigned long seed,
                           const char *path);

/* ---- the runner (test_calibration.c) ---- */

typedef struct {
    size_t series, surrogates;
    const char *null;    /* NULL: the binary's default null, as users get it */
    unsigned long salt;  /* mixed into the seeds: another scale draws other series */
} calibration_scale;

typedef struct {
    size_t hits;   /* p <= 0.05 */
    size_t tested; /* rows with a finite p */
    size_t rows;   /* rows of this test in the summary */
} calibration_count;

typedef enum { CAL_RAN, CAL_SKIPPED, CAL_ERROR } calibration_outcome;

/* Writes the case's CSV to the scratch directory, screens it with the scale's surrogates,
 * null and seed, and counts per test. CAL_SKIPPED when the binary refuses c->needs (exit 1
 * naming it); CAL_ERROR otherwise when screen fails; `why` says which. */
calibration_outcome calibration_run_case(const calibration_case *c, const calibration_scale *s,
                                         calibration_count out[CAL_TESTS], char *why,
                                         size_t why_len);

/* Cells that are size tests (not expected rejections, not ar1-null mismatches when `null`
 * is "ar1"): the Bonferroni divisor for one null. */
size_t calibration_tested_cells(const char *null);

/* The largest count still consistent with the nominal 5% rate: the smallest c with
 * P(X > c) <= alpha for X ~ Binomial(series, 0.05). */
size_t calibration_bound(size_t series, double alpha);

/* "holds", "FAIL", "EXPECTED" (the quantity really changes) or "n/c" (the ar1 null on a
 * memory it cannot hold by construction). */
const char *calibration_verdict(const calibration_case *c, int test, const char *null,
                                size_t hits, size_t bound);

/* Clopper-Pearson 95% interval of a share hits/series. */
void calibration_interval(size_t hits, size_t series, double *lo, double *hi);

#endif
