/* Private state of the NetCDF reader (io/netcdf_open.c, io/netcdf_blocks.c). */
#ifndef SLOWSCAN_NETCDF_INTERNAL_H
#define SLOWSCAN_NETCDF_INTERNAL_H

#include "io_internal.h"
#include "slowscan/netcdf_input.h"

#include <stdio.h>

/* One non-time dimension of a variable, with the selected index range. */
typedef struct {
    int dimid;
    char name[260];
    size_t length;        /* in the file */
    size_t start, count;  /* selected */
    double *coord;        /* length values of its coordinate variable, NULL: none (indices) */
} netcdf_dim;

/* What turns a stored value into a number or a missing value. */
typedef struct {
    double scale, offset;    /* unpacking: value = raw * scale + offset */
    double fill;             /* raw _FillValue, or the type's default fill */
    int has_fill;
    double missing[4];       /* raw missing_value entries */
    size_t nmissing;
    double valid_min, valid_max; /* raw; -inf / +inf when not given */
} netcdf_packing;

typedef struct {
    int varid;
    char name[260];
    int ndims;
    int time_position;       /* which of its dimensions is time */
    netcdf_dim dims[NETCDF_MAX_DIMS]; /* the other dimensions, in file order */
    int ncoords;
    size_t ncells;           /* selected cells */
    netcdf_packing packing;
    int time_chunked;        /* chunks hold fewer than all time steps: read by time slabs */
} netcdf_variable;

struct netcdf_reader {
    int ncid;
    char *path;
    netcdf_read_options options;
    /* time */
    int time_dimid;
    char time_name[260];
    size_t nt;
    double *time;
    time_axis axis;
    /* variables */
    netcdf_variable *vars;
    size_t nvars, total_cells;
    /* iteration */
    size_t var_at, cell_at;        /* the next cell to hand out */
    size_t block_first, block_cells; /* cells of var_at now in `block` */
    size_t block_capacity;         /* cells a block may hold (the memory budget) */
    double *block;                 /* block_cells x nt, cell-major */
    double *raw;                   /* the hyperslab as read, in file order */
    FILE *spill;                   /* the transposed copy of a time-chunked variable */
    char *spill_path;
    size_t spilled_var;            /* which variable the spill holds (+1; 0: none) */
    char name[512];                /* the current series' name */
};

/* slowscan_netcdf_open on a file held in memory (nc_open_mem; `memory` must stay untouched
 * until the reader is closed), `name` standing for the file in messages. Not public: the
 * fuzzing harness (tests/fuzz/fuzz_netcdf.c) reads its inputs through it, without a file. */
int netcdf_open_memory(const char *name, void *memory, size_t size,
                       const netcdf_read_options *options, netcdf_reader **reader, io_error *err);

/* Walks the header of a classic-format file (the file at r->path, or the `size` bytes at
 * memory) and refuses, with a message, one whose counts run past the end of the file, before
 * netcdf-c reads it (netcdf_screen.c says why). Other formats pass untouched. */
int netcdf_screen_header(const netcdf_reader *r, const void *memory, size_t size,
                         io_error *err);

/* Formats into err the message "PATH: what" and returns status (io_fail with the file). */
int netcdf_fail(const netcdf_reader *r, io_error *err, int status, const char *fmt, ...)
    __attribute__((format(printf, 4, 5)));
/* A netCDF library error as a message naming the call's purpose. */
int netcdf_library_fail(const netcdf_reader *r, io_error *err, int nc_status, const char *doing);

/* 1 with *varid when dimension dimid has a coordinate variable: a numeric variable of the
 * same name on that dimension alone (netcdf_open.c). */
int netcdf_coordinate_variable(int ncid, int dimid, int *varid);
/* A text attribute into buf (empty when absent, not text or too long) (netcdf_open.c). */
void netcdf_text_attribute(int ncid, int varid, const char *name, char *buf, size_t size);
/* SLOWSCAN_EINVAL when a classic-format file is shorter than its header says
 * (netcdf_extent.c): netcdf-c would read the missing part as zeros. */
int netcdf_check_extent(const netcdf_reader *r, const char *path, io_error *err);
/* --select applied to every variable's dimensions; the cell counts (netcdf_select.c). */
int netcdf_apply_selection(netcdf_reader *r, io_error *err);
/* Closes and removes the transposed copy, if any (netcdf_blocks.c). */
void netcdf_drop_spill(netcdf_reader *r);

#endif
