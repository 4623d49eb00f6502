/* Sequential Monte Carlo testing (--surrogates auto; surrogates/sequential.c and
 * screen/sequential_run.c, whose own checks are in test_sequential_run.c).
 *
 * - One round's decisions against a direct computation: Clopper-Pearson limits by
 *   scipy.stats.beta.ppf, Benjamini-Hochberg by statsmodels' multipletests on the upper and on
 *   the lower limits (tests/reference/sequential_decide.py).
 * - The next round's sizes against the rule written out by hand (common practice, no source).
 * - Replicate j is the same draw however the rounds fall: a series screened in ranges gives
 *   the null of one fixed run bit for bit, and the command's p of a test that drew n
 *   surrogates equals a fixed --surrogates n run's.
 * - The same output for --threads 1, 2 and 3; `undecided` with a tiny budget; refusals.
 * - The false discovery proportion, averaged over many simulated screens of nulls (p uniform:
 *   the exact null of a Monte Carlo test of a continuous statistic, Besag & Clifford 1991,
 *   Biometrika 78:301 — from memory) and alternatives, stays at or below q (Benjamini &
 *   Hochberg 1995: FDR = m0 q / m for independent tests). */
#include "check.h"
#include "slowscan/screen.h"
#include "slowscan/sequential.h"
#include "slowscan/significance.h"
#include "slowscan/status.h"

#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

enum { DECIDE_TESTS = 40 };

/* Counts spread from sure rejections to sure acceptances, with open ones between. */
static void decide_counts(sequential_test *t)
{
    static const size_t hits[] = {0, 0, 1, 3, 0, 12, 40, 2, 0, 5};
    static const size_t drawn[] = {20000, 64, 5000, 640, 1000, 256, 128, 9000, 30000, 64};
    for (size_t k = 0; k < DECIDE_TESTS; k++)
        t[k] = (sequential_test){.series = k, .tested = 1, .hits = hits[k % 10] * (1 + k / 10),
                                 .drawn = drawn[k % 10] * (1 + k / 10)};
}

/* The levels of a test's intervals under cfg's risk (joint: divided by the tests). */
static void spending_levels(const sequential_config *c, int joint)
{
    sequential_config cfg = *c;
    /* the risk spent over the draws (Gandy 2009 spends a test's risk over its samples;
     * Gandy & Hahn's MMCTest over its testing times): an interval at n draws after one at n'
     * has level epsilon (F(n) - F(n')), F(n) = (n / K + log(1 + n/64) / log(1 + K/64)) / 2,
     * and a test's levels add up to at most epsilon (from the definition) */
    double k = (double)cfg.max_per_series, e = cfg.epsilon / (joint ? DECIDE_TESTS : 1);
    double a1 = slowscan_sequential_alpha_at(&cfg, DECIDE_TESTS, 32768, 65536);
    double want = e * (0.5 * 32768 / k + 0.5 * (log1p(1024.0) - log1p(512.0)) / log1p(k / 64));
    double sum = 0;
    for (size_t n = 64, before = 0; before < cfg.max_per_series; before = n, n *= 2)
        sum += slowscan_sequential_alpha_at(&cfg, DECIDE_TESTS, before, n);
    CHECK(fabs(a1 - want) <= 1e-12 * want && fabs(sum - e) <= 1e-12 * e,
          "levels by draws: %g for 32768 -> 65536, %g over a doubling path to K (joint %d)", a1,
          sum, joint);
    sequential_config even = cfg;
    even.spending = SEQUENTIAL_SPEND_ROUNDS;
    CHECK(slowscan_sequential_alpha_at(&even, DECIDE_TESTS, 64, 128) ==
              e / (double)slowscan_sequential_max_rounds(&cfg),
          "the even split: epsilon / R per round (joint %d)", joint);
}

/* One round's decisions (and, with finish, the end's) in risk mode `joint` against
 * sequential_decide.py. */
