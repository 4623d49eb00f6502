/* Whether a classic-format NetCDF file (CDF-1, CDF-2 64-bit offset, CDF-5) holds all the
 * bytes its header promises. netcdf-c reads a cut file without complaint: the missing tail
 * comes back as zeros (its reads past the end of the file are zero-filled), so a transfer
 * cut short would be screened as a series that drops to 0 — a silently wrong number. The
 * NetCDF-4 (HDF5) formats keep their own checks and are not looked at here.
 *
 * The size the file must at least have is the header's size plus every variable's data,
 * both computed from the layout of the classic format (NetCDF User Guide, "File Format
 * Specification"; from the published grammar, not from netcdf-c's code). A writer may leave
 * free room after the header or align the data further, so a real file can only be longer:
 * the bound never refuses a whole file. */
#include "netcdf_internal.h"

#include <netcdf.h>
#include <stdint.h>
#include <string.h>
#include <sys/stat.h>

typedef struct {
    int ncid;
    uint64_t count; /* bytes of a count or a dimension length: 4, 8 in CDF-5 */
    uint64_t offset; /* bytes of a variable's begin: 4 in CDF-1, else 8 */
} layout;

static uint64_t pad4(uint64_t n) { return (n + 3) & ~(uint64_t)3; }

static uint64_t name_bytes(const layout *l, const char *name)
{
    return l->count + pad4(strlen(name));
}

static uint64_t type_size(const layout *l, nc_type type)
{
    size_t size = 0;
    return nc_inq_type(l->ncid, type, NULL, &size) == NC_NOERR ? size : 0;
}

/* An attribute list: ABSENT (8 bytes) or its tag, count and attributes. */
static uint64_t attributes_bytes(const layout *l, int varid, int natts)
{
    uint64_t bytes = 4 + l->count;
    for (int a = 0; a < natts; a++) {
        char name[NC_MAX_NAME + 1];
        nc_type type;
        size_t len = 0;
        if (nc_inq_attname(l->ncid, varid, a, name) != NC_NOERR ||
            nc_inq_att(l->ncid, varid, name, &type, &len) != NC_NOERR)
            continue;
        bytes += name_bytes(l, name) + 4 + l->count + pad4(len * type_size(l, type));
    }
    return bytes;
}

/* A variable's entry in the header, and its data (*data: all of it, or one record's). */
static uint64_t variable_bytes(const layout *l, int varid, int unlimited, int *is_record,
                               uint64_t *data)
{
    char name[NC_MAX_NAME + 1];
    int ndims = 0, natts = 0, dims[NC_MAX_VAR_DIMS];
    nc_type type;
    if (nc_inq_var(l->ncid, varid, name, &type, &ndims, dims, &natts) != NC_NOERR)
        return 0;
    *data = type_size(l, type);
    *is_record = ndims > 0 && dims[0] == unlimited;
    for (int d = *is_record; d < ndims; d++) {
        size_t len = 0;
        nc_inq_dimlen(l->ncid, dims[d], &len);
        *data *= len;
    }
    return name_bytes(l, name) + l->count + (uint64_t)ndims * l->count +
           attributes_bytes(l, varid, natts) + 4 + l->count + l->offset;
}

/* The smallest size of a file with this header. One record variable alone is not padded
 * to 4 bytes per record (the format's special case); otherwise every piece is. */
static uint64_t least_size(const layout *l)
{
    int ndims = 0, nvars = 0, natts = 0, unlimited = -1, records = 0;
    nc_inq(l->ncid, &ndims, &nvars, &natts, &unlimited);
    uint64_t header = 4 + l->count + 4 + l->count, fixed = 0, record = 0, last_record = 0;
    for (int d = 0; d < ndims; d++) {
        char name[NC_MAX_NAME + 1];
        if (nc_inq_dimname(l->ncid, d, name) == NC_NOERR)
            header += name_bytes(l, name) + l->count;
    }
    header += attributes_bytes(l, NC_GLOBAL, natts) + 4 + l->count;
    size_t nrecs = 0;
    if (unlimited >= 0)
        nc_inq_dimlen(l->ncid, unlimited, &nrecs);
    for (int v = 0; v < nvars; v++) {
        int is_record = 0;
        uint64_t data = 0;
        header += variable_bytes(l, v, unlimited, &is_record, &data);
        if (is_record) {
            records++;
            record += pad4(data);
            last_record = data;
        } else {
            fixed += pad4(data);
        }
    }
    if (records == 1)
        record = last_record;
    return header + fixed + (uint64_t)nrecs * record;
}

int netcdf_check_extent(const netcdf_reader *r, const char *path, io_error *err)
{
    int format = 0;
    struct stat st;
    if (nc_inq_format(r->ncid, &format) != NC_NOERR || stat(path, &st) != 0)
        return SLOWSCAN_OK; /* nothing to measure: netcdf-c's own checks stand */
    layout l = {r->ncid, 4, 8};
    if (format == NC_FORMAT_CLASSIC)
        l.offset = 4;
    else if (format == NC_FORMAT_CDF5)
        l.count = 8;
    else if (format != NC_FORMAT_64BIT_OFFSET)
        return SLOWSCAN_OK;
    uint64_t need = least_size(&l);
    /* 3 bytes of slack: a writer may leave the last value's padding out */
    if ((uint64_t)st.st_size + 3 < need)
        return netcdf_fail(r, err, SLOWSCAN_EINVAL, "the file is cut short: its header "
                           "describes at least %llu bytes, the file has %llu (an incomplete "
                           "copy or download?)", (unsigned long long)need,
                           (unsigned long long)st.st_size);
    return SLOWSCAN_OK;
}
