/* Opening a CF NetCDF file: its time axis, the variables on it, their packing and missing
 * values, and the --select subset (include/slowscan/netcdf_input.h). The cells themselves are
 * read in netcdf_blocks.c. */
#include "netcdf_internal.h"

#include <math.h>
#include <netcdf.h>
#include <netcdf_mem.h>
#include <stdarg.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>

netcdf_read_options slowscan_netcdf_read_options_default(void)
{
    netcdf_read_options o = {.vars = NULL, .select = NULL, .memory_budget = 0, .temp_dir = NULL};
    return o;
}

int netcdf_fail(const netcdf_reader *r, io_error *err, int status, const char *fmt, ...)
{
    char what[900];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(what, sizeof what, fmt, ap);
    va_end(ap);
    return io_fail(err, status, "%s: %s", r->path, what);
}

int netcdf_library_fail(const netcdf_reader *r, io_error *err, int nc_status, const char *doing)
{
    return netcdf_fail(r, err, nc_status == NC_ENOMEM ? SLOWSCAN_ENOMEM : SLOWSCAN_EIO,
                       "%s: %s", doing, nc_strerror(nc_status));
}

void netcdf_text_attribute(int ncid, int varid, const char *name, char *buf, size_t size)
{
    nc_type type;
    size_t len;
    buf[0] = '\0';
    if (nc_inq_att(ncid, varid, name, &type, &len) != NC_NOERR || type != NC_CHAR ||
        len >= size)
        return;
    if (nc_get_att_text(ncid, varid, name, buf) != NC_NOERR)
        len = 0;
    buf[len] = '\0';
}

/* Up to max numeric values of an attribute; how many were read (0: absent or not numeric). */
static size_t number_attribute(int ncid, int varid, const char *name, double *values, size_t max)
{
    nc_type type;
    size_t len;
    if (nc_inq_att(ncid, varid, name, &type, &len) != NC_NOERR || type == NC_CHAR ||
        type == NC_STRING || len == 0 || len > max)
        return 0;
    return nc_get_att_double(ncid, varid, name, values) == NC_NOERR ? len : 0;
}

int netcdf_coordinate_variable(int ncid, int dimid, int *varid)
{
    char name[NC_MAX_NAME + 1];
    int ndims, dims[NC_MAX_VAR_DIMS];
    nc_type type;
    if (nc_inq_dimname(ncid, dimid, name) != NC_NOERR || nc_inq_varid(ncid, name, varid) != NC_NOERR ||
        nc_inq_var(ncid, *varid, NULL, &type, &ndims, dims, NULL) != NC_NOERR)
        return 0;
    return ndims == 1 && dims[0] == dimid && type != NC_CHAR && type != NC_STRING;
}

/* Whether a coordinate variable says it is time (CF 1.9, section 4.4). */
static int says_time(int ncid, int varid)
{
    char text[256];
    netcdf_text_attribute(ncid, varid, "axis", text, sizeof text);
    if (strcasecmp(text, "T") == 0)
        return 1;
    netcdf_text_attribute(ncid, varid, "standard_name", text, sizeof text);
    if (strcmp(text, "time") == 0)
        return 1;
    netcdf_text_attribute(ncid, varid, "units", text, sizeof text);
    return strstr(text, " since ") != NULL;
}

/* The time coordinate's values, calendar and units, turned into the axis. */
static int read_time(netcdf_reader *r, int varid, io_error *err)
{
    char calendar[64], units[256];
    netcdf_text_attribute(r->ncid, varid, "calendar", calendar, sizeof calendar);
    netcdf_text_attribute(r->ncid, varid, "units", units, sizeof units);
    calendar_kind kind = CALENDAR_STANDARD;
    if (calendar[0] && slowscan_calendar_lookup(calendar, &kind) != SLOWSCAN_OK)
        return netcdf_fail(r, err, SLOWSCAN_EINVAL, "variable '%s': calendar = \"%s\" is not a "
                           "CF calendar (standard, proleptic_gregorian, noleap, all_leap, "
                           "360_day, julian)", r->time_name, calendar);
    time_units u;
    time_units_problem why;
    int st = slowscan_time_units_parse(units, kind, &u, &why);
    if (st != SLOWSCAN_OK)
        return netcdf_fail(r, err, st, "variable '%s': units = \"%s\": %s", r->time_name, units,
                           slowscan_time_units_problem_text(why));
    if (!(r->time = malloc((r->nt ? r->nt : 1) * sizeof *r->time)))
        return netcdf_fail(r, err, SLOWSCAN_ENOMEM, "out of memory");
    st = nc_get_var_double(r->ncid, varid, r->time);
    if (st != NC_NOERR)
        return netcdf_library_fail(r, err, st, "reading the time coordinate");
    for (size_t i = 0; i < r->nt; i++)
        if (!isfinite(r->time[i]) || (i > 0 && !(r->time[i] > r->time[i - 1])))
            return netcdf_fail(r, err, SLOWSCAN_EINVAL, "variable '%s', index %zu: time %.15g "
                               "is %s", r->time_name, i, r->time[i],
                               isfinite(r->time[i]) ? "not after the one before" : "missing");
    time_axis_from_units(&u, r->time, r->nt, &r->axis);
    return SLOWSCAN_OK;
}