static void decide_against_reference(int joint, int finish, size_t cap)
{
    sequential_config cfg = slowscan_sequential_config_default();
    cfg.fdr = 0.1;
    cfg.joint = joint;
    if (cap)
        cfg.max_per_series = cap; /* tests at the cap: their limits are their reported p */
    sequential_test t[DECIDE_TESTS];
    decide_counts(t);
    size_t open = 0;
    CHECK(slowscan_sequential_decide(&cfg, t, DECIDE_TESTS, &open) == SLOWSCAN_OK, "decide");
    if (finish)
        CHECK(slowscan_sequential_finish(&cfg, t, DECIDE_TESTS, &open) == SLOWSCAN_OK, "finish");
    if (!cap)
        spending_levels(&cfg, joint);
    double ref[3 * DECIDE_TESTS];
    char path[512], cmd[1024];
    snprintf(path, sizeof path, "%s", check_tmp_path("sequential_counts.txt"));
    FILE *f = fopen(path, "w");
    for (size_t j = 0; f && j < DECIDE_TESTS; j++) /* each test's first interval */
        fprintf(f, "%zu %zu %.17g\n", t[j].hits, t[j].drawn,
                slowscan_sequential_alpha_at(&cfg, DECIDE_TESTS, 0, t[j].drawn));
    if (f)
        fclose(f);
    snprintf(cmd, sizeof cmd, "sequential_decide.py %s per-test %.17g%s cap=%zu", path,
             cfg.fdr, finish ? " finish" : "", cfg.max_per_series);
    /* scipy.stats.beta.ppf and statsmodels multipletests(fdr_bh) */
    int got = check_python(cmd, ref, 3 * DECIDE_TESTS);
    CHECK(got == 3 * DECIDE_TESTS, "sequential_decide.py gave %d numbers", got);
    size_t same = 0, kinds[3] = {0};
    for (size_t k = 0; got == 3 * DECIDE_TESTS && k < DECIDE_TESTS; k++) {
        CHECK_CLOSE(t[k].lo, ref[3 * k], 1e-7, 1e-15, "Clopper-Pearson lower limit");
        CHECK_CLOSE(t[k].hi, ref[3 * k + 1], 1e-7, 1e-15, "Clopper-Pearson upper limit");
        same += (int)t[k].decision == (int)ref[3 * k + 2];
        kinds[t[k].decision % 3]++;
    }
    CHECK(same == DECIDE_TESTS, "decisions equal the direct computation's: %zu of %d (joint %d, "
          "finish %d)", same, DECIDE_TESTS, joint, finish);
    CHECK(kinds[0] > 0 && kinds[1] > 0 && kinds[2] > 0,
          "the case holds open, rejected and accepted tests (%zu %zu %zu; joint %d, finish %d)",
          kinds[0], kinds[1], kinds[2], joint, finish);
    size_t open_count = 0;
    for (size_t k = 0; k < DECIDE_TESTS; k++)
        open_count += t[k].decision == SEQUENTIAL_OPEN;
    CHECK(open == open_count, "open count %zu", open);
    size_t at_cap = 0, point = 0;
    for (size_t k = 0; k < DECIDE_TESTS; k++) {
        at_cap += t[k].drawn >= cfg.max_per_series;
        /* before the end a test at the cap may wait on others' open intervals */
        point += t[k].drawn >= cfg.max_per_series &&
                 (!finish || t[k].decision != SEQUENTIAL_OPEN) && t[k].lo == t[k].hi &&
                 t[k].lo == (1.0 + (double)t[k].hits) / (1.0 + (double)t[k].drawn);
    }
    CHECK(point == at_cap && (cap == 0 || at_cap > 0),
          "%zu of %zu tests at the cap K = %zu settled on their fixed-K p", point, at_cap,
          cfg.max_per_series);
    /* the reported p: (1 + S) / (1 + n) with the 95% Clopper-Pearson interval */
    double p, lo, hi, wlo, whi;
    slowscan_sequential_p(&t[3], &p, &lo, &hi);
    slowscan_significance_binomial_interval(t[3].hits, t[3].drawn, &wlo, &whi);
    CHECK(p == 4.0 / 641.0 && lo == wlo && hi == whi, "reported p %g [%g, %g]", p, lo, hi);
}

/* The next round by the rule written out: doubling, first_round to start, capped at K;
 * when the requests exceed the budget, all cut to one common cap (whole blocks), what is left
 * a block at a time to the series cut, in series order. */
