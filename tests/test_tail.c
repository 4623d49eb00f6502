/* Suite tail: p below 1/(M+1) from a generalised Pareto fit to the surrogates' upper tail
 * (include/slowscan/tail.h) — the fit against scipy, the Anderson-Darling statistic by its
 * formula, its critical values by simulation, the estimate against exact tails, the
 * fallbacks, and `screen --tail gpd` (refusal, labels, size on null series). */
#include "check.h"
#include "slowscan/status.h"
#include "slowscan/tail.h"
#include "tail_size.h"

#include <gsl/gsl_cdf.h>
#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>
#include <gsl/gsl_sort.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* GPD draws by inversion of F(z) = 1 - (1 + xi z / sigma)^(-1/xi). */
static void draw_gpd(gsl_rng *r, double xi, double sigma, double *z, size_t n)
{
    for (size_t i = 0; i < n; i++) {
        double u = gsl_rng_uniform_pos(r);
        z[i] = xi == 0 ? -sigma * log(u) : sigma / xi * (pow(u, -xi) - 1);
    }
}

/* The exceedances over the threshold halfway below the nexc largest of x[m] (sorted here). */
static size_t top_exceedances(double *x, size_t m, size_t nexc, double *z)
{
    gsl_sort(x, 1, m);
    double t = 0.5 * (x[m - nexc] + x[m - nexc - 1]);
    for (size_t i = 0; i < nexc; i++)
        z[i] = x[m - nexc + i] - t;
    return nexc;
}

/* One fit against scipy: ML by scipy.stats.genpareto.fit(floc=0), tightened (the same
 * likelihood minimised by scipy.optimize.fmin to xtol 1e-12) and as scipy does it by
 * default (fmin's xtol 1e-4); A^2 by its formula with scipy's cdf; the survival function. */
static void fit_against_scipy(const char *what, double *z, size_t n)
{
    double xi = NAN, sigma = NAN, ref[8];
    CHECK(slowscan_tail_gpd_fit(z, n, &xi, &sigma) == SLOWSCAN_OK, "%s: fit runs", what);
    gsl_sort(z, 1, n);
    char extra[160];
    snprintf(extra, sizeof extra, "%.17g %.17g 0.5 3 40", xi, sigma);
    if (check_python_on("gpd_scipy.py", z, n, extra, ref, 8) != 8) {
        CHECK(0, "%s: scipy reference ran", what);
        return;
    }
    /* scipy.stats.genpareto.fit, tight: measured agreement ~1e-9 relative */
    CHECK_CLOSE(xi, ref[2], 1e-6, 1e-8, "xi vs scipy (tight)");
    CHECK_CLOSE(sigma, ref[3], 1e-6, 1e-10, "sigma vs scipy (tight)");
    /* scipy's default fit stops at fmin's xtol = 1e-4 */
    CHECK_CLOSE(xi, ref[0], 2e-3, 1e-3, "xi vs scipy (default)");
    CHECK_CLOSE(sigma, ref[1], 2e-3, 1e-4, "sigma vs scipy (default)");
    printf("  %s: n %zu xi %.6f sigma %.6f; |rel diff| vs scipy tight %.1e %.1e, default "
           "%.1e %.1e\n", what, n, xi, sigma, fabs(xi / ref[2] - 1), fabs(sigma / ref[3] - 1),
           fabs(xi / ref[0] - 1), fabs(sigma / ref[1] - 1));
    /* Anderson & Darling 1954, by the formula in tests/reference/gpd_scipy.py */
    CHECK_CLOSE(slowscan_tail_anderson_darling(z, n, xi, sigma), ref[4], 1e-10, 1e-12,
                "A^2 vs the formula with scipy's cdf");
    const double x[3] = {0.5, 3, 40};
    for (int k = 0; k < 3; k++) /* scipy.stats.genpareto.sf */
        CHECK_CLOSE(slowscan_tail_gpd_sf(x[k], xi, sigma), ref[5 + k], 1e-11, 1e-300,
                    "survival function vs scipy");
}

