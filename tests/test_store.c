/* What a screening run keeps for its q-values: the record spill store (io.h) and the screen
 * store (screen_store.h), and `slowscan screen` spilling its records to a temporary file.
 *
 * Checks of the project against itself: records read back equal those written, whether they
 * stayed in memory or went to the file; the store's q-values and flags equal
 * slowscan_screen_decide's (whose q-values are compared with statsmodels in suite
 * significance); the command's outputs are byte-identical whether its records spilled or not;
 * no temporary file outlives a run, a failing one included. */
#include "check.h"
#include "slowscan/screen_store.h"
#include "slowscan/status.h"

#include <dirent.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

/* Entries of a folder other than . and .. (-1: it cannot be opened). */
static int entries(const char *dir)
{
    DIR *d = opendir(dir);
    if (!d)
        return -1;
    int count = 0;
    for (struct dirent *e; (e = readdir(d));)
        count += strcmp(e->d_name, ".") != 0 && strcmp(e->d_name, "..") != 0;
    closedir(d);
    return count;
}

/* Record k: (k * 37) % 301 bytes, byte i = (k + 3 i) mod 256 (0 bytes for k = 0). */
static size_t record_of(size_t k, unsigned char *buf)
{
    size_t size = (k * 37) % 301;
    for (size_t i = 0; i < size; i++)
        buf[i] = (unsigned char)(k + 3 * i);
    return size;
}

static int read_matches(record_spill *s, size_t k)
{
    unsigned char want[301], got[301];
    size_t size = record_of(k, want);
    io_error err;
    return slowscan_spill_size(s, k) == size &&
           slowscan_spill_read(s, k, got, &err) == SLOWSCAN_OK && memcmp(got, want, size) == 0;
}

/* Appends and reads interleaved (a read between two appends, backwards, repeated), in memory
 * and spilled from the start or part-way. */
static void spill_store(const char *dir)
{
    static const size_t after[] = {SIZE_MAX, 0, 5};
    enum { RECORDS = 60 };
    for (size_t a = 0; a < sizeof after / sizeof after[0]; a++) {
        record_spill *s = slowscan_spill_alloc(after[a], dir);
        size_t bad = 0;
        io_error err;
        for (size_t k = 0; s && k < RECORDS; k++) {
            unsigned char buf[301];
            size_t size = record_of(k, buf);
            bad += slowscan_spill_append(s, buf, size, &err) != SLOWSCAN_OK;
            bad += k % 7 == 3 && !read_matches(s, k / 2);
        }
        for (size_t k = RECORDS; s && k-- > 0;)
            bad += !read_matches(s, k) + !read_matches(s, k);
        CHECK(s && bad == 0 && slowscan_spill_count(s) == RECORDS,
              "spill store (spill after %zu): every record reads back as written", after[a]);
        CHECK(s && slowscan_spill_spilled(s) == (after[a] < RECORDS),
              "spill store (spill after %zu): spilled exactly when past its count", after[a]);
        CHECK(entries(dir) == 0, "spill store: its file has no name in %s while open", dir);
        unsigned char out[301];
        CHECK(s && slowscan_spill_read(s, RECORDS, out, &err) == SLOWSCAN_EINVAL,
              "spill store: an index past the end is refused");
        slowscan_spill_free(s);
    }
    const char *missing = check_tmp_path("no-such-folder");
    record_spill *s = slowscan_spill_alloc(0, missing);
    io_error err = {{0}};
    unsigned char one = 1;
    CHECK(s && slowscan_spill_append(s, &one, 1, &err) == SLOWSCAN_EIO &&
          strstr(err.message, missing) && slowscan_spill_count(s) == 0,
          "spill store: a folder that does not exist fails naming it (%s)", err.message);
    slowscan_spill_free(s);
}

/* Series k of the store check: 1 + k % SCREEN_MAX_TESTS tests, p-values with NaN (no p),
 * negative statistics, tests without surrogates, and a surrogate count that differs by series. */
static screen_result result_of(check_rng *rng, size_t k)
{
    screen_result r;
    memset(&r, 0, sizeof r);
    r.n = 100 + k;
    r.window = 0.5 * (double)k;
    r.ntests = 1 + k % SCREEN_MAX_TESTS;
    for (size_t j = 0; j < r.ntests; j++) {
        screen_test *t = &r.tests[j];
        double u = check_rng_uniform(rng);
        t->kind = (int)j;
        t->statistic = (k + j) % 11 == 5 ? NAN : u - 0.4;
        t->surrogates = (k + j) % 13 == 0 ? 0 : 19 + 80 * (k % 3);
        t->p_value = isnan(t->statistic) || !t->surrogates || (k + j) % 9 == 2
                         ? NAN : pow(check_rng_uniform(rng), 3);
        t->quantile[2] = u;
    }
    return r;
}