static void next_round(void)
{
    sequential_config cfg = slowscan_sequential_config_default();
    cfg.max_per_series = 300;
    size_t drawn[] = {0, 64, 256, 128, 192}, add[5], total;
    int open[] = {1, 1, 1, 0, 1};
    slowscan_sequential_next(&cfg, 5, drawn, open, 0, 100000, add, &total);
    CHECK(add[0] == 64 && add[1] == 64 && add[2] == 44 && add[3] == 0 && add[4] == 108 &&
              total == 280,
          "doubling, capped: %zu %zu %zu %zu %zu", add[0], add[1], add[2], add[3], add[4]);
    slowscan_sequential_next(&cfg, 5, drawn, open, 1000, 1000 + 400, add, &total);
    /* asked 280 of 400 left: all granted */
    CHECK(total == 280, "within the budget: %zu", total);
    size_t big[] = {1024, 2048, 0, 0, 0};
    cfg.max_per_series = 100000;
    slowscan_sequential_next(&cfg, 2, big, open, 0, 1536, add, &total);
    /* asked 3072 of 1536: both cut to 768, the larger request not starved */
    CHECK(add[0] == 768 && add[1] == 768 && total == 1536, "common cap: %zu %zu", add[0],
          add[1]);
    size_t three[] = {1024, 2048, 4096};
    slowscan_sequential_next(&cfg, 3, three, open, 0, 4000, add, &total);
    /* cap 1472 (1024 + 2 x 1472 = 3968 fits, a block more does not), 32 left: less than a block */
    CHECK(add[0] == 1024 && add[1] == 1472 && add[2] == 1472 && total == 3968,
          "common cap and blocks: %zu %zu %zu", add[0], add[1], add[2]);
    size_t near_k[] = {99900, 1000, 1000};
    slowscan_sequential_next(&cfg, 3, near_k, open, 0, 300, add, &total);
    /* asked 100 (K - 99900), 1000, 1000: cap 64 (192), 108 left: 36 more to the first (never
       past its request), a block to the second, 8 left */
    CHECK(add[0] == 100 && add[1] == 128 && add[2] == 64 && total == 292,
          "blocks after the cap within the requests: %zu %zu %zu", add[0], add[1], add[2]);
    slowscan_sequential_next(&cfg, 5, drawn, open, 0, 100, add, &total);
    CHECK(add[0] == 64 && add[1] == 0 && add[2] == 0 && total == 64,
          "a block to the first series when less than two are left: %zu %zu %zu", add[0], add[1],
          add[2]);
    /* the same in another order of the inputs: the block goes to the first in that order */
    const size_t reversed[] = {4, 3, 2, 1, 0};
    slowscan_sequential_next_in_order(&cfg, 5, drawn, open, 0, 100, reversed, add, &total);
    CHECK(add[0] == 0 && add[2] == 0 && add[4] == 64 && total == 64,
          "a block to the first series of the given order: %zu %zu %zu", add[0], add[2], add[4]);
}

static double ar1_sample(check_rng *rng, size_t k, size_t i, size_t n, double *state)
{
    (void)k;
    double a = 0.2 + 0.7 * (double)i / (double)n;
    *state = a * *state + check_rng_gaussian(rng);
    return *state;
}

/* Replicates drawn in ranges [0, 64) and [64, 192) equal those of one fixed run of 192. */
static void ranges_equal_fixed(void)
{
    enum { N = 200, M = 192 };
    check_rng *rng = check_rng_alloc(11);
    double t[N], x[N], state = 0;
    for (size_t i = 0; i < N; i++)
        t[i] = (double)i, x[i] = ar1_sample(rng, 0, i, N, &state);
    check_rng_free(rng);
    screen_config cfg = slowscan_screen_config_default();
    cfg.surrogates = M;
    screen_workspace *ws = slowscan_screen_workspace_alloc(2);
    screen_input in = {.name = "x", .source = "t", .time_name = "t", .time = t, .values = x, .n = N};
    screen_result fixed, part;
    screen_detail d;
    CHECK(slowscan_screen_series(ws, &cfg, &in, &fixed, &d) == SLOWSCAN_OK, "fixed run");
    size_t tests = fixed.ntests;
    double *want = malloc(tests * M * sizeof *want);
    for (size_t j = 0; j < tests; j++)
        memcpy(want + j * M, slowscan_screen_workspace_null(ws, j), M * sizeof *want);
    static const size_t first[] = {0, 64}, count[] = {64, 128};
    size_t hits[SCREEN_MAX_TESTS] = {0}, bad = 0;
    cfg.surrogates = 0;
    for (int r = 0; r < 2; r++) {
        in.null_range = 1, in.null_first = first[r], in.null_count = count[r];
        cfg.threads = (size_t)(r + 1); /* and whatever the threads */
        CHECK(slowscan_screen_series(ws, &cfg, &in, &part, &d) == SLOWSCAN_OK, "round %d", r);
        for (size_t j = 0; j < tests; j++) {
            const double *null = slowscan_screen_workspace_null(ws, j);
            bad += memcmp(null, want + j * M + first[r], count[r] * sizeof *null) != 0;
            hits[j] += slowscan_screen_test_hits(&part.tests[j]);
            bad += part.tests[j].surrogates != count[r];
        }
    }
    for (size_t j = 0; j < tests; j++)
        bad += hits[j] != slowscan_screen_test_hits(&fixed.tests[j]);
    CHECK(bad == 0, "ranges of replicates equal the fixed run's, bit for bit (%zu differ)", bad);
    free(want);
    slowscan_screen_workspace_free(ws);
}

