/* The library's rounds of --surrogates auto (screen/sequential_run.c, screen_sequential.h),
 * called directly (part of suite sequential; the command's outputs are checked there and by
 * suites resume and mpi):
 * - rounds given back by the replay hook (as --resume gives back journaled rounds) draw
 *   nothing and end in the same decisions, p-values and intervals as the rounds drawn;
 * - the caller's reserve words stay zero, the counts after them are the journal's;
 * - the same decisions whatever the thread count;
 * - a series that fails names itself to the end hook and ends the run.
 * The series are AR(1) draws (common practice, no source): only identity is checked here. */
#include "check.h"
#include "slowscan/screen_sequential.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

enum { SERIES = 6, N = 240, RESERVE = 3, MAX_ROUNDS = 32 };

typedef struct {
    double t[N], x[SERIES][N];
    size_t short_series; /* a series given 2 samples (refused), SERIES: none */
    size_t reads;        /* series handed out */
} arrays;

static int next(void *state, size_t index, screen_input *in, screen_detail *d)
{
    (void)d;
    arrays *a = state;
    if (index >= SERIES)
        return SCREEN_BATCH_END;
    static const char *names[SERIES] = {"s0", "s1", "s2", "s3", "s4", "s5"};
    *in = (screen_input){.name = names[index], .source = "ar1", .time_name = "t",
                         .time = a->t, .values = a->x[index],
                         .n = index == a->short_series ? 2 : N};
    a->reads++;
    return SLOWSCAN_OK;
}

/* What the hooks saw: each drawn round's counts (the journal), the reserve's words. */
typedef struct {
    uint64_t *counts[MAX_ROUNDS];
    size_t ncounts[MAX_ROUNDS], rounds, reserve_dirty, failed_series, decided;
    int failed_status;
} journal;

static int keep_round(void *context, size_t round, int status, const screen_batch_failure *f,
                      size_t series, uint64_t *words, size_t nwords)
{
    journal *j = context;
    if (status != SLOWSCAN_OK) {
        j->failed_status = status, j->failed_series = series;
        return f && strcmp(f->input.name, "s4") == 0 ? status : SLOWSCAN_ENUMERIC;
    }
    for (size_t k = 0; k < RESERVE; k++)
        j->reserve_dirty += words[k] != 0;
    if (round < MAX_ROUNDS && (j->counts[round] = malloc(nwords * sizeof *words))) {
        memcpy(j->counts[round], words + RESERVE, (nwords - RESERVE) * sizeof *words);
        j->ncounts[round] = nwords - RESERVE, j->rounds = round + 1;
    }
    return SLOWSCAN_OK;
}

static int give_back(void *context, size_t round, uint64_t *counts, size_t ncounts, int *taken)
{
    journal *j = context;
    if (round >= j->rounds || ncounts != j->ncounts[round])
        return SLOWSCAN_EINVAL;
    memcpy(counts, j->counts[round], ncounts * sizeof *counts);
    *taken = 1;
    return SLOWSCAN_OK;
}

static void count_decided(void *context, const screen_sequential_round *r)
{
    journal *j = context;
    j->decided += r->round == j->decided + 1;
}

/* A run of the rounds over a's series; its state (NULL when it failed: *status says why). */
static screen_sequential *rounds(arrays *a, size_t threads, const screen_sequential_hooks *h,
                                 int *status)
{
    screen_config cfg = slowscan_screen_config_default();
    cfg.surrogates = 0, cfg.threads = threads;
    sequential_config seq = slowscan_sequential_config_default();
    seq.budget = 20000, seq.max_per_series = 4096;
    screen_sequential *q = slowscan_screen_sequential_alloc(&seq, &cfg, SERIES);
    screen_source source = {next, NULL, SERIES, a};
    screen_batch_failure failure;
    *status = q ? slowscan_screen_sequential_run(q, &cfg, &source, h, &failure) : SLOWSCAN_ENOMEM;
    if (*status == SLOWSCAN_OK)
        return q;
    slowscan_screen_sequential_free(q);
    return NULL;
}

