/* A run dealt over several processes (build/slowscan-mpi under mpirun): series i goes to
 * process i mod K, each screens its share, and process 0 alone gathers the plain-data records
 * in input order and writes the outputs. This header knows nothing of MPI: cli/mpi_main.c
 * fills a cli_share with MPI calls, the plain binary never sets one, and the commands see only
 * what is here. */
#ifndef SLOWSCAN_CLI_SHARE_H
#define SLOWSCAN_CLI_SHARE_H

#include "slowscan/io.h"

#include <stddef.h>
#include <stdint.h>
#include <stdio.h>

/* What one message between processes carries. */
typedef enum {
    SHARE_RECORD, /* one series' record */
    SHARE_END,    /* the sender has no more series */
    SHARE_FAILED  /* the sender's run failed here: an int exit code, then its messages */
} share_kind;

typedef struct cli_share cli_share;
struct cli_share {
    size_t rank, ranks;
    /* Collective: every process passes its exit code; all get process 0's when it failed,
     * else the worst of the others (so no process starts work another cannot do). */
    int (*agree)(const cli_share *s, int rc);
    /* The same agreement without waiting for it (cli_share_begin): the collective runs once
     * MPI is up, while this process already works; answer() gives its outcome (as agree's),
     * with wait = 0 EXIT_OK while it is not known yet. */
    void (*propose)(const cli_share *s, int rc);
    int (*answer)(const cli_share *s, int wait);
    /* From a process other than 0 to process 0, in order. */
    int (*send)(const cli_share *s, share_kind kind, const void *data, size_t size);
    /* Process 0: the next message of process `from` into *data (grown with realloc, *cap its
     * room), its size in *size. */
    int (*receive)(const cli_share *s, size_t from, share_kind *kind, void **data,
                   size_t *size, size_t *cap);
    /* Collective: values[count] summed element by element over every process, the sums on
     * every process (--surrogates auto's counts after each round). */
    int (*sum)(const cli_share *s, uint64_t *values, size_t count);
    void *state;
};

/* Makes *buf (realloc'd, *cap bytes) hold at least `need` bytes; EXIT_OK or EXIT_INTERNAL. */
int cli_share_room(void **buf, size_t *cap, size_t need);

/* Before a shared command's work: every process passes its exit code (as agree). A process
 * that failed waits for the outcome and returns it; one that can start returns EXIT_OK at once
 * and starts, without waiting for the others (they may still be starting: MPI_Init takes longer
 * than loading a table). It then polls cli_share_stopped between series, and calls
 * cli_share_settle before it exchanges anything else with the others. */
int cli_share_begin(const cli_share *s, int rc);

/* EXIT_OK while no other process is known to have failed to start, else the outcome. */
int cli_share_stopped(const cli_share *s);

/* Waits for the outcome of cli_share_begin: EXIT_OK, or the failure's exit code (process 0
 * says that another process could not start). Only the first call waits or speaks. */
int cli_share_settle(const cli_share *s);

/* The run's share: NULL for one process (the plain binary, or mpirun -np 1). */
const cli_share *cli_share_get(void);
void cli_share_set(const cli_share *share);

/* Where cli_error and cli_warning write (NULL: stderr); returns the previous target. Processes
 * other than 0 speak only through process 0, and every process holds back what it says while
 * it screens, so that process 0 can print a failure's words at its place in input order. */
FILE *cli_messages_to(FILE *fp);

/* How a process's own screening ended: `count` records delivered, then rc (EXIT_OK: the
 * share was done) with the words it held back (text, NUL-terminated, may be empty). */
typedef struct {
    size_t count;
    int rc;
    const char *text;
} share_outcome;

/* Called on process 0 with each record of the run in input order. */
typedef int (*share_accept)(const void *record, size_t size, void *context);

/* Process 0: every record in input order — series g of process g mod K, its own read from
 * `own` (index g / K), the others' received — until the process whose turn it is has no
 * more; stops at the first failure in input order (prints its words, returns its exit code),
 * and always receives every process's messages to their end, so none waits forever. Other
 * processes: send `own`'s records, then SHARE_END or SHARE_FAILED. Returns an exit code. */
int cli_share_gather(const cli_share *s, record_spill *own, const share_outcome *mine,
                     share_accept accept, void *context);

#endif
