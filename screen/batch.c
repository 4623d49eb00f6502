/* The batch driver (screen_batch.h): workers take whole series from the source in order,
 * screen them in their own workspace, and leave the result in a slot of a ring (the reorder
 * buffer); whichever worker finds the oldest slot done hands it to the sink, one at a time.
 * The source is asked for a series only when its slot is free, so memory stays bounded. */
#include "screen_internal.h"
#include "slowscan/screen_batch.h"
#include "slowscan/status.h"

#include <fftw3.h>
#include <pthread.h>
#include <stdlib.h>
#include <string.h>

enum { SLOT_FREE, SLOT_BUSY, SLOT_DONE };

typedef struct {
    int state, status;
    screen_input input;
    screen_result result;
    screen_detail detail;
    screen_prepared prepared; /* a copy: arrays in `kept` (keep_series) or NULL */
    double *kept;
    size_t kept_cap;
    double *paths[INDICATOR_COUNT];
    double *nulls[SCREEN_MAX_TESTS];
} slot;

typedef struct {
    screen_config series_cfg; /* threads per series: 1, or all when series are few */
    screen_source *source;
    screen_sink *sink;
    pthread_mutex_t lock;
    pthread_cond_t changed;
    pthread_mutex_t sink_lock; /* one of put and progress at a time */
    slot *slots;
    size_t cap, next, delivered;
    int source_done, delivering, stop, status;
    screen_batch_failure *failure;
} batch;

/* Copies what the sink is to see of the series just screened into the slot: the prepared
 * series without its arrays, and with keep_series the arrays, paths and nulls too. */
static int keep(batch *b, screen_workspace *ws, slot *s)
{
    const screen_prepared *ps = slowscan_screen_workspace_prepared(ws);
    s->prepared = *ps;
    s->prepared.value = s->prepared.trend = s->prepared.residual = s->prepared.owned = NULL;
    s->prepared.null_source = NULL;
    if (!b->sink->keep_series || s->status != SLOWSCAN_OK)
        return SLOWSCAN_OK;
    size_t n = ps->n, nind = b->series_cfg.nindicators, m = b->series_cfg.surrogates;
    size_t need = (3 + nind) * n + s->result.ntests * m;
    if (s->kept_cap < need) {
        free(s->kept);
        s->kept_cap = (s->kept = malloc(need * sizeof *s->kept)) ? need : 0;
        if (!s->kept)
            return SLOWSCAN_ENOMEM;
    }
    memcpy(s->kept, ps->value, 3 * n * sizeof *s->kept); /* value, trend, residual: one block */
    s->prepared.value = s->kept;
    s->prepared.trend = s->kept + n;
    s->prepared.residual = s->kept + 2 * n;
    for (size_t j = 0; j < nind; j++) {
        s->paths[j] = s->kept + (3 + j) * n;
        memcpy(s->paths[j], slowscan_screen_workspace_path(ws, j), n * sizeof *s->kept);
    }
    for (size_t j = 0; j < s->result.ntests; j++) {
        const double *null = slowscan_screen_workspace_null(ws, j);
        s->nulls[j] = null ? s->kept + (3 + nind) * n + j * m : NULL;
        if (null)
            memcpy(s->nulls[j], null, m * sizeof *s->kept);
    }
    return SLOWSCAN_OK;
}

static void compute(batch *b, screen_workspace *ws, slot *s)
{
    s->status = ws ? slowscan_screen_series(ws, &b->series_cfg, &s->input, &s->result, &s->detail)
                   : SLOWSCAN_ENOMEM;
    if (!ws)
        s->detail = (screen_detail){.rule = SCREEN_RULE_NO_MEMORY, .status = SLOWSCAN_ENOMEM};
    if (ws && keep(b, ws, s) != SLOWSCAN_OK) {
        s->status = SLOWSCAN_ENOMEM;
        s->detail = (screen_detail){.rule = SCREEN_RULE_NO_MEMORY, .status = SLOWSCAN_ENOMEM};
    }
}

/* Hands the oldest slot to the sink (called with the lock held, returns with it held). */
static void deliver(batch *b)
{
    size_t index = b->delivered;
    slot *s = &b->slots[index % b->cap];
    b->delivering = 1;
    pthread_mutex_unlock(&b->lock);
    int st = s->status;
    if (st == SLOWSCAN_OK) {
        int kept = b->sink->keep_series;
        screen_batch_item item = {index, &s->input, &s->result, &s->prepared,
                                  kept ? (const double *const *)s->paths : NULL,
                                  kept ? (const double *const *)s->nulls : NULL};
        pthread_mutex_lock(&b->sink_lock);
        st = b->sink->put(b->sink->state, &item);
        pthread_mutex_unlock(&b->sink_lock);
        if (st != SLOWSCAN_OK)
            s->detail = (screen_detail){.rule = SCREEN_RULE_NONE, .status = st};
    }
    /* the sink has seen the input (its name, its arrays): the source may let it go now; a
     * failing series stays, since the failure still names it */
    if (st == SLOWSCAN_OK && b->source->release)
        b->source->release(b->source->state, index);
    pthread_mutex_lock(&b->lock);
    if (st != SLOWSCAN_OK && !b->stop) {
        b->stop = 1;
        b->status = st;
        *b->failure = (screen_batch_failure){index, s->input, s->prepared, s->result,
                                             s->detail};
        screen_prepared *fp = &b->failure->prepared; /* the slot's arrays go with the run */
        fp->value = fp->trend = fp->residual = fp->owned = NULL;
        fp->null_source = NULL;
    }
    s->state = SLOT_FREE;
    b->delivered++;
    b->delivering = 0;
    pthread_cond_broadcast(&b->changed);
}

