/* Tests of surrogates/: p-values, Benjamini-Hochberg q-values, stream seeds, phase surrogates. */
#include "../surrogates/mt_stream.h" /* module internal: the generator the null draws use */
#include "check.h"
#include "slowscan/significance.h"
#include "slowscan/status.h"
#include "slowscan/surrogates.h"

#include <fftw3.h>
#include <gsl/gsl_fit.h>
#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>
#include <gsl/gsl_statistics_double.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* p = (1 + #{tau_s >= tau_obs}) / (M + 1) on a constructed null (DESIGN §3; the "+1" form of
 * Davison & Hinkley 1997, Bootstrap Methods and their Application, eq. 4.11). */
static void test_p_value(void)
{
    double null[9] = {-0.4, -0.2, 0.0, 0.1, 0.2, 0.3, 0.5, NAN, 0.7};
    size_t used = 0;
    CHECK_CLOSE(slowscan_significance_p_value(0.3, null, 9, ALTERNATIVE_INCREASING, &used), 4.0 / 9.0,
                1e-15, 0, "one-sided: 3 of 8 at or above, (1+3)/(8+1)");
    CHECK(used == 8, "NaN null values are not counted (%zu)", used);
    CHECK_CLOSE(slowscan_significance_p_value(0.8, null, 9, ALTERNATIVE_INCREASING, NULL), 1.0 / 9.0, 1e-15,
                0, "beyond the null: the smallest p, 1/(M+1)");
    CHECK_CLOSE(slowscan_significance_p_value(-0.2, null, 9, ALTERNATIVE_DECREASING, NULL), 3.0 / 9.0,
                1e-15, 0, "decreasing: -0.4, -0.2 at or below");
    CHECK_CLOSE(slowscan_significance_p_value(-0.45, null, 9, ALTERNATIVE_TWO_SIDED, NULL), 3.0 / 9.0,
                1e-15, 0, "two-sided on |tau|: 0.5, 0.7 at or above 0.45");
    CHECK(isnan(slowscan_significance_p_value(NAN, null, 9, ALTERNATIVE_INCREASING, NULL)), "NaN observed");
}

/* The worked example of Benjamini & Hochberg (1995, J. R. Stat. Soc. B 57:289, section 3.2):
 * 15 p-values, at q = 0.05 the four smallest are rejected (values from memory, checked
 * against statsmodels below). */
static void test_benjamini_hochberg(void)
{
    double p[15] = {0.0001, 0.0004, 0.0019, 0.0095, 0.0201, 0.0278, 0.0298, 0.0344,
                    0.0459, 0.3240, 0.4262, 0.5719, 0.6528, 0.7590, 1.0000};
    double q[15];
    size_t order[15];
    CHECK(slowscan_significance_bh(p, 15, q, order) == SLOWSCAN_OK, "bh runs");
    int rejected = 0;
    for (int i = 0; i < 15; i++)
        rejected += q[i] <= 0.05;
    CHECK(rejected == 4 && q[3] <= 0.05 && q[4] > 0.05, "BH 1995 example: 4 rejected (%d)", rejected);
    /* statsmodels.stats.multitest.multipletests(method='fdr_bh') (Debian python3-statsmodels). */
    double want[15];
    CHECK(check_python_on("bh_statsmodels.py", p, 15, NULL, want, 15) == 15,
          "statsmodels reference ran");
    for (int i = 0; i < 15; i++)
        CHECK_CLOSE(q[i], want[i], 1e-12, 1e-15, "q vs statsmodels fdr_bh");
    /* NaN p-values stay out of the family: the others get the q of a family of 15. */
    double pn[16], qn[16];
    memcpy(pn, p, sizeof p);
    pn[15] = NAN;
    slowscan_significance_bh(pn, 16, qn, NULL);
    CHECK(isnan(qn[15]) && check_close(qn[7], q[7], 1e-15, 0), "NaN left out of the family");
}

static void test_stream_seeds(void)
{
    unsigned long a = slowscan_stream_seed(1, "north_bay", "phase", 0);
    CHECK(a == slowscan_stream_seed(1, "north_bay", "phase", 0), "seed is a function of its parts");
    CHECK(a != slowscan_stream_seed(2, "north_bay", "phase", 0) && a != slowscan_stream_seed(1, "north_ba", "yphase", 0) &&
              a != slowscan_stream_seed(1, "north_bay", "phase", 1) && a != slowscan_stream_seed(1, "north_bay", "ar1", 0),
          "different parts give different seeds");
}

