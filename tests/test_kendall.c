/* Kendall tau-b (surrogates/kendall.c): scipy, a direct O(n^2) count, hand examples, NaN
 * skipping and the error returns. */
#include "check.h"

#include "slowscan/kendall.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include "kendall_direct.h"

/* tau-b from its definition (Kendall 1945, Biometrika 33:239, recalled from memory):
 * sum over pairs of sign(dx) sign(dy) / sqrt((n0 - pairs tied in x)(n0 - pairs tied in y)),
 * counted pair by pair. */

/* Reference library: scipy.stats.kendalltau (variant 'b') from Debian's python3-scipy, via
 * tests/reference/kendall_ref.py on the data written to a scratch file. */
static double tau_scipy(const double *x, const double *y, size_t n)
{
    const char *path = check_tmp_path("kendall.txt");
    FILE *f = fopen(path, "w");
    if (!f)
        return NAN;
    for (size_t i = 0; i < n; i++)
        fprintf(f, "%.17g %.17g\n", x[i], y[i]);
    fclose(f);
    char args[600];
    snprintf(args, sizeof args, "kendall_ref.py '%s'", path);
    double tau;
    return check_python(args, &tau, 1) == 1 ? tau : NAN;
}

/* kind 0: continuous, no ties; 1: heavy ties in x and y (rounded values); 2: x = time
 * index, y a noisy trend (the trend-statistic use). */
static void fill(check_rng *rng, int kind, double *x, double *y, size_t n)
{
    for (size_t i = 0; i < n; i++) {
        double g = check_rng_gaussian(rng), u = check_rng_uniform(rng);
        if (kind == 0) {
            x[i] = u;
            y[i] = 0.3 * u + g;
        } else if (kind == 1) {
            x[i] = floor(u * 8.0);
            y[i] = round(2.0 * g + 0.2 * x[i]);
        } else {
            x[i] = (double)i;
            y[i] = 0.002 * (double)i + g;
        }
    }
}

static void test_against_scipy(kendall_workspace *ws)
{
    const size_t sizes[2] = {500, 5000};
    const char *names[3] = {"no ties", "heavy ties", "trend"};
    check_rng *rng = check_rng_alloc(21);
    double *x = malloc(5000 * sizeof(double)), *y = malloc(5000 * sizeof(double));
    for (int kind = 0; kind < 3; kind++)
        for (int s = 0; s < 2; s++) {
            size_t n = sizes[s], used = 0;
            fill(rng, kind, x, y, n);
            double tau = NAN, want = tau_scipy(x, y, n);
            int st = slowscan_kendall_tau_b(ws, x, y, n, &tau, &used);
            CHECK(st == SLOWSCAN_OK && used == n, "%s n=%zu: status %d used %zu", names[kind],
                  n, st, used);
            CHECK_CLOSE(tau, want, 1e-12, 1e-12, names[kind]);
        }
    free(x);
    free(y);
    check_rng_free(rng);
}

static void test_against_direct(kendall_workspace *ws)
{
    const size_t n = 2000;
    check_rng *rng = check_rng_alloc(22);
    double *x = malloc(n * sizeof(double)), *y = malloc(n * sizeof(double)), tau;
    for (int kind = 0; kind < 3; kind++) {
        fill(rng, kind, x, y, n);
        /* common practice, no source: the O(n^2) count is the definition itself */
        CHECK(slowscan_kendall_tau_b(ws, x, y, n, &tau, NULL) == SLOWSCAN_OK, "direct kind %d", kind);
        CHECK_CLOSE(tau, tau_direct(x, y, n), 1e-13, 1e-14, "tau vs O(n^2) count");
    }
    /* All small sizes, where the merge-sort run boundaries are irregular. */
    size_t bad = 0;
    for (size_t m = 2; m < 300; m++) {
        fill(rng, (int)(m % 3), x, y, m);
        int st = slowscan_kendall_tau_b(ws, x, y, m, &tau, NULL);
        if (st == SLOWSCAN_OK)
            bad += !check_close(tau, tau_direct(x, y, m), 1e-13, 1e-14);
        else
            bad += st != SLOWSCAN_ECONST;
    }
    CHECK(bad == 0, "small sizes: %zu mismatches against the O(n^2) count", bad);
    free(x);
    free(y);
    check_rng_free(rng);
}

