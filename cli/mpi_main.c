/* slowscan-mpi (make MPI=1): the command line under mpirun. `screen` is shared by the
 * processes (cli/share.h: series i to process i mod K, records gathered on process 0 in
 * input order, process 0 alone writes and speaks); every other command runs on process 0
 * alone while the others end at once. Only this file knows MPI.
 *
 * Start-up overlap: MPI_Init spends ~0.23 s waiting on the launcher (measured with Open MPI
 * 4.1: 0.23 s of wall time for 0.03 s of CPU), as long as loading a table of 2000 series. When
 * the launcher says which process this is (Open MPI's OMPI_COMM_WORLD_RANK/SIZE, MPICH's
 * PMI_RANK/SIZE), the command starts at once on a thread of its own and loads its inputs
 * while the main thread initialises MPI; MPI's own answer must match the launcher's or the
 * run stops. Every MPI call is still made from the main thread (MPI_THREAD_FUNNELED): the
 * command thread hands each one over (funnel) and waits for it, except the agreement to start
 * (share.h: propose), which the main thread makes once MPI is up while the command already
 * screens its first series (a table loads in less time than MPI_Init takes), and which the
 * command reads later (answer). Without the launcher's word, MPI comes first as before. */
#include "cli.h"
#include "share.h"

#include <limits.h>
#include <mpi.h>
#include <pthread.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

/* One MPI call handed from the command thread to the main thread. */
typedef struct {
    pthread_mutex_t lock;
    pthread_cond_t cond;
    void (*call)(void *); /* pending, NULL when none */
    void *arg;
    int done;             /* the command has returned */
    int threaded;         /* the command runs on its own thread */
} funnel_state;

static funnel_state funnel_box = {PTHREAD_MUTEX_INITIALIZER, PTHREAD_COND_INITIALIZER, NULL,
                                  NULL, 0, 0};

/* Hands call(arg) to the main thread (after any call still pending) and, when `wait`, waits
 * until it has run; without the command's own thread it runs here at once. */
static void funnel_call(void (*call)(void *), void *arg, int wait)
{
    funnel_state *f = &funnel_box;
    if (!f->threaded) {
        call(arg);
        return;
    }
    pthread_mutex_lock(&f->lock);
    while (f->call) /* one call at a time: an earlier one not waited for may still be pending */
        pthread_cond_wait(&f->cond, &f->lock);
    f->call = call;
    f->arg = arg;
    pthread_cond_broadcast(&f->cond);
    while (wait && f->call)
        pthread_cond_wait(&f->cond, &f->lock);
    pthread_mutex_unlock(&f->lock);
}

/* Runs call(arg) on the main thread and waits for it. */
static void funnel(void (*call)(void *), void *arg)
{
    funnel_call(call, arg, 1);
}

/* Whether the call handed over with `arg` has run; with `wait`, waits until it has. */
static int funnel_ran(const void *arg, int wait)
{
    funnel_state *f = &funnel_box;
    pthread_mutex_lock(&f->lock);
    while (wait && f->call && f->arg == arg)
        pthread_cond_wait(&f->cond, &f->lock);
    int ran = !f->call || f->arg != arg;
    pthread_mutex_unlock(&f->lock);
    return ran;
}

/* The main thread, once MPI is up: every call handed over, until the command returns. The
 * lock is let go during a call, so that the command thread can ask whether one it did not
 * wait for has run. */
static void serve_calls(void)
{
    funnel_state *f = &funnel_box;
    pthread_mutex_lock(&f->lock);
    for (;;) {
        while (!f->call && !f->done)
            pthread_cond_wait(&f->cond, &f->lock);
        if (!f->call)
            break;
        void (*call)(void *) = f->call;
        void *arg = f->arg;
        pthread_mutex_unlock(&f->lock);
        call(arg);
        pthread_mutex_lock(&f->lock);
        f->call = NULL;
        pthread_cond_broadcast(&f->cond);
    }
    pthread_mutex_unlock(&f->lock);
}

typedef struct {
    const cli_share *s;
    int rc, agreed;
} agree_call;

/* Waiting without spinning: MPI's blocking calls poll flat out, and the main thread shares its
 * core with the command thread (mpirun binds a process to one core), which screens while the
 * agreement to start waits for a process still loading its inputs; a process that waits for
 * another to finish its share would take CPU from it on a shared or oversubscribed node. The
 * naps between polls grow from 20 us to 1 ms, so an answer comes at most 1 ms late and a long
 * wait costs a thousand polls a second. */