static void check_fit(void)
{
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    double z[250], *x = malloc(10000 * sizeof *x);
    gsl_rng_set(r, 11);
    draw_gpd(r, -0.2, 1.0, z, 250);
    fit_against_scipy("GPD(-0.2, 1), 250 draws", z, 250);
    draw_gpd(r, 0.3, 2.0, z, 150);
    fit_against_scipy("GPD(0.3, 2), 150 draws", z, 150);
    for (size_t j = 0; j < 10000; j++)
        x[j] = gsl_ran_gaussian(r, 1.0);
    top_exceedances(x, 10000, 250, z);
    fit_against_scipy("normal, 250 largest of 10^4", z, 250);
    /* refusals of the fit */
    double xi, sigma, bad[3] = {1, 1, 1};
    CHECK(slowscan_tail_gpd_fit(bad, 3, &xi, &sigma) == SLOWSCAN_ECONST, "equal exceedances");
    bad[1] = -1;
    CHECK(slowscan_tail_gpd_fit(bad, 3, &xi, &sigma) == SLOWSCAN_EINVAL, "a negative exceedance");
    CHECK(slowscan_tail_gpd_fit(bad, 1, &xi, &sigma) == SLOWSCAN_EINVAL, "one exceedance");
    free(x);
    gsl_rng_free(r);
}

/* The 0.05 critical value of Choulakian & Stephens' Table 2 (case 3), checked by simulation:
 * GPD samples of 100 fitted by ML, A^2 above the interpolated critical value about 5% of the
 * time. Bounds: the counts with binomial(400, 0.05) probability 0.001 beyond each. (With the
 * table's rows read by the opposite sign of the shape, 30 and 8 of 400 were rejected.) */
static void check_ad_table(void)
{
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    const double shapes[2] = {-0.2, 0.2};
    unsigned lo = 0, hi = 0;
    while (gsl_cdf_binomial_P(lo + 1, 0.05, 400) < 0.001)
        lo++;
    while (gsl_cdf_binomial_Q(hi, 0.05, 400) > 0.001)
        hi++;
    for (int s = 0; s < 2; s++) {
        gsl_rng_set(r, 100 + (unsigned long)s);
        unsigned rejected = 0;
        double z[100], xi, sigma;
        for (int rep = 0; rep < 400; rep++) {
            draw_gpd(r, shapes[s], 1.0, z, 100);
            gsl_sort(z, 1, 100);
            if (slowscan_tail_gpd_fit(z, 100, &xi, &sigma) != SLOWSCAN_OK)
                continue;
            rejected += slowscan_tail_anderson_darling(z, 100, xi, sigma) >
                        slowscan_tail_ad_critical(xi, 0.05);
        }
        CHECK(rejected >= lo && rejected <= hi, "A^2 > critical(0.05) for %u of 400 GPD(%g) "
              "samples, want %u to %u", rejected, shapes[s], lo, hi);
        printf("  AD test of GPD(%g) samples of 100: rejected %u of 400 at 0.05\n", shapes[s],
               rejected);
    }
    /* the table itself: xi = 0 row, 0.05 column (Choulakian & Stephens 2001, Table 2) */
    CHECK_CLOSE(slowscan_tail_ad_critical(0.0, 0.05), 0.974, 1e-12, 0, "table: xi 0, 0.05");
    CHECK_CLOSE(slowscan_tail_ad_p(0.0, 0.974), 0.05, 1e-12, 0, "table: p of its own value");
    CHECK(slowscan_tail_ad_p(0.0, 0.1) == 0.5 && slowscan_tail_ad_p(0.0, 9) == 0.001,
          "p clamped to [0.001, 0.5]");
    gsl_rng_free(r);
}

static double normal_draw(gsl_rng *r) { return gsl_ran_gaussian(r, 1.0); }
static double t5_draw(gsl_rng *r) { return gsl_ran_tdist(r, 5.0); }
static double normal_q(double x) { return gsl_cdf_ugaussian_Q(x); }
static double t5_q(double x) { return gsl_cdf_tdist_Q(x, 5.0); }

static int by_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