/* The store against slowscan_screen_decide on the same tests: q-values and flags exactly,
 * the records as added (the caller's block aligned), in memory and spilled. */
static void screen_store_decides(const char *dir)
{
    enum { SERIES = 40 };
    static const size_t after[] = {SIZE_MAX, 0, 7};
    screen_result *results = malloc(SERIES * sizeof *results);
    const screen_test **tests = malloc(SERIES * SCREEN_MAX_TESTS * sizeof *tests);
    double *q = malloc(SERIES * SCREEN_MAX_TESTS * sizeof *q);
    screen_flag *flags = malloc(SERIES * SCREEN_MAX_TESTS * sizeof *flags);
    check_rng *rng = check_rng_alloc(5);
    size_t count = 0;
    for (size_t k = 0; k < SERIES; k++) {
        results[k] = result_of(rng, k);
        for (size_t j = 0; j < results[k].ntests; j++)
            tests[count++] = &results[k].tests[j];
    }
    CHECK(slowscan_screen_decide(tests, count, 0.1, q, flags) == SLOWSCAN_OK, "decide");
    for (size_t a = 0; a < sizeof after / sizeof after[0]; a++) {
        screen_store *s = slowscan_screen_store_alloc(after[a], dir);
        io_error err;
        size_t bad = 0, r = 0, misaligned = 0;
        for (size_t k = 0; s && k < SERIES; k++) {
            char name[32];
            snprintf(name, sizeof name, "series %zu", k);
            bad += slowscan_screen_store_add(s, name, &results[k], results[k].tests,
                                             k * sizeof(double), &err) != SLOWSCAN_OK;
        }
        bad += !s || slowscan_screen_store_decide(s, 0.1) != SLOWSCAN_OK;
        for (size_t k = 0; !bad && k < SERIES; k++) {
            screen_stored got;
            char name[32];
            snprintf(name, sizeof name, "series %zu", k);
            bad += slowscan_screen_store_read(s, k, &got, &err) != SLOWSCAN_OK;
            bad += memcmp(&got.result, &results[k], sizeof got.result) != 0 ||
                   strcmp(got.name, name) != 0 || got.extra_size != k * sizeof(double) ||
                   (k && memcmp(got.extra, results[k].tests, k * sizeof(double)) != 0);
            misaligned += got.extra && (uintptr_t)got.extra % 16 != 0;
            for (size_t j = 0; j < got.result.ntests; j++, r++)
                bad += !(got.q_value[j] == q[r] || (isnan(got.q_value[j]) && isnan(q[r]))) ||
                       got.flag[j] != flags[r];
        }
        CHECK(bad == 0 && r == count && slowscan_screen_store_tests(s) == count,
              "screen store (spill after %zu): records as added, q and flags as "
              "slowscan_screen_decide's", after[a]);
        CHECK(misaligned == 0, "screen store: the caller's block comes back 16-byte aligned");
        slowscan_screen_store_free(s);
    }
    check_rng_free(rng);
    free(results);
    free(tests);
    free(q);
    free(flags);
}

/* Runs `slowscan screen ARGS -o OUT` with the environment ENV; returns the exit status. */
static int screen(const char *env, const char *args, const char *out, char **err)
{
    char cmd[4096];
    snprintf(cmd, sizeof cmd, "%s %s screen --no-progress %s -o %s", env, check_binary(), args,
             out);
    return check_run(cmd, NULL, err);
}

static int same_files(const char *a, const char *b)
{
    char *x = check_read_file(a), *y = check_read_file(b);
    int same = x && y && strcmp(x, y) == 0;
    free(x);
    free(y);
    return same;
}

/* Byte-identical outputs (summary in both formats, JSON, figures, messages) whether the
 * records stayed in memory or spilled after 3 series, at 1 and 2 threads. */
