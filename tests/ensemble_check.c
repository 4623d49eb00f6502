/* Ensembles for the tests (ensemble_check.h). */
#include "ensemble_check.h"

#include "slowscan/ensemble.h"

#include <math.h>
#include <stdlib.h>

void ensemble_draw(check_rng *rng, size_t members, size_t n, int split, double *x)
{
    const double phi = 0.7, sd = 0.3;
    for (size_t m = 0; m < members; m++) {
        double e = sd * check_rng_gaussian(rng) / sqrt(1 - phi * phi);
        for (size_t i = 0; i < n; i++) {
            if (i > 0)
                e = phi * e + sd * check_rng_gaussian(rng);
            double t = (double)i, forced = 2 * (1 - exp(-t / ((double)n / 4)));
            if (split && m % 2)
                forced += 2 / (1 + exp(-(t - 0.7 * (double)n) / 5));
            x[m * n + i] = forced + e;
        }
    }
}

void ensemble_draw_fold(check_rng *rng, size_t members, size_t n, double *x)
{
    const double h = 0.05;
    for (size_t m = 0; m < members; m++) {
        double state = 1.0;
        for (size_t i = 0; i < n; i++) {
            double a = 1.0 - 0.98 * (double)i / (double)(n - 1);
            for (int s = 0; s < 10; s++) /* Euler-Maruyama, 10 substeps a sample */
                state += (a - state * state) * h + 0.03 * sqrt(h) * check_rng_gaussian(rng);
            x[m * n + i] = state;
        }
    }
}

ensemble_rate ensemble_split_rate(size_t runs, size_t members, size_t n, int split,
                                  unsigned long seed)
{
    ensemble_rate r = {.runs = runs};
    check_rng *rng = check_rng_alloc(seed);
    double *x = malloc(members * n * sizeof *x);
    const double **rows = malloc(members * sizeof *rows);
    ensemble_split_options o = slowscan_ensemble_split_options_default();
    for (size_t k = 0; x && rows && k < runs; k++) {
        ensemble_draw(rng, members, n, split, x);
        for (size_t m = 0; m < members; m++)
            rows[m] = &x[m * n];
        ensemble_split s;
        slowscan_ensemble_split_test(rows, members, n, &o, &s);
        r.hits += s.flags != 0;
        r.bimodal += (s.flags & ENSEMBLE_SPLIT_BIMODAL) != 0;
        r.gap += (s.flags & ENSEMBLE_SPLIT_GAP) != 0;
    }
    free(x);
    free(rows);
    check_rng_free(rng);
    return r;
}
