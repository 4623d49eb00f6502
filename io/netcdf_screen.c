/* A walk over the header of a classic-format NetCDF file (CDF-1, 64-bit offset CDF-2, CDF-5)
 * before netcdf-c reads it: every name, attribute value and dimension list must fit in the
 * file. Fuzzing (tests/fuzz/fuzz_netcdf.c) found that netcdf-c 4.9.0 trusts these counts: it
 * allocates a name as long as the header says (gigabytes for a 1 kB file), uses a table
 * unchecked when that allocation fails, and reads past its buffer on a header whose counts
 * overrun the file (a SEGV in ncx_getn_longlong_int, also in ncdump;
 * tests/fuzz/regressions/netcdf/), and copies a name longer than NC_MAX_NAME, which it
 * writes nowhere but reads back all the same, into its caller's NC_MAX_NAME + 1 bytes (a
 * stack overflow in the reader, through nc_inq_dimname). Such a file is refused here, naming
 * the byte where the header stops making sense. The walk only reads; it checks nothing netcdf-c checks after
 * it (types of values, dimension ids, where the data start). */
#include "netcdf_internal.h"

#include <netcdf.h>

#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

typedef struct {
    const unsigned char *mem; /* the file in memory, or NULL: read fp */
    FILE *fp;
    uint64_t size, pos;
    int wide;                 /* CDF-5: counts are 8 bytes */
    int offset_bytes;         /* where a variable's data begin: 4 (CDF-1) or 8 */
    const char *why;          /* what was wrong, when not a count past the end */
    uint64_t dims;            /* dimensions read so far */
    uint64_t *lengths;        /* their lengths (dims of them, room for cap) */
    size_t cap;
    uint64_t unlimited;       /* the record dimension's id, UINT64_MAX: none */
    int records;              /* some variable runs along the record dimension */
} header_walk;

/* n bytes into out (NULL: skipped); 0 past the end of the file. */
static int take(header_walk *w, void *out, uint64_t n)
{
    if (n > w->size - w->pos)
        return 0;
    if (w->mem) {
        if (out)
            memcpy(out, w->mem + w->pos, (size_t)n);
    } else if (out ? fread(out, 1, (size_t)n, w->fp) != n
                   : fseeko(w->fp, (off_t)n, SEEK_CUR) != 0) {
        return 0;
    }
    w->pos += n;
    return 1;
}

/* A big-endian unsigned number of `bytes` bytes. */
static int number(header_walk *w, int bytes, uint64_t *v)
{
    unsigned char b[8];
    if (!take(w, b, (uint64_t)bytes))
        return 0;
    *v = 0;
    for (int k = 0; k < bytes; k++)
        *v = *v << 8 | b[k];
    return 1;
}

static int count(header_walk *w, uint64_t *v)
{
    return number(w, w->wide ? 8 : 4, v);
}

/* Bytes rounded up to the 4-byte boundary the format pads to; 0 when that overflows. */
static uint64_t padded(uint64_t n)
{
    return n > UINT64_MAX - 3 ? 0 : (n + 3) / 4 * 4;
}

/* Every name the reader asks netcdf-c for lands in a buffer of NC_MAX_NAME + 1 bytes. */
static int name(header_walk *w)
{
    uint64_t n;
    if (!count(w, &n))
        return 0;
    if (n == 0 || n > NC_MAX_NAME) {
        w->why = n ? "a name longer than NC_MAX_NAME bytes" : "an empty name";
        return 0;
    }
    return take(w, NULL, padded(n));
}

/* The size of one value of a NetCDF external type, 0 for none. */
static uint64_t type_size(uint64_t type)
{
    static const unsigned char sizes[] = {0, 1, 1, 2, 4, 4, 8, 1, 2, 4, 8, 8};
    return type < sizeof sizes ? sizes[type] : 0;
}

/* A list: ABSENT (two zeros) or its tag and that many elements read by `element`. */
static int list(header_walk *w, uint64_t tag, int (*element)(header_walk *))
{
    uint64_t got, n;
    if (!number(w, 4, &got) || !count(w, &n) || (got != tag && (got != 0 || n != 0)))
        return 0;
    /* each element takes bytes, so a count larger than the file runs out of them here */
    for (uint64_t k = 0; k < n; k++)
        if (!element(w))
            return 0;
    return 1;
}

