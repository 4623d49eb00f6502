/* Benchmark of the detrend workspace: 1000 slowscan_detrend_apply calls (each plans, weighs and
 * transforms its kernel afresh) against 1000 slowscan_detrend_apply_with calls on one workspace, at
 * n = 2000 and a bandwidth of 10% of the span; the ratio is measured in one run, each time the
 * best of three repetitions. Gap-free series reuse the mask sums too; series with gaps
 * recompute them. The outputs are compared bit for bit on the way. */
#include "slowscan/detrend.h"
#include "slowscan/status.h"

#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

enum { CALLS = 1000, SERIES = 8, REPS = 3 };

static double now(void)
{
    struct timespec t;
    clock_gettime(CLOCK_MONOTONIC, &t);
    return (double)t.tv_sec + 1e-9 * (double)t.tv_nsec;
}

/* Best wall time of REPS runs of CALLS fits cycling over the series; with ws or without. */
static double best_time(const detrend_spec *spec, detrend_workspace *ws, const double *x,
                        size_t n, double *out)
{
    double best = INFINITY;
    for (int r = 0; r < REPS; r++) {
        double t0 = now();
        for (size_t c = 0; c < CALLS; c++) {
            const double *xs = x + (c % SERIES) * n;
            double *o = out + (c % SERIES) * n;
            int st = ws ? slowscan_detrend_apply_with(ws, xs, n, NULL, o)
                        : slowscan_detrend_apply(spec, 1.0, xs, n, NULL, o);
            if (st != SLOWSCAN_OK)
                return -1.0;
        }
        double t = now() - t0;
        best = t < best ? t : best;
    }
    return best;
}

static int one_case(const char *method, int gaps, gsl_rng *rng, size_t n, double *x,
                    double *a, double *b)
{
    detrend_spec spec = {.bandwidth = 0.1 * (double)(n - 1)};
    slowscan_detrend_parse_method(method, &spec);
    for (size_t k = 0; k < SERIES; k++) {
        double level = 0.0;
        for (size_t i = 0; i < n; i++) {
            level = 0.7 * level + gsl_ran_gaussian(rng, 1.0);
            x[k * n + i] = 0.002 * (double)i + level;
            if (gaps && i % 211 < 5)
                x[k * n + i] = NAN;
        }
    }
    detrend_workspace *ws = slowscan_detrend_workspace_alloc(&spec, 1.0, n);
    if (!ws)
        return 1;
    double tf = best_time(&spec, NULL, x, n, a), tw = best_time(&spec, ws, x, n, b);
    slowscan_detrend_workspace_free(ws);
    if (tf < 0.0 || tw < 0.0)
        return 1;
    int same = memcmp(a, b, SERIES * n * sizeof *a) == 0;
    printf("%s n=%zu bandwidth 10%%%s: %d slowscan_detrend_apply %.1f ms, %d slowscan_detrend_apply_with "
           "%.1f ms, ratio = %.2f (outputs %s)\n", method, n, gaps ? ", gaps" : "", CALLS,
           1e3 * tf, CALLS, 1e3 * tw, tf / tw, same ? "identical" : "DIFFER");
    return !same;
}

int main(void)
{
    const size_t n = 2000;
    double *x = malloc(3 * SERIES * n * sizeof *x);
    gsl_rng *rng = gsl_rng_alloc(gsl_rng_mt19937);
    if (!x || !rng)
        return 1;
    gsl_rng_set(rng, 1);
    int fail = one_case("gaussian-linear", 0, rng, n, x, x + SERIES * n, x + 2 * SERIES * n) ||
               one_case("gaussian-linear", 1, rng, n, x, x + SERIES * n, x + 2 * SERIES * n) ||
               one_case("gaussian", 0, rng, n, x, x + SERIES * n, x + 2 * SERIES * n);
    gsl_rng_free(rng);
    free(x);
    if (fail)
        fprintf(stderr, "bench_detrend: a fit failed or the outputs differ\n");
    return fail;
}