static int find_time(netcdf_reader *r, io_error *err)
{
    int ndims;
    nc_inq_ndims(r->ncid, &ndims);
    for (int d = 0; d < ndims; d++) {
        int varid;
        if (netcdf_coordinate_variable(r->ncid, d, &varid) && says_time(r->ncid, varid)) {
            r->time_dimid = d;
            nc_inq_dim(r->ncid, d, r->time_name, &r->nt);
            if (r->nt < 2)
                return netcdf_fail(r, err, SLOWSCAN_ESHORT, "the time axis '%s' has %zu step%s; "
                                   "at least 2 are needed", r->time_name, r->nt,
                                   r->nt == 1 ? "" : "s");
            return read_time(r, varid, err);
        }
    }
    return netcdf_fail(r, err, SLOWSCAN_EINVAL, "no time axis: no coordinate variable has axis "
                       "= \"T\", standard_name = \"time\" or units \"UNIT since DATE\"");
}

/* A variable's dimensions: the time position and the others, with their coordinates. */
static int describe_dims(netcdf_reader *r, netcdf_variable *v, const int *dimids, io_error *err)
{
    v->time_position = -1;
    for (int k = 0; k < v->ndims; k++) {
        if (dimids[k] == r->time_dimid) {
            v->time_position = k;
            continue;
        }
        netcdf_dim *d = &v->dims[v->ncoords++];
        d->dimid = dimids[k];
        char name[NC_MAX_NAME + 1];
        nc_inq_dim(r->ncid, d->dimid, name, &d->length);
        snprintf(d->name, sizeof d->name, "%s", name);
        d->start = 0, d->count = d->length;
        int cv;
        if (d->length > 0 && netcdf_coordinate_variable(r->ncid, d->dimid, &cv)) {
            if (!(d->coord = malloc(d->length * sizeof *d->coord)))
                return netcdf_fail(r, err, SLOWSCAN_ENOMEM, "out of memory");
            if (nc_get_var_double(r->ncid, cv, d->coord) != NC_NOERR) {
                free(d->coord);
                d->coord = NULL;
            }
        }
    }
    return SLOWSCAN_OK;
}

/* The netCDF default fill of a type (NetCDF User Guide, "Fill Values"); bytes have none that
 * counts as missing. */
static int default_fill(nc_type type, double *fill)
{
    switch (type) {
    case NC_SHORT: *fill = NC_FILL_SHORT; return 1;
    case NC_USHORT: *fill = NC_FILL_USHORT; return 1;
    case NC_INT: *fill = NC_FILL_INT; return 1;
    case NC_UINT: *fill = NC_FILL_UINT; return 1;
    case NC_INT64: *fill = (double)NC_FILL_INT64; return 1;
    case NC_UINT64: *fill = (double)NC_FILL_UINT64; return 1;
    case NC_FLOAT: *fill = NC_FILL_FLOAT; return 1;
    case NC_DOUBLE: *fill = NC_FILL_DOUBLE; return 1;
    default: return 0;
    }
}

/* Packing and missing values, CF 1.9 sections 2.5.1 and 8.1. */
static void read_packing(int ncid, int varid, nc_type type, netcdf_packing *p)
{
    double range[2], one;
    p->scale = number_attribute(ncid, varid, "scale_factor", &one, 1) ? one : 1.0;
    p->offset = number_attribute(ncid, varid, "add_offset", &one, 1) ? one : 0.0;
    p->has_fill = number_attribute(ncid, varid, "_FillValue", &p->fill, 1) == 1 ||
                  default_fill(type, &p->fill);
    p->nmissing = number_attribute(ncid, varid, "missing_value", p->missing, 4);
    p->valid_min = -INFINITY, p->valid_max = INFINITY;
    if (number_attribute(ncid, varid, "valid_range", range, 2) == 2) {
        p->valid_min = range[0], p->valid_max = range[1];
    } else {
        if (number_attribute(ncid, varid, "valid_min", &one, 1))
            p->valid_min = one;
        if (number_attribute(ncid, varid, "valid_max", &one, 1))
            p->valid_max = one;
    }
}

