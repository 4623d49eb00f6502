/* The batch driver (screen_batch.h): results reach the sink in input order and equal
 * slowscan_screen_series run one series at a time, whatever the thread count (threads over series, or
 * over one series' surrogates when series are fewer than threads); the first failure in input
 * order ends the run after every result before it. A check of the project against itself:
 * slowscan_screen_series is checked against the command's output in suite screen. */
#include "check.h"
#include "stations_check.h"
#include "slowscan/io.h"
#include "slowscan/screen_batch.h"
#include "slowscan/screen_memory.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

typedef struct {
    const series_table *t;
    size_t fail_at; /* a source-side failure at this index (SIZE_MAX: none) */
    size_t given, released;
} table_source;

static int next_series(void *state, size_t index, screen_input *in, screen_detail *detail)
{
    table_source *src = state;
    if (index >= src->t->nseries)
        return SCREEN_BATCH_END;
    if (index == src->fail_at) {
        detail->rule = SCREEN_RULE_NONE;
        return SLOWSCAN_EINVAL;
    }
    const series_table *t = src->t;
    *in = (screen_input){.name = t->names[index], .source = t->source, .time_name = t->time_name, .time = t->time, .values = t->values[index], .n = t->n, .control = NULL};
    src->given++;
    return SLOWSCAN_OK;
}

static void release_series(void *state, size_t index)
{
    (void)index;
    __atomic_add_fetch(&((table_source *)state)->released, 1, __ATOMIC_SEQ_CST);
}

typedef struct {
    screen_result want[16];
    double *want_path[16]; /* path 0 of each series */
    size_t seen, bad_order;
    int paths_differ;
} expect_sink;

static int put(void *state, const screen_batch_item *item)
{
    expect_sink *e = state;
    if (item->index != e->seen++)
        e->bad_order++;
    const screen_result *r = item->result, *w = &e->want[item->index];
    for (size_t j = 0; j < w->ntests; j++) {
        const screen_test *a = &r->tests[j], *b = &w->tests[j];
        CHECK(memcmp(&a->statistic, &b->statistic, sizeof a->statistic) == 0 &&
              memcmp(&a->p_value, &b->p_value, sizeof a->p_value) == 0 &&
              memcmp(a->quantile, b->quantile, sizeof a->quantile) == 0 &&
              memcmp(a->quantile_tail, b->quantile_tail, sizeof a->quantile_tail) == 0,
              "series %zu test %zu equals slowscan_screen_series", item->index, j);
    }
    if (item->paths && e->want_path[item->index])
        e->paths_differ |= memcmp(item->paths[0], e->want_path[item->index],
                                  item->prepared->n * sizeof(double)) != 0;
    return SLOWSCAN_OK;
}

static void count_stored(void *context, const screen_progress *p)
{
    if (p->total == 0)
        ++*(size_t *)context;
}

/* A table screened in memory into a store (screen_memory.h, what the Python package calls):
 * every series stored in order with the results of slowscan_screen_series, told once each;
 * the same from the caller's source instead of the table (a grid's blocks). */
static void memory_run_stores(const series_table *t, screen_config cfg, const expect_sink *e,
                              screen_source *series)
{
    cfg.threads = 2;
    screen_store *store = slowscan_screen_store_alloc(4, NULL); /* spills after 4 series */
    size_t told = 0;
    screen_memory_run run = slowscan_screen_memory_default();
    run.table = series ? NULL : t, run.series = series;
    run.store = store, run.progress = count_stored, run.context = &told;
    screen_batch_failure f;
    int st = slowscan_screen_memory_run(&cfg, &run, &f);
    size_t same = 0, n = t->nseries < 16 ? t->nseries : 16;
    for (size_t k = 0; st == SLOWSCAN_OK && k < n; k++) {
        screen_stored got;
        io_error err;
        if (slowscan_screen_store_read(store, k, &got, &err) != SLOWSCAN_OK)
            break;
        int equal = !strcmp(got.name, t->names[k]) && got.result.ntests == e->want[k].ntests;
        for (size_t j = 0; equal && j < got.result.ntests; j++)
            equal = memcmp(&got.result.tests[j].statistic, &e->want[k].tests[j].statistic,
                           sizeof(double)) == 0 &&
                    memcmp(&got.result.tests[j].p_value, &e->want[k].tests[j].p_value,
                           sizeof(double)) == 0;
        same += equal;
    }
    CHECK(st == SLOWSCAN_OK && run.stored == t->nseries && told == t->nseries && same == n,
          "memory run: status %d, %zu stored, %zu told, %zu of %zu equal", st, run.stored, told,
          same, n);
    slowscan_screen_store_free(store);
}