/* Phase surrogates keep |FFT| exactly and the mean (Theiler et al. 1992, Physica D 58:77). */
static void check_spectrum_kept(size_t n)
{
    check_rng *r = check_rng_alloc(11 + n);
    double *x = fftw_alloc_real(n), *y = fftw_alloc_real(n);
    for (size_t i = 0; i < n; i++)
        x[i] = 0.7 * (i ? x[i - 1] : 0) + check_rng_gaussian(r) + 100.0;
    surrogate_plan *plan = slowscan_surrogate_plan_alloc(n, FFTW_ESTIMATE);
    int status;
    surrogate_source *src = slowscan_surrogate_source_alloc(plan, SURROGATE_PHASE, x, NULL, &status);
    CHECK(src && status == SLOWSCAN_OK, "phase source n=%zu", n);
    fftw_complex *fx = fftw_alloc_complex(n / 2 + 1), *fy = fftw_alloc_complex(n / 2 + 1);
    fftw_plan pf = fftw_plan_dft_r2c_1d((int)n, x, fx, FFTW_ESTIMATE | FFTW_PRESERVE_INPUT);
    fftw_execute(pf);
    gsl_rng *rng = gsl_rng_alloc(gsl_rng_mt19937);
    gsl_rng_set(rng, 5);
    double worst = 0, differs = 0, scale = hypot(fx[0][0], fx[0][1]);
    for (int rep = 0; rep < 20 && src; rep++) {
        slowscan_surrogate_draw(src, rng, y);
        fftw_execute_dft_r2c(pf, y, fy);
        for (size_t k = 0; k <= n / 2; k++)
            worst = fmax(worst, fabs(hypot(fy[k][0], fy[k][1]) - hypot(fx[k][0], fx[k][1])));
        for (size_t i = 0; i < n; i++)
            differs = fmax(differs, fabs(y[i] - x[i]));
    }
    CHECK(worst <= 1e-10 * scale, "n=%zu: |FFT| kept to %.3g of the DC term", n, worst / scale);
    CHECK(differs > 1.0, "n=%zu: surrogates differ from the series", n);
    gsl_rng_free(rng);
    fftw_destroy_plan(pf);
    fftw_free(fx);
    fftw_free(fy);
    fftw_free(x);
    fftw_free(y);
    slowscan_surrogate_source_free(src);
    slowscan_surrogate_plan_free(plan);
    check_rng_free(r);
}

static void test_phase_surrogates(void)
{
    check_spectrum_kept(2000);
    check_spectrum_kept(1001);
    /* Gaps come back as NaN at the same places; a constant series is refused. */
    double x[64], y[64];
    for (int i = 0; i < 64; i++)
        x[i] = sin(0.3 * i) + 0.1 * i;
    x[5] = x[40] = NAN;
    surrogate_plan *plan = slowscan_surrogate_plan_alloc(64, FFTW_ESTIMATE);
    int status;
    surrogate_source *src = slowscan_surrogate_source_alloc(plan, SURROGATE_PHASE, x, NULL, &status);
    gsl_rng *rng = gsl_rng_alloc(gsl_rng_mt19937);
    slowscan_surrogate_draw(src, rng, y); /* y is not fftw-aligned on purpose: the copy path */
    CHECK(isnan(y[5]) && isnan(y[40]) && isfinite(y[6]), "gaps restored");
    for (int i = 0; i < 64; i++)
        x[i] = 3.0;
    CHECK(!slowscan_surrogate_source_alloc(plan, SURROGATE_PHASE, x, NULL, &status) && status == SLOWSCAN_ECONST,
          "constant series refused");
    gsl_rng_free(rng);
    slowscan_surrogate_source_free(src);
    slowscan_surrogate_plan_free(plan);
}

static int by_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

/* A test series: AR(1) with phi = 0.6 and skewed (exponentiated) values, n = 1000. */
static void skewed_ar1(double *x, size_t n, unsigned long seed)
{
    check_rng *r = check_rng_alloc(seed);
    double v = 0;
    for (size_t i = 0; i < n; i++) {
        v = 0.6 * v + check_rng_gaussian(r);
        x[i] = exp(0.5 * v);
    }
    check_rng_free(r);
}

