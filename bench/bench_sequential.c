/* Benchmark of --surrogates auto (sequential Monte Carlo tests under BH) against a fixed
 * number of surrogates M = 10^4 taken as the reference.
 *
 * Data: S series (default 10^4; `bench_sequential S B E K` for fewer, B the budget per
 * series, default 1000; E, --risk, default 0.01; K, --max-per-series, default 10^4, the
 * reference's M) of 500 samples; every 100th
 * is AR(1) with its coefficient rising linearly from 0.2 to 0.9, the rest AR(1) with a
 * stationary coefficient 0.5 (GSL mt19937, seed 16). Default indicators (variance, lag1) and
 * recovery_trend: 3 tests per series.
 *
 * 1. `slowscan screen --surrogates auto --budget B --max-per-series K --threads 2` (B = 1000
 *    per series, a tenth of the reference's 10^4), timed. K = M = 10^4 by default: a test
 *    auto carries to K is then the reference's own test (same draws, same p), so the bench
 *    asks whether auto makes the reference's decisions with less work, rather than whether
 *    two Monte Carlo runs of different sizes agree (near BH's threshold they cannot: a test
 *    at p = 2e-4 is a discovery of an M = 10^4 run 41% of the time, bench/tools/
 *    sequential_sim.c). K = 100000 (the command's default) measures the latter.
 * 2. The reference, M = 10^4 for every series, would be 10^8 draws (about 1.5 hours on two
 *    cores here); it is made only for the series that could hold one of its discoveries.
 *    Replicate j is the same draw in both runs, and a test's auto counts (S hits of n) put its
 *    Monte Carlo p above L, the Clopper-Pearson lower limit at level 1e-6. The candidates C
 *    are the fixed point of C -> {tests with L <= q |C| / m}, from all tests (BH rejects at most
 *    |C| tests, each with p <= q |C| / m); the series holding a candidate are screened at
 *    --surrogates 10000 (same names: the same streams and p as in one run over all series),
 *    the other tests enter BH with p = 1. This is a probabilistic shortcut, not an identity:
 *    a test left out could be a reference discovery only if its true p were below L, a chance
 *    of 1e-6 each (and its p at M = 10^4 would then also have to fall below q |C| / m).
 * Prints: discoveries of each, the share of the reference's recovered (target >= 95%),
 * extra ones (target <= 5%), total surrogates of each and their ratio (target >= 10x),
 * auto's time and surrogates per series, undecided tests. Exits 1 when a target is missed. */
#define _POSIX_C_SOURCE 200809L
#include "slowscan/sequential.h"
#include "slowscan/significance.h"

#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <unistd.h>

enum { N = 500, TESTS = 3, REFERENCE = 10000 };
static char dir[] = "/tmp/bench_sequential.XXXXXX";
static const char *made[6];
static size_t nmade;

static const char *scratch(const char *name)
{
    static char paths[6][256];
    snprintf(paths[nmade], sizeof paths[nmade], "%s/%s", dir, name);
    made[nmade] = paths[nmade];
    return paths[nmade++];
}

static void cleanup(void)
{
    for (size_t k = 0; k < nmade; k++)
        unlink(made[k]);
    rmdir(dir);
}

static double now(void)
{
    struct timespec t;
    clock_gettime(CLOCK_MONOTONIC, &t);
    return (double)t.tv_sec + 1e-9 * (double)t.tv_nsec;
}

/* x[k * N + i]: series k, sample i. */
static void simulate(size_t series, double *x)
{
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    gsl_rng_set(r, 16);
    for (size_t k = 0; k < series; k++) {
        double v = 0;
        for (size_t i = 0; i < N + 100; i++) { /* 100 samples of spin-up */
            double a = k % 100 == 0 ? 0.2 + 0.7 * (double)(i < 100 ? 0 : i - 100) / (N - 1) : 0.5;
            v = a * v + gsl_ran_gaussian(r, 1.0);
            if (i >= 100)
                x[k * N + i - 100] = v;
        }
    }
    gsl_rng_free(r);
}

/* The CSV of the series with keep[k] (NULL: all). */
static int write_csv(const char *path, size_t series, const double *x, const int *keep)
{
    FILE *f = fopen(path, "w");
    if (!f)
        return -1;
    fputs("t", f);
    for (size_t k = 0; k < series; k++)
        if (!keep || keep[k])
            fprintf(f, ",s%05zu", k);
    fputc('\n', f);
    for (size_t i = 0; i < N; i++) {
        fprintf(f, "%zu", i);
        for (size_t k = 0; k < series; k++)
            if (!keep || keep[k])
                fprintf(f, ",%.6g", x[k * N + i]);
        fputc('\n', f);
    }
    return fclose(f);
}

typedef struct {
    double p;
    long surrogates;
    int rejected, undecided;
} row;