/* Runs the binary with args; its exit status, stdout in *out. */
static int run_out(const char *args, char **out, char **err)
{
    char cmd[4096];
    snprintf(cmd, sizeof cmd, "%.2000s %.2000s", check_binary(), args);
    *out = NULL;
    return check_run(cmd, out, err);
}

/* Field k (0-based) of a CSV row into buf; 0 when the row has fewer fields. */
static int csv_field(const char *row, int k, char *buf, size_t size)
{
    for (; k > 0 && row; k--)
        row = strpbrk(row, ",\n") && *strpbrk(row, ",\n") == ',' ? strchr(row, ',') + 1 : NULL;
    if (!row)
        return 0;
    size_t len = strcspn(row, ",\n");
    snprintf(buf, size, "%.*s", (int)(len < size ? len : size - 1), row);
    return 1;
}

/* Capped at K = 128 with budget to spare, every test auto carries to the cap is the fixed-128
 * test: its p and its flag are those of `--surrogates 128` (Besag & Clifford 1991: run to its
 * largest size the sequential test is the fixed one; replicate j is the same draw), and none
 * is undecided. */
static void capped_equals_fixed(const char *csv)
{
    char args[2048], *capped = NULL, *fixed = NULL, *err = NULL;
    snprintf(args, sizeof args, "screen --surrogates auto --max-per-series 128 --budget 100000 "
             "--quiet %s", csv);
    int rc = run_out(args, &capped, &err);
    free(err);
    snprintf(args, sizeof args, "screen --surrogates 128 %s", csv);
    int rc_fixed = run_out(args, &fixed, NULL);
    size_t compared = 0, differ = 0, rows = 0;
    for (const char *row = capped ? strchr(capped, '\n') : NULL; row && row[1]; row = strchr(row + 1, '\n')) {
        char key[128], used[32], p[64], flag[32], want_p[64], want_flag[32];
        rows++;
        if (!csv_field(row + 1, 10, used, sizeof used) || strcmp(used, "128") != 0)
            continue;
        size_t keylen = strcspn(row + 1, ",") + 1;
        keylen += strcspn(row + 1 + keylen, ",") + 1; /* "series,indicator," */
        snprintf(key, sizeof key, "\n%.*s", (int)keylen, row + 1);
        const char *same = fixed ? strstr(fixed, key) : NULL;
        csv_field(row + 1, 7, p, sizeof p), csv_field(row + 1, 11, flag, sizeof flag);
        differ += !same || !csv_field(same + 1, 7, want_p, sizeof want_p) ||
                  !csv_field(same + 1, 11, want_flag, sizeof want_flag) || strcmp(p, want_p) ||
                  strcmp(flag, want_flag);
        compared++;
    }
    CHECK(rc == 0 && rc_fixed == 0 && compared >= 30 && differ == 0 && capped &&
              !strstr(capped, ",undecided,"),
          "auto capped at 128: %zu of %zu tests at the cap, %zu differ from --surrogates 128 in "
          "p or flag", compared, rows, differ);
    free(capped), free(fixed);
}

static double ar1_with_empty(check_rng *rng, size_t k, size_t i, size_t n, double *state)
{
    double x = ar1_sample(rng, k, i, n, state);
    return k == 1 ? NAN : x; /* series s1 has no value at all, as a grid's land cell */
}