static int attribute(header_walk *w)
{
    uint64_t type, n, size;
    if (!name(w) || !number(w, 4, &type) || !count(w, &n) || !(size = type_size(type)))
        return 0;
    if (n > (UINT64_MAX - 3) / size)
        return 0;
    return take(w, NULL, padded(n * size));
}

static int dimension(header_walk *w)
{
    uint64_t length;
    if (!name(w) || !count(w, &length))
        return 0;
    if (length == 0 && w->unlimited == UINT64_MAX)
        w->unlimited = w->dims;
    /* each dimension took 12 bytes or more, so the file bounds this array */
    if (slowscan_io_reserve((void **)&w->lengths, &w->cap, (size_t)w->dims, sizeof *w->lengths,
                            16) != SLOWSCAN_OK)
        return 0;
    w->lengths[w->dims++] = length;
    return 1;
}

/* A variable holds at least one byte per element (per record for a record variable), so no
 * dimension of a variable but the record one can be longer than the file (fuzzing: a member
 * dimension of 268435458 in 453 bytes, whose coordinates the reader then tried to allocate). */
static int variable(header_walk *w)
{
    uint64_t ndims, type, vsize, begin, id, first = UINT64_MAX;
    int width = w->wide ? 8 : 4, fixed_too_long = 0;
    if (!name(w) || !count(w, &ndims) || ndims > (w->size - w->pos) / (uint64_t)width)
        return 0;
    for (uint64_t k = 0; k < ndims; k++) {
        if (!count(w, &id))
            return 0;
        if (k == 0)
            first = id;
        fixed_too_long |= id < w->dims && w->lengths[id] > w->size;
    }
    w->records |= ndims > 0 && first == w->unlimited;
    if (fixed_too_long) {
        w->why = "a dimension longer than the file";
        return 0;
    }
    return list(w, 0x0C, attribute) && number(w, 4, &type) && type_size(type) &&
           count(w, &vsize) && number(w, w->offset_bytes, &begin);
}

/* A record takes at least a byte of each record variable, so a record count larger than the
 * file is corrupt (fuzzing: 4160749317 records in 1 kB, which the reader then tried to
 * allocate a time axis for); all ones is netcdf-c's "streaming" (count unknown). */
static int walk(header_walk *w)
{
    uint64_t numrecs;
    if (!count(w, &numrecs) || !list(w, 0x0A, dimension) || !list(w, 0x0C, attribute) ||
        !list(w, 0x0B, variable))
        return 0;
    uint64_t streaming = w->wide ? UINT64_MAX : UINT32_MAX;
    if (w->records && numrecs != streaming && numrecs > w->size) {
        w->why = "a record count larger than the file";
        return 0;
    }
    return 1;
}

int netcdf_screen_header(const netcdf_reader *r, const void *memory, size_t size,
                         io_error *err)
{
    unsigned char magic[4];
    header_walk w = {.mem = memory, .size = size, .unlimited = UINT64_MAX};
    struct stat st;
    if (!memory) {
        /* a file that cannot be opened or sized here is left to nc_open's own message; only
         * regular files are opened (opening a FIFO would wait for its writer) */
        if (stat(r->path, &st) != 0 || !S_ISREG(st.st_mode) || !(w.fp = fopen(r->path, "rb")))
            return SLOWSCAN_OK;
        w.size = (uint64_t)st.st_size;
    }
    int classic = take(&w, magic, 4) && memcmp(magic, "CDF", 3) == 0 &&
                  (magic[3] == 1 || magic[3] == 2 || magic[3] == 5);
    int whole = 1;
    if (classic) {
        w.wide = magic[3] == 5;
        w.offset_bytes = magic[3] == 1 ? 4 : 8;
        whole = walk(&w);
    }
    if (w.fp)
        fclose(w.fp);
    free(w.lengths);
    if (!whole)
        return netcdf_fail(r, err, SLOWSCAN_EIO, "cannot read it as NetCDF: its header is "
                           "corrupt (%s near byte %llu)",
                           w.why ? w.why : "a count that runs past the end of the file",
                           (unsigned long long)w.pos);
    return SLOWSCAN_OK;
}