/* Test j of series g in both runs: the same decision and interval. */
static size_t differences(const screen_sequential *x, const screen_sequential *y)
{
    size_t bad = 0, tests = slowscan_screen_sequential_summary(x).per_series;
    screen_test t = {.statistic = 1};
    for (size_t g = 0; g < SERIES; g++)
        for (size_t j = 0; j < tests; j++) {
            double lx, hx, ly, hy;
            slowscan_screen_sequential_interval(x, g, j, &lx, &hx);
            slowscan_screen_sequential_interval(y, g, j, &ly, &hy);
            bad += slowscan_screen_sequential_flag(x, g, j, &t, SCREEN_FLAG_UNTESTED) !=
                   slowscan_screen_sequential_flag(y, g, j, &t, SCREEN_FLAG_UNTESTED);
            bad += memcmp(&lx, &ly, sizeof lx) != 0 || memcmp(&hx, &hy, sizeof hx) != 0;
        }
    screen_sequential_summary sx = slowscan_screen_sequential_summary(x),
                              sy = slowscan_screen_sequential_summary(y);
    bad += sx.spent != sy.spent || sx.rounds != sy.rounds || sx.undecided != sy.undecided ||
           sx.tested != sy.tested || sx.budget != sy.budget;
    return bad;
}

static void make_series(arrays *a)
{
    check_rng *rng = check_rng_alloc(23);
    for (size_t i = 0; i < N; i++)
        a->t[i] = (double)i;
    for (size_t s = 0; s < SERIES; s++) {
        double x = 0, rise = 0.15 * (double)s; /* memory rising with s: some tests reject */
        for (size_t i = 0; i < N; i++)
            x = (0.3 + rise * (double)i / N) * x + check_rng_gaussian(rng), a->x[s][i] = x;
    }
    check_rng_free(rng);
    a->short_series = SERIES;
}

void sequential_run_checks(void);
void sequential_run_checks(void)
{
    static arrays a;
    make_series(&a);
    journal j = {0};
    screen_sequential_hooks h = slowscan_screen_sequential_hooks_default();
    h.reserve = RESERVE, h.end = keep_round, h.decided = count_decided, h.context = &j;
    int st;
    screen_sequential *drawn = rounds(&a, 1, &h, &st);
    screen_sequential_summary s = slowscan_screen_sequential_summary(drawn);
    CHECK(drawn && s.rounds > 2 && j.rounds == s.rounds && j.decided == s.rounds,
          "the rounds drawn (%zu rounds, %zu journaled, %zu traced)", s.rounds, j.rounds,
          j.decided);
    CHECK(j.reserve_dirty == 0, "the caller's reserve words are left zero");
    screen_sequential_hooks back = slowscan_screen_sequential_hooks_default();
    back.replay = give_back, back.context = &j;
    a.reads = 0;
    screen_sequential *replayed = rounds(&a, 2, &back, &st);
    CHECK(replayed && a.reads == 0 && differences(drawn, replayed) == 0,
          "rounds given back draw nothing (%zu series read) and decide the same", a.reads);
    screen_sequential *threads = rounds(&a, 3, NULL, &st);
    CHECK(threads && differences(drawn, threads) == 0, "the same rounds on 3 threads");
    for (size_t r = 0; r < j.rounds; r++)
        free(j.counts[r]);
    journal failed = {0};
    h.context = &failed;
    a.short_series = 4;
    CHECK(!rounds(&a, 2, &h, &st) && st == failed.failed_status && failed.failed_series == 4,
          "a failing series ends the rounds and is named to the end hook (status %d, series "
          "%zu)", st, failed.failed_series);
    slowscan_screen_sequential_free(drawn);
    slowscan_screen_sequential_free(replayed);
    slowscan_screen_sequential_free(threads);
    /* the inputs' order: a permutation, set before the rounds, or refused */
    screen_config cfg = slowscan_screen_config_default();
    sequential_config seq = slowscan_sequential_config_default();
    screen_sequential *q = slowscan_screen_sequential_alloc(&seq, &cfg, 3);
    const size_t twice[] = {0, 2, 2}, out[] = {0, 1, 3}, fine[] = {2, 0, 1};
    CHECK(q && slowscan_screen_sequential_order(q, twice) == SLOWSCAN_EINVAL &&
              slowscan_screen_sequential_order(q, out) == SLOWSCAN_EINVAL &&
              slowscan_screen_sequential_order(q, fine) == SLOWSCAN_OK &&
              slowscan_screen_sequential_order(q, NULL) == SLOWSCAN_OK,
          "the inputs' order: a repeated or out-of-range index refused, a permutation taken");
    slowscan_screen_sequential_free(q);
}
