/* `make validate`: the calibration battery at a larger scale and under every surrogate null
 * that keeps a series' memory (phase, aaft, iaaft, ar1), as a markdown table of case x test x
 * null (count, share, Clopper-Pearson 95% interval, verdict) on stdout and in OUT.md.
 *
 *   build/validate OUT.md [NULL...]      (default nulls: phase aaft iaaft ar1)
 *
 * A C program rather than a script: it is the `make check` battery (the same case table,
 * generator, screen call, summary parsing and binomial bounds from tests/calibration_cases.c
 * and tests/test_calibration.c) run with other scales, so nothing is written twice.
 * The bound is Bonferroni over every size cell of the whole table (all nulls) at 1%.
 * OUT.md is rewritten after each null (cheapest first), so a long run that is stopped keeps
 * the nulls it finished. Exit status 0 whatever the verdicts: this is a measurement. */
#include "../calibration_cases.h"
#include "../check.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

/* Series per case and surrogates per null: iaaft costs about 17 times a phase surrogate
 * (measured with screen on n = 1000), so it gets fewer series to keep the run near 20-30
 * minutes on two shared cores. */
static const calibration_scale scales[] = {
    {1000, 199, "phase", 101},
    {500, 199, "ar1", 104},
    {500, 199, "aaft", 102},
    {200, 199, "iaaft", 103},
};
enum { NULLS = sizeof scales / sizeof scales[0] };

typedef struct {
    calibration_outcome outcome;
    calibration_count count[CAL_TESTS];
} case_result;

static double seconds_since(const struct timespec *t0)
{
    struct timespec t1;
    clock_gettime(CLOCK_MONOTONIC, &t1);
    return (double)(t1.tv_sec - t0->tv_sec) + 1e-9 * (double)(t1.tv_nsec - t0->tv_nsec);
}

static void run_null(const calibration_scale *s, case_result *res)
{
    for (size_t i = 0; i < calibration_case_count; i++) {
        struct timespec t0;
        clock_gettime(CLOCK_MONOTONIC, &t0);
        char why[600] = "";
        res[i].outcome = calibration_run_case(&calibration_cases[i], s, res[i].count, why,
                                              sizeof why);
        fprintf(stderr, "validate: %-6s %-17s %4.0f s%s%s\n", s->null,
                calibration_cases[i].name, seconds_since(&t0), why[0] ? "  " : "", why);
    }
}

static void print_cell(FILE *f, const calibration_case *c, int t, const calibration_scale *s,
                       const case_result *r, size_t bound)
{
    if (r->outcome == CAL_SKIPPED) {
        fprintf(f, " skipped (binary lacks %s) |", c->needs);
        return;
    }
    if (r->outcome == CAL_ERROR) {
        fprintf(f, " ERROR (screen failed) |");
        return;
    }
    const calibration_count *k = &r->count[t];
    double lo, hi;
    calibration_interval(k->hits, k->tested, &lo, &hi);
    const char *v = calibration_verdict(c, t, s->null, k->hits, bound);
    fprintf(f, " %zu/%zu %.1f%% [%.1f, %.1f] %s%s%s |", k->hits, k->tested,
            k->tested ? 100.0 * (double)k->hits / (double)k->tested : 0.0, 100 * lo, 100 * hi,
            strcmp(v, "FAIL") == 0 ? "**" : "", v, strcmp(v, "FAIL") == 0 ? "**" : "");
}

