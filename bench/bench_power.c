/* Power of the slowing-down tests at equal size against a matched null.
 *
 * Usage: bench_power [METHOD]   (METHOD: a --detrend method; default: the binary's default)
 * Environment: SLOWSCAN_BIN, the command to measure (default build/slowscan).
 *
 * Three approaches to a threshold (bench/common/approaches.c): a fold, a transcritical and a
 * Hopf normal form, the parameter ramped linearly over the record toward (not across) the
 * bifurcation, simulated by Euler-Maruyama with 10 steps per sample, 0.1 time units per sample,
 * sigma 0.05; observed: x (Hopf: Re z). For each approach and length n the matched null is the
 * same model's noise-free run under the same ramp (its mean path) plus the linearisation at
 * t = 0, an Ornstein-Uhlenbeck process (Hopf: a linear oscillator, mu = -1) with the start's
 * recovery rate and the same noise: the mean path and its detrending residue are matched, the
 * growing memory is not.
 *
 * Each test's threshold is the 95% quantile of its statistic over the null series (Kendall
 * tau of rolling variance and of rolling lag1, and the t-value of a1 of recovery_trend; all
 * one-sided, rising), so every test has size 5% by construction and no surrogates are needed;
 * power is the share of approach series above the threshold, with a 95% Clopper-Pearson
 * interval. That interval covers the sampling of the approach series only: the threshold is
 * itself estimated from the nulls, and its realised size scatters about 5% with sd ~0.7%
 * (binomial, 1000 nulls). The statistics are the `statistic` column of `slowscan screen --surrogates 0`
 * run on a CSV of all series of a cell: the bench measures exactly what users run (option
 * parsing, span arithmetic, detrend, windows, the drift fit), and follows the binary's
 * default detrend and any change to recovery_trend without being edited. Approach paths that
 * leave the basin (noise-induced escape, see approaches.h) are redrawn and counted: the
 * powers are those of records that have not yet tipped. */
#include "approaches.h"
#include "slowscan/significance.h"

#include <csv.h>
#include <gsl/gsl_cdf.h>
#include <gsl/gsl_rng.h>
#include <gsl/gsl_statistics_double.h>
#include <math.h>
#include <spawn.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/wait.h>
#include <unistd.h>

extern char **environ;

enum { TESTS = 3, TEST_LAG1 = 1, TEST_DRIFT = 2, LENGTHS = 3, MODELS_MAX = 8 };
enum { NULLS = 1000, APPROACHES = 400, SERIES = NULLS + APPROACHES };
/* Redraws allowed per approach series before the cell is declared unusable. */
enum { MAX_REDRAWS = 50 };
static const size_t lengths[LENGTHS] = {300, 1000, 3000};
static const char *const test_names[TESTS] = {"variance", "lag1", "recovery_trend"};
static const double TARGET_POWER = 0.90;

typedef struct {
    size_t n;
    double *x;                  /* SERIES paths of n samples: nulls first, then approaches */
    double stat[TESTS][SERIES]; /* the screen's statistic per test and series */
    size_t redrawn, missing;    /* escaped approach paths; statistics the screen gave as NA */
} cell;

typedef struct {
    const char *bin, *method, *dir;
} bench_setup;

typedef struct {
    double power, lo, hi; /* share above the threshold and its 95% interval */
} estimate;

/* Null and approach paths come from their own streams, seeded by (model, length, kind), so a
 * cell's numbers do not depend on the other cells or on the number of series of the other kind. */
static int simulate_cell(size_t model, size_t length, cell *c)
{
    const approach_model *m = &approach_models[model];
    const struct {
        path_kind kind;
        size_t first, count;
    } groups[2] = {{PATH_NULL, 0, NULLS}, {PATH_APPROACH, NULLS, APPROACHES}};
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    if (!r)
        return -1;
    for (int g = 0; g < 2; g++) {
        gsl_rng_set(r, 1 + 100 * model + 10 * length + (size_t)groups[g].kind);
        for (size_t j = groups[g].first; j < groups[g].first + groups[g].count; j++)
            while (approach_simulate(m, groups[g].kind, c->n, r, c->x + j * c->n))
                if (++c->redrawn > MAX_REDRAWS * APPROACHES) {
                    gsl_rng_free(r);
                    fprintf(stderr, "bench_power: %s, n = %zu: nearly every path escapes\n", m->name, c->n);
                    return -1;
                }
    }
    gsl_rng_free(r);
    return 0;
}

/* One column per series (s0 .. s599), time i * SAMPLE_DT; 9 significant digits keep the
 * rounding far below the noise (sd >= 0.02). */
static int write_cell_csv(const char *path, const cell *c)
{
    FILE *f = fopen(path, "w");
    if (!f)
        return -1;
    fputs("time", f);
    for (size_t j = 0; j < SERIES; j++)
        fprintf(f, ",s%zu", j);
    fputc('\n', f);
    for (size_t i = 0; i < c->n; i++) {
        fprintf(f, "%.10g", SAMPLE_DT * (double)i);
        for (size_t j = 0; j < SERIES; j++)
            fprintf(f, ",%.9g", c->x[j * c->n + i]);
        fputc('\n', f);
    }
    return fclose(f) == 0 ? 0 : -1;
}

