/* Fuzzing the NetCDF reader (io/netcdf_open.c, netcdf_select.c, netcdf_blocks.c,
 * netcdf_table.c, netcdf_area.c, netcdf_branch.c) on files held in memory (nc_open_mem, through
 * the reader's internal netcdf_open_memory).
 *
 * Input: one byte of reading options, then the file's bytes.
 *   bits 0-1  --select: none, "lat=-30:30", "lon=0:180,lat=0", "member=1"
 *   bit 2     --vars "tas,pr" (else every data variable)
 *   bit 3     a memory budget of 4 KiB (many small blocks) instead of the default
 * The format is screened before netcdf-c sees the bytes: classic, 64-bit offset and CDF-5
 * ("CDF" and version 1, 2 or 5) are netcdf-c's own code and are read in full. NetCDF-4 files
 * are HDF5 files, parsed by the HDF5 library: they go through the reader only when
 * SLOWSCAN_FUZZ_HDF5=1 is set, so that a crash inside HDF5 (which slowscan cannot fix) is
 * looked for on purpose and recorded, not mistaken for the reader's. Anything else is not a
 * NetCDF file for netcdf-c either (its own magic-number check refuses it) and is skipped. */
#include "fuzz.h"

#include "../../io/netcdf_internal.h"
#include "slowscan/status.h"

#include <stdlib.h>
#include <string.h>

enum { FORMAT_OTHER = 0, FORMAT_CLASSIC, FORMAT_HDF5 };

static int screen_format(const uint8_t *data, size_t size)
{
    static const uint8_t hdf5[8] = {0x89, 'H', 'D', 'F', '\r', '\n', 0x1a, '\n'};
    if (size >= 4 && memcmp(data, "CDF", 3) == 0 && (data[3] == 1 || data[3] == 2 || data[3] == 5))
        return FORMAT_CLASSIC;
    if (size >= 8 && memcmp(data, hdf5, 8) == 0)
        return FORMAT_HDF5;
    return FORMAT_OTHER;
}

static int hdf5_wanted(void)
{
    const char *v = getenv("SLOWSCAN_FUZZ_HDF5");
    return v && strcmp(v, "1") == 0;
}

/* Everything a command asks of an open reader: the axis, the cells as tables, the members,
 * the area weights and the branch times. */
static void read_all(netcdf_reader *r)
{
    size_t n;
    time_axis axis;
    const char *name;
    char text[260];
    io_error err;
    slowscan_netcdf_times(r, &n, &axis, &name);
    slowscan_netcdf_series_count(r);
    slowscan_netcdf_member_dimension(r, text, sizeof text);
    for (size_t v = 0; v < r->nvars; v++) {
        netcdf_area_weights w;
        slowscan_netcdf_area_weights(r, v, &w, &err);
        slowscan_netcdf_area_weights_free(&w);
    }
    int found;
    double parent, child;
    slowscan_netcdf_branch_days(r, &found, &parent, &child, &err);
    for (int tables = 0; tables < 64; tables++) {
        series_table t = {0};
        int st = slowscan_netcdf_next_table(r, 3, &t, NULL, &err);
        slowscan_series_table_free(&t);
        if (st != SLOWSCAN_OK)
            break;
    }
}

int FUZZ_ENTRY(netcdf)(const uint8_t *data, size_t size)
{
    static const char *const selects[] = {NULL, "lat=-30:30", "lon=0:180,lat=0", "member=1"};
    if (size < 1)
        return 0;
    unsigned flags = data[0];
    int format = screen_format(data + 1, size - 1);
    if (format == FORMAT_OTHER || (format == FORMAT_HDF5 && !hdf5_wanted()))
        return 0;
    netcdf_read_options o = slowscan_netcdf_read_options_default();
    o.select = selects[flags & 3u];
    o.vars = (flags & 4u) ? "tas,pr" : NULL;
    o.memory_budget = (flags & 8u) ? 4096 : 0;
    /* netcdf-c wants a writable pointer; the reader opens it NC_NOWRITE, but a copy keeps the
     * fuzzer's own buffer out of it all the same */
    void *copy = malloc(size - 1);
    if (!copy)
        return 0;
    memcpy(copy, data + 1, size - 1);
    netcdf_reader *r;
    io_error err;
    if (netcdf_open_memory("fuzz.nc", copy, size - 1, &o, &r, &err) == SLOWSCAN_OK) {
        read_all(r);
        slowscan_netcdf_close(r);
    }
    free(copy);
    return 0;
}
