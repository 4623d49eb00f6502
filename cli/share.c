/* A run dealt over several processes: the gathering of records on process 0 in input order
 * (share.h). No MPI here: the messages go through the cli_share's own calls. */
#include "share.h"
#include "cli.h"
#include "slowscan/status.h"

#include <stdint.h>
#include <stdlib.h>
#include <string.h>

static const cli_share *run_share;

const cli_share *cli_share_get(void)
{
    return run_share;
}

void cli_share_set(const cli_share *share)
{
    run_share = share;
}

/* cli_share_begin's outcome: -1 while the process that proposed has not settled it. */
static int begun_outcome = -1;

int cli_share_begin(const cli_share *s, int rc)
{
    s->propose(s, rc);
    begun_outcome = rc == EXIT_OK ? -1 : s->answer(s, 1);
    return rc == EXIT_OK ? EXIT_OK : begun_outcome;
}

int cli_share_stopped(const cli_share *s)
{
    return begun_outcome >= 0 ? begun_outcome : s->answer(s, 0);
}

int cli_share_settle(const cli_share *s)
{
    if (begun_outcome >= 0)
        return begun_outcome;
    begun_outcome = s->answer(s, 1);
    if (begun_outcome != EXIT_OK && s->rank == 0)
        cli_error("another process of the run could not start (exit code %d)", begun_outcome);
    return begun_outcome;
}

int cli_share_room(void **buf, size_t *cap, size_t need)
{
    if (need <= *cap && *buf)
        return EXIT_OK;
    size_t room = need > 2 * *cap ? need : 2 * *cap;
    void *grown = realloc(*buf, room ? room : 1);
    if (!grown)
        return EXIT_INTERNAL;
    *buf = grown;
    *cap = room ? room : 1;
    return EXIT_OK;
}

/* A failure's message: the exit code, then the words the process held back. */
static int send_outcome(const cli_share *s, const share_outcome *mine)
{
    if (mine->rc == EXIT_OK)
        return s->send(s, SHARE_END, NULL, 0);
    size_t len = mine->text ? strlen(mine->text) : 0;
    char *buf = malloc(sizeof(int) + len + 1);
    if (!buf)
        return EXIT_INTERNAL;
    memcpy(buf, &mine->rc, sizeof(int));
    memcpy(buf + sizeof(int), mine->text ? mine->text : "", len + 1);
    int rc = s->send(s, SHARE_FAILED, buf, sizeof(int) + len + 1);
    free(buf);
    return rc;
}

/* Records travel in bundles, each record after its size (a uint64_t) and padded to 8 bytes: a
 * message per record cost both processes a hand-over to the MPI thread per series. Process 0
 * holds one bundle of each process at a time, so a bundle is kept under 16 MiB / K (at least
 * 64 KiB; a larger record travels alone). The suites set SLOWSCAN_SHARE_BUNDLE=BYTES to send a
 * small run in several bundles (not a user setting). */
static size_t bundle_room(const cli_share *s)
{
    const char *text = getenv("SLOWSCAN_SHARE_BUNDLE");
    char *end;
    unsigned long bytes = text ? strtoul(text, &end, 10) : 0;
    if (text && *text && !*end)
        return (size_t)bytes;
    size_t room = ((size_t)16 << 20) / s->ranks, least = (size_t)64 << 10;
    return room < least ? least : room;
}

/* Bytes a record of `size` bytes takes in a bundle. */
static size_t bundled(size_t size)
{
    return sizeof(uint64_t) + ((size + 7) & ~(size_t)7);
}

/* A process other than 0: its records in order, in bundles, then how it ended. */
static int send_share(const cli_share *s, record_spill *own, const share_outcome *mine)
{
    void *buf = NULL;
    size_t cap = 0, used = 0, room = bundle_room(s);
    int rc = EXIT_OK;
    for (size_t k = 0; rc == EXIT_OK && k < mine->count; k++) {
        uint64_t size = slowscan_spill_size(own, k);
        io_error err = {{0}};
        if (used > 0 && used + bundled(size) > room) {
            rc = s->send(s, SHARE_RECORD, buf, used);
            used = 0;
        }
        if (rc == EXIT_OK && cli_share_room(&buf, &cap, used + bundled(size)) != EXIT_OK)
            rc = EXIT_INTERNAL;
        if (rc == EXIT_OK) {
            char *at = (char *)buf + used;
            memset(at, 0, bundled(size)); /* the padding is sent too */
            memcpy(at, &size, sizeof size);
            if (slowscan_spill_read(own, k, at + sizeof size, &err) != SLOWSCAN_OK)
                rc = EXIT_INTERNAL;
            else
                used += bundled(size);
        }
    }
    if (used > 0) { /* the records bundled before a failure still go first */
        int sent = s->send(s, SHARE_RECORD, buf, used);
        rc = rc == EXIT_OK ? sent : rc;
    }
    free(buf);
    if (rc != EXIT_OK) /* still end the stream, so process 0 does not wait for more */
        s->send(s, SHARE_FAILED, &rc, sizeof rc);
    else
        rc = send_outcome(s, mine);
    return rc;
}