static void print_table(FILE *f, const calibration_scale *const *run, size_t nulls,
                        case_result *const *res, const size_t *bound, size_t cells)
{
    fprintf(f, "# Calibration: size of screen's tests on null series\n\n"
               "Count of series with p <= 0.05 out of those tested, share, Clopper-Pearson 95%% "
               "interval (percent), verdict. Defaults of the binary (detrend, bandwidth, window);"
               " `--indicators variance,lag1,recovery_trend --threads 2`. A cell FAILs above "
               "the one-sided binomial bound at 5%% nominal, Bonferroni over the %zu size cells "
               "of this table at 1%%. EXPECTED: the tested quantity really changes. n/c: the "
               "ar1 null cannot hold this memory by construction.\n\n", cells);
    for (size_t j = 0; j < nulls; j++)
        fprintf(f, "- `--null %s`: S = %zu series per case, M = %zu surrogates, bound %zu\n",
                run[j]->null, run[j]->series, run[j]->surrogates, bound[j]);
    fprintf(f, "\n| case | test |");
    for (size_t j = 0; j < nulls; j++)
        fprintf(f, " %s |", run[j]->null);
    fprintf(f, "\n|---|---|");
    for (size_t j = 0; j < nulls; j++)
        fprintf(f, "---|");
    fputc('\n', f);
    for (size_t i = 0; i < calibration_case_count; i++)
        for (int t = 0; t < CAL_TESTS; t++) {
            const calibration_case *c = &calibration_cases[i];
            fprintf(f, "| %s | %s |", c->name, calibration_test_names[t]);
            for (size_t j = 0; j < nulls; j++)
                print_cell(f, c, t, run[j], &res[j][i], bound[j]);
            fputc('\n', f);
        }
    fprintf(f, "\nCases:\n\n");
    for (size_t i = 0; i < calibration_case_count; i++)
        fprintf(f, "- `%s` (n = %zu%s%s): %s\n", calibration_cases[i].name,
                calibration_cases[i].n, calibration_cases[i].options[0] ? ", " : "",
                calibration_cases[i].options, calibration_cases[i].what);
}

/* Written to OUT.md.tmp and renamed: a run stopped while writing keeps the previous table. */
static int write_table(const char *path, const calibration_scale *const *run, size_t nulls,
                       case_result *const *res, const size_t *bound, size_t cells)
{
    char tmp[1024];
    snprintf(tmp, sizeof tmp, "%s.tmp", path);
    FILE *out = fopen(tmp, "w");
    if (!out)
        return -1;
    print_table(out, run, nulls, res, bound, cells);
    if (fclose(out) != 0 || rename(tmp, path) != 0) {
        remove(tmp);
        return -1;
    }
    return 0;
}

int main(int argc, char **argv)
{
    if (argc < 2) {
        fprintf(stderr, "usage: validate OUT.md [phase|aaft|iaaft|ar1 ...]\n");
        return 1;
    }
    const calibration_scale *run[NULLS];
    size_t nulls = 0, cells = 0, bound[NULLS];
    for (size_t j = 0; j < NULLS; j++) {
        int wanted = argc == 2;
        for (int a = 2; a < argc; a++)
            wanted |= strcmp(argv[a], scales[j].null) == 0;
        if (wanted) {
            run[nulls++] = &scales[j];
            cells += calibration_tested_cells(scales[j].null);
        }
    }
    if (nulls == 0 || (size_t)(argc - 2) > nulls) {
        fprintf(stderr, "validate: nulls are phase, ar1, aaft, iaaft\n");
        return 1;
    }
    case_result *res[NULLS];
    struct timespec t0;
    clock_gettime(CLOCK_MONOTONIC, &t0);
    int written = 1;
    for (size_t j = 0; j < nulls; j++) {
        res[j] = calloc(calibration_case_count, sizeof *res[j]);
        bound[j] = calibration_bound(run[j]->series, 0.01 / (double)cells);
        run_null(run[j], res[j]);
        written = write_table(argv[1], run, j + 1, res, bound, cells) == 0;
    }
    print_table(stdout, run, nulls, res, bound, cells);
    fprintf(stderr, "validate: %.0f s in all; table in %s\n", seconds_since(&t0), argv[1]);
    int status = !written;
    for (size_t j = 0; j < nulls; j++)
        free(res[j]);
    return status;
}