static void nap(long *ns)
{
    *ns = *ns < 20000 ? 20000 : *ns < 500000 ? 2 * *ns : 1000000;
    const struct timespec t = {0, *ns};
    nanosleep(&t, NULL);
}

static void wait_lazily(MPI_Request *request)
{
    int done = 0;
    long ns = 0;
    for (MPI_Test(request, &done, MPI_STATUS_IGNORE); !done;
         MPI_Test(request, &done, MPI_STATUS_IGNORE))
        nap(&ns);
}

static void agree_on_main(void *arg)
{
    agree_call *a = arg;
    const cli_share *s = a->s;
    int *all = malloc(s->ranks * sizeof *all);
    if (!all) /* cannot hear the others: end this process alike on every one */
        MPI_Abort(MPI_COMM_WORLD, EXIT_INTERNAL);
    MPI_Request request;
    MPI_Iallgather(&a->rc, 1, MPI_INT, all, 1, MPI_INT, MPI_COMM_WORLD, &request);
    wait_lazily(&request);
    int agreed = all[0];
    for (size_t r = 1; agreed == EXIT_OK && r < s->ranks; r++)
        agreed = all[r];
    free(all);
    a->agreed = agreed;
}

static int agree(const cli_share *s, int rc)
{
    agree_call a = {s, rc, EXIT_INTERNAL};
    funnel(agree_on_main, &a);
    if (rc == EXIT_OK && a.agreed != EXIT_OK && s->rank == 0)
        cli_error("another process of the run could not start (exit code %d)", a.agreed);
    return a.agreed;
}

/* The one agreement not waited for (share.h: propose, answer). */
static agree_call proposal;

static void propose(const cli_share *s, int rc)
{
    proposal = (agree_call){s, rc, EXIT_INTERNAL};
    funnel_call(agree_on_main, &proposal, 0);
}

static int answer(const cli_share *s, int wait)
{
    (void)s;
    return funnel_ran(&proposal, wait) ? proposal.agreed : EXIT_OK;
}

typedef struct {
    share_kind kind;
    const void *data;
    int size;
} send_call;

static void send_on_main(void *arg)
{
    const send_call *c = arg;
    static const char none;
    MPI_Request request;
    MPI_Isend(c->data ? c->data : &none, c->size, MPI_BYTE, 0, (int)c->kind, MPI_COMM_WORLD,
              &request);
    wait_lazily(&request);
}

static int send(const cli_share *s, share_kind kind, const void *data, size_t size)
{
    (void)s;
    if (size > INT_MAX)
        return EXIT_INTERNAL;
    send_call c = {kind, data, (int)size};
    funnel(send_on_main, &c);
    return EXIT_OK;
}

typedef struct {
    size_t from;
    share_kind *kind;
    void **data;
    size_t *size, *cap;
    int rc;
} receive_call;

static void receive_on_main(void *arg)
{
    receive_call *c = arg;
    MPI_Status status;
    int count;
    int arrived = 0;
    long ns = 0;
    for (MPI_Iprobe((int)c->from, MPI_ANY_TAG, MPI_COMM_WORLD, &arrived, &status); !arrived;
         MPI_Iprobe((int)c->from, MPI_ANY_TAG, MPI_COMM_WORLD, &arrived, &status))
        nap(&ns);
    MPI_Get_count(&status, MPI_BYTE, &count);
    if (cli_share_room(c->data, c->cap, (size_t)count) != EXIT_OK) {
        c->rc = EXIT_INTERNAL;
        return;
    }
    MPI_Recv(*c->data, count, MPI_BYTE, (int)c->from, status.MPI_TAG, MPI_COMM_WORLD,
             MPI_STATUS_IGNORE);
    *c->kind = (share_kind)status.MPI_TAG;
    *c->size = (size_t)count;
    c->rc = EXIT_OK;
}

static int receive(const cli_share *s, size_t from, share_kind *kind, void **data, size_t *size,
                   size_t *cap)
{
    (void)s;
    receive_call c = {from, kind, data, size, cap, EXIT_OK};
    funnel(receive_on_main, &c);
    return c.rc;
}

typedef struct {
    uint64_t *values;
    size_t count;
} sum_call;

static void sum_on_main(void *arg)
{
    sum_call *c = arg;
    for (size_t done = 0; done < c->count;) { /* MPI counts are ints */
        size_t part = c->count - done < (size_t)INT_MAX ? c->count - done : (size_t)INT_MAX;
        MPI_Allreduce(MPI_IN_PLACE, c->values + done, (int)part, MPI_UINT64_T, MPI_SUM,
                      MPI_COMM_WORLD);
        done += part;
    }
}

