/* Live progress: the library's surrogate counts (slowscan_screen_workspace_set_progress and
 * the batch sink's progress) rise to M for each series, come one call at a time, and change
 * no number; the command's progress line written to a file is one line per update with a
 * newline and no carriage return, naming the series done of the total; --no-progress prints
 * none; --quiet drops warnings but keeps errors and exit codes. Checks of the project against
 * itself and against its own stated behaviour (issue 14, item 5); the numbers themselves are
 * checked against the committed outputs in suites screen and golden. */
#include "check.h"
#include "stations_check.h"
#include "slowscan/io.h"
#include "slowscan/null_trend.h"
#include "slowscan/screen_batch.h"
#include "slowscan/status.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

enum { MAX_CALLS = 256, MAX_SERIES = 16 };

/* What one series' progress calls said. */
typedef struct {
    size_t calls, done[MAX_CALLS], total, bad_name;
    const char *series;
    int in_call, overlapped; /* a second call while one was running */
} progress_log;

static void hold_briefly(void)
{
    /* widens the window in which an overlapping call would be seen */
    struct timespec pause = {0, 100000};
    nanosleep(&pause, NULL);
}

static void record(progress_log *log, const screen_progress *p)
{
    if (__atomic_exchange_n(&log->in_call, 1, __ATOMIC_SEQ_CST))
        log->overlapped = 1;
    if (log->series && (!p->series || strcmp(p->series, log->series) != 0))
        log->bad_name++;
    if (log->calls < MAX_CALLS)
        log->done[log->calls] = p->done;
    log->calls++;
    log->total = p->total;
    hold_briefly();
    __atomic_store_n(&log->in_call, 0, __ATOMIC_SEQ_CST);
}

static void on_progress(void *context, const screen_progress *p)
{
    record(context, p);
}

/* done rises in steps of at most one block (NULL_TREND_BLOCK, null_trend.h) and ends at m. */
static int rises_to(const progress_log *log, size_t m)
{
    size_t n = log->calls < MAX_CALLS ? log->calls : MAX_CALLS;
    for (size_t c = 0; c < n; c++) {
        size_t before = c ? log->done[c - 1] : 0;
        if (log->done[c] <= before || log->done[c] - before > NULL_TREND_BLOCK)
            return 0;
    }
    return n > 0 && log->done[n - 1] == m && log->total == m;
}

static int same_tests(const screen_result *a, const screen_result *b)
{
    int same = a->ntests == b->ntests;
    for (size_t j = 0; same && j < a->ntests; j++)
        same = memcmp(&a->tests[j].statistic, &b->tests[j].statistic, sizeof(double)) == 0 &&
               memcmp(&a->tests[j].p_value, &b->tests[j].p_value, sizeof(double)) == 0 &&
               memcmp(a->tests[j].quantile, b->tests[j].quantile, sizeof a->tests[j].quantile) == 0;
    return same;
}

/* One series through slowscan_screen_series with and without a callback, at 1 and 3 threads:
 * M = 300 is four whole blocks of 64 and one of 44, so the counts are 64 .. 256, 300. */
