/* Ensembles (ensemble.h): grouping and its refusals, the mean and anomalies against numpy,
 * the bimodality coefficient against scipy, the split test's false-flag rate and detection,
 * and (test_ensemble_cli.c) screen --ensemble end to end. */
#include "check.h"
#include "ensemble_check.h"

#include "slowscan/ensemble.h"
#include "slowscan/message.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static void test_grouping(void)
{
    const char *names[] = {"T.a", "x.1", "T.b", "T.c", "x.2", "T.d", "x.3", "x.4", "y", "a.b.c",
                           "a.b.d", "a.b.e", "a.b.f"};
    size_t count = sizeof names / sizeof names[0];
    ensemble_grouping how = slowscan_ensemble_grouping_default();
    ensemble_set set;
    ensemble_detail d;
    int st = slowscan_ensemble_group(names, NULL, count, &how, &set, &d);
    /* common practice, no source: NAME.MEMBER split at the last dot, groups in the order of
     * their first member, members in column order */
    CHECK(st == SLOWSCAN_OK && set.ngroups == 3, "three ensembles (status %d, %zu)", st,
          set.ngroups);
    if (st == SLOWSCAN_OK && set.ngroups == 3) {
        const ensemble_group *t = &set.groups[0], *x = &set.groups[1], *ab = &set.groups[2];
        CHECK(strcmp(t->name, "T") == 0 && t->nmembers == 4 && t->members[0] == 0 &&
                  t->members[1] == 2 && t->members[2] == 3 && t->members[3] == 5,
              "ensemble T: members 0,2,3,5");
        CHECK(strcmp(x->name, "x") == 0 && x->nmembers == 4 && x->members[3] == 7, "ensemble x");
        CHECK(strcmp(ab->name, "a.b") == 0 && ab->nmembers == 4, "ensemble a.b (last dot)");
    }
    slowscan_ensemble_set_free(&set);
}

/* Refusals, each with its rule and the names it is about (common practice, no source). */
static void test_grouping_refusals(void)
{
    ensemble_grouping how = slowscan_ensemble_grouping_default();
    ensemble_set set;
    ensemble_detail d;
    const char *few[] = {"T.a", "T.b", "T.c", "U.1", "U.2", "U.3", "U.4"};
    int st = slowscan_ensemble_group(few, NULL, 7, &how, &set, &d);
    char msg[512];
    slowscan_message_ensemble_refusal(msg, sizeof msg, &d, few, "--ensemble", NULL);
    CHECK(st == SLOWSCAN_EINVAL && d.rule == ENSEMBLE_RULE_FEW_MEMBERS && d.count == 3 &&
              d.need == 4 && strstr(msg, "'T.a' has 3 members, at least 4"),
          "three members refused: %s", msg);
    slowscan_ensemble_set_free(&set);

    const char *plain[] = {"temperature", "salinity"};
    st = slowscan_ensemble_group(plain, NULL, 2, &how, &set, &d);
    CHECK(st == SLOWSCAN_EINVAL && d.rule == ENSEMBLE_RULE_NO_MEMBERS,
          "names without members refused");
    slowscan_ensemble_set_free(&set);

    size_t lengths[] = {100, 100, 80, 100};
    const char *four[] = {"T.1", "T.2", "T.3", "T.4"};
    st = slowscan_ensemble_group(four, lengths, 4, &how, &set, &d);
    slowscan_message_ensemble_refusal(msg, sizeof msg, &d, four, "--ensemble", NULL);
    CHECK(st == SLOWSCAN_EINVAL && d.rule == ENSEMBLE_RULE_MIXED_LENGTHS && d.series == 2 &&
              d.other == 0 && strstr(msg, "'T.3' ends after 80 samples, member 'T.1' after 100"),
          "mixed lengths refused: %s", msg);
    slowscan_ensemble_set_free(&set);

    const char *listed[] = {"r1", "r2", "r3", "r4"};
    const char *runs[] = {"T.r1", "T.r2", "T.r3", "T.r4", "V.x", "U.r1", "U.r2"};
    how.members = listed, how.nmembers = 4;
    st = slowscan_ensemble_group(runs, NULL, 5, &how, &set, &d);
    CHECK(st == SLOWSCAN_OK && set.ngroups == 1 && set.groups[0].nmembers == 4,
          "--members: T grouped, V.x left alone");
    slowscan_ensemble_set_free(&set);
    st = slowscan_ensemble_group(runs, NULL, 7, &how, &set, &d);
    CHECK(st == SLOWSCAN_EINVAL && d.rule == ENSEMBLE_RULE_MISSING_MEMBER &&
              strcmp(d.member, "r3") == 0 && d.series == 5,
          "--members: U lacks r3");
    slowscan_ensemble_set_free(&set);
    how.nmembers = 3;
    st = slowscan_ensemble_group(runs, NULL, 4, &how, &set, &d);
    CHECK(st == SLOWSCAN_EINVAL && d.rule == ENSEMBLE_RULE_FEW_LISTED && d.count == 3,
          "--members with three suffixes refused");
    slowscan_ensemble_set_free(&set);
}