static int add_variable(netcdf_reader *r, int varid, io_error *err)
{
    netcdf_variable *v = &r->vars[r->nvars];
    memset(v, 0, sizeof *v);
    int dimids[NC_MAX_VAR_DIMS];
    nc_type type;
    char name[NC_MAX_NAME + 1];
    nc_inq_var(r->ncid, varid, name, &type, &v->ndims, dimids, NULL);
    v->varid = varid;
    snprintf(v->name, sizeof v->name, "%s", name);
    if (type == NC_CHAR || type == NC_STRING)
        return netcdf_fail(r, err, SLOWSCAN_EINVAL, "variable '%s' holds text, not numbers",
                           name);
    if (v->ndims > NETCDF_MAX_DIMS)
        return netcdf_fail(r, err, SLOWSCAN_EINVAL, "variable '%s' has %d dimensions; at most "
                           "%d are read", name, v->ndims, NETCDF_MAX_DIMS);
    r->nvars++;
    int st = describe_dims(r, v, dimids, err);
    if (st == SLOWSCAN_OK && v->time_position < 0)
        return netcdf_fail(r, err, SLOWSCAN_EINVAL, "variable '%s' does not run along the time "
                           "axis '%s'", name, r->time_name);
    read_packing(r->ncid, varid, type, &v->packing);
    int storage = NC_CONTIGUOUS;
    size_t chunks[NC_MAX_VAR_DIMS];
    if (nc_inq_var_chunking(r->ncid, varid, &storage, chunks) == NC_NOERR &&
        storage == NC_CHUNKED)
        v->time_chunked = chunks[v->time_position] < r->nt;
    return st;
}

/* Whether some variable names `name` in its bounds, climatology or coordinates attribute:
 * then it describes the grid and is no data variable. */
static int describes_grid(int ncid, int nvars, const char *name)
{
    static const char *const attributes[] = {"bounds", "climatology", "coordinates"};
    for (int v = 0; v < nvars; v++)
        for (size_t a = 0; a < 3; a++) {
            char text[1024];
            netcdf_text_attribute(ncid, v, attributes[a], text, sizeof text);
            char *save = NULL;
            for (char *tok = strtok_r(text, " ", &save); tok; tok = strtok_r(NULL, " ", &save))
                if (strcmp(tok, name) == 0)
                    return 1;
        }
    return 0;
}

/* Every data variable on the time axis, in file order. */
static int default_variables(netcdf_reader *r, int nvars, io_error *err)
{
    for (int v = 0; v < nvars; v++) {
        char name[NC_MAX_NAME + 1];
        int ndims, dimids[NC_MAX_VAR_DIMS], on_time = 0, own_dim = 0;
        nc_type type;
        nc_inq_var(r->ncid, v, name, &type, &ndims, dimids, NULL);
        for (int k = 0; k < ndims; k++) {
            char dim[NC_MAX_NAME + 1];
            nc_inq_dimname(r->ncid, dimids[k], dim);
            on_time |= dimids[k] == r->time_dimid;
            own_dim |= strcmp(dim, name) == 0;
        }
        if (!on_time || own_dim || type == NC_CHAR || type == NC_STRING ||
            ndims > NETCDF_MAX_DIMS || describes_grid(r->ncid, nvars, name))
            continue;
        int st = add_variable(r, v, err);
        if (st != SLOWSCAN_OK)
            return st;
    }
    if (r->nvars == 0)
        return netcdf_fail(r, err, SLOWSCAN_EINVAL, "no data variable runs along the time axis "
                           "'%s'", r->time_name);
    return SLOWSCAN_OK;
}

/* The variables named in --vars, in that order. */
static int named_variables(netcdf_reader *r, io_error *err)
{
    char *list = io_strdup(r->options.vars);
    if (!list)
        return netcdf_fail(r, err, SLOWSCAN_ENOMEM, "out of memory");
    int st = SLOWSCAN_OK;
    for (char *tok = list, *next; tok && st == SLOWSCAN_OK; tok = next) {
        char *comma = strchr(tok, ',');
        next = comma ? comma + 1 : NULL;
        size_t len = comma ? (size_t)(comma - tok) : strlen(tok);
        const char *name = csv_trim(tok, &len);
        int varid;
        if (!*name)
            st = netcdf_fail(r, err, SLOWSCAN_EINVAL, "option --vars: the list \"%s\" has an "
                             "empty name", r->options.vars);
        else if (nc_inq_varid(r->ncid, name, &varid) != NC_NOERR)
            st = netcdf_fail(r, err, SLOWSCAN_EINVAL, "option --vars: there is no variable "
                             "'%s'", name);
        else
            for (size_t k = 0; k < r->nvars && st == SLOWSCAN_OK; k++)
                if (r->vars[k].varid == varid)
                    st = netcdf_fail(r, err, SLOWSCAN_EINVAL, "option --vars: variable '%s' is "
                                     "listed twice", name);
        if (st == SLOWSCAN_OK)
            st = add_variable(r, varid, err);
    }
    free(list);
    return st;
}

