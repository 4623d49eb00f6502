/* Byte-identity of every command's outputs against files committed in tests/golden/, at
 * --threads 1, 2 and 3. The files were written by the binary before the screening pipeline
 * moved into the library (screen/); the move must not change a byte of any output, nor of
 * the messages on standard error. The check is against the project's own earlier outputs,
 * not against the outside world: the numbers themselves are checked by the other suites.
 *
 * GOLDEN_UPDATE=1 build/run_tests golden rewrites the files (and the batch input) from the
 * current binary at --threads 1; do that only when an output is meant to change.
 *
 * Inputs are named by the same relative paths as when the files were made (the JSON
 * outputs record them), so the suite runs from the repository's top folder like the rest. */
#include "check.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define GOLDEN_DIR "tests/golden/"
#define BATCH_CSV GOLDEN_DIR "batch.csv"
#define CONTROL_CSV GOLDEN_DIR "control.csv"

/* A side output of a command: the option writing it and the golden file's suffix. */
typedef struct {
    const char *option, *suffix;
} side_output;

typedef struct {
    const char *name; /* golden files are NAME.out, NAME.err, NAME.SUFFIX */
    const char *args; /* command and options, before -o and the side outputs */
    const char *input;
    int threaded; /* takes --threads */
    side_output side[3];
} golden_case;

static const golden_case cases[] = {
    {"screen_stations",
     "screen --deseason 364 --indicators variance,lag1,recovery_trend --surrogates 99",
     "data/stations.csv", 1, {{"--json", "json"}, {"--rolling", "rolling.csv"}}},
    {"screen_batch", "screen --surrogates 99 --indicators variance,lag1,recovery_trend",
     BATCH_CSV, 1, {{"--json", "json"}}},
    {"screen_control",
     "screen --null control --control " CONTROL_CSV " --surrogates 19 --vars s0,s3,s7,s11,s20",
     BATCH_CSV, 1, {{NULL, NULL}}},
    {"robustness",
     "robustness --deseason 364 --vars reed_inlet,north_bay --surrogates 19 --windows 40%:60%:10% "
     "--bandwidths 5%:15%:5% --indicators variance,lag1,recovery_trend",
     "data/stations.csv", 1, {{NULL, NULL}}},
    {"recovery", "recovery --deseason 364 --vars reed_inlet,mill_pond --surrogates 19",
     "data/stations.csv", 1, {{"--json", "json"}, {"--project", "project.csv"}}},
    {"indicators", "indicators --deseason 364 --vars reed_inlet,deep_basin --indicators variance,lag1,ar1,recovery,skewness",
     "data/stations.csv", 0, {{NULL, NULL}}},
    {"detrend", "detrend --deseason 364 --vars reed_inlet,deep_basin", "data/stations.csv", 0, {{NULL, NULL}}},
    {"surrogates", "surrogates --vars north_bay,east_shoal --surrogates 3", "data/stations.csv",
     0, {{NULL, NULL}}},
};

/* The batch input: 40 short series, AR(1) with a rising variance in some, a constant one and
 * some with long gaps (so the summary holds every reason a row can be insufficient). Invented
 * data, used only to pin the outputs. */
enum { BATCH_SERIES = 40, BATCH_N = 90 };

static int write_batch(const char *path)
{
    double *x = malloc(BATCH_SERIES * BATCH_N * sizeof *x);
    check_rng *rng = check_rng_alloc(20261202);
    if (!x || !rng) {
        free(x);
        check_rng_free(rng);
        return -1;
    }
    for (size_t k = 0; k < BATCH_SERIES; k++) {
        double state = 0, phi = 0.2 + 0.015 * (double)k;
        for (size_t i = 0; i < BATCH_N; i++) {
            double ramp = k % 3 == 0 ? 1.0 + 2.0 * (double)i / BATCH_N : 1.0;
            state = phi * state + ramp * check_rng_gaussian(rng);
            double v = state + 0.05 * (double)i;
            if (k == 7)
                v = 3.0; /* constant */
            if (k == 11 && i % 10 != 0)
                v = NAN; /* too few finite values for any indicator */
            if (k == 17 && i > 20 && i < 60)
                v = NAN; /* a long gap */
            x[k * BATCH_N + i] = v;
        }
    }
    int rc = check_write_columns_csv(path, BATCH_SERIES, BATCH_N, x);
    free(x);
    check_rng_free(rng);
    return rc;
}

/* A control run for the batch: the same column names, AR(1) of constant variance, longer. */
enum { CONTROL_N = 120 };

static int write_control(const char *path)
{
    double *x = malloc(BATCH_SERIES * CONTROL_N * sizeof *x);
    check_rng *rng = check_rng_alloc(20261203);
    int rc = -1;
    if (x && rng) {
        for (size_t k = 0; k < BATCH_SERIES; k++) {
            double state = 0;
            for (size_t i = 0; i < CONTROL_N; i++)
                x[k * CONTROL_N + i] = state = 0.5 * state + check_rng_gaussian(rng);
        }
        rc = check_write_columns_csv(path, BATCH_SERIES, CONTROL_N, x);
    }
    free(x);
    check_rng_free(rng);
    return rc;
}