static void one_series(const series_table *t)
{
    screen_config cfg = slowscan_screen_config_default();
    cfg.deseason = 364;
    cfg.surrogates = 300;
    screen_input in = {.name = t->names[0], .source = t->source, .time_name = t->time_name,
                       .time = t->time, .values = t->values[0], .n = t->n};
    screen_result plain, watched;
    screen_detail d;
    for (size_t threads = 1; threads <= 3; threads += 2) {
        cfg.threads = threads;
        screen_workspace *ws = slowscan_screen_workspace_alloc(threads);
        progress_log log = {.series = t->names[0]};
        int st = ws ? slowscan_screen_series(ws, &cfg, &in, &plain, &d) : SLOWSCAN_ENOMEM;
        if (ws)
            slowscan_screen_workspace_set_progress(ws, on_progress, &log);
        if (st == SLOWSCAN_OK)
            st = slowscan_screen_series(ws, &cfg, &in, &watched, &d);
        CHECK(st == SLOWSCAN_OK, "threads %zu: status %d", threads, st);
        CHECK(rises_to(&log, 300) && log.calls == 5 && !log.bad_name,
              "threads %zu: counts rise in blocks to M = 300 (%zu calls, last %zu)", threads,
              log.calls, log.calls ? log.done[log.calls - 1] : 0);
        CHECK(!log.overlapped, "threads %zu: one call at a time", threads);
        CHECK(st == SLOWSCAN_OK && same_tests(&plain, &watched),
              "threads %zu: the callback changes no statistic, p or quantile", threads);
        slowscan_screen_workspace_set_progress(ws, NULL, NULL);
        size_t calls = log.calls;
        if (ws)
            slowscan_screen_series(ws, &cfg, &in, &watched, &d);
        CHECK(log.calls == calls, "threads %zu: no calls once the callback is taken off", threads);
        slowscan_screen_workspace_free(ws);
    }
}

/* The batch driver: per series the counts rise to M, about series not yet handed on, never
 * during put nor two at once; the results are those of a run without progress. */
typedef struct {
    const series_table *t;
    progress_log log[MAX_SERIES];
    screen_result result[MAX_SERIES];
    size_t delivered, early;
    int in_put, during_put, in_call, overlapped;
} batch_watch;

static int next_series(void *state, size_t index, screen_input *in, screen_detail *detail)
{
    (void)detail;
    const series_table *t = ((batch_watch *)state)->t;
    if (index >= t->nseries || index >= MAX_SERIES)
        return SCREEN_BATCH_END;
    *in = (screen_input){.name = t->names[index], .source = t->source,
                         .time_name = t->time_name, .time = t->time, .values = t->values[index],
                         .n = t->n};
    return SLOWSCAN_OK;
}

static int put(void *state, const screen_batch_item *item)
{
    batch_watch *w = state;
    if (__atomic_exchange_n(&w->in_put, 1, __ATOMIC_SEQ_CST) || w->in_call)
        w->overlapped = 1;
    w->result[item->index] = *item->result;
    w->delivered = item->index + 1;
    hold_briefly();
    __atomic_store_n(&w->in_put, 0, __ATOMIC_SEQ_CST);
    return SLOWSCAN_OK;
}

static void batch_progress(void *state, const screen_progress *p)
{
    batch_watch *w = state;
    if (__atomic_exchange_n(&w->in_call, 1, __ATOMIC_SEQ_CST) || w->in_put)
        w->overlapped = 1;
    w->early += p->index < w->delivered;
    if (p->index < MAX_SERIES)
        record(&w->log[p->index], p);
    __atomic_store_n(&w->in_call, 0, __ATOMIC_SEQ_CST);
}

static void batch_run(const series_table *t)
{
    screen_config cfg = slowscan_screen_config_default();
    cfg.deseason = 364;
    cfg.surrogates = 99;
    size_t count = t->nseries < MAX_SERIES ? t->nseries : MAX_SERIES;
    /* 3 threads over whole series; 16 threads over the surrogates of one series at a time */
    const size_t threads[] = {3, 16};
    static batch_watch plain, watched;
    for (size_t r = 0; r < 2; r++) {
        cfg.threads = threads[r];
        screen_batch_failure failure;
        memset(&plain, 0, sizeof plain);
        memset(&watched, 0, sizeof watched);
        plain.t = watched.t = t;
        screen_source src = {next_series, NULL, count, &plain};
        screen_sink sink = {.put = put, .state = &plain};
        int st = slowscan_screen_batch_run(&cfg, &src, &sink, &failure);
        src.state = &watched;
        sink = (screen_sink){.put = put, .state = &watched, .progress = batch_progress};
        if (st == SLOWSCAN_OK)
            st = slowscan_screen_batch_run(&cfg, &src, &sink, &failure);
        CHECK(st == SLOWSCAN_OK && watched.delivered == count, "threads %zu: batch runs", threads[r]);
        size_t rising = 0, same = 0;
        for (size_t k = 0; k < count; k++) {
            rising += rises_to(&watched.log[k], 99);
            same += same_tests(&plain.result[k], &watched.result[k]);
        }
        CHECK(rising == count, "threads %zu: each series' counts rise to M = 99 (%zu of %zu)",
              threads[r], rising, count);
        CHECK(same == count, "threads %zu: progress changes no result (%zu of %zu)", threads[r],
              same, count);
        CHECK(!watched.overlapped && !watched.early,
              "threads %zu: one call at a time, never during put, only about series not yet "
              "handed on (%zu early)", threads[r], watched.early);
    }
}

