/* slowscan — gridded input from NetCDF files that follow the CF conventions (module prefix:
 * netcdf_).
 *
 * A variable on (time, lat, lon) — or any dimensions of which one is time — is many series:
 * one per combination of its other indices (a grid cell), named VAR[lat=-28.5,lon=120] with
 * the values of the coordinate variables (or VAR[x=3,y=5] with indices where there are none).
 *
 * - The time axis is the dimension whose coordinate variable says it is time: axis = "T",
 *   standard_name = "time", or units "UNIT since DATE"; its calendar attribute (default
 *   standard) and units turn it into the axis of io.h (day numbers, or a month or year index
 *   for monthly and yearly records).
 * - Values are unpacked (scale_factor, add_offset) and every value the file marks as missing
 *   becomes NaN: _FillValue (or the netCDF default fill of the type when it has none),
 *   missing_value, and anything outside valid_min / valid_max / valid_range.
 * - Cells are read in blocks of many cells x all times sized by a memory budget, never the
 *   whole variable. A variable stored in chunks of few time steps (one map per chunk, as
 *   models write them) would have each chunk read once per block; it is instead read once,
 *   time slab by time slab, into a temporary file laid out by blocks (removed on close), from
 *   which the blocks are then read.
 *
 * Errors come back as a status and a message naming the file, the variable, the attribute or
 * the --select item. Nothing here prints. */
#ifndef SLOWSCAN_NETCDF_INPUT_H
#define SLOWSCAN_NETCDF_INPUT_H

#include "slowscan/export.h"

#include "slowscan/io.h"

#include <stddef.h>

typedef struct {
    const char *vars;     /* comma-separated variable names; NULL: every variable on the time
                             dimension that is not a coordinate or bounds variable */
    const char *select;   /* "lat=-30:30,lon=0:90,lev=850": ranges of coordinate values
                             (inclusive, either order) or one value; NULL: everything */
    size_t memory_budget; /* bytes for one block of cells x all times; 0: 64 MiB */
    const char *temp_dir; /* where the transposed copy goes; NULL: $TMPDIR or /tmp */
} netcdf_read_options;

SLOWSCAN_API
netcdf_read_options slowscan_netcdf_read_options_default(void);

enum { NETCDF_MAX_DIMS = 8 };

/* One grid cell of a variable, valid until the next call of slowscan_netcdf_next. */
typedef struct {
    const char *name;       /* VAR[lat=-28.5,lon=120] */
    const char *variable;   /* VAR */
    size_t variable_index;  /* which of the selected variables */
    size_t cell;            /* the cell's index within its variable (row-major, selected) */
    size_t ncoords;         /* the variable's other dimensions */
    const char *coord_name[NETCDF_MAX_DIMS];
    double coord_value[NETCDF_MAX_DIMS]; /* the coordinate variable's value, or the index */
    size_t coord_index[NETCDF_MAX_DIMS]; /* index in the file */
    const double *values;   /* n, unpacked, NaN where missing */
    size_t n;
    int all_missing;        /* every value is missing (land in an ocean field) */
} netcdf_series;

/* A cell's series name, VAR[lat=-28.5,lon=120] (coordinate values with up to 10
 * significant digits; VAR alone without coordinates): the name its results and random
 * streams carry, for a caller that screens a grid it holds itself. Works like snprintf:
 * returns the whole length, writes at most size bytes (NUL-terminated when size > 0). */
SLOWSCAN_API
size_t slowscan_netcdf_series_name(char *buf, size_t size, const char *variable,
                                   const char *const *coord_name, const double *coord_value,
                                   size_t ncoords);

typedef struct netcdf_reader netcdf_reader;

/* Opens a NetCDF file (classic, 64-bit offset, CDF-5 or NetCDF-4) and finds its time axis,
 * variables and selection. SLOWSCAN_EIO (unreadable, not NetCDF), SLOWSCAN_EINVAL (no time
 * axis, unknown variable, bad --select, bad units or calendar), SLOWSCAN_ENOMEM. */
