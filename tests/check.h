/* slowscan test harness: a plain C runner. Each tests/test_*.c file defines one suite
 * function listed in tests/run_tests.c; checks count into the runner's totals, which end the
 * run in a line "LABEL: N passed, N failed".
 *
 * Every check against something outside the project names its source in a comment beside it
 * (a paper, a handbook, a reference library, a data set shipped by a package, or "common
 * practice, no source"; values recalled from memory say so). */
#ifndef SLOWSCAN_TESTS_CHECK_H
#define SLOWSCAN_TESTS_CHECK_H

#include <stddef.h>

void check_record(int ok, const char *file, int line, const char *fmt, ...)
    __attribute__((format(printf, 4, 5)));

/* CHECK(cond, "what %d", arg): one check; prints the message when it fails. */
#define CHECK(cond, ...) check_record((cond) ? 1 : 0, __FILE__, __LINE__, __VA_ARGS__)

/* |got - want| <= abs_tol + rel_tol*|want|; NaN equals NaN only when both are NaN. */
int check_close(double got, double want, double rel_tol, double abs_tol);
#define CHECK_CLOSE(got, want, rel, abs_, what)                                              \
    do {                                                                                     \
        double g_ = (got), w_ = (want);                                                      \
        check_record(check_close(g_, w_, (rel), (abs_)), __FILE__, __LINE__,                 \
                     "%s: got %.17g, want %.17g", (what), g_, w_);                           \
    } while (0)

/* Largest |got - want| over the samples; a NaN in one and not the other counts as infinite. */
double check_max_diff(const double *got, const double *want, size_t n);

/* The slowscan binary under test ($SLOWSCAN_BIN, default build/slowscan). */
const char *check_binary(void);

/* A fresh scratch directory for this run (removed at exit); returns a path inside it. */
const char *check_tmp_path(const char *name);

/* Writes `text` to a file; returns 0 on success. */
int check_write_file(const char *path, const char *text);
/* Reads a whole file into a malloc'd NUL-terminated buffer (NULL on failure). */
char *check_read_file(const char *path);
int check_file_exists(const char *path);

/* Runs a shell command line; returns its exit status (or -1), captures stdout and stderr
 * (either pointer may be NULL; free the buffers). */
int check_run(const char *command, char **out, char **err);

/* Runs `/usr/bin/python3 tests/reference/SCRIPT ARGS` (Debian's numpy/scipy/statsmodels)
 * and parses whitespace-separated numbers from its stdout into values (at most max);
 * returns how many were read, or -1 if the script failed. */
int check_python(const char *script_and_args, double *values, size_t max);

/* Writes x[n] one number per line to a scratch file, then runs
 * `/usr/bin/python3 tests/reference/SCRIPT FILE EXTRA` as check_python does. */
int check_python_on(const char *script, const double *x, size_t n, const char *extra,
                    double *values, size_t max);

/* Files in the scratch directory whose names start with `prefix` (leftover temp files). */
int check_scratch_files(const char *prefix);

/* Deterministic standard normal draws for tests (GSL's mt19937, seeded). */
typedef struct check_rng check_rng;
check_rng *check_rng_alloc(unsigned long seed);
double check_rng_gaussian(check_rng *rng);
double check_rng_uniform(check_rng *rng);
void check_rng_free(check_rng *rng);

/* A CSV of `count` series of n samples, sample i of series k from gen (state: one double per
 * series, zeroed first), the time column t = 0, 1, ... */
typedef double (*check_sample_fn)(check_rng *rng, size_t k, size_t i, size_t n, double *state);
void check_write_series_csv(const char *path, size_t count, size_t n, check_sample_fn gen,
                            unsigned long seed);
/* The same CSV from x[k*n + i] (series k, sample i) already drawn; NaN is written as NA.
 * Returns 0, or -1 when the file cannot be written. */
int check_write_columns_csv(const char *path, size_t count, size_t n, const double *x);
/* The same with the header line given (NULL: t,s0,s1,...) and times 0, step, 2 step, ... */
int check_write_table_csv(const char *path, const char *header, size_t count, size_t n,
                          double step, const double *x);

/* Wilson score 95% interval of a binomial share hits/trials (Wilson 1927, J. Am. Stat.
 * Assoc. 22:209), z = 1.959964. */
void check_wilson(size_t hits, size_t trials, double *lo, double *hi);

#endif