/* A failure met in input order: its words, held back by the process that met it. */
static int failed(const void *data, size_t size)
{
    int rc = EXIT_INTERNAL;
    if (size >= sizeof rc)
        memcpy(&rc, data, sizeof rc);
    if (size > sizeof rc)
        fputs((const char *)data + sizeof rc, stderr);
    else
        cli_error("another process of the run failed (out of memory, or its temporary file)");
    return rc == EXIT_OK ? EXIT_INTERNAL : rc;
}

/* The last message received from a process: a bundle of records being taken (or its end). */
typedef struct {
    void *buf;
    size_t cap, size, taken;
    share_kind kind;
} bundle;

typedef struct {
    const cli_share *s;
    unsigned char *ended; /* per process: its last message received */
    bundle *from;         /* per process */
    void *buf;            /* process 0's own record */
    size_t cap;
    const void *record; /* the record taken */
    size_t size;
} gathering;

/* The next message of process `from` (an end when it cannot be received). */
static void receive(gathering *g, size_t from)
{
    bundle *b = &g->from[from];
    b->taken = 0;
    if (g->s->receive(g->s, from, &b->kind, &b->buf, &b->size, &b->cap) != EXIT_OK) {
        int rc = EXIT_INTERNAL;
        b->kind = SHARE_FAILED;
        b->size = 0;
        if (cli_share_room(&b->buf, &b->cap, sizeof rc) == EXIT_OK) {
            memcpy(b->buf, &rc, sizeof rc);
            b->size = sizeof rc;
        }
    }
    if (b->kind != SHARE_RECORD)
        g->ended[from] = 1;
}

/* The next record of process `from`, from its bundle or a new one: EXIT_OK, CLI_CURSOR_END at
 * its end, or the failure's exit code. */
static int take_record(gathering *g, size_t from)
{
    bundle *b = &g->from[from];
    if (b->kind != SHARE_RECORD || b->taken >= b->size)
        receive(g, from);
    if (b->kind != SHARE_RECORD)
        return b->kind == SHARE_END ? CLI_CURSOR_END : failed(b->buf, b->size);
    uint64_t size = 0;
    size_t left = b->size - b->taken;
    if (left >= sizeof size)
        memcpy(&size, (const char *)b->buf + b->taken, sizeof size);
    if (left < sizeof size || size > left - sizeof size) { /* every process runs this binary */
        cli_error("a bundle of series' records arrived damaged (%zu bytes)", b->size);
        return EXIT_INTERNAL;
    }
    g->record = (const char *)b->buf + b->taken + sizeof size;
    g->size = (size_t)size;
    b->taken += bundled(g->size) < left ? bundled(g->size) : left;
    return EXIT_OK;
}

/* Record g of the run (process g mod K); EXIT_OK, CLI_CURSOR_END at the run's end, or the
 * failure's exit code. */
static int next_record(gathering *g, record_spill *own, const share_outcome *mine, size_t index)
{
    size_t from = index % g->s->ranks, local = index / g->s->ranks;
    if (from != 0)
        return take_record(g, from);
    if (local >= mine->count) {
        if (mine->rc != EXIT_OK && mine->text)
            fputs(mine->text, stderr);
        return mine->rc == EXIT_OK ? CLI_CURSOR_END : mine->rc;
    }
    io_error err = {{0}};
    g->size = slowscan_spill_size(own, local);
    if (cli_share_room(&g->buf, &g->cap, g->size) != EXIT_OK) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    if (slowscan_spill_read(own, local, g->buf, &err) != SLOWSCAN_OK) {
        cli_error("%s", err.message);
        return EXIT_INTERNAL;
    }
    g->record = g->buf;
    return EXIT_OK;
}

int cli_share_gather(const cli_share *s, record_spill *own, const share_outcome *mine,
                     share_accept accept, void *context)
{
    int started = cli_share_settle(s);
    if (started != EXIT_OK) /* another process could not start: nothing to gather */
        return started;
    if (s->rank != 0)
        return send_share(s, own, mine);
    /* calloc'd bundles (kind SHARE_RECORD, the first value, size 0) are empty: each
     * process's first record is received */
    gathering g = {.s = s, .ended = calloc(s->ranks, 1),
                   .from = calloc(s->ranks, sizeof *g.from)};
    int rc = g.ended && g.from ? EXIT_OK : EXIT_INTERNAL;
    if (rc != EXIT_OK)
        cli_error("out of memory");
    for (size_t index = 0; rc == EXIT_OK; index++) {
        rc = next_record(&g, own, mine, index);
        if (rc == EXIT_OK)
            rc = accept(g.record, g.size, context);
    }
    for (size_t from = 1; g.ended && g.from && from < s->ranks; from++)
        while (!g.ended[from])
            receive(&g, from);
    for (size_t from = 0; g.from && from < s->ranks; from++)
        free(g.from[from].buf);
    free(g.from);
    free(g.buf);
    free(g.ended);
    return rc == CLI_CURSOR_END ? EXIT_OK : rc;
}
