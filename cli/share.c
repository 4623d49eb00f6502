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

/* A process other than 0: its records in order, then how it ended. */
static int send_share(const cli_share *s, record_spill *own, const share_outcome *mine)
{
    void *buf = NULL;
    size_t cap = 0;
    int rc = EXIT_OK;
    for (size_t k = 0; rc == EXIT_OK && k < mine->count; k++) {
        size_t size = slowscan_spill_size(own, k);
        io_error err = {{0}};
        if (cli_share_room(&buf, &cap, size) != EXIT_OK)
            rc = EXIT_INTERNAL;
        else if (slowscan_spill_read(own, k, buf, &err) != SLOWSCAN_OK)
            rc = EXIT_INTERNAL;
        else
            rc = s->send(s, SHARE_RECORD, buf, size);
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

typedef struct {
    const cli_share *s;
    unsigned char *ended; /* per process: its last message received */
    void *buf;
    size_t cap, size;
    share_kind kind;
} gathering;

/* The next message of process `from` (an end when it cannot be received). */
static void receive(gathering *g, size_t from)
{
    if (g->s->receive(g->s, from, &g->kind, &g->buf, &g->size, &g->cap) != EXIT_OK) {
        int rc = EXIT_INTERNAL;
        g->kind = SHARE_FAILED;
        g->size = 0;
        if (cli_share_room(&g->buf, &g->cap, sizeof rc) == EXIT_OK) {
            memcpy(g->buf, &rc, sizeof rc);
            g->size = sizeof rc;
        }
    }
    if (g->kind != SHARE_RECORD)
        g->ended[from] = 1;
}

/* Record g of the run (process g mod K); EXIT_OK, CLI_CURSOR_END at the run's end, or the
 * failure's exit code. */
static int next_record(gathering *g, record_spill *own, const share_outcome *mine, size_t index)
{
    size_t from = index % g->s->ranks, local = index / g->s->ranks;
    if (from != 0) {
        receive(g, from);
        return g->kind == SHARE_RECORD ? EXIT_OK
               : g->kind == SHARE_END  ? CLI_CURSOR_END
                                       : failed(g->buf, g->size);
    }
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
    return EXIT_OK;
}

int cli_share_gather(const cli_share *s, record_spill *own, const share_outcome *mine,
                     share_accept accept, void *context)
{
    if (s->rank != 0)
        return send_share(s, own, mine);
    gathering g = {.s = s, .ended = calloc(s->ranks, 1)};
    if (!g.ended) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    int rc = EXIT_OK;
    for (size_t index = 0; rc == EXIT_OK; index++) {
        rc = next_record(&g, own, mine, index);
        if (rc == EXIT_OK)
            rc = accept(g.buf, g.size, context);
    }
    for (size_t from = 1; from < s->ranks; from++)
        while (!g.ended[from])
            receive(&g, from);
    free(g.buf);
    free(g.ended);
    return rc == CLI_CURSOR_END ? EXIT_OK : rc;
}
