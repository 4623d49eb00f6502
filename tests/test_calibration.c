/* Suite "calibration": the size (false-alarm rate at p <= 0.05) of screen's variance, lag1
 * and recovery_trend tests on the null cases of calibration_cases.c, through the binary and
 * with its defaults (detrend, bandwidth, window, null), as users get them.
 *
 * Bounds. Under a test of exact size 0.05 the count of p <= 0.05 among S independent series
 * is Binomial(S, 0.05); a cell fails when its count exceeds the one-sided binomial upper
 * bound at level 0.01 / C, C the number of size cells of the battery (Bonferroni), so the
 * battery as a whole fails by chance with probability below 1% (binomial test and Bonferroni
 * correction: common practice, no source; the tail from GSL's gsl_cdf_binomial_Q). With M
 * surrogates and p = (1 + #{s_j >= s}) / (M + 1), P(p <= 0.05) = 0.05 exactly for M = 99 or
 * 199 when the null holds (the observed statistic is exchangeable with the surrogates'). Cells
 * where the tested quantity really changes are expected rejections: printed, not required.
 * The shares come with Clopper-Pearson 95% intervals (gsl_cdf_beta_Pinv).
 *
 * Runs in the plain build only (SLOWSCAN_LABEL=sanitized skips it with a line saying so).
 * CALIBRATION_REPORT_ONLY=1 prints the table without counting FAIL cells as failed checks
 * (for a branch whose fixes have not landed); a screen that does not run still fails. */
#include "calibration_cases.h"
#include "slowscan/significance.h"
#include "check.h"

#include <gsl/gsl_cdf.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#define BATTERY_ALPHA 0.01
#define NOMINAL 0.05

size_t calibration_tested_cells(const char *null)
{
    size_t cells = 0;
    for (size_t k = 0; k < calibration_case_count; k++) {
        const calibration_case *c = &calibration_cases[k];
        if (null && strcmp(null, "ar1") == 0 && c->ar1_mismatch)
            continue;
        for (int t = 0; t < CAL_TESTS; t++)
            cells += !(c->expected & (1u << t));
    }
    return cells;
}

size_t calibration_bound(size_t series, double alpha)
{
    size_t c = 0;
    while (c < series && gsl_cdf_binomial_Q((unsigned)c, NOMINAL, (unsigned)series) > alpha)
        c++;
    return c;
}

void calibration_interval(size_t hits, size_t series, double *lo, double *hi)
{
    slowscan_significance_binomial_interval(hits, series, lo, hi);
}

const char *calibration_verdict(const calibration_case *c, int test, const char *null,
                                size_t hits, size_t bound)
{
    if (c->expected & (1u << test))
        return "EXPECTED";
    if (null && strcmp(null, "ar1") == 0 && c->ar1_mismatch)
        return "n/c";
    return hits <= bound ? "holds" : "FAIL";
}

/* Column index of `name` in a CSV header line, or -1. */
static int column_of(const char *header, const char *name)
{
    size_t len = strlen(name);
    int col = 0;
    for (const char *p = header; p && *p && *p != '\n'; col++) {
        if (strncmp(p, name, len) == 0 && (p[len] == ',' || p[len] == '\n' || !p[len]))
            return col;
        p = strchr(p, ',');
        p = p ? p + 1 : NULL;
    }
    return -1;
}

/* Start of field `col` of the line at p (NULL when the line is shorter). */
static const char *field_at(const char *p, int col)
{
    for (; col > 0 && p; col--) {
        const char *comma = strpbrk(p, ",\n");
        p = comma && *comma == ',' ? comma + 1 : NULL;
    }
    return p;
}

static int test_of(const char *field)
{
    for (int t = 0; t < CAL_TESTS; t++) {
        size_t len = strlen(calibration_test_names[t]);
        if (strncmp(field, calibration_test_names[t], len) == 0 && field[len] == ',')
            return t;
    }
    return -1;
}

/* Counts p <= 0.05 per test in a screen summary (DESIGN §4 columns, found by name). */
static int count_summary(const char *csv, calibration_count out[CAL_TESTS])
{
    memset(out, 0, CAL_TESTS * sizeof *out);
    int ci = column_of(csv, "indicator"), cp = column_of(csv, "p_value");
    if (ci < 0 || cp < 0)
        return -1;
    for (const char *line = strchr(csv, '\n'); line && line[1]; line = strchr(line + 1, '\n')) {
        const char *ind = field_at(line + 1, ci), *pv = field_at(line + 1, cp);
        int t = ind ? test_of(ind) : -1;
        if (t < 0 || !pv)
            continue;
        char *end;
        double p = strtod(pv, &end);
        out[t].rows++;
        if (end != pv && isfinite(p)) {
            out[t].tested++;
            out[t].hits += p <= NOMINAL;
        }
    }
    return 0;
}