/* A series without a value draws no surrogate, so it costs the budget nothing: with the
 * budget short, the other series get the same rounds, p and flags as in a run without it
 * (replicate j depends on the series' name only; BH counts tested tests only). Found by the
 * Python grid path: an empty cell used to be charged its first round. */
static void empty_series_costs_nothing(void)
{
    char with[512], without[512], cmd[2048], *a = NULL, *b = NULL;
    snprintf(with, sizeof with, "%s", check_tmp_path("sequential-empty.csv"));
    snprintf(without, sizeof without, "%s", check_tmp_path("sequential-no-empty.csv"));
    check_write_series_csv(with, 12, 200, ar1_with_empty, 5);
    snprintf(cmd, sizeof cmd, "cut -d, -f1,2,4- '%s' > '%s'", with, without);
    int cut = check_run(cmd, NULL, NULL);
    snprintf(cmd, sizeof cmd, "screen --surrogates auto --budget 3000 --quiet %s", with);
    int rc = run_out(cmd, &a, NULL);
    snprintf(cmd, sizeof cmd, "screen --surrogates auto --budget 3000 --quiet %s", without);
    int rc2 = run_out(cmd, &b, NULL);
    /* a's rows without s1's: remove each "\ns1,..." line */
    for (char *row = a ? strstr(a, "\ns1,") : NULL; row; row = strstr(row, "\ns1,")) {
        char *end = strchr(row + 1, '\n');
        memmove(row, end ? end : row + strlen(row), strlen(end ? end : row + strlen(row)) + 1);
    }
    CHECK(cut == 0 && rc == 0 && rc2 == 0 && a && b && strcmp(a, b) == 0,
          "an empty series costs the budget nothing: the other series' rows equal a run "
          "without it");
    free(a), free(b);
}

