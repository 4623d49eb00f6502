/* Benchmark of Kendall tau-b: Knight's O(n log n) algorithm against the direct O(n^2) pair
 * count at n = 10^4 (ratio in the same run), and the time at n = 10^6. Each time is the best
 * of several repetitions. */
#include "slowscan/kendall.h"
#include "slowscan/status.h"

#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <time.h>
#include "../tests/kendall_direct.h"

static double now(void)
{
    struct timespec t;
    clock_gettime(CLOCK_MONOTONIC, &t);
    return (double)t.tv_sec + 1e-9 * (double)t.tv_nsec;
}


/* An indicator-like series against time: x the index (already in order, as for the trend
 * statistic), y a noisy trend rounded so that there are ties in y. */
static void fill(gsl_rng *rng, double *x, double *y, size_t n)
{
    for (size_t i = 0; i < n; i++) {
        x[i] = (double)i;
        y[i] = round(1e3 * (1e-6 * (double)i + gsl_ran_gaussian_ziggurat(rng, 1.0))) / 1e3;
    }
}

static double time_fast(kendall_workspace *ws, const double *x, const double *y, size_t n,
                        int reps, double *tau)
{
    double best = INFINITY;
    for (int r = 0; r < reps; r++) {
        double t0 = now();
        if (slowscan_kendall_tau_b(ws, x, y, n, tau, NULL) != SLOWSCAN_OK)
            return -1.0;
        double t = now() - t0;
        best = t < best ? t : best;
    }
    return best;
}

int main(void)
{
    const size_t small = 10000, large = 1000000;
    double *x = malloc(large * sizeof(double)), *y = malloc(large * sizeof(double));
    kendall_workspace *ws = slowscan_kendall_alloc(large);
    gsl_rng *rng = gsl_rng_alloc(gsl_rng_mt19937);
    if (!x || !y || !ws || !rng) {
        fprintf(stderr, "bench_kendall: out of memory\n");
        return 1;
    }
    gsl_rng_set(rng, 1);
    fill(rng, x, y, small);
    double tau = NAN, direct = NAN, td = INFINITY;
    double tf = time_fast(ws, x, y, small, 50, &tau);
    for (int r = 0; r < 3; r++) {
        double t0 = now();
        direct = tau_direct(x, y, small);
        double t = now() - t0;
        td = t < td ? t : td;
    }
    printf("kendall tau-b n=%zu: O(n log n) %.3f ms, O(n^2) direct %.1f ms, ratio "
           "direct/fast = %.0f (tau %.15f vs %.15f)\n", small, 1e3 * tf, 1e3 * td, td / tf, tau,
           direct);
    fill(rng, x, y, large);
    double tl = time_fast(ws, x, y, large, 5, &tau);
    printf("kendall tau-b n=%zu: O(n log n) %.1f ms (%.0f ns per pair of values; "
           "x %zu -> time ratio %.0f for n log n ratio %.0f)\n", large, 1e3 * tl,
           1e9 * tl / (double)large, large / small, tl / tf,
           (double)large * log((double)large) / ((double)small * log((double)small)));
    /* Shuffled x (the pairs must be sorted first: the full algorithm). */
    for (size_t i = 0; i < large; i++)
        x[i] = gsl_rng_uniform(rng);
    double tr = time_fast(ws, x, y, large, 5, &tau);
    printf("kendall tau-b n=%zu, x in random order: O(n log n) %.1f ms (ratio to x in time "
           "order %.2f)\n", large, 1e3 * tr, tr / tl);
    gsl_rng_free(rng);
    slowscan_kendall_free(ws);
    free(x);
    free(y);
    return 0;
}