/* Reads the summary: series sNNNNN, test order as written (TESTS per series). */
static size_t read_summary(const char *path, row *rows, size_t series, int with_flag_cols)
{
    FILE *f = fopen(path, "r");
    char line[1024];
    size_t count = 0;
    if (!f || !fgets(line, sizeof line, f))
        return 0;
    while (fgets(line, sizeof line, f)) {
        size_t k;
        char test[64], flag[32];
        double p;
        long m;
        if (sscanf(line, "s%zu,%63[^,],%*[^,],%*[^,],%*[^,],%*[^,],%*[^,],%lf,%*[^,],%*[^,],%ld,"
                         "%31[^,\n]", &k, test, &p, &m, flag) != 5 || k >= series)
            continue;
        size_t j = strcmp(test, "variance") == 0 ? 0 : strcmp(test, "lag1") == 0 ? 1 : 2;
        rows[k * TESTS + j] = (row){p, m, strcmp(flag, "rising") == 0 || strcmp(flag, "falling") == 0,
                                    strcmp(flag, "undecided") == 0};
        count++;
    }
    (void)with_flag_cols;
    fclose(f);
    return count;
}

/* BH rejections (q <= fdr) of p[m] into out[m]; returns their count. */
static size_t bh(const double *p, size_t m, double fdr, int *out)
{
    double *q = malloc(m * sizeof *q);
    size_t r = 0;
    slowscan_significance_bh(p, m, q, NULL);
    for (size_t i = 0; i < m; i++)
        r += (size_t)(out[i] = q[i] <= fdr);
    free(q);
    return r;
}

static int run(const char *cmd, double *seconds)
{
    double t0 = now();
    int rc = system(cmd);
    *seconds = now() - t0;
    if (rc != 0)
        fprintf(stderr, "bench_sequential: failed: %s\n", cmd);
    return rc;
}

/* The auto run over `series` series of x into a[]: its time and surrogates. */
static unsigned long per_series_budget = 1000; /* `bench_sequential S B`: B per series */
static const char *risk = "0.01";               /* `bench_sequential S B E`: --risk E */
static unsigned long cap = 10000;               /* `bench_sequential S B E K`: K */

static int auto_run(const char *bin, const char *csv, const char *out, size_t series, row *a,
                    double *seconds, size_t *drawn)
{
    char cmd[2048];
    snprintf(cmd, sizeof cmd, "%s screen --surrogates auto --budget %lu --risk %s "
             "--max-per-series %lu --threads 2 --quiet %s -o %s", bin, per_series_budget * series,
             risk, cap, csv, out);
    if (run(cmd, seconds) != 0 || read_summary(out, a, series, 1) != series * TESTS)
        return -1;
    *drawn = 0;
    for (size_t k = 0; k < series; k++)
        *drawn += (size_t)a[k * TESTS].surrogates;
    return 0;
}

/* Hits of a test from its p and draws: p = (1 + S) / (1 + n). */
static size_t hits_of(const row *r)
{
    double s = isnan(r->p) ? 0 : round(r->p * ((double)r->surrogates + 1) - 1);
    return s > 0 ? (size_t)s : 0;
}

/* The candidates (fixed point, see above) into cand[m]; returns |C|. */
static size_t candidates(const row *a, size_t m, double fdr, int *cand)
{
    double *lower = malloc(m * sizeof *lower), hi;
    for (size_t i = 0; i < m; i++)
        slowscan_sequential_interval(hits_of(&a[i]), (size_t)a[i].surrogates, 2e-6, &lower[i], &hi);
    size_t size = m, before;
    do {
        before = size, size = 0;
        for (size_t i = 0; i < m; i++)
            size += (size_t)(cand[i] = lower[i] <= fdr * (double)before / (double)m);
    } while (size < before);
    free(lower);
    return size;
}

/* The cache of reference p-values: lines "k j p surrogates". */
static void load_cache(const char *path, size_t series, row *f, int *cached)
{
    FILE *fp = path ? fopen(path, "r") : NULL;
    size_t k, j;
    double p;
    long m;
    while (fp && fscanf(fp, "%zu %zu %lf %ld", &k, &j, &p, &m) == 4)
        if (k < series && j < TESTS) {
            f[k * TESTS + j] = (row){p, m, 0, 0};
            cached[k] = 1;
        }
    if (fp)
        fclose(fp);
}

static void save_cache(const char *path, size_t series, const row *f, const int *add)
{
    FILE *fp = path ? fopen(path, "a") : NULL;
    for (size_t k = 0; fp && k < series; k++)
        for (size_t j = 0; add[k] && j < TESTS; j++)
            fprintf(fp, "%zu %zu %.17g %ld\n", k, j, f[k * TESTS + j].p, f[k * TESTS + j].surrogates);
    if (fp)
        fclose(fp);
}

/* The reference p of the series with keep[k] into f[]: from BENCH_SEQUENTIAL_CACHE=FILE
 * (for trying the procedure by hand: the reference is deterministic) when it holds them,
 * else screened at M = REFERENCE (in *seconds; *fresh of them) and added to the cache. */