/* The command: threads, the fixed-run equality of p, undecided, warnings, refusals. */
static void command(void)
{
    char csv[512], args[2048];
    snprintf(csv, sizeof csv, "%s", check_tmp_path("sequential.csv"));
    check_write_series_csv(csv, 12, 200, ar1_sample, 5);
    char *out[3] = {0}, *err = NULL;
    int rc;
    for (int k = 0; k < 3; k++) {
        snprintf(args, sizeof args, "screen --surrogates auto --budget 6000 --threads %d %s", k + 1,
                 csv);
        rc = run_out(args, &out[k], &err);
        CHECK(rc == 0 && out[k], "auto at --threads %d: %s", k + 1, err ? err : "");
        free(err), err = NULL;
    }
    CHECK(out[0] && out[1] && out[2] && !strcmp(out[0], out[1]) && !strcmp(out[0], out[2]),
          "the same output at --threads 1, 2, 3");
    CHECK(out[0] && strstr(out[0], "q_value,null,surrogates,flag,p_low,p_high\n"),
          "auto's columns");
    /* series s3's first test: its p equals a fixed run's with as many surrogates */
    char name[64] = "", *line = out[0] ? strstr(out[0], "\ns3,variance,") : NULL;
    double p_auto = NAN;
    long used = 0;
    if (line && sscanf(line + 1, "%63[^,],variance,%*[^,],%*[^,],%*[^,],%*[^,],%*[^,],%lf,%*[^,],"
                                 "phase,%ld", name, &p_auto, &used) == 3) {
        snprintf(args, sizeof args, "screen --surrogates %ld --vars s3 %s", used, csv);
        char *fixed;
        rc = run_out(args, &fixed, NULL);
        double p_fixed = NAN;
        char *row = fixed ? strstr(fixed, "\ns3,variance,") : NULL;
        if (row)
            sscanf(row + 1, "%*[^,],variance,%*[^,],%*[^,],%*[^,],%*[^,],%*[^,],%lf", &p_fixed);
        CHECK(p_fixed == p_auto && used >= 64,
              "auto's p of s3 (%ld surrogates) %g equals the fixed run's %g", used, p_auto, p_fixed);
        free(fixed);
    } else {
        CHECK(0, "row s3,variance in auto's output");
    }
    for (int k = 0; k < 3; k++)
        free(out[k]);
    /* the JSON records the procedure and its parameters (checked with Python's json) */
    const char *json = check_tmp_path("sequential.json");
    snprintf(args, sizeof args, "screen --surrogates auto --budget 6000 --json %s %s", json, csv);
    char *ignored_out;
    rc = run_out(args, &ignored_out, NULL);
    free(ignored_out);
    char py[1024];
    snprintf(py, sizeof py,
             "/usr/bin/python3 -c \"import json; d=json.load(open('%s')); s=d['sequential'];"
             "r=d['results'][0]; print(s['budget'], s['max_per_series'], s['epsilon'], s['risk'],"
             " d['parameters']['surrogates'] == 'auto', len(r['p_interval']), r['surrogates'] > 0)\"",
             json);
    char *jout = NULL;
    int jrc = check_run(py, &jout, NULL);
    CHECK(rc == 0 && jrc == 0 && jout && !strcmp(jout, "6000 100000 0.01 per test True 2 True\n"),
          "JSON records the procedure: %s", jout ? jout : "");
    free(jout);
    /* a tiny budget: undecided tests, said on stderr */
    snprintf(args, sizeof args, "screen --surrogates auto --budget 200 %s", csv);
    char *tiny;
    rc = run_out(args, &tiny, &err);
    CHECK(rc == 0 && tiny && strstr(tiny, ",undecided,") && err && strstr(err, "undecided"),
          "undecided with --budget 200");
    free(tiny), free(err), err = NULL;
    empty_series_costs_nothing();
    capped_equals_fixed(csv);
    /* K too small for any discovery among 36 tests: 1/65 > 0.05/36 */
    snprintf(args, sizeof args, "screen --surrogates auto --max-per-series 64 %s", csv);
    char *ignored;
    rc = run_out(args, &ignored, &err);
    free(ignored);
    /* BH rejects k tests tied at p = 1/65 when 1/65 <= 0.05 k / 36: k >= 12 (Benjamini &
     * Hochberg 1995's step-up rule) */
    CHECK(rc == 0 && err && strstr(err, "no test can be a discovery alone") &&
              strstr(err, "at least 12 tests tied"), "warns: %s", err ? err : "");
    free(err), err = NULL;
    /* at --fdr 0.01 not even all 36 tied at 1/65 could be: 1/65 > 0.01 */
    snprintf(args, sizeof args, "screen --surrogates auto --max-per-series 64 --fdr 0.01 %s", csv);
    rc = run_out(args, &ignored, &err);
    free(ignored);
    CHECK(rc == 0 && err && strstr(err, "no discovery is possible"), "warns: %s", err ? err : "");
    free(err), err = NULL;
    /* refusals: one line naming the option, exit 1, no output file */
    const char *refused[] = {"screen --budget 100", "robustness --surrogates auto", "screen --max-per-series 10 "
                                                             "--surrogates auto",
                             "screen --risk 0.02", "screen --risk-joint",
                             "screen --surrogates auto --risk 0.7"};
    for (size_t k = 0; k < sizeof refused / sizeof refused[0]; k++) {
        const char *o = check_tmp_path("sequential_refused.csv");
        snprintf(args, sizeof args, "%s %s -o %s", refused[k], csv, o);
        char *none;
        rc = run_out(args, &none, &err);
        free(none);
        CHECK(rc == 1 && err && strstr(err, "option --") && !strchr(strchr(err, '\n') + 1, '\n') &&
                  !check_file_exists(o),
              "%s refused: %s", refused[k], err ? err : "");
        free(err), err = NULL;
    }
}

/* One simulated screen: m tests, each its own series, true Monte Carlo p from p_of; each
 * surrogate is at least as extreme with that chance. Returns false and all discoveries. */
