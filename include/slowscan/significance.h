/* slowscan — p-values from a surrogate null distribution, Benjamini-Hochberg q-values, and
 * the per-purpose random streams that make results independent of thread and rank counts
 * (module prefixes: significance_, stream_). */
#ifndef SLOWSCAN_SIGNIFICANCE_H
#define SLOWSCAN_SIGNIFICANCE_H

#include "slowscan/export.h"

#include <stddef.h>

typedef enum {
    ALTERNATIVE_INCREASING, /* p = (1 + #{s >= obs}) / (M + 1) */
    ALTERNATIVE_DECREASING, /* p = (1 + #{s <= obs}) / (M + 1) */
    ALTERNATIVE_TWO_SIDED   /* p = (1 + #{|s| >= |obs|}) / (M + 1) */
} significance_alternative;

/* Surrogate p-value of `observed` against the m finite values of null[] (non-finite null
 * values are not counted, and m shrinks accordingly; *used receives m, may be NULL). NaN
 * when observed is NaN or no null value is finite. */
SLOWSCAN_API
double slowscan_significance_p_value(double observed, const double *null, size_t count,
                            significance_alternative alternative, size_t *used);

/* Benjamini & Hochberg (1995) adjusted p-values (q-values) of count p-values; NaN entries
 * are left out of the family and get NaN. q[i] = min over j with p_(j) >= p_i of
 * p_(j) * m / rank(j), capped at 1. `order` is scratch of count entries. */
SLOWSCAN_API
int slowscan_significance_bh(const double *p, size_t count, double *q, size_t *order);

/* A 32-bit seed for the stream of (global seed, series name, purpose, block): FNV-1a over the
 * parts. Distinct parts give unrelated streams, so work can be dealt out in any order. */
SLOWSCAN_API
unsigned long slowscan_stream_seed(unsigned long seed, const char *series, const char *purpose,
                          unsigned long block);

/* Exact (Clopper-Pearson) 95% interval of a binomial share hits/trials, for size and power
 * tables. GSL's beta inverse fails to converge at some counts (e.g. the upper end for 6 of
 * 400 or 31 of 1000, GSL 2.7); there the quantile is found by bisection on the monotone
 * gsl_cdf_beta_P instead, to double precision. */
SLOWSCAN_API
void slowscan_significance_binomial_interval(size_t hits, size_t trials, double *lo, double *hi);

#endif
