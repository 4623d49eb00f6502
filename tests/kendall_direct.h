/* tau-b from its definition (Kendall 1945, Biometrika 33:239, recalled from memory):
 * sum over pairs of sign(dx) sign(dy) / sqrt((n0 - pairs tied in x)(n0 - pairs tied in y)),
 * counted pair by pair in O(n^2). The yardstick of tests/test_kendall.c and
 * bench/bench_kendall.c. */
#ifndef SLOWSCAN_TESTS_KENDALL_DIRECT_H
#define SLOWSCAN_TESTS_KENDALL_DIRECT_H

#include <math.h>
#include <stddef.h>
#include <stdint.h>

static inline double tau_direct(const double *x, const double *y, size_t n)
{
    int64_t s = 0, tx = 0, ty = 0, n0 = (int64_t)n * (int64_t)(n - 1) / 2;
    for (size_t i = 0; i < n; i++)
        for (size_t j = i + 1; j < n; j++) {
            int dx = (x[j] > x[i]) - (x[j] < x[i]), dy = (y[j] > y[i]) - (y[j] < y[i]);
            s += dx * dy;
            tx += dx == 0;
            ty += dy == 0;
        }
    return (double)s / sqrt((double)(n0 - tx) * (double)(n0 - ty));
}

#endif
