/* The size of `--tail gpd` on i.i.d. nulls, exactly per set of surrogates (suite tail, and
 * make validate's tail table through tests/validate/tail_size_main.c). */
#ifndef SLOWSCAN_TESTS_TAIL_SIZE_H
#define SLOWSCAN_TESTS_TAIL_SIZE_H

#include <stddef.h>

typedef enum { TAIL_NULL_NORMAL, TAIL_NULL_T5 } tail_null;

typedef struct {
    double size[3], lo[3], hi[3]; /* size / alpha: mean over sets and its 95% interval */
    int sets, fitted;
    double ms_per_estimate;
    int used_exact;               /* sets whose estimate at the exact 1e-5 point was used */
    double median_ratio, q1_ratio, q3_ratio; /* p / exact there: the reported p */
    double median_point;          /* and the point estimate */
} tail_size_result;

/* size / alpha at alpha[0..2] over `sets` sets of m surrogates (seeds seed, seed + 1, ...);
 * point = 1 measures the point estimate instead of the reported p. with_end = 0 skips
 * subtracting the mass beyond the limit's end (a slight overestimate of the size, cheaper). */
void tail_size_run(tail_null null, size_t m, int sets, unsigned long seed,
                   const double alpha[3], int point, int with_end, tail_size_result *out);

#endif
