/* slowscan — screening results of a NetCDF grid as maps in a CF NetCDF file (module prefix:
 * netcdf_maps_).
 *
 * A grid read with netcdf_input.h gives one series per cell; screening gives, per series
 * and test, a statistic, a p-value, a q-value and a flag. The maps put them back on the
 * grid: for every variable VAR read and every test TEST of the run, four variables on VAR's
 * non-time dimensions (as selected):
 *     VAR_TEST_statistic  float, Kendall tau for a rolling indicator, the t-value for
 *                         recovery_trend (long_name says which)
 *     VAR_TEST_p_value    float, the surrogate p-value
 *     VAR_TEST_q_value    float, the Benjamini-Hochberg q-value over the run
 *     VAR_TEST_flag       byte, a screen_flag (flag_values / flag_meanings)
 * with the input's dimensions and coordinate variables (values of the selected ranges, their
 * attributes copied, except bounds: the bounds variables are not copied) and the global
 * attributes Conventions = "CF-1.9", history (the caller's command line) and source (the
 * input file). A cell nothing was put for (no value at all, or not screened) is _FillValue
 * in every map, and so is a NaN (a test without a statistic, p or q).
 *
 * The file has the input's format family: a classic or 64-bit-offset input gives a 64-bit
 * offset file, CDF-5 gives CDF-5, NetCDF-4 gives NetCDF-4 (so every coordinate type and
 * attribute copies as it is).
 *
 * It appears whole or not at all, like atomic_file (io.h): opening makes an empty temporary
 * file beside the target (so an unwritable place fails before any work), writing fills it,
 * committing renames it into place; freeing an uncommitted writer removes it. */
#ifndef SLOWSCAN_NETCDF_MAPS_H
#define SLOWSCAN_NETCDF_MAPS_H

#include "slowscan/export.h"

#include "slowscan/io.h"
#include "slowscan/netcdf_input.h"
#include "slowscan/screen.h"

#include <stddef.h>

typedef struct {
    const char *input;         /* the NetCDF grid that was screened */
    netcdf_read_options read;  /* how it was read (vars, select): the maps' variables and dims */
    const int *tests;          /* ntests test kinds (screen_test_kind) in the run's order */
    size_t ntests;
    const char *history;       /* the command line that made the maps (NULL: none) */
    int tail_estimates;        /* 1: p may be a tail estimate (screen_config.tail, tail.h);
                                  the p maps' long_name says so */
    int undecided;             /* 1: a flag may be undecided (rounds of surrogates,
                                  screen_sequential.h); flag_values go on to it */
} netcdf_maps_spec;

typedef struct netcdf_maps netcdf_maps;

/* The four maps of a variable x test, in the order of their names' suffixes. */
typedef enum {
    NETCDF_MAP_STATISTIC = 0, /* VAR_TEST_statistic */
    NETCDF_MAP_P_VALUE,       /* VAR_TEST_p_value */
    NETCDF_MAP_Q_VALUE,       /* VAR_TEST_q_value */
    NETCDF_MAP_FLAG           /* VAR_TEST_flag */
} netcdf_map_kind;

/* The long_name of map `kind` of test `test` (a screen_test_kind) of variable `var`, as the
 * maps carry it (tail_estimates: the spec's), into buf (snprintf-style; its length). The
 * one wording for every writer of such maps (the command's --maps, Python's grids). */
SLOWSCAN_API
size_t slowscan_netcdf_maps_long_name(char *buf, size_t size, netcdf_map_kind kind, int test,
                                      const char *var, int tail_estimates);

/* Opens the input as netcdf_input.h reads it and makes the temporary file beside `path`.
 * SLOWSCAN_EINVAL: path "-" (a NetCDF file needs a name), no tests, or the input refused
 * (its message); SLOWSCAN_EIO: path is a directory or its folder is not writable;
 * SLOWSCAN_ENOMEM. The message names the path. */
SLOWSCAN_API
int slowscan_netcdf_maps_open(const char *path, const netcdf_maps_spec *spec,
                              netcdf_maps **maps, io_error *err);

/* The results of test `test` (a kind of the spec) at `cell` of variable `variable` (the
 * positions of grid_position). SLOWSCAN_EINVAL for a variable, cell or test outside the
 * maps (nothing is put). */
SLOWSCAN_API
int slowscan_netcdf_maps_put(netcdf_maps *maps, size_t variable, size_t cell, int test,
                             double statistic, double p_value, double q_value,
                             screen_flag flag);

/* One variable x test of the maps as put so far, for a figure: the variable's non-time
 * dimensions as selected (name, length, coordinate values — NULL where the dimension has no
 * coordinate variable: indices from 0) and the statistic and flag of each cell, row-major
 * over the dimensions, `fill` where nothing was put. Borrowed until the maps are freed. */
typedef struct {
    const char *variable;
    size_t ndims;
    const char *dim_name[NETCDF_MAX_DIMS];
    size_t dim_length[NETCDF_MAX_DIMS];
    const double *dim_value[NETCDF_MAX_DIMS];
    const float *statistic;
    const signed char *flag;
    float fill;
} netcdf_maps_view;
/* The variables of the maps (the reader's, in order). */
SLOWSCAN_API
size_t slowscan_netcdf_maps_variables(const netcdf_maps *maps);
/* SLOWSCAN_EINVAL for a variable or test outside the maps. */
SLOWSCAN_API
int slowscan_netcdf_maps_view(const netcdf_maps *maps, size_t variable, int test,
                              netcdf_maps_view *view);

/* Writes the whole file into the temporary file (done once; commit does it when it has not
 * been done), so that a caller committing several outputs can fail before renaming any.
 * SLOWSCAN_EIO with a message naming the path; the temporary file is then removed. */
SLOWSCAN_API
int slowscan_netcdf_maps_write(netcdf_maps *maps, io_error *err);
/* Writes (if not yet written) and renames the file into place. */
SLOWSCAN_API
int slowscan_netcdf_maps_commit(netcdf_maps *maps, io_error *err);
/* Closes the input and removes the temporary file unless committed. NULL is allowed. */
SLOWSCAN_API
void slowscan_netcdf_maps_free(netcdf_maps *maps);

#endif