/* Takes the next series from the source into its slot (lock held). 1: a series to screen. */
static int take(batch *b, size_t *index)
{
    slot *s = &b->slots[b->next % b->cap];
    memset(&s->input, 0, sizeof s->input);
    memset(&s->detail, 0, sizeof s->detail);
    memset(&s->prepared, 0, sizeof s->prepared);
    memset(&s->result, 0, sizeof s->result);
    int st = b->source->next(b->source->state, b->next, &s->input, &s->detail);
    if (st == SCREEN_BATCH_END) {
        b->source_done = 1;
        return 0;
    }
    *index = b->next++;
    s->state = st == SLOWSCAN_OK ? SLOT_BUSY : SLOT_DONE;
    s->status = st;
    if (st != SLOWSCAN_OK) /* the run ends at this series, once those before it are out */
        b->source_done = 1;
    return st == SLOWSCAN_OK;
}

typedef struct {
    batch *b;
    screen_workspace *ws;
    size_t index; /* the series this worker screens, for its progress reports */
} worker_arg;

/* A worker's surrogate progress, passed on to the sink with the series' index. */
static void relay_progress(void *context, const screen_progress *progress)
{
    worker_arg *arg = context;
    screen_progress p = *progress;
    p.index = arg->index;
    pthread_mutex_lock(&arg->b->sink_lock);
    arg->b->sink->progress(arg->b->sink->state, &p);
    pthread_mutex_unlock(&arg->b->sink_lock);
}

static void work(worker_arg *arg)
{
    batch *b = arg->b;
    pthread_mutex_lock(&b->lock);
    while (!b->stop) {
        size_t index;
        if (!b->delivering && b->delivered < b->next &&
            b->slots[b->delivered % b->cap].state == SLOT_DONE) {
            deliver(b);
        } else if (!b->source_done && b->next - b->delivered < b->cap) {
            if (!take(b, &index))
                continue;
            slot *s = &b->slots[index % b->cap];
            arg->index = index;
            pthread_mutex_unlock(&b->lock);
            compute(b, arg->ws, s);
            pthread_mutex_lock(&b->lock);
            s->state = SLOT_DONE;
            pthread_cond_broadcast(&b->changed);
        } else if (b->source_done && b->delivered == b->next) {
            break;
        } else {
            pthread_cond_wait(&b->changed, &b->lock);
        }
    }
    pthread_cond_broadcast(&b->changed);
    pthread_mutex_unlock(&b->lock);
}

static void *worker(void *p)
{
    work(p);
    return NULL;
}

/* Threads over series, or (fewer series than threads) over each series' surrogates. */
static size_t split_threads(const screen_config *cfg, const screen_source *source,
                            screen_config *series_cfg)
{
    size_t threads = cfg->threads < 1 ? 1 : cfg->threads;
    if (threads > SCREEN_MAX_THREADS)
        threads = SCREEN_MAX_THREADS;
    *series_cfg = *cfg;
    if (source->count > 0 && source->count < threads) {
        series_cfg->threads = threads;
        return 1;
    }
    series_cfg->threads = 1;
    return threads;
}

int slowscan_screen_batch_run(const screen_config *cfg, screen_source *source, screen_sink *sink,
                     screen_batch_failure *failure)
{
    batch b = {.source = source, .sink = sink, .failure = failure};
    size_t workers = split_threads(cfg, source, &b.series_cfg);
    memset(failure, 0, sizeof *failure);
    b.cap = 2 * workers;
    b.slots = calloc(b.cap, sizeof *b.slots);
    worker_arg *args = calloc(workers, sizeof *args);
    pthread_t *ids = calloc(workers, sizeof *ids);
    int *running = calloc(workers, sizeof *running);
    int st = b.slots && args && ids && running ? SLOWSCAN_OK : SLOWSCAN_ENOMEM;
    for (size_t k = 0; st == SLOWSCAN_OK && k < workers; k++) {
        args[k] = (worker_arg){&b, slowscan_screen_workspace_alloc(b.series_cfg.threads), 0};
        if (!args[k].ws)
            st = SLOWSCAN_ENOMEM;
        else if (sink->progress)
            slowscan_screen_workspace_set_progress(args[k].ws, relay_progress, &args[k]);
    }
    if (st == SLOWSCAN_OK) {
        /* Workers detrend and plan (kernel sums, window and surrogate plans) at the same
         * time, and FFTW's planner is not thread-safe: this makes FFTW serialise every
         * planner call and plan destruction (FFTW >= 3.3.5, libfftw3_threads). Executing
         * plans stays parallel. */
        if (workers > 1)
            fftw_make_planner_thread_safe();
        pthread_mutex_init(&b.lock, NULL);
        pthread_mutex_init(&b.sink_lock, NULL);
        pthread_cond_init(&b.changed, NULL);
        /* If a thread cannot start, the others simply take its series. */
        for (size_t k = 1; k < workers; k++)
            running[k] = pthread_create(&ids[k], NULL, worker, &args[k]) == 0;
        work(&args[0]);
        for (size_t k = 1; k < workers; k++)
            if (running[k])
                pthread_join(ids[k], NULL);
        pthread_cond_destroy(&b.changed);
        pthread_mutex_destroy(&b.lock);
        pthread_mutex_destroy(&b.sink_lock);
        st = b.status;
    }
    for (size_t k = 0; args && k < workers; k++)
        slowscan_screen_workspace_free(args[k].ws);
    for (size_t k = 0; b.slots && k < b.cap; k++)
        free(b.slots[k].kept);
    free(b.slots);
    free(args);
    free(ids);
    free(running);
    return st;
}