static void simulated_screen(const sequential_config *cfg, gsl_rng *r, size_t m, size_t alt,
                             size_t *false_found, size_t *found, size_t *undecided)
{
    sequential_test *t = calloc(m, sizeof *t);
    double *p = malloc(m * sizeof *p);
    size_t *drawn = calloc(m, sizeof *drawn), *add = calloc(m, sizeof *add);
    int *open = malloc(m * sizeof *open);
    for (size_t i = 0; i < m; i++) {
        /* alternatives: p below 1e-3; nulls: uniform */
        p[i] = i < alt ? 1e-3 * gsl_rng_uniform(r) : gsl_rng_uniform(r);
        t[i] = (sequential_test){.series = i, .tested = 1};
        open[i] = 1;
    }
    size_t budget = slowscan_sequential_budget(cfg, m), spent = 0, total = 0, left = 0;
    slowscan_sequential_next(cfg, m, drawn, open, spent, budget, add, &total);
    for (size_t round = 0; total > 0 && round < slowscan_sequential_max_rounds(cfg); round++) {
        for (size_t i = 0; i < m; i++) {
            t[i].hits += gsl_ran_binomial(r, p[i], (unsigned)add[i]);
            t[i].drawn += add[i], drawn[i] += add[i], spent += add[i];
        }
        slowscan_sequential_decide(cfg, t, m, &left);
        for (size_t i = 0; i < m; i++)
            open[i] = t[i].decision == SEQUENTIAL_OPEN;
        slowscan_sequential_next(cfg, m, drawn, open, spent, budget, add, &total);
    }
    slowscan_sequential_finish(cfg, t, m, &left);
    *false_found = *found = 0;
    for (size_t i = 0; i < m; i++) {
        *found += t[i].decision == SEQUENTIAL_REJECTED;
        *false_found += t[i].decision == SEQUENTIAL_REJECTED && i >= alt;
    }
    *undecided = left;
    free(t), free(p), free(drawn), free(add), free(open);
}

/* Mean FDP over `screens` screens of m tests (alt alternatives), with a normal-theory 95%
 * interval of the mean, at `per_test` surrogates of budget per test and in risk mode joint.
 * SEQUENTIAL_SCREENS sets the count (bigger runs by hand). */
static void false_discoveries(size_t per_test, int joint, size_t cap)
{
    const char *env = getenv("SEQUENTIAL_SCREENS");
    size_t screens = env ? strtoul(env, NULL, 10) : 60, m = 300, alt = 30;
    sequential_config cfg = slowscan_sequential_config_default();
    cfg.fdr = 0.1;
    cfg.joint = joint;
    if (cap) /* tests at the cap settled on their fixed-K p, a valid p of its own */
        cfg.max_per_series = cap;
    cfg.budget = per_test * m; /* 1000: the alternatives need about 2000 surrogates each */
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    gsl_rng_set(r, 2026);
    double sum = 0, sum2 = 0, power = 0, undecided = 0;
    for (size_t s = 0; s < screens; s++) {
        size_t fd, found, und;
        simulated_screen(&cfg, r, m, alt, &fd, &found, &und);
        double fdp = found ? (double)fd / (double)found : 0.0;
        sum += fdp, sum2 += fdp * fdp;
        power += (double)(found - fd) / (double)alt;
        undecided += (double)und;
    }
    gsl_rng_free(r);
    double mean = sum / (double)screens;
    double sd = sqrt(fmax(0.0, (sum2 - (double)screens * mean * mean) / (double)(screens - 1)));
    double half = 1.959964 * sd / sqrt((double)screens);
    printf("  sequential (%s risk, budget %zu per test, K %zu): mean FDP %.4f [%.4f, %.4f] over %zu "
           "screens of %zu tests (%zu alternatives), q = %g (bound m0 q / m = %.3f); power %.3f, "
           "undecided %.2f per screen\n", joint ? "joint" : "per-test", per_test,
           cfg.max_per_series,
           mean, mean - half, mean + half, screens, m, alt, cfg.fdr,
           cfg.fdr * (double)(m - alt) / (double)m, power / (double)screens,
           undecided / (double)screens);
    /* Benjamini & Hochberg 1995, Theorem 1: FDR <= m0 q / m for independent tests */
    CHECK(mean - half <= cfg.fdr * (double)(m - alt) / (double)m,
          "mean FDP %.4f (95%% interval from %.4f) at or below q m0/m", mean, mean - half);
    CHECK(per_test < 1000 || power / (double)screens > 0.5,
          "the alternatives are found (power %.3f)", power / (double)screens);
}

void sequential_run_checks(void); /* test_sequential_run.c: the library's rounds */

void suite_sequential(void)
{
    decide_against_reference(0, 0, 0);
    decide_against_reference(1, 0, 0);
    decide_against_reference(0, 1, 0);
    decide_against_reference(0, 0, 9000);
    decide_against_reference(0, 1, 9000);
    next_round();
    ranges_equal_fixed();
    sequential_run_checks();
    command();
    false_discoveries(1000, 0, 0);
    false_discoveries(200, 0, 0);
    false_discoveries(1000, 1, 0);
    false_discoveries(1000, 0, 2048);
}