/* A control run (--null control, what Python's control= passes): each series' surrogates
 * from its same-named series of run.control, as slowscan_screen_series makes them with that
 * control attached; a control without the series is refused as CONTROL_MISSING, naming it,
 * with failure.input.control NULL after the run (common practice, no source). */
static void memory_run_control(const series_table *t, screen_config cfg)
{
    slowscan_screen_config_control(&cfg);
    cfg.threads = 2;
    screen_workspace *ws = slowscan_screen_workspace_alloc(1);
    screen_input control = slowscan_screen_control_input(t, t->names[2], "control.csv");
    screen_input in = {.name = t->names[2], .source = t->source, .time_name = t->time_name,
                       .time = t->time, .values = t->values[2], .n = t->n, .control = &control};
    screen_result want;
    screen_detail d;
    int st = slowscan_screen_series(ws, &cfg, &in, &want, &d);
    slowscan_screen_workspace_free(ws);
    screen_store *store = slowscan_screen_store_alloc(4, NULL);
    screen_memory_run run = slowscan_screen_memory_default();
    run.table = t, run.store = store, run.control = t, run.control_source = "control.csv";
    screen_batch_failure f;
    st |= slowscan_screen_memory_run(&cfg, &run, &f);
    screen_stored got;
    io_error err;
    st |= slowscan_screen_store_read(store, 2, &got, &err);
    CHECK(st == SLOWSCAN_OK && control.values == t->values[2] &&
          memcmp(&got.result.tests[0].p_value, &want.tests[0].p_value, sizeof(double)) == 0,
          "memory run with a control: status %d, p %g, one series alone %g", st,
          got.result.tests[0].p_value, want.tests[0].p_value);
    slowscan_screen_store_free(store);
    series_table none = *t;
    none.nseries = 0; /* a control run without any of the series */
    store = slowscan_screen_store_alloc(4, NULL);
    run.store = store, run.control = &none;
    st = slowscan_screen_memory_run(&cfg, &run, &f);
    CHECK(st == SLOWSCAN_EINVAL && f.index == 0 && f.detail.control &&
          f.detail.rule == SCREEN_RULE_CONTROL_MISSING && f.input.control == NULL,
          "a control without the series: status %d, index %zu, rule %d", st, f.index,
          (int)f.detail.rule);
    slowscan_screen_store_free(store);
}

/* One store's p-values and flags (the rounds') over its series, for comparing two runs. */
static size_t stored_p(screen_store *store, const screen_sequential *q, double *p, int *flag,
                       size_t cap)
{
    size_t k = 0;
    screen_stored got;
    io_error err;
    for (size_t g = 0; g < slowscan_screen_store_count(store); g++) {
        if (slowscan_screen_store_read(store, g, &got, &err) != SLOWSCAN_OK)
            return 0;
        for (size_t j = 0; j < got.result.ntests && k < cap; j++, k++) {
            p[k] = got.result.tests[j].p_value;
            flag[k] = (int)slowscan_screen_sequential_flag(q, g, j, &got.result.tests[j],
                                                           got.flag[j]);
        }
    }
    return k;
}

/* The rounds of --surrogates auto over a table and over the same series from the caller's
 * source (walked again each round, as a grid's blocks are): the same p-values and flags. */
