/* The screening run's store (screen_store.h): p-values in memory, full records in a record
 * spill store, q-values after the decision.
 *
 * A record is plain data: a header with the sizes; the screen_result without its unused
 * test slots (a third of its size with the default three tests); the caller's block, at a
 * 16-byte boundary of the record, which is read into a malloc'd buffer, so the block comes
 * back aligned for any plain type; and the name with its NUL. */
#include "screen_internal.h"
#include "slowscan/screen_store.h"
#include "slowscan/significance.h"
#include "slowscan/status.h"

#include <math.h>
#include <stddef.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

typedef struct {
    size_t extra_size, name_size, ntests;
    size_t first_test; /* where its tests' p-values (q-values) are in the store's array */
} record_header;

enum { RECORD_ALIGN = 16 };

/* The result's fields up to its last used test, and from its warnings on. */
static size_t head_size(size_t ntests)
{
    return offsetof(screen_result, tests) + ntests * sizeof(screen_test);
}
static const size_t tail_at = offsetof(screen_result, nwarnings);

static size_t extra_at(size_t ntests)
{
    size_t at = sizeof(record_header) + head_size(ntests) + sizeof(screen_result) - tail_at;
    return (at + RECORD_ALIGN - 1) / RECORD_ALIGN * RECORD_ALIGN;
}

struct screen_store {
    record_spill *records;
    double *p;        /* one per test: the p-values, then (decided) the q-values */
    size_t ntests, p_cap;
    size_t tested;    /* tests with a p-value */
    int decided;
    double fdr;
    unsigned char *buffer; /* the record read last */
    size_t buffer_cap;
};

screen_store *slowscan_screen_store_alloc(size_t spill_after, const char *dir)
{
    screen_store *s = calloc(1, sizeof *s);
    if (!s)
        return NULL;
    if (!(s->records = slowscan_spill_alloc(spill_after, dir))) {
        free(s);
        return NULL;
    }
    return s;
}

void slowscan_screen_store_free(screen_store *s)
{
    if (!s)
        return;
    slowscan_spill_free(s->records);
    free(s->p);
    free(s->buffer);
    free(s);
}

size_t slowscan_screen_store_count(const screen_store *s)
{
    return slowscan_spill_count(s->records);
}

size_t slowscan_screen_store_tests(const screen_store *s)
{
    return s->ntests;
}

/* Grows the read buffer to `size` bytes. */
static int buffer_fit(screen_store *s, size_t size)
{
    if (size <= s->buffer_cap)
        return SLOWSCAN_OK;
    unsigned char *grown = realloc(s->buffer, size);
    if (!grown)
        return SLOWSCAN_ENOMEM;
    s->buffer = grown;
    s->buffer_cap = size;
    return SLOWSCAN_OK;
}

/* Room for the series' p-values; the record is packed into the buffer. */
static int reserve(screen_store *s, const screen_result *res, size_t record_size)
{
    void *p = s->p;
    int st = SLOWSCAN_OK;
    for (size_t j = 0; st == SLOWSCAN_OK && j < res->ntests; j++) {
        st = slowscan_io_reserve(&p, &s->p_cap, s->ntests + j, sizeof *s->p, 256);
        s->p = p;
    }
    return st == SLOWSCAN_OK ? buffer_fit(s, record_size) : st;
}

int slowscan_screen_store_add(screen_store *s, const char *name, const screen_result *res,
                              const void *extra, size_t extra_size, io_error *err)
{
    if (s->decided || res->ntests > SCREEN_MAX_TESTS)
        return SLOWSCAN_EINVAL;
    record_header h = {extra_size, strlen(name) + 1, res->ntests, s->ntests};
    size_t at = extra_at(res->ntests), head = head_size(res->ntests);
    if (extra_size > SIZE_MAX - at - h.name_size || reserve(s, res, at + extra_size + h.name_size))
        return SLOWSCAN_ENOMEM;
    unsigned char *b = s->buffer;
    memset(b, 0, at); /* the padding too: a record holds no stray bytes */
    memcpy(b, &h, sizeof h);
    memcpy(b + sizeof h, res, head);
    memcpy(b + sizeof h + head, (const unsigned char *)res + tail_at, sizeof *res - tail_at);
    if (extra_size)
        memcpy(b + at, extra, extra_size);
    memcpy(b + at + extra_size, name, h.name_size);
    int st = slowscan_spill_append(s->records, s->buffer, at + extra_size + h.name_size, err);
    if (st != SLOWSCAN_OK)
        return st;
    for (size_t j = 0; j < res->ntests; j++) {
        s->p[s->ntests++] = res->tests[j].p_value;
        s->tested += !isnan(res->tests[j].p_value);
    }
    return SLOWSCAN_OK;
}

int slowscan_screen_store_decide(screen_store *s, double fdr)
{
    if (s->decided) { /* the q-values do not depend on fdr; only the flags do */
        s->fdr = fdr;
        return SLOWSCAN_OK;
    }
    double *q = malloc((s->ntests + 1) * sizeof *q);
    int st = q ? slowscan_significance_bh(s->p, s->ntests, q, NULL) : SLOWSCAN_ENOMEM;
    if (st != SLOWSCAN_OK) {
        free(q);
        return st;
    }
    free(s->p); /* the records hold the p-values; memory keeps the q-values */
    s->p = q;
    s->p_cap = s->ntests + 1;
    s->decided = 1;
    s->fdr = fdr;
    return SLOWSCAN_OK;
}

int slowscan_screen_store_read(screen_store *s, size_t index, screen_stored *out, io_error *err)
{
    size_t size = slowscan_spill_size(s->records, index);
    if (index >= slowscan_spill_count(s->records))
        return SLOWSCAN_EINVAL;
    if (buffer_fit(s, size) != SLOWSCAN_OK)
        return SLOWSCAN_ENOMEM;
    int st = slowscan_spill_read(s->records, index, s->buffer, err);
    if (st != SLOWSCAN_OK)
        return st;
    record_header h;
    memcpy(&h, s->buffer, sizeof h);
    size_t head = head_size(h.ntests), at = extra_at(h.ntests);
    memset(&out->result, 0, sizeof out->result);
    memcpy(&out->result, s->buffer + sizeof h, head);
    memcpy((unsigned char *)&out->result + tail_at, s->buffer + sizeof h + head,
           sizeof out->result - tail_at);
    out->extra = h.extra_size ? s->buffer + at : NULL;
    out->extra_size = h.extra_size;
    out->name = (const char *)s->buffer + at + h.extra_size;
    for (size_t j = 0; j < out->result.ntests; j++) {
        const screen_test *t = &out->result.tests[j];
        out->q_value[j] = s->decided ? s->p[h.first_test + j] : NAN;
        out->flag[j] = s->decided ? screen_flag_of(t, out->q_value[j], s->tested, s->fdr)
                                  : SCREEN_FLAG_UNTESTED;
    }
    return SLOWSCAN_OK;
}
