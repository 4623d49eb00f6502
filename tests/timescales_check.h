/* Test helpers shared by the suites of response/ (timescales, emulate). */
#ifndef SLOWSCAN_TESTS_TIMESCALES_CHECK_H
#define SLOWSCAN_TESTS_TIMESCALES_CHECK_H

#include <stddef.h>

/* t[i] = i + 1 and y[i] = sum_k a_k (1 - exp(-t_i / tau_k)) plus, when seed != 0, AR(1)
 * noise of coefficient phi and stationary sd `sd` (GSL mt19937 through check_rng). */
void modes_simulate(double *t, double *y, size_t n, const double *a, const double *tau,
                    size_t K, double sd, double phi, unsigned long seed);

/* Wilson score interval (95%) of x successes in n trials. */
void modes_wilson(size_t x, size_t n, double *lo, double *hi);

/* Departures the rule (persist 0) or a fixed persistence reports on `runs` linear step/ramp run pairs (test_emulate.c). */
size_t modes_false_departures(size_t runs, double sd, double phi, int skew, size_t persist,
                              size_t length, unsigned long seed0);

/* The binary with args; exit status, stdout and stderr (either may be NULL; free them). */
int modes_run(const char *args, char **out, char **err);
/* The binary refuses args (-o a scratch file added): exit 1, one message line holding
 * needle, no output file left. */
void modes_expect_refusal(const char *what, const char *args, const char *needle);
/* A CSV in the scratch directory: header, then rows t0 + i dt and the columns; its path. */
const char *modes_write_csv(const char *name, const char *header, size_t n, double t0, double dt,
                            const double *const *columns, size_t ncol);

#endif
