/* The surrogate replicates of one series, dealt out to threads in whole blocks of
 * NULL_TREND_BLOCK. Every block draws from its own stream (null_trend.h), so the numbers do
 * not depend on which thread drew which block, nor on how many threads there are. */
#include "screen_internal.h"
#include "slowscan/status.h"

#include <pthread.h>
#include <stdlib.h>

typedef struct {
    screen_null_task *task;
    pthread_mutex_t lock;
    size_t next_block, nblocks;
    int status;
    size_t drawn; /* replicates drawn so far, for the progress callback */
} shared_state;

typedef struct {
    shared_state *shared;
    null_trend_workspace *ws;
} worker_arg;

static int take_block(shared_state *s, size_t *block)
{
    pthread_mutex_lock(&s->lock);
    int ok = s->status == SLOWSCAN_OK && s->next_block < s->nblocks;
    if (ok)
        *block = s->next_block++;
    pthread_mutex_unlock(&s->lock);
    return ok;
}

/* Counts a finished block and tells the caller's progress callback, under the lock: one call
 * at a time, and the count it sees only rises. */
static void block_drawn(shared_state *s, size_t count)
{
    screen_null_task *t = s->task;
    if (!t->progress)
        return;
    pthread_mutex_lock(&s->lock);
    s->drawn += count;
    screen_progress p = {.series = t->series, .done = s->drawn, .total = t->m};
    t->progress(t->progress_context, &p);
    pthread_mutex_unlock(&s->lock);
}

static void *worker(void *p)
{
    worker_arg *arg = p;
    shared_state *s = arg->shared;
    screen_null_task *t = s->task;
    int st;
    /* Each thread has its own source: the draw writes into the source's spectrum scratch. */
    surrogate_source *src = slowscan_surrogate_source_alloc(t->plan, t->kind, t->residual, t->options, &st);
    size_t block;
    while (st == SLOWSCAN_OK && take_block(s, &block)) {
        size_t first = block * NULL_TREND_BLOCK, count = t->m - first;
        if (count > NULL_TREND_BLOCK)
            count = NULL_TREND_BLOCK;
        st = slowscan_null_trend_draw(arg->ws, src, t->job, t->first + first, count, t->null,
                                      t->stride);
        if (st == SLOWSCAN_OK)
            block_drawn(s, count);
    }
    size_t unconverged = 0;
    if (src)
        slowscan_surrogate_iaaft_report(src, NULL, NULL, &unconverged);
    slowscan_surrogate_source_free(src);
    pthread_mutex_lock(&s->lock);
    if (st != SLOWSCAN_OK && s->status == SLOWSCAN_OK)
        s->status = st;
    t->unconverged += unconverged;
    pthread_mutex_unlock(&s->lock);
    return NULL;
}

int screen_null_parallel(screen_null_task *task, null_trend_workspace *const *ws, size_t threads)
{
    task->unconverged = 0;
    shared_state s = {task, PTHREAD_MUTEX_INITIALIZER, 0,
                      (task->m + NULL_TREND_BLOCK - 1) / NULL_TREND_BLOCK, SLOWSCAN_OK, 0};
    if (threads > s.nblocks)
        threads = s.nblocks ? s.nblocks : 1;
    if (threads > SCREEN_MAX_THREADS)
        threads = SCREEN_MAX_THREADS;
    pthread_t ids[SCREEN_MAX_THREADS];
    worker_arg args[SCREEN_MAX_THREADS];
    int running[SCREEN_MAX_THREADS] = {0};
    for (size_t k = 0; k < threads; k++)
        args[k] = (worker_arg){&s, ws[k]};
    /* If a thread cannot start, the others simply take its blocks. */
    for (size_t k = 1; k < threads; k++)
        running[k] = pthread_create(&ids[k], NULL, worker, &args[k]) == 0;
    worker(&args[0]);
    for (size_t k = 1; k < threads; k++)
        if (running[k])
            pthread_join(ids[k], NULL);
    pthread_mutex_destroy(&s.lock);
    return s.status;
}
