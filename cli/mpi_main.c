/* slowscan-mpi (make MPI=1): the command line under mpirun. `screen` is shared by the
 * processes (cli/share.h: series i to process i mod K, records gathered on process 0 in
 * input order, process 0 alone writes and speaks); every other command runs on process 0
 * alone while the others end at once. Only this file knows MPI; every MPI call is made from
 * the main thread (the batch driver's workers never make one), hence MPI_THREAD_FUNNELED. */
#include "cli.h"
#include "share.h"

#include <limits.h>
#include <mpi.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static int agree(const cli_share *s, int rc)
{
    int *all = malloc(s->ranks * sizeof *all);
    if (!all) /* cannot hear the others: end this process alike on every one */
        MPI_Abort(MPI_COMM_WORLD, EXIT_INTERNAL);
    MPI_Allgather(&rc, 1, MPI_INT, all, 1, MPI_INT, MPI_COMM_WORLD);
    int agreed = all[0];
    for (size_t r = 1; agreed == EXIT_OK && r < s->ranks; r++)
        agreed = all[r];
    if (all[0] == EXIT_OK && agreed != EXIT_OK && s->rank == 0)
        cli_error("another process of the run could not start (exit code %d)", agreed);
    free(all);
    return agreed;
}

static int send(const cli_share *s, share_kind kind, const void *data, size_t size)
{
    (void)s;
    if (size > INT_MAX)
        return EXIT_INTERNAL;
    static const char none;
    MPI_Send(data ? data : &none, (int)size, MPI_BYTE, 0, (int)kind, MPI_COMM_WORLD);
    return EXIT_OK;
}

static int receive(const cli_share *s, size_t from, share_kind *kind, void **data, size_t *size,
                   size_t *cap)
{
    (void)s;
    MPI_Status status;
    int count;
    MPI_Probe((int)from, MPI_ANY_TAG, MPI_COMM_WORLD, &status);
    MPI_Get_count(&status, MPI_BYTE, &count);
    if (cli_share_room(data, cap, (size_t)count) != EXIT_OK)
        return EXIT_INTERNAL;
    MPI_Recv(*data, count, MPI_BYTE, (int)from, status.MPI_TAG, MPI_COMM_WORLD,
             MPI_STATUS_IGNORE);
    *kind = (share_kind)status.MPI_TAG;
    *size = (size_t)count;
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

int main(int argc, char **argv)
{
    int provided, rank, ranks;
    MPI_Init_thread(&argc, &argv, MPI_THREAD_FUNNELED, &provided);
    MPI_Comm_rank(MPI_COMM_WORLD, &rank);
    MPI_Comm_size(MPI_COMM_WORLD, &ranks);
    int shared = ranks > 1 && argc > 1 && strcmp(argv[1], "screen") == 0;
    static cli_share share = {.agree = agree, .send = send, .receive = receive};
    share.rank = (size_t)rank;
    share.ranks = (size_t)ranks;
    int rc = EXIT_OK;
    if (rank == 0 || shared) {
        if (rank != 0)
            silence();
        if (shared)
            cli_share_set(&share);
        rc = cli_main(argc, argv);
    }
    MPI_Finalize();
    return rc;
}