static void command_spills_identically(const char *dir)
{
    static const char *const formats[] = {"csv", "table"};
    const char *input = "tests/golden/batch.csv";
    char figs[2][600], json[2][600], out[2][600], env[2][700];
    snprintf(env[0], sizeof env[0], "TMPDIR=%s", dir);
    snprintf(env[1], sizeof env[1], "TMPDIR=%s SLOWSCAN_SPILL_AFTER=3", dir);
    for (size_t f = 0; f < 2; f++) {
        char *err[2] = {NULL, NULL};
        int rc[2];
        for (int v = 0; v < 2; v++) {
            char name[64], args[1600];
            snprintf(name, sizeof name, "spill-%d-figures-%zu", v, f);
            snprintf(figs[v], sizeof figs[v], "%s", check_tmp_path(name));
            mkdir(figs[v], 0755);
            snprintf(name, sizeof name, "spill-%d-%zu.json", v, f);
            snprintf(json[v], sizeof json[v], "%s", check_tmp_path(name));
            snprintf(name, sizeof name, "spill-%d-%zu.out", v, f);
            snprintf(out[v], sizeof out[v], "%s", check_tmp_path(name));
            snprintf(args, sizeof args, "--surrogates 19 --indicators variance,lag1,"
                     "recovery_trend --vars s0,s1,s2,s3,s4,s5,s6,s7,s8,s9,s10 --threads %zu "
                     "--format %s --json %s --figures %s %s", f + 1, formats[f], json[v],
                     figs[v], input);
            rc[v] = screen(env[v], args, out[v], &err[v]);
        }
        CHECK(rc[0] == 0 && rc[1] == 0 && same_files(out[0], out[1]) &&
              same_files(json[0], json[1]) && err[0] && err[1] && strcmp(err[0], err[1]) == 0,
              "screen --format %s --threads %zu: summary, JSON and messages the same spilled",
              formats[f], f + 1);
        size_t figures = 0, differ = 0;
        DIR *d = opendir(figs[0]);
        for (struct dirent *e; d && (e = readdir(d));) {
            if (e->d_name[0] == '.')
                continue;
            char a[1200], b[1200];
            snprintf(a, sizeof a, "%s/%s", figs[0], e->d_name);
            snprintf(b, sizeof b, "%s/%s", figs[1], e->d_name);
            figures++;
            differ += !same_files(a, b);
        }
        if (d)
            closedir(d);
        CHECK(figures == 12 && differ == 0,
              "screen --figures: %zu figures, %zu differ when spilled", figures, differ);
        free(err[0]);
        free(err[1]);
    }
    CHECK(entries(dir) == 0, "no temporary file left in TMPDIR after spilling runs");
}

/* A run that fails after its records spilled, and one whose TMPDIR cannot take the file. */
static void failing_runs_leave_nothing(const char *dir)
{
    /* The control run: s0 and s1 vary, s2 is constant, which refuses the third series. */
    const char *control = check_tmp_path("spill-control.csv");
    FILE *c = fopen(control, "w");
    for (int i = 0; c && i <= 90; i++)
        i == 0 ? fputs("t,s0,s1,s2\n", c)
               : fprintf(c, "%d,%d,%d,1\n", i - 1, (i * 7) % 11, (i * 5) % 13);
    CHECK(c && fclose(c) == 0, "write %s", control);
    char env[700], args[1200], out[600];
    snprintf(out, sizeof out, "%s", check_tmp_path("spill-failed.csv"));
    snprintf(env, sizeof env, "TMPDIR=%s SLOWSCAN_SPILL_AFTER=1", dir);
    snprintf(args, sizeof args, "--surrogates 19 --null control --control %s --vars s0,s1,s2 "
             "tests/golden/batch.csv", control);
    char *err = NULL;
    int rc = screen(env, args, out, &err);
    CHECK(rc == 1 && err && strstr(err, "'s2'") && strstr(err, "no usable variation") &&
              !check_file_exists(out),
          "a run failing at its third series (records spilled) exits 1, no output (%s)",
          err ? err : "");
    CHECK(entries(dir) == 0, "no temporary file left in TMPDIR after a failing run");
    free(err);
    err = NULL;
    const char *missing = check_tmp_path("no-such-tmpdir");
    snprintf(env, sizeof env, "TMPDIR=%s SLOWSCAN_SPILL_AFTER=1", missing);
    rc = screen(env, "--surrogates 0 tests/golden/batch.csv", out, &err);
    CHECK(rc == 1 && err && strstr(err, missing) && strchr(err, '\n') == strrchr(err, '\n') &&
              !check_file_exists(out),
          "spilling into a TMPDIR that does not exist: exit 1, one message naming it (%s)",
          err ? err : "");
    free(err);
}

void suite_store(void)
{
    char dir[600];
    snprintf(dir, sizeof dir, "%s", check_tmp_path("spill-tmpdir"));
    CHECK(mkdir(dir, 0700) == 0, "make %s", dir);
    spill_store(dir);
    screen_store_decides(dir);
    command_spills_identically(dir);
    failing_runs_leave_nothing(dir);
}
