/* Every temporary output file of the process (io_temp_register, slowscan_atomic_temp_done,
 * slowscan_atomic_remove_temporaries; include/slowscan/io.h), so that a run stopped by a
 * signal can remove them from its handler.
 *
 * The handler may interrupt any code, so it takes no lock and frees nothing: it walks a list
 * of chunks of slots, each slot a path and a flag saying it is live, and unlinks the live
 * ones. Writers (under a mutex) publish a chunk only once it is filled in, set a slot's flag
 * only after its path, and never free a path whose flag the handler could still see set:
 * a slot is cleared before its path is replaced, and chunks are never freed. What the list
 * holds stays reachable from it, so nothing here is a leak. */
#include "io_internal.h"

#include <errno.h>
#include <pthread.h>
#include <signal.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

enum { SLOTS_PER_CHUNK = 256 };

typedef struct {
    char *path;
    volatile sig_atomic_t live;
} temp_slot;

typedef struct temp_chunk temp_chunk;
struct temp_chunk {
    temp_slot slots[SLOTS_PER_CHUNK];
    temp_chunk *volatile next;
};

static temp_chunk first_chunk;
static pthread_mutex_t registry_lock = PTHREAD_MUTEX_INITIALIZER;

/* A slot not in use (lock held); a new chunk when all are; NULL when out of memory. */
static temp_slot *free_slot(void)
{
    temp_chunk *c = &first_chunk;
    for (;;) {
        for (size_t k = 0; k < SLOTS_PER_CHUNK; k++)
            if (!c->slots[k].live)
                return &c->slots[k];
        if (!c->next) {
            temp_chunk *fresh = calloc(1, sizeof *fresh);
            if (!fresh)
                return NULL;
            c->next = fresh; /* published whole: calloc left every slot clear */
        }
        c = c->next;
    }
}

/* Puts `copy` (malloc'd; the registry owns it from now on) in a slot and sets it live;
 * 0, or -1 when no slot could be had (copy then freed). */
static int publish(char *copy)
{
    pthread_mutex_lock(&registry_lock);
    temp_slot *s = free_slot();
    if (s) {
        char *old = s->path; /* not live: the handler no longer looks at it */
        s->path = copy;
        s->live = 1;
        free(old);
    } else {
        free(copy);
    }
    pthread_mutex_unlock(&registry_lock);
    return s ? 0 : -1;
}

void io_temp_register(const char *path)
{
    char *copy = io_strdup(path);
    if (copy) /* else the file is still removed on every path but a signal's */
        publish(copy);
}

int io_temp_make(const char *template, char **name)
{
    *name = NULL;
    char *copy = io_strdup(template), *slot_name = copy;
    if (!copy || !(*name = io_strdup(template))) {
        free(copy);
        errno = ENOMEM;
        return -1;
    }
    /* mkstemp writes each name it tries into the slot's own string, in place: a signal from
     * now on finds the file by its name. A name it rejects (someone's file of that name)
     * would be removed only by a signal in that instant; 62^6 names make that remote. */
    if (publish(copy) != 0)
        slot_name = *name; /* no slot: made unregistered, as before */
    int fd = mkstemp(slot_name), e = errno;
    if (slot_name != *name)
        memcpy(*name, slot_name, strlen(slot_name));
    if (fd < 0) {
        if (slot_name != *name)
            slowscan_atomic_temp_done(slot_name);
        free(*name);
        *name = NULL;
        errno = e;
    }
    return fd;
}

void slowscan_atomic_temp_done(const char *path)
{
    if (!path)
        return;
    pthread_mutex_lock(&registry_lock);
    for (temp_chunk *c = &first_chunk; c; c = c->next)
        for (size_t k = 0; k < SLOTS_PER_CHUNK; k++)
            if (c->slots[k].live && strcmp(c->slots[k].path, path) == 0) {
                c->slots[k].live = 0;
                pthread_mutex_unlock(&registry_lock);
                return;
            }
    pthread_mutex_unlock(&registry_lock);
}

void slowscan_atomic_remove_temporaries(void)
{
    /* async-signal-safe: loads, and unlink(2) */
    for (temp_chunk *c = &first_chunk; c; c = c->next)
        for (size_t k = 0; k < SLOTS_PER_CHUNK; k++)
            if (c->slots[k].live && c->slots[k].path)
                unlink(c->slots[k].path);
}

int io_unnamed_temporary(const char *dir, const char *stem, FILE **fp, io_error *err)
{
    *fp = NULL;
    const char *tmp = getenv("TMPDIR");
    const char *where = dir && *dir ? dir : tmp && *tmp ? tmp : "/tmp";
    size_t len = strlen(where) + strlen(stem) + sizeof "/-XXXXXX";
    char *path = malloc(len), why[128];
    if (!path)
        return io_fail(err, SLOWSCAN_ENOMEM, "out of memory");
    snprintf(path, len, "%s/%s-XXXXXX", where, stem);
    int fd = mkstemp(path), e = errno;
    if (fd >= 0) {
        unlink(path); /* no name from now on: gone when closed, however the run ends */
        if (!(*fp = fdopen(fd, "w+b"))) {
            e = errno;
            close(fd);
        }
    }
    free(path);
    return *fp ? SLOWSCAN_OK
               : io_fail(err, SLOWSCAN_EIO, "cannot create a temporary file in %s: %s", where,
                         io_strerror(e, why, sizeof why));
}