static int sum(const cli_share *s, uint64_t *values, size_t count)
{
    (void)s;
    sum_call c = {values, count};
    funnel(sum_on_main, &c);
    return EXIT_OK;
}

/* A process other than 0 writes nothing and says nothing itself: process 0 prints its
 * failures from the words it sends. */
static void silence(void)
{
    static FILE *nowhere;
    nowhere = fopen("/dev/null", "w");
    if (nowhere)
        cli_messages_to(nowhere);
    cli_stops_quiet();
    if (!freopen("/dev/null", "w", stdout))
        fclose(stdout);
}

/* This process's place as the launcher states it in the environment: 1 when known. */
static int launcher_place(int *rank, int *ranks)
{
    static const char *const names[][2] = {{"OMPI_COMM_WORLD_RANK", "OMPI_COMM_WORLD_SIZE"},
                                           {"PMI_RANK", "PMI_SIZE"}};
    for (size_t k = 0; k < sizeof names / sizeof names[0]; k++) {
        const char *r = getenv(names[k][0]), *n = getenv(names[k][1]);
        char *end_r, *end_n;
        long lr = r ? strtol(r, &end_r, 10) : -1, ln = n ? strtol(n, &end_n, 10) : -1;
        if (r && n && *r && *n && !*end_r && !*end_n && lr >= 0 && ln > lr && ln <= INT_MAX) {
            *rank = (int)lr;
            *ranks = (int)ln;
            return 1;
        }
    }
    return 0;
}

typedef struct {
    int argc;
    char **argv;
    int rc;
} command_run;

static void *run_command(void *arg)
{
    command_run *c = arg;
    c->rc = cli_main(c->argc, c->argv);
    pthread_mutex_lock(&funnel_box.lock);
    funnel_box.done = 1;
    pthread_cond_broadcast(&funnel_box.cond);
    pthread_mutex_unlock(&funnel_box.lock);
    return NULL;
}

int main(int argc, char **argv)
{
    int provided, rank = 0, ranks = 1;
    int early = launcher_place(&rank, &ranks);
    if (!early) {
        MPI_Init_thread(&argc, &argv, MPI_THREAD_FUNNELED, &provided);
        MPI_Comm_rank(MPI_COMM_WORLD, &rank);
        MPI_Comm_size(MPI_COMM_WORLD, &ranks);
    }
    int shared = ranks > 1 && argc > 1 && strcmp(argv[1], "screen") == 0;
    static cli_share share = {.agree = agree, .propose = propose, .answer = answer,
                              .send = send, .receive = receive, .sum = sum};
    share.rank = (size_t)rank;
    share.ranks = (size_t)ranks;
    /* the command's own copy of the arguments: MPI_Init may rearrange argv meanwhile */
    char **args = malloc(((size_t)argc + 1) * sizeof *args);
    command_run cmd = {argc, args, EXIT_OK};
    pthread_t thread;
    int working = (rank == 0 || shared) && args;
    if (args)
        memcpy(args, argv, ((size_t)argc + 1) * sizeof *args);
    if (working) {
        if (rank != 0)
            silence();
        if (shared)
            cli_share_set(&share);
    }
    if (working && early) { /* set before the thread starts: its first call must wait */
        funnel_box.threaded = 1;
        if (pthread_create(&thread, NULL, run_command, &cmd) != 0)
            funnel_box.threaded = 0; /* no thread: the command runs below, after MPI_Init */
    }
    if (early) {
        int mpi_rank, mpi_ranks;
        MPI_Init_thread(&argc, &argv, MPI_THREAD_FUNNELED, &provided);
        MPI_Comm_rank(MPI_COMM_WORLD, &mpi_rank);
        MPI_Comm_size(MPI_COMM_WORLD, &mpi_ranks);
        if (mpi_rank != rank || mpi_ranks != ranks) {
            fprintf(stderr, "slowscan-mpi: the launcher's environment says process %d of %d, "
                            "MPI says %d of %d\n", rank, ranks, mpi_rank, mpi_ranks);
            MPI_Abort(MPI_COMM_WORLD, EXIT_INTERNAL);
        }
    }
    if (funnel_box.threaded) {
        serve_calls();
        pthread_join(thread, NULL);
    } else if (working) {
        cmd.rc = cli_main(argc, args);
    } else if (!args) {
        cmd.rc = EXIT_INTERNAL;
    }
    free(args);
    MPI_Finalize();
    return cmd.rc;
}