/* The p used against GSL's exact tail P(X > x) = 1e-5, from M = 10^4 draws (a decade beyond
 * 1/M): the median ratio over 40 replicates, and p_point <= p_upper <= p < 1/(M+1) (and
 * p_predictive <= p) wherever the estimate is used. The point estimate was measured (400
 * replicates) at a median ratio of 0.47 (normal) and 0.52 (Student t, 5 df), the fit at 250
 * exceedances seeing a tail lighter than the asymptotic one; the p used is an upper limit,
 * measured by make validate (150 sets) at a median of 8.9 (normal; used in 46 of 150 sets,
 * where it fell below 1/(M+1)) and 3.6 (Student t; 127 of 150). [1, 15] holds the median
 * of 40 well away from both, and fails if p falls back to the point estimate. */
static void check_exact_tail(const char *what, double (*draw)(gsl_rng *), double (*q)(double),
                             double x)
{
    enum { M = 10000, R = 40 };
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    double *v = malloc(M * sizeof *v), ratio[R], point[R];
    tail_options o = slowscan_tail_options_default();
    o.method = TAIL_GPD;
    size_t used = 0, ordered = 0;
    for (int rep = 0; rep < R; rep++) {
        gsl_rng_set(r, 1000 + (unsigned long)rep);
        for (size_t j = 0; j < M; j++)
            v[j] = draw(r);
        tail_result t;
        CHECK(slowscan_tail_estimate(&o, v, M, x, 1.0 / (M + 1), &t) == SLOWSCAN_OK, "runs");
        if (!t.used)
            continue;
        ordered += t.p_point <= t.p_upper && t.p_upper <= t.p && t.p_predictive <= t.p &&
                   t.p < t.p_surrogates;
        point[used] = t.p_point / q(x);
        ratio[used++] = t.p / q(x);
    }
    qsort(ratio, used, sizeof *ratio, by_double);
    qsort(point, used, sizeof *point, by_double);
    double median = used ? ratio[used / 2] : NAN;
    CHECK(used >= R / 8, "%s: estimate used in %zu of %d replicates", what, used, R);
    CHECK(ordered == used, "%s: p_point <= p_upper <= p < 1/(M+1) in %zu of %zu", what,
          ordered, used);
    CHECK(median > 1 && median < 15, "%s: median p / exact %.3f", what, median);
    printf("  %s: P(X > %.3f) = 1e-5; p/exact median %.2f (point estimate %.2f; %zu of %d "
           "used)\n", what, x, median, used ? point[used / 2] : NAN, used, R);
    free(v);
    gsl_rng_free(r);
}

/* The size of "p < alpha" given the surrogates, exactly (tests/tail_size.c), averaged over
 * sets of surrogates: a small run of what make validate measures with 200 sets per null. */
enum { SIZE_SETS = 16 };
static void check_size(void)
{
    const double alpha[3] = {1e-4, 1e-5, 1e-6};
    tail_size_result s;
    tail_size_run(TAIL_NULL_T5, 1000, SIZE_SETS, 7000, alpha, 0, 1, &s);
    /* Student t (5 df), M = 1000. make validate: the point estimate gave 3.1, 11 and 51 times
     * alpha here (100 sets), the p used 0.28, 0.50 and 0 (150 sets). Bound: size / alpha not above 1
     * beyond its interval, at every alpha; a return to the point estimate fails it. */
    for (int a = 0; a < 3; a++)
        CHECK(s.lo[a] <= 1.0, "size / alpha at M 1000, alpha %g: %.2f [%.2f, %.2f]", alpha[a],
              s.size[a], s.lo[a], s.hi[a]);
    printf("  size of p < alpha on Student t nulls, M 1000, %d sets: %.2f [%.2f, %.2f], %.2f "
           "[%.2f, %.2f], %.2f [%.2f, %.2f] at 1e-4, 1e-5, 1e-6 (%.1f ms per estimate)\n",
           SIZE_SETS, s.size[0], s.lo[0], s.hi[0], s.size[1], s.lo[1], s.hi[1], s.size[2],
           s.lo[2], s.hi[2], s.ms_per_estimate);
}