/* memory NULL: the file at path; else the `size` bytes at memory (netcdf_open_memory), with
 * path only naming them in messages. Everything after the open is the same. */
static int open_file(netcdf_reader *r, const char *path, void *memory, size_t size,
                     io_error *err)
{
    r->ncid = -1;
    int st = netcdf_screen_header(r, memory, size, err);
    if (st != SLOWSCAN_OK)
        return st;
    st = memory ? nc_open_mem(path, NC_NOWRITE, size, memory, &r->ncid)
                : nc_open(path, NC_NOWRITE, &r->ncid);
    if (st != NC_NOERR) {
        r->ncid = -1;
        return netcdf_fail(r, err, SLOWSCAN_EIO, "cannot read it as NetCDF: %s",
                           nc_strerror(st));
    }
    if ((st = netcdf_check_extent(r, path, err)) != SLOWSCAN_OK)
        return st;
    int nvars;
    nc_inq_nvars(r->ncid, &nvars);
    if (!(r->vars = calloc(nvars ? (size_t)nvars : 1, sizeof *r->vars)))
        return netcdf_fail(r, err, SLOWSCAN_ENOMEM, "out of memory");
    st = find_time(r, err);
    if (st == SLOWSCAN_OK)
        st = r->options.vars ? named_variables(r, err) : default_variables(r, nvars, err);
    if (st == SLOWSCAN_OK)
        st = netcdf_apply_selection(r, err);
    return st;
}

static int open_reader(const char *path, void *memory, size_t size,
                       const netcdf_read_options *options, netcdf_reader **reader, io_error *err)
{
    *reader = NULL;
    if (err)
        err->message[0] = '\0';
    netcdf_reader *r = calloc(1, sizeof *r);
    if (!r || !(r->path = io_strdup(path))) {
        free(r);
        return io_fail(err, SLOWSCAN_ENOMEM, "%s: out of memory", path);
    }
    r->options = options ? *options : slowscan_netcdf_read_options_default();
    int st = open_file(r, path, memory, size, err);
    if (st != SLOWSCAN_OK) {
        slowscan_netcdf_close(r);
        return st;
    }
    *reader = r;
    return SLOWSCAN_OK;
}

int slowscan_netcdf_open(const char *path, const netcdf_read_options *options,
                         netcdf_reader **reader, io_error *err)
{
    return open_reader(path, NULL, 0, options, reader, err);
}

int netcdf_open_memory(const char *name, void *memory, size_t size,
                       const netcdf_read_options *options, netcdf_reader **reader, io_error *err)
{
    return open_reader(name, memory, size, options, reader, err);
}

void slowscan_netcdf_close(netcdf_reader *r)
{
    if (!r)
        return;
    if (r->ncid >= 0)
        nc_close(r->ncid);
    for (size_t v = 0; v < r->nvars; v++)
        for (int k = 0; k < r->vars[v].ncoords; k++)
            free(r->vars[v].dims[k].coord);
    netcdf_drop_spill(r);
    free(r->vars);
    free(r->time);
    free(r->block);
    free(r->raw);
    free(r->path);
    free(r);
}

const double *slowscan_netcdf_times(const netcdf_reader *r, size_t *n, time_axis *axis,
                                    const char **name)
{
    if (n)
        *n = r->nt;
    if (axis)
        *axis = r->axis;
    if (name)
        *name = r->time_name;
    return r->time;
}

size_t slowscan_netcdf_series_count(const netcdf_reader *r)
{
    return r->total_cells;
}

/* A dimension of members: named so, or its coordinate variable has the standard name
 * "realization" (CF standard name table). */
static int is_member_dimension(const netcdf_reader *r, const netcdf_dim *d)
{
    static const char *const names[] = {"member", "realization", "ensemble", "ens"};
    for (size_t k = 0; k < sizeof names / sizeof names[0]; k++)
        if (strcasecmp(d->name, names[k]) == 0)
            return 1;
    int varid;
    char text[256];
    if (!netcdf_coordinate_variable(r->ncid, d->dimid, &varid))
        return 0;
    netcdf_text_attribute(r->ncid, varid, "standard_name", text, sizeof text);
    return strcmp(text, "realization") == 0;
}

int slowscan_netcdf_member_dimension(const netcdf_reader *r, char *name, size_t size)
{
    for (size_t v = 0; v < r->nvars; v++)
        for (int k = 0; k < r->vars[v].ncoords; k++)
            if (is_member_dimension(r, &r->vars[v].dims[k])) {
                snprintf(name, size, "%s", r->vars[v].dims[k].name);
                return 1;
            }
    return 0;
}