static char *run_out, *run_err;

/* Runs the binary with `env` before it; stderr into run_err (a file: not a terminal). */
static int slowscan(const char *env, const char *args)
{
    free(run_out);
    free(run_err);
    char cmd[4096];
    snprintf(cmd, sizeof cmd, "%s %s %s", env, check_binary(), args);
    return check_run(cmd, &run_out, &run_err);
}

static size_t count_char(const char *s, char c)
{
    size_t n = 0;
    for (; s && *s; s++)
        n += *s == c;
    return n;
}

/* Every line of err reads "COMMAND: series D/TOTAL..." with D rising to TOTAL; returns the
 * number of lines, 0 when one does not. */
static size_t progress_lines(const char *err, const char *command, size_t total)
{
    size_t lines = 0, last = 0;
    for (const char *line = err; line && *line; lines++) {
        const char *end = strchr(line, '\n');
        size_t done, of;
        char head[32];
        snprintf(head, sizeof head, "%s: series %%zu/%%zu", command);
        if (!end || sscanf(line, head, &done, &of) != 2 || of != total || done < last)
            return 0;
        last = done;
        line = end + 1;
    }
    return last == total ? lines : 0;
}

static void command_line(void)
{
    const char *screen = "--threads 2 --surrogates 199 --deseason 364 data/stations.csv";
    char args[1024];
    CHECK(slowscan("", "screen --no-progress --threads 2 --surrogates 199 --deseason 364 "
                   "data/stations.csv") == 0 && run_err && !*run_err,
          "--no-progress: nothing on stderr: %s", run_err ? run_err : "");
    char *want = run_out ? strdup(run_out) : NULL;
    /* every update shown: the line of each series and of each block of surrogates */
    snprintf(args, sizeof args, "screen --progress %s", screen);
    int rc = slowscan("SLOWSCAN_PROGRESS_EVERY=0", args);
    size_t lines = progress_lines(run_err, "screen", 8);
    CHECK(rc == 0 && lines >= 8 && !strchr(run_err, '\r') && run_err[strlen(run_err) - 1] == '\n',
          "--progress to a file: lines ending in newlines, no carriage return, series D/8 "
          "rising to 8/8: %s", run_err ? run_err : "");
    CHECK(run_err && strstr(run_err, "surrogates 199/199 of north_bay") &&
              strstr(run_err, "surrogates 64/199 of ") && strstr(run_err, " series/s") &&
              strstr(run_err, ", ETA ") && strstr(run_err, "series 8/8") && strstr(run_err, "took"),
          "the surrogates of a running series, the rate and the time left");
    CHECK(want && run_out && strcmp(want, run_out) == 0, "--progress changes no output byte");
    CHECK(slowscan("SLOWSCAN_PROGRESS_EVERY=0", "screen --no-progress --threads 2 --surrogates "
                   "199 --deseason 364 data/stations.csv") == 0 && run_err && !*run_err,
          "--no-progress prints none even with every update due");
    /* by default at most one line per 2 s, and the last one */
    struct timespec t0, t1;
    clock_gettime(CLOCK_MONOTONIC, &t0);
    rc = slowscan("", args);
    clock_gettime(CLOCK_MONOTONIC, &t1);
    double elapsed = (double)(t1.tv_sec - t0.tv_sec) + 1e-9 * (double)(t1.tv_nsec - t0.tv_nsec);
    lines = progress_lines(run_err, "screen", 8);
    CHECK(rc == 0 && lines >= 1 && (double)lines <= 1 + elapsed / 2,
          "a line every 2 s at most: %zu lines in %.1f s", lines, elapsed);
    /* the commands that run series one by one share the line */
    rc = slowscan("SLOWSCAN_PROGRESS_EVERY=0", "detrend --progress -o /dev/null data/stations.csv");
    CHECK(rc == 0 && progress_lines(run_err, "detrend", 8) == 8 && !count_char(run_err, '\r'),
          "detrend --progress: one line per series: %s", run_err ? run_err : "");
    free(want);
}