/* The estimate falls back to the ordinary p, with its reason. */
static void check_fallbacks(void)
{
    enum { M = 1000 };
    tail_options o = slowscan_tail_options_default();
    o.method = TAIL_GPD;
    double v[M], p0 = 1.0 / (M + 1);
    tail_result t;
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    gsl_rng_set(r, 3);
    for (size_t j = 0; j < M; j++)
        v[j] = gsl_ran_gaussian(r, 1.0);
    slowscan_tail_estimate(&o, v, M, 0.5, 0.3, &t);
    CHECK(t.reason == TAIL_NOT_NEEDED && t.p == 0.3 && !t.used, "a surrogate beyond: not needed");
    v[0] = NAN; /* 999 finite: fewer than 100 exceedances at a tenth */
    slowscan_tail_estimate(&o, v, M, 10, p0, &t);
    CHECK(t.reason == TAIL_FEW_SURROGATES && t.p == p0 && t.surrogates == M - 1,
          "999 finite surrogates: %s", slowscan_tail_reason_name(t.reason));
    for (size_t j = 0; j < M; j++) /* the top tenth all tied: no fit */
        v[j] = j < 900 ? (double)j / 900 : 2.0;
    slowscan_tail_estimate(&o, v, M, 10, p0, &t);
    CHECK(t.reason == TAIL_NO_FIT && t.p == p0, "tied tail: %s",
          slowscan_tail_reason_name(t.reason));
    for (size_t j = 0; j < M; j++) /* a tail of two clumps, 60 close above 1, 40 at 3-4 */
        v[j] = j < 900 ? gsl_rng_uniform(r)
                       : 1 + (j < 960 ? 0.02 * gsl_rng_uniform(r) : 2 + gsl_rng_uniform(r));
    slowscan_tail_estimate(&o, v, M, 10, p0, &t);
    CHECK(t.reason == TAIL_POOR_FIT && t.p == p0 && t.ad > t.ad_critical,
          "two clumps: %s (A^2 %.2f)", slowscan_tail_reason_name(t.reason), t.ad);
    double *w = malloc(10000 * sizeof *w);
    for (size_t j = 0; j < 10000; j++) /* density 2(1 - x) on [0, 1]: xi = -1/2, ends at 1 */
        w[j] = 1 - sqrt(gsl_rng_uniform_pos(r));
    slowscan_tail_estimate(&o, w, 10000, 1.5, 1.0 / 10001, &t);
    /* beyond every end point of the region the point estimate and the GPD limit are 0; the
     * exponential floor still gives a p (an unbounded tail is not ruled out) */
    CHECK(t.xi < 0 && t.p_point == 0 && t.p_upper == 0 &&
          t.p == fmax(t.p_exponential, 1.0 / 10001 * 1e-2) && t.p < 1.0 / 10001 &&
          t.reason == TAIL_USED,
          "beyond the fitted end: %s, p %g (xi %.3f)", slowscan_tail_reason_name(t.reason),
          t.p, t.xi);
    double largest = -INFINITY; /* just beyond the largest: the limit reaches the floor */
    for (size_t j = 0; j < M; j++)
        largest = fmax(largest, v[j] = gsl_ran_gaussian(r, 1.0));
    slowscan_tail_estimate(&o, v, M, largest + 1e-9, p0, &t);
    CHECK(t.reason == TAIL_NOT_BELOW_FLOOR && t.p == p0 && !t.used && t.p_upper == p0,
          "just beyond the largest: %s (point estimate %g)", slowscan_tail_reason_name(t.reason),
          t.p_point);
    memcpy(w, v, M * sizeof *v); /* far beyond: p stops two decades below the floor */
    slowscan_tail_estimate(&o, w, M, largest + 40, p0, &t);
    CHECK(t.used && t.p == p0 * 1e-2 && t.p_upper < t.p,
          "far beyond: p %g, two decades below %g (upper limit %g)", t.p, p0, t.p_upper);
    o.min_exceedances = 1;
    CHECK(slowscan_tail_estimate(&o, w, 10000, 1.5, 0.1, &t) == SLOWSCAN_EINVAL,
          "options out of their domain");
    free(w);
    gsl_rng_free(r);
}

/* An AR(1) whose memory rises from 0.1 to 0.97 (series 0), and stationary AR(1) at 0.5. */
static double rising_ar1(check_rng *r, size_t k, size_t i, size_t n, double *state)
{
    double a = k == 0 ? 0.1 + 0.87 * (double)i / (double)(n - 1) : 0.5;
    return *state = a * *state + check_rng_gaussian(r);
}