calibration_outcome calibration_run_case(const calibration_case *c, const calibration_scale *s,
                                         calibration_count out[CAL_TESTS], char *why,
                                         size_t why_len)
{
    char in[512], sum[512], cmd[2048];
    snprintf(in, sizeof in, "%s", check_tmp_path("calibration-series.csv"));
    snprintf(sum, sizeof sum, "%s", check_tmp_path("calibration-summary.csv"));
    memset(out, 0, CAL_TESTS * sizeof *out);
    unsigned long seed = calibration_seed(c, s->salt);
    if (calibration_write_case(c, s->series, seed, in) != 0) {
        snprintf(why, why_len, "could not write %s", in);
        return CAL_ERROR;
    }
    snprintf(cmd, sizeof cmd,
             "%s screen --indicators variance,lag1,recovery_trend --surrogates %zu --seed %lu "
             "--threads 2 %s%s %s '%s' -o '%s'",
             check_binary(), s->surrogates, calibration_seed(c, s->salt + 1),
             s->null ? "--null " : "", s->null ? s->null : "", c->options, in, sum);
    char *err = NULL;
    int rc = check_run(cmd, NULL, &err);
    calibration_outcome outcome = CAL_RAN;
    if (err)
        err[strcspn(err, "\n")] = '\0'; /* the first line is the message */
    if (rc == 1 && c->needs && err && strstr(err, c->needs)) {
        snprintf(why, why_len, "SKIPPED: the binary refuses %s (%.200s)", c->needs, err);
        outcome = CAL_SKIPPED;
    } else if (rc != 0) {
        snprintf(why, why_len, "screen exit %d: %.300s", rc, err ? err : "");
        outcome = CAL_ERROR;
    }
    free(err);
    char *csv = outcome == CAL_RAN ? check_read_file(sum) : NULL;
    if (outcome == CAL_RAN && (!csv || count_summary(csv, out) != 0)) {
        snprintf(why, why_len, "no readable summary from screen");
        outcome = CAL_ERROR;
    }
    free(csv);
    remove(in);
    remove(sum);
    return outcome;
}

/* ---- the suite ---- */

enum { SUITE_SERIES = 400, SUITE_SURROGATES = 99 };

static int report_only(void)
{
    const char *e = getenv("CALIBRATION_REPORT_ONLY");
    return e && *e && strcmp(e, "0") != 0;
}

static void print_cell(const calibration_case *c, int t, const calibration_count *k,
                       size_t bound, const char *verdict)
{
    double lo, hi;
    calibration_interval(k->hits, k->tested, &lo, &hi);
    fprintf(stderr, "%-17s %5zu %-15s %4zu/%-4zu %6.3f %6zu   %.3f-%.3f   %s\n", c->name,
            c->n, calibration_test_names[t], k->hits, k->tested,
            k->tested ? (double)k->hits / (double)k->tested : NAN, bound, lo, hi, verdict);
}

/* Judges one case's cells; returns how many FAIL. */
static size_t judge_case(const calibration_case *c, const calibration_count k[CAL_TESTS],
                         size_t bound, int lenient)
{
    size_t fails = 0;
    for (int t = 0; t < CAL_TESTS; t++) {
        const char *v = calibration_verdict(c, t, NULL, k[t].hits, bound);
        print_cell(c, t, &k[t], bound, v);
        CHECK(k[t].rows == SUITE_SERIES && k[t].tested == SUITE_SERIES,
              "calibration %s %s: %zu rows, %zu with a p-value, want %d", c->name,
              calibration_test_names[t], k[t].rows, k[t].tested, SUITE_SERIES);
        int fail = strcmp(v, "FAIL") == 0;
        fails += fail;
        if (!lenient)
            CHECK(!fail, "calibration %s %s: %zu of %d with p <= 0.05, bound %zu",
                  c->name, calibration_test_names[t], k[t].hits, SUITE_SERIES, bound);
    }
    return fails;
}

void suite_calibration(void)
{
    const char *label = getenv("SLOWSCAN_LABEL");
    if (label && strcmp(label, "sanitized") == 0) {
        fprintf(stderr, "calibration: skipped in the sanitized build (runs in the plain one)\n");
        return;
    }
    struct timespec t0, t1;
    clock_gettime(CLOCK_MONOTONIC, &t0);
    int lenient = report_only();
    calibration_scale scale = {SUITE_SERIES, SUITE_SURROGATES, NULL, 0};
    size_t cells = calibration_tested_cells(NULL);
    size_t bound = calibration_bound(SUITE_SERIES, BATTERY_ALPHA / (double)cells);
    fprintf(stderr, "calibration: S = %d series per case, M = %d surrogates, default null and "
            "detrend; bound = one-sided binomial at %.2g/%zu cells%s\n", SUITE_SERIES,
            SUITE_SURROGATES, BATTERY_ALPHA, cells, lenient ? " (REPORT ONLY)" : "");
    fprintf(stderr, "%-17s %5s %-15s %9s %6s %6s   %-11s   %s\n", "case", "n", "test", "count/S",
            "share", "bound", "95% CI", "verdict");
    size_t fails = 0, skipped = 0;
    for (size_t i = 0; i < calibration_case_count; i++) {
        const calibration_case *c = &calibration_cases[i];
        calibration_count k[CAL_TESTS];
        char why[600] = "";
        calibration_outcome o = calibration_run_case(c, &scale, k, why, sizeof why);
        if (o != CAL_RAN) {
            fprintf(stderr, "%-17s %s\n", c->name, why);
            skipped += o == CAL_SKIPPED;
            CHECK(o == CAL_SKIPPED, "calibration %s: %s", c->name, why);
            continue;
        }
        fails += judge_case(c, k, bound, lenient);
    }
    clock_gettime(CLOCK_MONOTONIC, &t1);
    fprintf(stderr, "calibration: %zu FAIL cells, %zu cases skipped%s; %.0f s\n", fails, skipped,
            lenient && fails ? " (not counted: CALIBRATION_REPORT_ONLY)" : "",
            (double)(t1.tv_sec - t0.tv_sec) + 1e-9 * (double)(t1.tv_nsec - t0.tv_nsec));
}
