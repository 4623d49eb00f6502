/* Resource limits (issue 18): a run whose memory estimate (slowscan_screen_memory_estimate)
 * exceeds the memory available — the room under the cgroup limit, or MemAvailable — is
 * refused before it starts, with one message naming the option (or the input) and both
 * numbers, and no output file. The limits are faked through the command's testing hooks
 * SLOWSCAN_CGROUP (a directory holding memory.max and memory.current, or the v1 files
 * memory.limit_in_bytes and memory.usage_in_bytes) and SLOWSCAN_MEMINFO (a meminfo file).
 * The estimate itself is checked against its own definition (additive in the surrogates and
 * the workers; common practice, no source). */
#include "check.h"
#include "slowscan/robustness.h"
#include "slowscan/screen.h"

#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

enum { N = 200 };

static double ar1_sample(check_rng *rng, size_t k, size_t i, size_t n, double *state)
{
    (void)k, (void)i, (void)n;
    *state = 0.6 * *state + check_rng_gaussian(rng);
    return *state;
}

/* A fake cgroup directory: v2 (memory.max, memory.current) or v1 file names. The paths are
 * kept in a ring of their own (check_tmp_path's is reused after 16 calls). */
static const char *keep_path(const char *path)
{
    static char kept[16][512];
    static size_t next;
    char *p = kept[next++ % 16];
    snprintf(p, 512, "%s", path);
    return p;
}

static const char *fake_cgroup(const char *name, const char *limit, const char *usage, int v1)
{
    const char *dir = keep_path(check_tmp_path(name));
    mkdir(dir, 0755);
    char path[700];
    snprintf(path, sizeof path, "%s/%s", dir, v1 ? "memory.limit_in_bytes" : "memory.max");
    check_write_file(path, limit);
    snprintf(path, sizeof path, "%s/%s", dir, v1 ? "memory.usage_in_bytes" : "memory.current");
    check_write_file(path, usage);
    return dir;
}

static const char *fake_meminfo(const char *name, long kib)
{
    const char *path = keep_path(check_tmp_path(name));
    char text[200];
    snprintf(text, sizeof text, "MemTotal:       32000000 kB\nMemFree:         1000 kB\n"
             "MemAvailable:   %ld kB\n", kib);
    check_write_file(path, text);
    return path;
}

/* Runs the command under the fake limits; checks exit 1, one message line holding every
 * `want` string, and no output left; or exit 0 when want is NULL. */
static void run_limited_env(const char *env, const char *cgroup, const char *meminfo,
                            const char *args, const char *const *want, const char *what)
{
    const char *out = check_tmp_path("limited-out.csv");
    remove(out);
    char cmd[2048], *err = NULL;
    snprintf(cmd, sizeof cmd, "%s SLOWSCAN_CGROUP='%s' SLOWSCAN_MEMINFO='%s' %s %s -o %s %s", env,
             cgroup, meminfo, check_binary(), args, out, check_tmp_path("limits.csv"));
    int rc = check_run(cmd, NULL, &err);
    if (!want) {
        CHECK(rc == 0 && check_file_exists(out), "%s: runs (exit %d: %s)", what, rc, err ? err : "");
        free(err);
        return;
    }
    CHECK(rc == 1, "%s: exit %d, want 1 (%s)", what, rc, err ? err : "");
    size_t lines = 0;
    for (const char *p = err; p && *p; p++)
        lines += *p == '\n';
    CHECK(lines == 1, "%s: one message line (%s)", what, err ? err : "");
    for (size_t k = 0; want[k]; k++)
        CHECK(err && strstr(err, want[k]), "%s: message lacks '%s': %s", what, want[k],
              err ? err : "");
    CHECK(!check_file_exists(out), "%s: no output file left", what);
    free(err);
}

static void run_limited(const char *cgroup, const char *meminfo, const char *args,
                        const char *const *want, const char *what)
{
    run_limited_env("", cgroup, meminfo, args, want, what);
}