/* Field 8 (p_value) of each row of two summaries agrees wherever the second's p came from the
 * surrogates (its last field). */
static int same_ordinary_p(const char *plain, const char *tail)
{
    const char *a = strchr(plain, '\n'), *b = strchr(tail, '\n');
    for (; a && b && a[1] && b[1]; a = strchr(a + 1, '\n'), b = strchr(b + 1, '\n')) {
        const char *fa = a + 1, *fb = b + 1, *end = strchr(b + 1, '\n');
        for (int c = 0; c < 7; c++)
            fa = strchr(fa, ',') + 1, fb = strchr(fb, ',') + 1;
        if (end && end - 10 > b && strncmp(end - 10, "surrogates", 10) == 0 &&
            strtod(fa, NULL) != strtod(fb, NULL))
            return 0;
    }
    return a && b;
}

/* --tail's outputs are the same at any thread count and through the spill file, and its
 * figures label the estimate. */
static void check_cli_same(const char *csv, const char *out)
{
    char cmd[2048], *one = NULL, *three = NULL, *spilled = NULL;
    const char *figures = check_tmp_path("tail_figures");
    snprintf(cmd, sizeof cmd, "%s screen --surrogates 1000 --tail gpd --threads 1 %s",
             check_binary(), csv);
    check_run(cmd, &one, NULL);
    snprintf(cmd, sizeof cmd, "SLOWSCAN_SPILL_AFTER=0 %s screen --surrogates 1000 --tail gpd "
             "--threads 3 %s", check_binary(), csv);
    check_run(cmd, &three, NULL);
    snprintf(cmd, sizeof cmd, "SLOWSCAN_FIGURE_BOXES=1 %s screen --surrogates 1000 --tail gpd "
             "--figures %s -o %s %s", check_binary(), figures, out, csv);
    CHECK(check_run(cmd, NULL, NULL) == 0, "--tail with --figures runs");
    snprintf(cmd, sizeof cmd, "%s/screen-s0.png.boxes", figures);
    spilled = check_read_file(cmd);
    CHECK(one && three && strcmp(one, three) == 0, "--threads 1 and 3 (spilled) agree");
    CHECK(spilled && strstr(spilled, "flagged: rising (tail p)"), "the figure labels the estimate");
    free(one), free(three), free(spilled);
}

/* An AR(1) whose memory falls from 0.97 to 0.1. */
static double falling_ar1(check_rng *r, size_t k, size_t i, size_t n, double *state)
{
    (void)k;
    return *state = (0.97 - 0.87 * (double)i / (double)(n - 1)) * *state + check_rng_gaussian(r);
}

/* The p of recovery_trend in screen's summary under --alternative ALT, NAN when its p did
 * not come from the tail estimate. */
static double tail_p_of(const char *csv, const char *alternative)
{
    char cmd[2048], *o = NULL;
    snprintf(cmd, sizeof cmd, "%s screen --surrogates 1000 --tail gpd --alternative %s "
             "--indicators recovery_trend %s", check_binary(), alternative, csv);
    double p = NAN;
    char *row = check_run(cmd, &o, NULL) == 0 && o ? strstr(o, "recovery_trend,") : NULL;
    if (row && strstr(row, ",falling,tail_estimate")) {
        for (int c = 0; c < 6; c++)
            row = strchr(row, ',') + 1;
        p = strtod(row, NULL);
    }
    free(o);
    return p;
}

/* The null turned toward the alternative: a falling memory's drift t far below its null is
 * estimated under "decreasing" and "two-sided", never under "increasing" (where its p is
 * near 1). The two estimates are of different tails (of -t, and of |t| whose threshold lies
 * lower on each side) and need not keep the order of exact p-values: here 6.5e-5 one-sided
 * and 9.4e-7 two-sided, the spread of extrapolating from 100 exceedances (see
 * check_exact_tail). */