SLOWSCAN_API
int slowscan_netcdf_open(const char *path, const netcdf_read_options *options,
                         netcdf_reader **reader, io_error *err);
SLOWSCAN_API
void slowscan_netcdf_close(netcdf_reader *reader);

/* The time axis: n times (borrowed), the axis, and the name of the time variable. */
SLOWSCAN_API
const double *slowscan_netcdf_times(const netcdf_reader *reader, size_t *n, time_axis *axis,
                                    const char **name);
/* Series (cells) the reader will give over all selected variables. */
SLOWSCAN_API
size_t slowscan_netcdf_series_count(const netcdf_reader *reader);

/* What slowscan_netcdf_next returns after the last cell. */
enum { NETCDF_END = -1 };

/* The next cell in order (variables in the order asked, cells row-major): SLOWSCAN_OK,
 * NETCDF_END when there are no more (series untouched), or a status with err filled. */
SLOWSCAN_API
int slowscan_netcdf_next(netcdf_reader *reader, netcdf_series *series, io_error *err);

/* The next cells as a series table (io.h) of at most max_series series with data: the
 * file's time axis (copied), one series per cell (names as slowscan_netcdf_next gives them,
 * values copied, grid[k] its variable index and cell), rows NULL. Cells with no value at
 * all (land in an ocean field) are not tables' series: *all_missing (may be NULL) counts
 * them. SLOWSCAN_OK with a table,
 * NETCDF_END when no cell is left (table zeroed), or a status with err filled. */
SLOWSCAN_API
int slowscan_netcdf_next_table(netcdf_reader *reader, size_t max_series, series_table *table,
                               size_t *all_missing, io_error *err);

/* The dimension of the ensemble members among the selected variables' non-time dimensions:
 * one named member, realization, ensemble or ens (any case), or whose coordinate variable
 * has standard_name "realization" (CF). 1 with its name in name[size]; 0 when there is none. */
SLOWSCAN_API
int slowscan_netcdf_member_dimension(const netcdf_reader *reader, char *name, size_t size);
/* Area weights of variable `variable`'s cells (for an area-weighted mean): the CF
 * cell_measures "area: NAME" variable when the file holds it on the variable's own non-time
 * dimensions (kind MEASURES, `measure` names it), else cos(latitude) from a latitude
 * coordinate (units degrees_north, or named lat/latitude): exact area weights on a regular
 * latitude-longitude grid (REGULAR_LATLON), approximate on a Gaussian or other unequally
 * spaced one (IRREGULAR_LAT); NONE (equal weights) without either. */
typedef enum {
    NETCDF_AREA_MEASURES = 0,
    NETCDF_AREA_REGULAR_LATLON,
    NETCDF_AREA_IRREGULAR_LAT,
    NETCDF_AREA_NONE
} netcdf_area_kind;

typedef struct {
    netcdf_area_kind kind;
    char measure[260];          /* the cell_measures variable named (also when unusable) */
    int lat_dim;                /* the latitude's position among the cell's coordinates */
    double *areas;              /* MEASURES: the area variable in file order */
    size_t stride[NETCDF_MAX_DIMS];
} netcdf_area_weights;

SLOWSCAN_API
int slowscan_netcdf_area_weights(const netcdf_reader *reader, size_t variable,
                                 netcdf_area_weights *weights, io_error *err);
/* The weight of a cell handed out by slowscan_netcdf_next. */
SLOWSCAN_API
double slowscan_netcdf_cell_weight(const netcdf_area_weights *weights, const netcdf_series *cell);
SLOWSCAN_API
void slowscan_netcdf_area_weights_free(netcdf_area_weights *weights);

/* The CF branch-time attributes (global branch_time_in_parent in parent_time_units, or the
 * file's own units when that is absent; branch_time_in_child in the time variable's units,
 * 0 when absent) as day numbers of the file's calendar; *found 0 without
 * branch_time_in_parent. SLOWSCAN_EINVAL for parent_time_units that are not CF units. */
SLOWSCAN_API
int slowscan_netcdf_branch_days(const netcdf_reader *reader, int *found, double *parent_day,
                                double *child_day, io_error *err);

#endif