/* Hand-counted examples (common practice, no source). */
static void test_hand(kendall_workspace *ws)
{
    double x[5] = {1, 2, 3, 4, 5}, y[5] = {1, 3, 2, 5, 4}, tau;
    /* 10 pairs, 2 discordant (3,2) and (5,4): (8 - 2) / 10 = 0.6. */
    CHECK(slowscan_kendall_tau_b(ws, x, y, 5, &tau, NULL) == SLOWSCAN_OK, "hand example");
    CHECK_CLOSE(tau, 0.6, 1e-15, 0, "tau of 1 3 2 5 4");
    double xt[4] = {1, 2, 2, 3}, yt[4] = {1, 1, 2, 3};
    /* 6 pairs: 4 concordant, one tied in x, one in y: 4 / sqrt(5 * 5) = 0.8. */
    CHECK(slowscan_kendall_tau_b(ws, xt, yt, 4, &tau, NULL) == SLOWSCAN_OK, "hand example, ties");
    CHECK_CLOSE(tau, 0.8, 1e-15, 0, "tau-b with one tie in each");
    double yr[5] = {5, 4, 3, 2, 1};
    int st = slowscan_kendall_tau_b(ws, x, yr, 5, &tau, NULL);
    CHECK(st == SLOWSCAN_OK && tau == -1.0, "reversed order gives exactly -1, got %.17g", tau);
    st = slowscan_kendall_tau_b(ws, x, x, 5, &tau, NULL);
    CHECK(st == SLOWSCAN_OK && tau == 1.0, "identical order gives exactly 1, got %.17g", tau);
}

/* Non-finite pairs are skipped: the result equals tau over the finite pairs only. */
static void test_nan_skipping(kendall_workspace *ws)
{
    const size_t n = 300;
    check_rng *rng = check_rng_alloc(23);
    double x[300], y[300], cx[300], cy[300], tau, want;
    fill(rng, 1, x, y, n);
    size_t m = 0, used = 0;
    for (size_t i = 0; i < n; i++) {
        if (i % 7 == 3)
            x[i] = NAN;
        else if (i % 11 == 5)
            y[i] = i % 2 ? INFINITY : NAN;
        else {
            cx[m] = x[i];
            cy[m++] = y[i];
        }
    }
    CHECK(slowscan_kendall_tau_b(ws, x, y, n, &tau, &used) == SLOWSCAN_OK, "NaN run");
    CHECK(used == m, "used %zu, want %zu finite pairs", used, m);
    CHECK(slowscan_kendall_tau_b(ws, cx, cy, m, &want, NULL) == SLOWSCAN_OK, "compacted run");
    CHECK(tau == want, "with NaN %.17g vs compacted %.17g", tau, want);
    CHECK_CLOSE(tau, tau_direct(cx, cy, m), 1e-13, 1e-14, "NaN skipping vs O(n^2) count");
    check_rng_free(rng);
}

static void test_errors(kendall_workspace *ws)
{
    double x[6] = {1, 2, 3, 4, 5, 6}, c[6] = {2, 2, 2, 2, 2, 2}, tau = 0;
    double nan6[6] = {NAN, NAN, NAN, NAN, NAN, 1};
    size_t used = 99;
    CHECK(slowscan_kendall_tau_b(ws, x, c, 6, &tau, &used) == SLOWSCAN_ECONST && isnan(tau) && used == 6,
          "constant y: ECONST, NaN");
    CHECK(slowscan_kendall_tau_b(ws, c, x, 6, &tau, NULL) == SLOWSCAN_ECONST && isnan(tau),
          "constant x: ECONST, NaN");
    CHECK(slowscan_kendall_tau_b(ws, x, nan6, 6, &tau, &used) == SLOWSCAN_ESHORT && isnan(tau) &&
              used == 1, "one finite pair: ESHORT");
    CHECK(slowscan_kendall_tau_b(ws, x, x, 1, &tau, NULL) == SLOWSCAN_ESHORT, "n = 1: ESHORT");
    CHECK(slowscan_kendall_tau_b(ws, x, x, 0, &tau, NULL) == SLOWSCAN_ESHORT, "n = 0: ESHORT");
    kendall_workspace *small = slowscan_kendall_alloc(4);
    CHECK(small != NULL, "slowscan_kendall_alloc(4)");
    CHECK(slowscan_kendall_tau_b(small, x, x, 6, &tau, NULL) == SLOWSCAN_EINVAL && isnan(tau),
          "n > nmax: EINVAL");
    CHECK(slowscan_kendall_tau_b(small, x, x, 4, &tau, NULL) == SLOWSCAN_OK && tau == 1.0, "n = nmax");
    slowscan_kendall_free(small);
    slowscan_kendall_free(NULL);
    CHECK(slowscan_kendall_tau_b(NULL, x, x, 4, &tau, NULL) == SLOWSCAN_EINVAL, "no workspace");
}

void suite_kendall(void)
{
    kendall_workspace *ws = slowscan_kendall_alloc(5000);
    CHECK(ws != NULL, "slowscan_kendall_alloc(5000)");
    if (!ws)
        return;
    test_hand(ws);
    test_against_scipy(ws);
    test_against_direct(ws);
    test_nan_skipping(ws);
    test_errors(ws);
    slowscan_kendall_free(ws);
}