static void check_directions(void)
{
    const char *csv = check_tmp_path("tail_falling.csv");
    check_write_series_csv(csv, 1, 500, falling_ar1, 5);
    double down = tail_p_of(csv, "decreasing"), both = tail_p_of(csv, "two-sided");
    CHECK(down < 1.0 / 1001 && both < 1.0 / 1001, "falling: tail estimates %g and %g", down,
          both);
    CHECK(isnan(tail_p_of(csv, "increasing")), "no estimate against the other side");
    printf("  falling memory, recovery_trend: tail p %.3g decreasing, %.3g two-sided\n", down,
           both);
}

/* --maps: the p maps' long_name says p may be a tail estimate (python3-netcdf4), and the
 * maps agree with the summary (tests/reference/netcdf_maps.py). */
static void check_maps(void)
{
    const char *maps = check_tmp_path("tail_maps.nc"), *out = check_tmp_path("tail_maps.csv");
    char cmd[2048];
    double ref[8];
    snprintf(cmd, sizeof cmd, "%s screen --deseason 12 --indicators variance --surrogates 1000 "
             "--tail gpd --quiet --maps %s -o %s data/shelf.nc", check_binary(), maps, out);
    CHECK(check_run(cmd, NULL, NULL) == 0, "--tail with --maps runs");
    snprintf(cmd, sizeof cmd, "maps_long_names.py '%s' 'generalised Pareto'", maps);
    CHECK(check_python(cmd, ref, 2) == 2 && ref[0] == 1 && ref[1] == 1,
          "the p map says it may hold tail estimates");
    snprintf(cmd, sizeof cmd, "netcdf_maps.py '%s' '%s'", maps, out);
    CHECK(check_python(cmd, ref, 8) >= 4 && ref[0] > 0 && ref[1] == 0, "maps match the summary");
}

static void check_cli(void)
{
    const char *csv = check_tmp_path("tail.csv"), *out = check_tmp_path("tail_out.csv");
    const char *json = check_tmp_path("tail.json");
    check_write_series_csv(csv, 2, 500, rising_ar1, 7);
    char cmd[2048], *o = NULL, *e = NULL;
    snprintf(cmd, sizeof cmd, "%s screen --surrogates 500 --tail gpd -o %s %s", check_binary(),
             out, csv);
    int rc = check_run(cmd, &o, &e);
    CHECK(rc == 1 && e && strstr(e, "--tail gpd") && strstr(e, "--surrogates 1000") &&
          !strchr(strchr(e, '\n') + 1, '\n'), "too few surrogates refused: %s", e ? e : "");
    CHECK(!check_file_exists(out), "no output left by the refusal");
    free(o), free(e);
    snprintf(cmd, sizeof cmd, "%s screen --surrogates auto --tail gpd -o %s %s", check_binary(),
             out, csv);
    rc = check_run(cmd, NULL, &e);
    CHECK(rc == 1 && e && strstr(e, "--tail gpd") && strstr(e, "--surrogates auto"),
          "--tail with --surrogates auto refused: %s", e ? e : "");
    free(e);
    snprintf(cmd, sizeof cmd, "%s screen --tail pareto %s", check_binary(), csv);
    rc = check_run(cmd, NULL, &e);
    CHECK(rc == 1 && e && strstr(e, "--tail") && strstr(e, "pareto"), "unknown method: %s", e);
    free(e);
    snprintf(cmd, sizeof cmd, "%s screen --surrogates 1000 --tail gpd --json %s -o %s %s",
             check_binary(), json, out, csv);
    CHECK(check_run(cmd, NULL, NULL) == 0, "screen --tail gpd runs");
    char *summary = check_read_file(out), *js = check_read_file(json);
    CHECK(summary && strstr(summary, ",flag,p_source\n"), "summary header has p_source");
    CHECK(summary && strstr(summary, ",tail_estimate\n") && strstr(summary, ",surrogates\n"),
          "rows say where their p came from");
    CHECK(js && strstr(js, "\"p_source\": \"tail_estimate\"") && strstr(js, "\"xi\": ") &&
          strstr(js, "\"anderson_darling_critical\": ") && strstr(js, "\"method\": \"gpd\""),
          "JSON has the fit of each test");
    free(summary), free(js);
    /* the JSON read by Python's json module, its p and q those of the summary */
    double ref[4];
    snprintf(cmd, sizeof cmd, "json_matches_csv.py '%s' '%s'", json, out);
    CHECK(check_python(cmd, ref, 4) == 4 && ref[0] == 6 && ref[1] == 1, "JSON matches CSV");
    snprintf(cmd, sizeof cmd, "%s screen --surrogates 1000 --tail gpd --format table %s",
             check_binary(), csv);
    CHECK(check_run(cmd, &o, NULL) == 0 && o && strstr(o, " p_source\n") &&
          strstr(o, "tail_estimate"), "the table labels the estimate");
    free(o);
    snprintf(cmd, sizeof cmd, "%s screen --surrogates 1000 %s", check_binary(), csv);
    CHECK(check_run(cmd, &o, NULL) == 0 && o && !strstr(o, "p_source") &&
          !strstr(o, "tail_estimate"), "no p_source without --tail");
    summary = check_read_file(out);
    CHECK(o && summary && same_ordinary_p(o, summary), "p unchanged where no estimate is used");
    free(o), free(summary);
    check_cli_same(csv, out);
}