/* Relative spectral distance of y from x: sqrt(sum (|Y_k| - |X_k|)^2 / sum |X_k|^2). */
static double spectral_distance(const double *x, const double *y, size_t n)
{
    double *buf = fftw_alloc_real(n);
    fftw_complex *fx = fftw_alloc_complex(n / 2 + 1), *fy = fftw_alloc_complex(n / 2 + 1);
    fftw_plan p = fftw_plan_dft_r2c_1d((int)n, buf, fx, FFTW_ESTIMATE);
    memcpy(buf, x, n * sizeof *buf);
    fftw_execute_dft_r2c(p, buf, fx);
    memcpy(buf, y, n * sizeof *buf);
    fftw_execute_dft_r2c(p, buf, fy);
    double num = 0, den = 0;
    for (size_t k = 0; k <= n / 2; k++) {
        double d = hypot(fy[k][0], fy[k][1]) - hypot(fx[k][0], fx[k][1]);
        num += d * d;
        den += fx[k][0] * fx[k][0] + fx[k][1] * fx[k][1];
    }
    fftw_destroy_plan(p);
    fftw_free(buf);
    fftw_free(fx);
    fftw_free(fy);
    return sqrt(num / den);
}

/* aaft and iaaft keep the set of values exactly (Theiler et al. 1992; Schreiber & Schmitz
 * 1996, Phys. Rev. Lett. 77:635); iterating brings the periodogram closer to the data's than
 * one AAFT step does, and stops below the tolerance's improvement. */
static void test_amplitude_adjusted(void)
{
    enum { N = 1000 };
    double x[N], sx[N], *y = fftw_alloc_real(N), sy[N];
    skewed_ar1(x, N, 17);
    memcpy(sx, x, sizeof x);
    qsort(sx, N, sizeof *sx, by_double);
    surrogate_plan *plan = slowscan_surrogate_plan_alloc(N, FFTW_ESTIMATE);
    gsl_rng *rng = gsl_rng_alloc(gsl_rng_mt19937);
    double distance[2] = {0, 0};
    surrogate_kind kinds[2] = {SURROGATE_AAFT, SURROGATE_IAAFT};
    for (int k = 0; k < 2; k++) {
        int status;
        surrogate_source *src = slowscan_surrogate_source_alloc(plan, kinds[k], x, NULL, &status);
        int exact = 1, changed = 0;
        for (int rep = 0; src && rep < 10; rep++) {
            slowscan_surrogate_draw(src, rng, y);
            memcpy(sy, y, sizeof sy);
            qsort(sy, N, sizeof *sy, by_double);
            exact &= memcmp(sx, sy, sizeof sx) == 0;
            changed |= memcmp(x, y, sizeof x) != 0;
            distance[k] += spectral_distance(x, y, N) / 10;
        }
        CHECK(src && exact && changed, "%s: sorted values identical, series reordered",
              slowscan_surrogate_name(kinds[k]));
        if (kinds[k] == SURROGATE_IAAFT && src) {
            int it;
            double err;
            size_t unconverged;
            slowscan_surrogate_iaaft_report(src, &it, &err, &unconverged);
            CHECK(unconverged == 0 && it > 1 && check_close(err, spectral_distance(x, y, N), 1e-9, 1e-12),
                  "iaaft converged in %d iterations, reported error %.4g", it, err);
        }
        slowscan_surrogate_source_free(src);
    }
    CHECK(distance[1] < 0.5 * distance[0], "iaaft spectrum closer than aaft's: %.4f vs %.4f",
          distance[1], distance[0]);
    gsl_rng_free(rng);
    slowscan_surrogate_plan_free(plan);
    fftw_free(y);
}

/* ar1: replicates reproduce the fitted coefficient — the mean lag-1 autocorrelation of many
 * replicates equals it within sampling error (Box & Jenkins, Time Series Analysis: the lag-1
 * autocorrelation of an AR(1) is phi). */
static void test_ar1_null(void)
{
    enum { N = 2000, REPS = 200 };
    double x[N], y[N], fit_phi;
    check_rng *r = check_rng_alloc(23);
    double v = 0;
    for (size_t i = 0; i < N; i++)
        x[i] = 3.0 + (v = 0.6 * v + check_rng_gaussian(r));
    check_rng_free(r);
    double h[N - 1], t[N - 1], c0, cov00, cov01, cov11, ss;
    memcpy(h, x, sizeof h);
    memcpy(t, x + 1, sizeof t);
    gsl_fit_linear(h, 1, t, 1, N - 1, &c0, &fit_phi, &cov00, &cov01, &cov11, &ss);
    surrogate_plan *plan = slowscan_surrogate_plan_alloc(N, FFTW_ESTIMATE);
    int status;
    surrogate_source *src = slowscan_surrogate_source_alloc(plan, SURROGATE_AR1, x, NULL, &status);
    gsl_rng *rng = gsl_rng_alloc(gsl_rng_mt19937);
    double mean_lag1 = 0, mean_level = 0;
    for (int rep = 0; src && rep < REPS; rep++) {
        slowscan_surrogate_draw(src, rng, y);
        mean_lag1 += gsl_stats_lag1_autocorrelation(y, 1, N) / REPS;
        mean_level += gsl_stats_mean(y, 1, N) / REPS;
    }
    /* se of one lag-1 estimate ~ sqrt((1-phi^2)/n) = 0.018; of the mean of 200, 0.0013; the
     * estimator's bias -(1+3 phi)/n = -0.0014 is allowed for. */
    CHECK(src && fabs(mean_lag1 - fit_phi) < 0.0014 + 4 * 0.0013,
          "ar1 null: mean lag1 %.4f vs fitted %.4f", mean_lag1, fit_phi);
    CHECK(fabs(mean_level - gsl_stats_mean(x, 1, N)) < 0.1, "ar1 null keeps the level (%.3f)", mean_level);
    gsl_rng_free(rng);
    slowscan_surrogate_source_free(src);
    slowscan_surrogate_plan_free(plan);
}