enum { MEAN_M = 5, MEAN_N = 60 };

/* The mean (NaN where a member is missing) and the anomalies, against numpy's mean over the
 * members' axis and the broadcast difference (tests/reference/ensemble_numpy.py). */
static void test_mean(void)
{
    check_rng *rng = check_rng_alloc(31);
    double x[MEAN_M * MEAN_N], mean[MEAN_N], anom[MEAN_M * MEAN_N];
    const double *members[MEAN_M];
    double *out[MEAN_M];
    for (size_t m = 0; m < MEAN_M; m++) {
        for (size_t i = 0; i < MEAN_N; i++)
            x[m * MEAN_N + i] = 3.0 * (1 - exp(-(double)i / 20)) + check_rng_gaussian(rng);
        members[m] = &x[m * MEAN_N], out[m] = &anom[m * MEAN_N];
    }
    check_rng_free(rng);
    x[1 * MEAN_N + 7] = NAN, x[4 * MEAN_N + 33] = NAN;
    CHECK(slowscan_ensemble_mean(members, MEAN_M, MEAN_N, mean) == SLOWSCAN_OK, "mean made");
    slowscan_ensemble_anomalies(members, MEAN_M, MEAN_N, mean, out);
    double want[MEAN_N * (MEAN_M + 1)];
    int got = check_python_on("ensemble_numpy.py", x, MEAN_M * MEAN_N, "mean 5", want,
                              MEAN_N * (MEAN_M + 1));
    CHECK(got == MEAN_N * (MEAN_M + 1), "numpy ran (%d values)", got);
    if (got == MEAN_N * (MEAN_M + 1)) {
        /* numpy.mean over axis 0 (Debian python3-numpy), to round-off */
        CHECK(check_max_diff(mean, want, MEAN_N) < 1e-13, "mean = numpy's (max diff %.3g)",
              check_max_diff(mean, want, MEAN_N));
        CHECK(check_max_diff(anom, want + MEAN_N, MEAN_M * MEAN_N) < 1e-13,
              "anomalies = numpy's (max diff %.3g)",
              check_max_diff(anom, want + MEAN_N, MEAN_M * MEAN_N));
    }
    CHECK(isnan(mean[7]) && isnan(mean[33]) && isfinite(mean[8]), "missing where one is");
    /* common practice, no source: the final value is the mean of the last tenth */
    double ramp[100];
    for (size_t i = 0; i < 100; i++)
        ramp[i] = (double)i;
    ramp[95] = NAN;
    CHECK_CLOSE(slowscan_ensemble_final_value(ramp, 100, 0.1), (90.0 + 91 + 92 + 93 + 94 + 96 +
                97 + 98 + 99) / 9, 1e-15, 0, "final value over the last 10%, NaN left out");
}

/* The sample bimodality coefficient against scipy.stats.skew and kurtosis with bias=False
 * (Pfister et al. 2013, Front. Psychol. 4:700, their equation for b with G1, G2). */