static void golden_path(char *buf, size_t size, const golden_case *c, const char *suffix)
{
    snprintf(buf, size, GOLDEN_DIR "%s.%s", c->name, suffix);
}

/* Messages may name an output file, which lives in this run's scratch folder: the folder is
 * written as SCRATCH so the text does not depend on it. */
static char *scratch_named(char *text)
{
    char dir[512];
    snprintf(dir, sizeof dir, "%s", check_tmp_path("x"));
    size_t len = strlen(dir) - 1; /* the folder with its trailing slash */
    dir[len] = 0;
    for (char *at = text; at && (at = strstr(at, dir)) != NULL; at += 8) {
        memcpy(at, "SCRATCH/", 8);
        memmove(at + 8, at + len, strlen(at + len) + 1);
    }
    return text;
}

/* Compares one produced file with its golden file (or, when updating, copies it there). */
static void compare_file(const golden_case *c, const char *suffix, const char *produced,
                         long threads, int update)
{
    char want_path[256];
    golden_path(want_path, sizeof want_path, c, suffix);
    char *got = scratch_named(check_read_file(produced));
    CHECK(got != NULL, "%s --threads %ld: %s not written", c->name, threads, suffix);
    if (!got)
        return;
    if (update) {
        CHECK(check_write_file(want_path, got) == 0, "cannot write %s", want_path);
        free(got);
        return;
    }
    char *want = check_read_file(want_path);
    CHECK(want != NULL, "%s missing (GOLDEN_UPDATE=1 makes it)", want_path);
    if (want) {
        size_t i = 0;
        while (got[i] && got[i] == want[i])
            i++;
        CHECK(got[i] == want[i], "%s --threads %ld: %s differs from %s at byte %zu", c->name,
              threads, suffix, want_path, i);
    }
    free(want);
    free(got);
}

static void run_case(const golden_case *c, long threads, int update)
{
    char cmd[2048], out[512], err_file[512], side[3][512];
    snprintf(out, sizeof out, "%s", check_tmp_path("golden.out"));
    snprintf(err_file, sizeof err_file, "%s", check_tmp_path("golden.err"));
    remove(out);
    remove(err_file);
    int len = snprintf(cmd, sizeof cmd, "%s %s -o '%s'", check_binary(), c->args, out);
    if (c->threaded)
        len += snprintf(cmd + len, sizeof cmd - (size_t)len, " --threads %ld", threads);
    for (size_t s = 0; s < 3 && c->side[s].option; s++) {
        char name[64];
        snprintf(name, sizeof name, "golden.%s", c->side[s].suffix);
        snprintf(side[s], sizeof side[s], "%s", check_tmp_path(name));
        remove(side[s]);
        len += snprintf(cmd + len, sizeof cmd - (size_t)len, " %s '%s'", c->side[s].option,
                        side[s]);
    }
    snprintf(cmd + len, sizeof cmd - (size_t)len, " %s 2>'%s'", c->input, err_file);
    int rc = check_run(cmd, NULL, NULL);
    CHECK(rc == 0, "%s --threads %ld: exit %d", c->name, threads, rc);
    compare_file(c, "out", out, threads, update);
    compare_file(c, "err", err_file, threads, update);
    for (size_t s = 0; s < 3 && c->side[s].option; s++)
        compare_file(c, c->side[s].suffix, side[s], threads, update);
}

void suite_golden(void)
{
    const char *env = getenv("GOLDEN_UPDATE");
    int update = env && strcmp(env, "1") == 0;
    /* GOLDEN_MAX_THREADS=2: make memcheck's subset (a third thread adds no code path, and
     * under valgrind each run costs tens of seconds) */
    const char *cap = getenv("GOLDEN_MAX_THREADS");
    long max_threads = cap && atol(cap) >= 1 && atol(cap) <= 3 ? atol(cap) : 3;
    if (update)
        CHECK(write_batch(BATCH_CSV) == 0 && write_control(CONTROL_CSV) == 0,
              "cannot write %s, %s", BATCH_CSV, CONTROL_CSV);
    for (size_t k = 0; k < sizeof cases / sizeof cases[0]; k++)
        for (long threads = 1; threads <= max_threads; threads++) {
            run_case(&cases[k], threads, update && threads == 1);
            if (update || !cases[k].threaded)
                break;
        }
    if (update)
        return;
    /* Every CSV input read a table of series at a time (as files over 64 MiB are): the same
     * bytes, messages included. */
    setenv("SLOWSCAN_STREAM_AFTER", "0", 1);
    for (size_t k = 0; k < sizeof cases / sizeof cases[0]; k++)
        run_case(&cases[k], cases[k].threaded ? 2 : 1, 0);
    unsetenv("SLOWSCAN_STREAM_AFTER");
}