/* block: every replicate is made of runs of L consecutive samples of the series (Kunsch
 * 1989, Ann. Statist. 17:1217: the moving-block bootstrap). */
static void test_block_null(void)
{
    enum { N = 125 };
    double x[N], y[N];
    for (size_t i = 0; i < N; i++)
        x[i] = sin(0.1 * (double)i) + 0.001 * (double)i * (double)i; /* all values distinct */
    surrogate_plan *plan = slowscan_surrogate_plan_alloc(N, FFTW_ESTIMATE);
    int status;
    surrogate_source *src = slowscan_surrogate_source_alloc(plan, SURROGATE_BLOCK, x, NULL, &status);
    gsl_rng *rng = gsl_rng_alloc(gsl_rng_mt19937);
    slowscan_surrogate_draw(src, rng, y);
    size_t L = 5, bad = 0; /* round(125^(1/3)) = 5 */
    for (size_t i = 0; i < N; i += L) {
        size_t from = 0;
        while (from < N && x[from] != y[i])
            from++;
        for (size_t k = 1; k < L && i + k < N; k++)
            bad += from + k >= N || x[from + k] != y[i + k];
    }
    CHECK(src && bad == 0, "block: runs of %zu consecutive samples (%zu mismatches)", L, bad);
    gsl_rng_free(rng);
    slowscan_surrogate_source_free(src);
    slowscan_surrogate_plan_free(plan);
}

/* The null draws' generator against GSL's gsl_rng_mt19937 (the reference: the same MT19937
 * with the 2002 seeding): the same words over several blocks of 624 for seeds that include
 * 0 (GSL's 4357), one whose low 32 bits are zero, and the largest; and the same uniforms and
 * Gaussians (GSL's own draws on top of it), interleaved with inline words. */
static void test_generator_matches_gsl(void)
{
    static const unsigned long seeds[] = {0, 1, 4357, 5489, 123456789, 4294967295UL,
                                          (unsigned long)-1, (unsigned long)-1 - 0xffffffffUL};
    gsl_rng *mine = gsl_rng_alloc(surrogate_mt19937), *gsl = gsl_rng_alloc(gsl_rng_mt19937);
    size_t bad = 0;
    for (size_t k = 0; mine && gsl && k < sizeof seeds / sizeof seeds[0]; k++) {
        gsl_rng_set(mine, seeds[k]);
        gsl_rng_set(gsl, seeds[k]);
        for (size_t i = 0; i < 2000; i++)
            bad += gsl_rng_get(mine) != gsl_rng_get(gsl);
        for (size_t i = 0; i < 700; i++) {
            bad += surrogate_mt_next(mine) != gsl_rng_get(gsl);
            bad += gsl_rng_uniform(mine) != gsl_rng_uniform(gsl);
            bad += gsl_ran_gaussian(mine, 2.0) != gsl_ran_gaussian(gsl, 2.0);
        }
    }
    CHECK(mine && gsl && bad == 0, "surrogate_mt19937 gives gsl_rng_mt19937's stream (%zu differ)",
          bad);
    CHECK(gsl_rng_max(mine) == gsl_rng_max(gsl) && gsl_rng_min(mine) == 0, "its range");
    gsl_rng_free(mine);
    gsl_rng_free(gsl);
}

void suite_surrogates(void)
{
    test_generator_matches_gsl();
    test_amplitude_adjusted();
    test_ar1_null();
    test_block_null();
    test_p_value();
    test_benjamini_hochberg();
    test_stream_seeds();
    test_phase_surrogates();
}