static void refusals(void)
{
    const char *plenty = fake_meminfo("meminfo-plenty", 32000000L);
    /* 100 MiB limit, 90 MiB in use: 10 MiB of room; 10^6 surrogates of 3 tests need ~38 MiB */
    const char *tight = fake_cgroup("cg-tight", "104857600\n", "94371840\n", 0);
    const char *want_m[] = {"option --surrogates 1000000", "the run needs about",
                            "more than the 10 MiB available", "the cgroup's limit 100 MiB less 90 MiB in use",
                            "lower --surrogates", NULL};
    run_limited(tight, plenty, "screen --threads 1 --surrogates 1000000", want_m, "cgroup v2 limit");
    const char *v1 = fake_cgroup("cg-v1", "104857600\n", "94371840\n", 1);
    run_limited(v1, plenty, "screen --threads 1 --surrogates 1000000", want_m, "cgroup v1 limit");
    run_limited(tight, plenty, "screen --threads 1 --surrogates 99", NULL, "cgroup v2, a run that fits");
    /* no cgroup limit ("max"), 12 MiB MemAvailable */
    const char *open = fake_cgroup("cg-open", "max\n", "94371840\n", 0);
    const char *want_info[] = {"option --surrogates 1000000", "MemAvailable in /proc/meminfo",
                               "12 MiB available", NULL};
    run_limited(open, fake_meminfo("meminfo-small", 12288), "screen --threads 1 --surrogates 1000000",
                want_info, "MemAvailable");
    /* --surrogates auto holds at most the smaller of --budget and --max-per-series per test:
     * 150 kB of room, a budget of 10^4 (about 390 kB) */
    const char *tiny = fake_cgroup("cg-tiny", "1000000\n", "850000\n", 0);
    const char *want_budget[] = {"option --budget 10000", "lower --budget", NULL};
    run_limited(tiny, plenty, "screen --threads 1 --surrogates auto --budget 10000", want_budget,
                "--budget");
    const char *want_cap[] = {"option --max-per-series 20000", NULL};
    run_limited(tiny, plenty, "screen --threads 1 --surrogates auto --max-per-series 20000",
                want_cap, "--max-per-series");
    const char *want_grid[] = {"option --surrogates 1000000", NULL};
    run_limited(tight, plenty, "robustness --surrogates 1000000 --windows 40%,60%", want_grid,
                "robustness grid");
    /* 4 kB of room: the series alone does not fit, whatever the options */
    const char *none = fake_cgroup("cg-none", "1000000\n", "996000\n", 0);
    const char *want_input[] = {"limits.csv: a series of 200 samples", "more than the 3.91 KiB available",
                                NULL};
    run_limited(none, plenty, "screen --threads 1 --surrogates 99", want_input, "the input");
    run_limited(none, plenty, "detrend", want_input, "detrend: the input");
    /* a CSV read a table at a time from its temporary copy (here past 100 bytes): refused on
     * its length before a table is taken */
    run_limited_env("SLOWSCAN_STREAM_AFTER=100", none, plenty, "screen --threads 1 --surrogates 99",
                    want_input, "a streamed CSV");
}

/* --threads: room for one worker's workspaces but not for two (the limit set between the
 * library's two estimates). */
static void threads_refusal(void)
{
    screen_config cfg = slowscan_screen_config_default();
    cfg.surrogates = 0;
    cfg.threads = 1;
    size_t one = slowscan_screen_memory_estimate(&cfg, N, 1, 0);
    size_t two = slowscan_screen_memory_estimate(&cfg, N, 2, 0);
    CHECK(two == 2 * one, "estimate: two workers hold twice one's (%zu, %zu)", two, one);
    char limit[64];
    snprintf(limit, sizeof limit, "%zu\n", (one + two) / 2);
    const char *cg = fake_cgroup("cg-threads", limit, "0\n", 0);
    const char *want[] = {"option --threads 2", "lower --threads", NULL};
    run_limited(cg, fake_meminfo("meminfo-threads", 32000000L),
                "screen --threads 2 --surrogates 0", want, "--threads");
}

/* The estimate grows by a fixed amount per surrogate (the tests' statistics and one sorted
 * copy, with the counted margin) and per sample; the robustness grid holds two screening
 * workspaces. */
static void estimate_shape(void)
{
    screen_config cfg = slowscan_screen_config_default();
    cfg.threads = 1;
    cfg.surrogates = 0;
    size_t base = slowscan_screen_memory_estimate(&cfg, 1000, 1, 0);
    cfg.surrogates = 1000;
    size_t more = slowscan_screen_memory_estimate(&cfg, 1000, 1, 0);
    size_t tests = slowscan_screen_test_count(&cfg);
    CHECK(more - base >= (tests + 1) * 1000 * sizeof(double),
          "estimate: 1000 surrogates add at least their arrays (%zu)", more - base);
    CHECK(slowscan_screen_memory_estimate(&cfg, 1000, 1, 1) > more, "estimate: kept series add");
    cfg.surrogates = SIZE_MAX / 4;
    CHECK(slowscan_screen_memory_estimate(&cfg, 1000, 1, 0) == SIZE_MAX, "estimate saturates");
    cfg.surrogates = 1000;
    robustness_grid grid = slowscan_robustness_grid_default();
    CHECK(slowscan_robustness_memory_estimate(&cfg, &grid, 1000) >= 2 * more,
          "robustness: two workspaces");
}

void suite_limits(void)
{
    check_write_series_csv(check_tmp_path("limits.csv"), 2, N, ar1_sample, 5);
    refusals();
    threads_refusal();
    estimate_shape();
    /* the machine's own limits (whatever they are) let a small run through */
    char cmd[1024];
    snprintf(cmd, sizeof cmd, "%s screen --surrogates 19 %s", check_binary(),
             check_tmp_path("limits.csv"));
    CHECK(check_run(cmd, NULL, NULL) == 0, "a small run under the machine's own limits");
}