/* AR(1) nulls at 0.5, 200 samples (a red-noise record that does not slow down). */
static double null_ar1(check_rng *r, size_t k, size_t i, size_t n, double *state)
{
    (void)k, (void)i, (void)n;
    return *state = 0.5 * *state + check_rng_gaussian(r);
}

/* Size on null series through the binary: phase surrogates, M = 1000, the default tests.
 * p < 5e-4 is only reachable through the estimate; over S x 3 tests the count must stay
 * within what a test of exact size 5e-4 exceeds with probability 0.01 at most (Poisson
 * approximation of the binomial; S is small for make check, so this only catches gross
 * anti-conservatism). */
static void check_null_screen(void)
{
    enum { S = 200 };
    const char *csv = check_tmp_path("tail_null.csv"), *out = check_tmp_path("tail_null_out.csv");
    check_write_series_csv(csv, S, 200, null_ar1, 21);
    char cmd[2048];
    snprintf(cmd, sizeof cmd, "%s screen --surrogates 1000 --tail gpd --threads 2 -o %s %s",
             check_binary(), out, csv);
    CHECK(check_run(cmd, NULL, NULL) == 0, "screen of null series runs");
    char *summary = check_read_file(out);
    size_t tests = 0, below = 0, floor_hits = 0, estimates = 0;
    char *line = summary ? strchr(summary, '\n') : NULL;
    for (; line && line[1]; line = strchr(line + 1, '\n')) {
        char *f = line + 1;
        for (int c = 0; c < 7 && f; c++)
            f = strchr(f, ',') ? strchr(f, ',') + 1 : NULL;
        if (!f)
            break;
        double p = strtod(f, NULL);
        tests++;
        below += p < 5e-4;
        floor_hits += p <= 1.0 / 1001 + 1e-12;
        char *end = strchr(line + 1, '\n');
        estimates += end && end - 13 > line && strncmp(end - 13, "tail_estimate", 13) == 0;
    }
    unsigned c = 0;
    while (gsl_cdf_poisson_Q(c, (double)tests * 5e-4) > 0.01)
        c++;
    double lo, hi;
    check_wilson(below, tests, &lo, &hi);
    CHECK(tests == 3 * S, "rows of the null screen: %zu", tests);
    CHECK(below <= c, "p < 5e-4 in %zu of %zu null tests (bound %u)", below, tests, c);
    printf("  null screen: %zu tests, %zu at the floor 1/(M+1) or below, %zu estimates, "
           "%zu below 5e-4 (Wilson 95%% [%.2g, %.2g])\n", tests, floor_hits, estimates,
           below, lo, hi);
    free(summary);
}

void suite_tail(void)
{
    check_fit();
    check_ad_table();
    check_exact_tail("normal", normal_draw, normal_q, gsl_cdf_ugaussian_Qinv(1e-5));
    check_exact_tail("Student t 5 df", t5_draw, t5_q, gsl_cdf_tdist_Qinv(1e-5, 5.0));
    check_size();
    check_fallbacks();
    check_cli();
    check_maps();
    check_directions();
    check_null_screen();
}