static void memory_run_sequential(const series_table *t, screen_config cfg)
{
    enum { CAP = 16 * SCREEN_MAX_TESTS };
    double p[2][CAP];
    int flag[2][CAP];
    size_t n[2] = {0, 0};
    table_source whole = {t, (size_t)-1, 0, 0};
    screen_source from_source = {next_series, release_series, t->nseries, &whole};
    sequential_config seq = slowscan_sequential_config_default();
    seq.fdr = cfg.fdr, seq.budget = 4000;
    cfg.threads = 2;
    for (int r = 0; r < 2; r++) {
        screen_store *store = slowscan_screen_store_alloc(4, NULL);
        screen_sequential *q = slowscan_screen_sequential_alloc(&seq, &cfg, t->nseries);
        screen_memory_run run = slowscan_screen_memory_default();
        run.table = r ? NULL : t, run.series = r ? &from_source : NULL;
        run.store = store, run.sequential = q;
        screen_batch_failure f;
        if (slowscan_screen_memory_run(&cfg, &run, &f) == SLOWSCAN_OK &&
            slowscan_screen_store_decide(store, cfg.fdr) == SLOWSCAN_OK)
            n[r] = stored_p(store, q, p[r], flag[r], CAP);
        slowscan_screen_sequential_free(q);
        slowscan_screen_store_free(store);
    }
    CHECK(n[0] > 0 && n[0] == n[1] && !memcmp(p[0], p[1], n[0] * sizeof(double)) &&
          !memcmp(flag[0], flag[1], n[0] * sizeof(int)) && whole.given > t->nseries,
          "rounds from a source as from the table: %zu and %zu tests, %zu series given",
          n[0], n[1], whole.given);
}

void suite_batch(void)
{
    series_table t;
    if (!check_read_stations(&t))
        return;
    screen_config cfg = slowscan_screen_config_default();
    cfg.deseason = 364;
    cfg.surrogates = 99;
    expect_sink e = {0};
    screen_workspace *ws = slowscan_screen_workspace_alloc(1);
    for (size_t k = 0; k < t.nseries && k < 16; k++) {
        screen_input in = {.name = t.names[k], .source = t.source, .time_name = t.time_name, .time = t.time, .values = t.values[k], .n = t.n, .control = NULL};
        screen_detail d;
        CHECK(slowscan_screen_series(ws, &cfg, &in, &e.want[k], &d) == SLOWSCAN_OK, "%s", t.names[k]);
        e.want_path[k] = malloc(t.n * sizeof(double));
        memcpy(e.want_path[k], slowscan_screen_workspace_path(ws, 0), t.n * sizeof(double));
    }
    slowscan_screen_workspace_free(ws);
    memory_run_stores(&t, cfg, &e, NULL);
    memory_run_control(&t, cfg);
    table_source whole = {&t, (size_t)-1, 0, 0};
    screen_source from_source = {next_series, release_series, t.nseries, &whole};
    memory_run_stores(&t, cfg, &e, &from_source);
    CHECK(whole.given == t.nseries && whole.released == t.nseries,
          "memory run from a source: %zu given, %zu released", whole.given, whole.released);
    memory_run_sequential(&t, cfg);
    /* 1 and 3 threads over the 8 series; 16: fewer series than threads, shared surrogates */
    const size_t threads[] = {1, 3, 16};
    for (size_t r = 0; r < 3; r++) {
        cfg.threads = threads[r];
        table_source src = {&t, (size_t)-1, 0, 0};
        screen_source source = {next_series, release_series, t.nseries, &src};
        e.seen = e.bad_order = 0;
        e.paths_differ = 0;
        screen_sink sink = {.put = put, .state = &e, .keep_series = r == 1};
        screen_batch_failure f;
        CHECK(slowscan_screen_batch_run(&cfg, &source, &sink, &f) == SLOWSCAN_OK, "batch, %zu threads",
              threads[r]);
        CHECK(e.seen == t.nseries && e.bad_order == 0 && !e.paths_differ &&
              src.released == t.nseries, "%zu threads: %zu of %zu series, %zu out of order",
              threads[r], e.seen, t.nseries, e.bad_order);
    }
    /* a failure at series 5: series 0-4 reach the sink, then the run ends */
    cfg.threads = 3;
    table_source src = {&t, 5, 0, 0};
    screen_source source = {next_series, NULL, 0, &src};
    e.seen = e.bad_order = 0;
    screen_sink sink = {.put = put, .state = &e};
    screen_batch_failure f;
    int st = slowscan_screen_batch_run(&cfg, &source, &sink, &f);
    CHECK(st == SLOWSCAN_EINVAL && f.index == 5 && e.seen == 5 && e.bad_order == 0,
          "failure at 5: status %d, index %zu, %zu delivered", st, f.index, e.seen);
    for (size_t k = 0; k < 16; k++)
        free(e.want_path[k]);
    slowscan_series_table_free(&t);
}