/* Runs the screen with no surrogates; its own messages go to our stderr. */
static int run_screen(const bench_setup *s, const char *input, const char *output)
{
    char tests[64] = "";
    for (int t = 0; t < TESTS; t++)
        snprintf(tests + strlen(tests), sizeof tests - strlen(tests), "%s%s", t ? "," : "", test_names[t]);
    const char *argv[16] = {s->bin, "screen", "--surrogates", "0", "--no-progress", "--indicators",
                            tests, "-o", output};
    size_t argc = 9;
    if (s->method) {
        argv[argc++] = "--detrend";
        argv[argc++] = s->method;
    }
    argv[argc++] = input;
    argv[argc] = NULL;
    pid_t pid;
    int status;
    if (posix_spawnp(&pid, s->bin, NULL, NULL, (char *const *)argv, environ) != 0) {
        fprintf(stderr, "bench_power: cannot run %s (set SLOWSCAN_BIN)\n", s->bin);
        return -1;
    }
    if (waitpid(pid, &status, 0) < 0 || !WIFEXITED(status) || WEXITSTATUS(status) != 0) {
        fprintf(stderr, "bench_power: %s screen failed on %s\n", s->bin, input);
        return -1;
    }
    return 0;
}

/* Reads series, indicator and statistic of every row of the summary CSV (columns found by
 * name in the header, so a leading file column or new columns do not matter). */
typedef struct {
    cell *c;
    size_t field, row, filled;
    long col[3], series;
    int test;
    double value;
} summary_reader;

static const char *const summary_columns[3] = {"series", "indicator", "statistic"};

/* Column k of a data row: series s<j> (j its index), the test's name, the statistic (NA and
 * anything else that is not a number: NaN). */
static void take_field(summary_reader *rd, int k, const char *text)
{
    char *end;
    if (k == 0) {
        long j = text[0] == 's' ? strtol(text + 1, &end, 10) : -1;
        rd->series = j >= 0 && text[1] && !*end ? j : -1;
    }
    for (int t = 0; k == 1 && t < TESTS; t++)
        if (strcmp(text, test_names[t]) == 0)
            rd->test = t;
    if (k == 2) {
        double v = strtod(text, &end);
        rd->value = *text && !*end ? v : NAN;
    }
}

static void on_field(void *data, size_t len, void *state)
{
    summary_reader *rd = state;
    const char *text = data ? data : "";
    (void)len;
    for (int k = 0; k < 3; k++) {
        if (rd->row == 0 && strcmp(text, summary_columns[k]) == 0)
            rd->col[k] = (long)rd->field;
        else if (rd->row > 0 && rd->col[k] == (long)rd->field)
            take_field(rd, k, text);
    }
    rd->field++;
}

static void on_row(int terminator, void *state)
{
    summary_reader *rd = state;
    (void)terminator;
    if (rd->row > 0 && rd->series >= 0 && rd->series < SERIES && rd->test >= 0) {
        rd->c->stat[rd->test][rd->series] = rd->value;
        rd->c->missing += !isfinite(rd->value);
        rd->filled++;
    }
    rd->row++;
    rd->field = 0;
    rd->series = -1;
    rd->test = -1;
    rd->value = NAN;
}

static int read_summary(const char *path, cell *c)
{
    summary_reader rd = {c, 0, 0, 0, {-1, -1, -1}, -1, -1, NAN};
    struct csv_parser p;
    FILE *f = fopen(path, "r");
    if (!f || csv_init(&p, CSV_APPEND_NULL) != 0) {
        if (f)
            fclose(f);
        return -1;
    }
    char buf[1 << 16];
    size_t got;
    int ok = 1;
    while (ok && (got = fread(buf, 1, sizeof buf, f)) > 0)
        ok = csv_parse(&p, buf, got, on_field, on_row, &rd) == got;
    ok = ok && csv_fini(&p, on_field, on_row, &rd) == 0;
    csv_free(&p);
    fclose(f);
    if (!ok || rd.filled != (size_t)TESTS * SERIES) {
        fprintf(stderr, "bench_power: %s: expected %d rows with series, indicator, statistic\n",
                path, TESTS * SERIES);
        return -1;
    }
    return 0;
}

