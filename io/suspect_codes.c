/* Values that look like an unflagged missing-value code (slowscan_table_suspect_code,
 * include/slowscan/io.h).
 *
 * A code is a value written exactly the same wherever data are missing, and far from its
 * neighbours: each run of it is a spike, a jump out of the series' range and straight back.
 * "Far" is measured against a robust spread of the first differences (1.4826 times their
 * median absolute deviation), not of the values: a series whose level shifted has one large
 * difference at the shift and small ones after, so the new level is no spike. A series whose
 * differences have no spread (counts, a river that is dry half the year) is not judged. */
#include "io_internal.h"

#include <gsl/gsl_statistics_double.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

/* How many robust spreads a jump into and out of a code must be (common practice, no source:
 * a Gaussian difference beyond 12 spreads has a probability below 1e-30). */
static const double SPIKE_SPREADS = 12.0;

/* Codes in use across archives, flagged even when they occur once (common practice, no
 * source: -999 and -9999 in station data, 9.96921e36 netCDF's default float fill, 1e20 CMIP's
 * missing value). */
static const double USUAL_CODES[] = {-999.0, -9999.0, -99999.0, 9.96921e36, 1e20};

/* 1.4826 x the median absolute deviation of the differences between consecutive finite
 * values; NaN when there are fewer than 8 of them. `scratch` holds n doubles. */
static double difference_spread(const double *x, size_t n, double *scratch)
{
    size_t m = 0;
    for (size_t i = 1; i < n; i++)
        if (isfinite(x[i]) && isfinite(x[i - 1]))
            scratch[m++] = x[i] - x[i - 1];
    if (m < 8)
        return NAN;
    /* The (m/2)-th smallest by selection (GSL), linear time: every column of every input
     * passes here, and two full sorts per column were a third of the time taken to load a
     * wide table. An infinite median (differences that overflow) keeps the sort, whose order
     * of the NaNs it then makes is what the answer has always been. */
    double median = gsl_stats_select(scratch, 1, m, m / 2);
    if (!isfinite(median)) {
        qsort(scratch, m, sizeof *scratch, io_compare_doubles);
        median = scratch[m / 2];
        for (size_t i = 0; i < m; i++)
            scratch[i] = fabs(scratch[i] - median);
        qsort(scratch, m, sizeof *scratch, io_compare_doubles);
        return 1.4826 * scratch[m / 2];
    }
    for (size_t i = 0; i < m; i++)
        scratch[i] = fabs(scratch[i] - median);
    return 1.4826 * gsl_stats_select(scratch, 1, m, m / 2);
}

/* Whether every run of `code` in x is a spike: the finite values on each side (where there
 * is one) differ from it by more than `jump`. *count: samples equal to the code. */
static int every_run_a_spike(const double *x, size_t n, double code, double jump, size_t *count,
                             size_t *first)
{
    *count = 0;
    for (size_t i = 0; i < n;) {
        if (x[i] != code) {
            i++;
            continue;
        }
        size_t end = i;
        while (end < n && x[end] == code)
            end++;
        if (*count == 0)
            *first = i;
        *count += end - i;
        int left = i > 0 && isfinite(x[i - 1]), right = end < n && isfinite(x[end]);
        if ((left && fabs(x[i - 1] - code) <= jump) || (right && fabs(x[end] - code) <= jump) ||
            (!left && !right))
            return 0;
        i = end;
    }
    return *count > 0;
}

static int usual_code(double v)
{
    for (size_t c = 0; c < sizeof USUAL_CODES / sizeof USUAL_CODES[0]; c++)
        if (v == USUAL_CODES[c] || fabs(v - USUAL_CODES[c]) <= 1e-7 * fabs(USUAL_CODES[c]))
            return 1;
    return 0;
}

/* Candidates are the values of runs that are spikes (one pass, into scratch), at most a few
 * distinct ones; a candidate is a code when it is one of the usual ones or repeats, and every
 * run of it is a spike. Cost O(n) per candidate, so long series of counts stay cheap. */
enum { MAX_CANDIDATES = 16 };

static int find_code(const double *x, size_t n, double jump, double *scratch, suspect_code *out)
{
    size_t m = 0;
    for (size_t i = 0; i < n;) {
        size_t end = i + 1;
        while (end < n && x[end] == x[i])
            end++;
        int left = i > 0 && isfinite(x[i - 1]), right = end < n && isfinite(x[end]);
        if (isfinite(x[i]) && (left || right) && (!left || fabs(x[i - 1] - x[i]) > jump) &&
            (!right || fabs(x[end] - x[i]) > jump))
            scratch[m++] = x[i];
        i = end;
    }
    qsort(scratch, m, sizeof *scratch, io_compare_doubles);
    for (size_t i = 0, tried = 0; i < m && tried < MAX_CANDIDATES; tried++) {
        size_t j = i;
        while (j < m && scratch[j] == scratch[i])
            j++;
        size_t count, first = 0;
        if (every_run_a_spike(x, n, scratch[i], jump, &count, &first) &&
            (count >= 2 || usual_code(scratch[i]))) {
            out->value = scratch[i];
            out->count = count;
            out->first_index = first;
            return 1;
        }
        i = j;
    }
    return 0;
}

int slowscan_table_suspect_code(const series_table *t, size_t k, suspect_code *found)
{
    memset(found, 0, sizeof *found);
    if (k >= t->nseries || t->n < 8 || !t->values || !t->values[k])
        return 0;
    double *scratch = malloc(t->n * sizeof *scratch);
    if (!scratch)
        return 0;
    const double *x = t->values[k];
    double spread = difference_spread(x, t->n, scratch);
    int hit = spread > 0.0 && find_code(x, t->n, SPIKE_SPREADS * spread, scratch, found);
    if (hit)
        found->first_row = t->rows ? t->rows[found->first_index] : 0;
    free(scratch);
    return hit;
}