/* On a terminal (a pseudo-terminal from util-linux's script(1), when installed): one line
 * rewritten in place, carriage returns between updates and a single newline at the end. */
static void terminal(void)
{
    if (check_run("command -v script >/dev/null", NULL, NULL) != 0) {
        printf("  (no script(1): the terminal line is not checked)\n");
        return;
    }
    char cmd[2048];
    snprintf(cmd, sizeof cmd, "script -qec 'SLOWSCAN_PROGRESS_EVERY=0 %s screen --threads 2 "
             "--surrogates 199 --deseason 364 -o /dev/null data/stations.csv' /dev/null",
             check_binary());
    free(run_out);
    free(run_err);
    int rc = check_run(cmd, &run_out, &run_err);
    /* the terminal turns the final newline into CR LF */
    CHECK(rc == 0 && run_out && count_char(run_out, '\n') == 1 &&
              count_char(run_out, '\r') > 8 && strstr(run_out, "\rscreen: series 8/8") &&
              strstr(run_out, "took"),
          "a terminal gets one line rewritten in place: %s", run_out ? run_out : "");
}

/* --quiet: a warning at the options (--surrogates below 19) and one of a series (a constant
 * column) are dropped; an error is still printed with its exit code. */
static void quiet(void)
{
    const char *csv = check_tmp_path("progress-constant.csv");
    FILE *fp = fopen(csv, "w");
    if (fp) {
        fputs("t,flat,wavy\n", fp);
        for (int i = 0; i < 60; i++)
            fprintf(fp, "%d,3,%g\n", i, (double)((i * 37) % 11));
        fclose(fp);
    }
    char args[1024];
    snprintf(args, sizeof args, "screen --surrogates 9 %s", csv);
    int rc = slowscan("", args);
    char *want = run_out ? strdup(run_out) : NULL;
    size_t warnings = count_char(run_err, '\n');
    CHECK(rc == 0 && run_err && strstr(run_err, "warning: option --surrogates 9") &&
              strstr(run_err, "flat") && warnings >= 2,
          "without --quiet: the option's and the series' warnings: %s", run_err ? run_err : "");
    snprintf(args, sizeof args, "screen --quiet --surrogates 9 %s", csv);
    rc = slowscan("", args);
    CHECK(rc == 0 && run_err && !*run_err, "--quiet: no warning: %s", run_err ? run_err : "");
    CHECK(want && run_out && strcmp(want, run_out) == 0, "--quiet changes no output");
    snprintf(args, sizeof args, "screen --quiet --surrogates 9 %s.missing", csv);
    rc = slowscan("", args);
    CHECK(rc == 1 && count_char(run_err, '\n') == 1 && strstr(run_err, ".missing") &&
              !strstr(run_err, "warning:"),
          "--quiet keeps an error and its exit code: %d %s", rc, run_err ? run_err : "");
    snprintf(args, sizeof args, "screen --quiet --window 1%% %s", csv);
    rc = slowscan("", args);
    CHECK(rc == 1 && strstr(run_err, "--window"), "--quiet keeps a refusal: %d %s", rc,
          run_err ? run_err : "");
    free(want);
}

void suite_progress(void)
{
    series_table t;
    if (!check_read_stations(&t))
        return;
    one_series(&t);
    batch_run(&t);
    slowscan_series_table_free(&t);
    command_line();
    terminal();
    quiet();
    free(run_out);
    free(run_err);
    run_out = run_err = NULL;
}