static int by_value(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

/* A statistic the screen could not compute (NA) never exceeds a threshold: in the null it
 * sorts below every value, in the approaches it is not a detection. */
static void slowscan_report_cell(const char *model, const cell *c, estimate power[TESTS])
{
    static double sorted[NULLS];
    for (int t = 0; t < TESTS; t++) {
        for (size_t j = 0; j < NULLS; j++)
            sorted[j] = isfinite(c->stat[t][j]) ? c->stat[t][j] : -INFINITY;
        qsort(sorted, NULLS, sizeof *sorted, by_value);
        double threshold = gsl_stats_quantile_from_sorted_data(sorted, 1, NULLS, 0.95);
        size_t hits = 0;
        for (size_t j = NULLS; j < SERIES; j++)
            hits += c->stat[t][j] > threshold;
        estimate *e = &power[t];
        slowscan_significance_binomial_interval(hits, APPROACHES, &e->lo, &e->hi);
        e->power = (double)hits / APPROACHES;
        printf("%-14s %5zu  %-15s %9.4f %7.3f  [%.3f, %.3f]\n", model, c->n, test_names[t],
               threshold, e->power, e->lo, e->hi);
    }
}

/* Simulate, write, screen, read and report one approach at one length. */
static int run_cell(const bench_setup *s, size_t model, size_t length, cell *c, estimate power[TESTS])
{
    char input[4096], output[4096];
    snprintf(input, sizeof input, "%s/series.csv", s->dir);
    snprintf(output, sizeof output, "%s/summary.csv", s->dir);
    c->n = lengths[length];
    c->redrawn = c->missing = 0;
    c->x = malloc((size_t)SERIES * c->n * sizeof *c->x);
    int rc = c->x ? simulate_cell(model, length, c) : -1;
    if (rc == 0 && write_cell_csv(input, c) != 0) {
        fprintf(stderr, "bench_power: cannot write %s\n", input);
        rc = -1;
    }
    free(c->x);
    rc = rc == 0 ? run_screen(s, input, output) : rc;
    rc = rc == 0 ? read_summary(output, c) : rc;
    remove(input);
    remove(output);
    if (rc == 0)
        slowscan_report_cell(approach_models[model].name, c, power);
    return rc;
}

/* How a point estimate stands against a target, and whether the intervals settle it. */
static const char *verdict(int met, int settled)
{
    return met ? (settled ? "met" : "met, not settled by the intervals")
               : (settled ? "NOT met" : "NOT met, not settled by the intervals");
}

/* The targets: recovery_trend at least as powerful as lag1 at n = 1000, and at
 * least 0.90 at n = 3000. A comparison is settled when the intervals do not overlap (for the
 * level: when the interval lies on one side of it). */
static void report_targets(estimate power[][LENGTHS][TESTS])
{
    int all = 1;
    printf("\ntargets (recovery_trend power >= lag1 power at n = %zu; >= %.2f at n = %zu):\n",
           lengths[1], TARGET_POWER, lengths[2]);
    for (size_t m = 0; m < approach_model_count; m++) {
        const estimate *drift = &power[m][1][TEST_DRIFT], *lag1 = &power[m][1][TEST_LAG1];
        const estimate *top = &power[m][2][TEST_DRIFT];
        int versus = drift->power >= lag1->power, level = top->power >= TARGET_POWER;
        int versus_settled = drift->lo > lag1->hi || drift->hi < lag1->lo;
        int level_settled = top->lo > TARGET_POWER || top->hi < TARGET_POWER;
        printf("  %-14s n = %zu: %.3f vs lag1 %.3f: %s;  n = %zu: %.3f: %s\n",
               approach_models[m].name, lengths[1], drift->power, lag1->power,
               verdict(versus, versus_settled), lengths[2], top->power, verdict(level, level_settled));
        all &= versus & level;
    }
    printf("  all targets met (point estimates): %s\n", all ? "yes" : "no");
}

static void report_cell_notes(const char *model, const cell *c)
{
    if (c->redrawn || c->missing)
        printf("%-14s %5zu  (%zu approach paths escaped and were redrawn; %zu statistics NA)\n",
               model, c->n, c->redrawn, c->missing);
}

int main(int argc, char **argv)
{
    if (argc > 2 || approach_model_count > MODELS_MAX) {
        fprintf(stderr, "usage: bench_power [DETREND-METHOD]\n");
        return 1;
    }
    const char *tmp = getenv("TMPDIR");
    char dir[4096];
    snprintf(dir, sizeof dir, "%s/bench_power.XXXXXX", tmp && *tmp ? tmp : "/tmp");
    bench_setup s = {getenv("SLOWSCAN_BIN"), argc > 1 ? argv[1] : NULL, mkdtemp(dir)};
    s.bin = s.bin && *s.bin ? s.bin : "build/slowscan";
    if (!s.dir) {
        perror("bench_power: temporary folder");
        return 1;
    }
    static cell c;
    static estimate power[MODELS_MAX][LENGTHS][TESTS];
    printf("power at equal size (5%%, threshold: 95%% quantile of %d matched-null series), "
           "%d approach series per cell; detrend %s\n", NULLS, APPROACHES,
           s.method ? s.method : "(the binary's default)");
    printf("%-14s %5s  %-15s %9s %7s  %s\n", "approach", "n", "test", "threshold", "power",
           "95% interval");
    int rc = 0;
    for (size_t m = 0; m < approach_model_count && rc == 0; m++)
        for (size_t l = 0; l < LENGTHS && rc == 0; l++) {
            rc = run_cell(&s, m, l, &c, power[m][l]);
            if (rc == 0)
                report_cell_notes(approach_models[m].name, &c);
        }
    rmdir(s.dir);
    if (rc != 0)
        return 1;
    report_targets(power);
    return 0;
}