static int reference_p(const char *bin, const double *x, size_t series, const int *keep,
                       row *f, const char *sub, const char *out, double *seconds, size_t *fresh)
{
    const char *cache = getenv("BENCH_SEQUENTIAL_CACHE");
    size_t m = series * TESTS;
    int *cached = calloc(series, sizeof *cached), *need = calloc(series, sizeof *need), rc = 0;
    load_cache(cache, series, f, cached);
    *fresh = 0, *seconds = 0;
    for (size_t k = 0; k < series; k++)
        *fresh += (size_t)(need[k] = keep[k] && !cached[k]);
    if (*fresh > 0) {
        char cmd[2048];
        row *g = calloc(m, sizeof *g);
        snprintf(cmd, sizeof cmd, "%s screen --surrogates %d --threads 2 --quiet %s -o %s", bin,
                 REFERENCE, sub, out);
        rc = write_csv(sub, series, x, need) != 0 || run(cmd, seconds) != 0 ||
             read_summary(out, g, series, 0) != *fresh * TESTS;
        for (size_t i = 0; !rc && i < m; i++)
            if (need[i / TESTS])
                f[i] = g[i];
        if (!rc)
            save_cache(cache, series, f, need);
        free(g);
    }
    free(cached), free(need);
    return rc;
}

int main(int argc, char **argv)
{
    size_t series = argc > 1 ? strtoul(argv[1], NULL, 10) : 10000, m = series * TESTS;
    if (argc > 2)
        per_series_budget = strtoul(argv[2], NULL, 10);
    if (argc > 3)
        risk = argv[3];
    if (argc > 4)
        cap = strtoul(argv[4], NULL, 10);
    const char *bin = getenv("SLOWSCAN_BIN") ? getenv("SLOWSCAN_BIN") : "build/slowscan";
    if (!mkdtemp(dir))
        return 2;
    atexit(cleanup);
    double *x = malloc(series * N * sizeof *x);
    row *a = calloc(m, sizeof *a), *f = calloc(m, sizeof *f);
    int *keep = calloc(series, sizeof *keep), *ref = calloc(m, sizeof *ref);
    int *cand = calloc(m, sizeof *cand);
    double *p = malloc(m * sizeof *p);
    const char *all = scratch("all.csv"), *sub = scratch("subset.csv");
    const char *auto_out = scratch("auto.csv"), *ref_out = scratch("reference.csv");
    simulate(series, x);
    double t_auto, t_ref;
    size_t drawn;
    if (write_csv(all, series, x, NULL) != 0 || auto_run(bin, all, auto_out, series, a, &t_auto, &drawn) != 0)
        return 2;
    size_t c = candidates(a, m, 0.05, cand), subset = 0;
    for (size_t k = 0; k < series; k++) {
        for (size_t j = 0; j < TESTS; j++)
            keep[k] |= cand[k * TESTS + j];
        subset += (size_t)keep[k];
    }
    size_t fresh = 0;
    if (reference_p(bin, x, series, keep, f, sub, ref_out, &t_ref, &fresh) != 0)
        return 2;
    printf("  reference: %zu candidate series, %zu screened now, the others from "
           "BENCH_SEQUENTIAL_CACHE\n", subset, fresh);
    subset = fresh; /* the timing below is of those screened now */
    for (size_t i = 0; i < m; i++)
        p[i] = keep[i / TESTS] ? f[i].p : 1.0;
    size_t reference = bh(p, m, 0.05, ref), undecided = 0, found = 0, both = 0, extra = 0;
    for (size_t i = 0; i < m; i++) {
        undecided += (size_t)a[i].undecided;
        found += (size_t)a[i].rejected;
        both += (size_t)(a[i].rejected && ref[i]);
        extra += (size_t)(a[i].rejected && !ref[i]);
    }
    double recovered = reference ? (double)both / (double)reference : 1.0;
    double more = reference ? (double)extra / (double)reference : 0.0;
    double ratio = (double)REFERENCE * (double)series / (double)drawn;
    double per_series = subset ? t_ref / (double)subset : 0;
    printf("bench_sequential: %zu series x %d samples (%zu with rising memory), %zu tests, q 0.05\n",
           series, N, (series + 99) / 100, m);
    printf("  auto (--budget %lu, --risk %s, --max-per-series %lu, --threads 2): %.1f s, %zu "
           "surrogates (%.0f per series), %zu discoveries, %zu undecided\n",
           per_series_budget * series, risk, cap, t_auto, drawn,
           (double)drawn / (double)series, found, undecided);
    printf("  reference --surrogates %d: %zu discoveries; drawn for the %zu series holding the %zu "
           "candidate tests in %.1f s (%.2f s per series: about %.0f s for all %zu)\n", REFERENCE,
           reference, subset, c, t_ref, per_series, per_series * (double)series, series);
    printf("  recovered %.1f%% of the reference's discoveries (target >= 95%%), extra %.1f%% "
           "(target <= 5%%), surrogate work %.1fx less (target >= 10x), time about %.1fx less%s\n",
           100 * recovered, 100 * more, ratio, per_series * (double)series / t_auto,
           subset ? "" : " (not measured: every reference series from the cache)");
    int ok = recovered >= 0.95 && more <= 0.05 && ratio >= 10;
    printf("  %s\n", ok ? "PASS" : "FAIL");
    free(x), free(a), free(f), free(keep), free(ref), free(cand), free(p);
    return ok ? 0 : 1;
}