static void test_bimodality(void)
{
    check_rng *rng = check_rng_alloc(7);
    double x[40];
    const size_t sizes[] = {4, 7, 12, 40};
    for (size_t s = 0; s < sizeof sizes / sizeof sizes[0]; s++) {
        size_t m = sizes[s];
        for (size_t i = 0; i < m; i++) /* two modes for the larger samples */
            x[i] = check_rng_gaussian(rng) + (m > 10 && i % 2 ? 4 : 0);
        double want = NAN;
        CHECK(check_python_on("ensemble_numpy.py", x, m, "bc", &want, 1) == 1, "scipy ran");
        char what[64];
        snprintf(what, sizeof what, "bimodality of %zu values = scipy's", m);
        CHECK_CLOSE(slowscan_ensemble_bimodality(x, m), want, 1e-12, 0, what);
    }
    check_rng_free(rng);
    CHECK(isnan(slowscan_ensemble_bimodality(x, 3)), "three values: NaN");
    /* Pfister et al. 2013: b = 5/9 for the uniform distribution (its population value;
     * evenly spaced values approach it) */
    double even[2001];
    for (size_t i = 0; i < 2001; i++)
        even[i] = (double)i;
    CHECK_CLOSE(slowscan_ensemble_bimodality(even, 2001), 5.0 / 9.0, 5e-3, 0,
                "evenly spaced values: 5/9");
}

/* The pooled test against numpy: the mean of the members' statistics against the members'
 * mean of each replicate, p = (1 + #{pooled_j >= pooled}) / (M + 1) (DESIGN §3's rule). */
static void test_pooled(void)
{
    enum { K = 5, M = 99 };
    double x[K + K * M], pooled[M];
    const double *nulls[K];
    check_rng *rng = check_rng_alloc(11);
    for (size_t i = 0; i < K + K * M; i++)
        x[i] = 0.3 * check_rng_gaussian(rng) + (i < K ? 0.15 : 0);
    check_rng_free(rng);
    for (size_t m = 0; m < K; m++)
        nulls[m] = x + K + m * M;
    ensemble_pooled p;
    CHECK(slowscan_ensemble_pooled_test(x, nulls, K, M, ALTERNATIVE_INCREASING, &p, pooled) ==
              SLOWSCAN_OK, "pooled test made");
    double want[2] = {NAN, NAN};
    CHECK(check_python_on("ensemble_numpy.py", x, K + K * M, "pooled 5", want, 2) == 2,
          "numpy ran");
    CHECK_CLOSE(p.statistic, want[0], 1e-14, 0, "pooled statistic = numpy's");
    CHECK_CLOSE(p.p_value, want[1], 0, 0, "pooled p = numpy's");
    CHECK(p.null_used == M, "every replicate used");
    nulls[2] = NULL;
    slowscan_ensemble_pooled_test(x, nulls, K, M, ALTERNATIVE_INCREASING, &p, NULL);
    CHECK(isnan(p.p_value) && isfinite(p.statistic), "a member without a null: no p");
}

static void test_split(void)
{
    ensemble_rate r = ensemble_split_rate(ENSEMBLE_SPLIT_NULL_RUNS, 10, 200, 0, 101);
    double lo, hi;
    check_wilson(r.hits, r.runs, &lo, &hi);
    fprintf(stderr, "   split false flags, forced relaxation + AR(1) members (10 x 200): "
            "%zu/%zu = %.3f, Wilson 95%% [%.3f, %.3f] (bimodality %zu, gap %zu)\n", r.hits,
            r.runs, (double)r.hits / (double)r.runs, lo, hi, r.bimodal, r.gap);
    /* measured (see help): the rate stays below 10% */
    CHECK(hi < 0.10, "split false-flag rate: upper Wilson bound %.3f below 0.10", hi);
    ensemble_rate s = ensemble_split_rate(100, 10, 200, 1, 202);
    CHECK(s.hits >= 95, "split ensembles (half the members cross a threshold) flagged: %zu/100",
          s.hits);
}

void suite_ensemble(void)
{
    test_grouping();
    test_grouping_refusals();
    test_mean();
    test_bimodality();
    test_pooled();
    test_split();
    ensemble_cli_tests();
}
