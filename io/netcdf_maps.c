/* Screening results of a NetCDF grid as CF maps (include/slowscan/netcdf_maps.h).
 *
 * The writer keeps the input open through its reader (netcdf_internal.h): the variables
 * read and their selected dimensions say what the maps look like, and the coordinate
 * variables are copied from it at write time. The maps themselves are held in memory, four
 * arrays per variable x test of one entry per selected cell (13 bytes a cell and test). */
#include "netcdf_internal.h"
#include "slowscan/netcdf_maps.h"

#include <errno.h>
#include <math.h>
#include <netcdf.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

/* The maps of one variable x test, ncells entries each, fill where nothing was put. */
typedef struct {
    float *statistic, *p_value, *q_value;
    signed char *flag;
} test_maps;

struct netcdf_maps {
    char *path, *temp;     /* temp: NULL once renamed into place or removed */
    char *history;
    netcdf_reader *reader; /* the input as it was screened */
    int tests[SCREEN_MAX_TESTS];
    size_t ntests;
    test_maps *maps;       /* [variable * ntests + test] */
    int written;
    int tail_estimates; /* the spec's */
    int undecided;      /* the spec's */
};

/* A dimension of the output: an input dimension with its selection and coordinate. */
typedef struct {
    const netcdf_dim *dim;
    int out_dimid;
    int in_coord, out_coord; /* coordinate variables, -1: none */
} out_dim;

static const float MAP_FILL = NC_FILL_FLOAT;
static const signed char FLAG_FILL = NC_FILL_BYTE;

static int maps_fail(const netcdf_maps *m, io_error *err, int status, const char *what, int nc)
{
    return io_fail(err, status, "%s: %s%s%s", m->path, what, nc != NC_NOERR ? ": " : "",
                   nc != NC_NOERR ? nc_strerror(nc) : "");
}

static int alloc_maps(netcdf_maps *m)
{
    const netcdf_reader *r = m->reader;
    if (!(m->maps = calloc(r->nvars * m->ntests, sizeof *m->maps)))
        return SLOWSCAN_ENOMEM;
    for (size_t v = 0; v < r->nvars; v++)
        for (size_t j = 0; j < m->ntests; j++) {
            test_maps *t = &m->maps[v * m->ntests + j];
            size_t n = r->vars[v].ncells ? r->vars[v].ncells : 1;
            t->statistic = malloc(n * sizeof *t->statistic);
            t->p_value = malloc(n * sizeof *t->p_value);
            t->q_value = malloc(n * sizeof *t->q_value);
            t->flag = malloc(n * sizeof *t->flag);
            if (!t->statistic || !t->p_value || !t->q_value || !t->flag)
                return SLOWSCAN_ENOMEM;
            for (size_t c = 0; c < n; c++) {
                t->statistic[c] = t->p_value[c] = t->q_value[c] = MAP_FILL;
                t->flag[c] = FLAG_FILL;
            }
        }
    return SLOWSCAN_OK;
}

/* The empty temporary file beside the target: the target's folder must take a new file. */
static int make_temp(netcdf_maps *m, io_error *err)
{
    char why[128];
    struct stat st;
    if (stat(m->path, &st) == 0 && S_ISDIR(st.st_mode))
        return io_fail(err, SLOWSCAN_EIO, "cannot write %s: it is a directory", m->path);
    if (!(m->temp = slowscan_atomic_temp_beside(m->path))) {
        int e = errno;
        return io_fail(err, e == ENOMEM ? SLOWSCAN_ENOMEM : SLOWSCAN_EIO, "cannot write %s: %s",
                       m->path, io_strerror(e, why, sizeof why));
    }
    return SLOWSCAN_OK;
}

int slowscan_netcdf_maps_open(const char *path, const netcdf_maps_spec *spec,
                              netcdf_maps **maps, io_error *err)
{
    *maps = NULL;
    if (!path || strcmp(path, "-") == 0)
        return io_fail(err, SLOWSCAN_EINVAL, "a NetCDF file cannot be written to standard "
                       "output; give a file name");
    if (spec->ntests == 0 || spec->ntests > SCREEN_MAX_TESTS)
        return io_fail(err, SLOWSCAN_EINVAL, "%s: %zu tests to map (1 to %d can be)", path,
                       spec->ntests, SCREEN_MAX_TESTS);
    netcdf_maps *m = calloc(1, sizeof *m);
    if (!m || !(m->path = io_strdup(path)) ||
        (spec->history && !(m->history = io_strdup(spec->history)))) {
        slowscan_netcdf_maps_free(m);
        return io_fail(err, SLOWSCAN_ENOMEM, "%s: out of memory", path);
    }
    m->ntests = spec->ntests;
    m->tail_estimates = spec->tail_estimates;
    m->undecided = spec->undecided;
    memcpy(m->tests, spec->tests, spec->ntests * sizeof *spec->tests);
    int st = slowscan_netcdf_open(spec->input, &spec->read, &m->reader, err);
    if (st == SLOWSCAN_OK && (st = alloc_maps(m)) != SLOWSCAN_OK)
        io_fail(err, st, "%s: out of memory for the maps", path);
    if (st == SLOWSCAN_OK)
        st = make_temp(m, err);
    if (st != SLOWSCAN_OK) {
        slowscan_netcdf_maps_free(m);
        return st;
    }
    *maps = m;
    return SLOWSCAN_OK;
}

/* Which of the maps' tests `test` is; ntests when it is none. */
static size_t test_slot(const netcdf_maps *m, int test)
{
    size_t j = 0;
    while (j < m->ntests && m->tests[j] != test)
        j++;
    return j;
}

static float map_value(double v)
{
    return isfinite(v) ? (float)v : MAP_FILL;
}

int slowscan_netcdf_maps_put(netcdf_maps *m, size_t variable, size_t cell, int test,
                             double statistic, double p_value, double q_value, screen_flag flag)
{
    size_t j = test_slot(m, test);
    if (variable >= m->reader->nvars || j == m->ntests ||
        cell >= (m->reader->vars[variable].ncells ? m->reader->vars[variable].ncells : 1))
        return SLOWSCAN_EINVAL;
    test_maps *t = &m->maps[variable * m->ntests + j];
    t->statistic[cell] = map_value(statistic);
    t->p_value[cell] = map_value(p_value);
    t->q_value[cell] = map_value(q_value);
    t->flag[cell] = (signed char)flag;
    return SLOWSCAN_OK;
}

size_t slowscan_netcdf_maps_variables(const netcdf_maps *m)
{
    return m->reader->nvars;
}

int slowscan_netcdf_maps_view(const netcdf_maps *m, size_t variable, int test,
                              netcdf_maps_view *view)
{
    size_t j = test_slot(m, test);
    if (variable >= m->reader->nvars || j == m->ntests)
        return SLOWSCAN_EINVAL;
    const netcdf_variable *v = &m->reader->vars[variable];
    memset(view, 0, sizeof *view);
    view->variable = v->name;
    view->ndims = (size_t)v->ncoords;
    for (int k = 0; k < v->ncoords; k++) {
        const netcdf_dim *d = &v->dims[k];
        view->dim_name[k] = d->name;
        view->dim_length[k] = d->count;
        view->dim_value[k] = d->coord ? d->coord + d->start : NULL;
    }
    const test_maps *t = &m->maps[variable * m->ntests + j];
    view->statistic = t->statistic;
    view->flag = t->flag;
    view->fill = MAP_FILL;
    return SLOWSCAN_OK;
}

/* The file format of the output: the input's family. */
static int output_mode(int in_ncid)
{
    int format = NC_FORMAT_64BIT_OFFSET;
    nc_inq_format(in_ncid, &format);
    switch (format) {
    case NC_FORMAT_CDF5: return NC_CLOBBER | NC_64BIT_DATA;
    case NC_FORMAT_NETCDF4: return NC_CLOBBER | NC_NETCDF4;
    case NC_FORMAT_NETCDF4_CLASSIC: return NC_CLOBBER | NC_NETCDF4 | NC_CLASSIC_MODEL;
    default: return NC_CLOBBER | NC_64BIT_OFFSET;
    }
}

static int put_text(int ncid, int varid, const char *name, const char *text)
{
    return nc_put_att_text(ncid, varid, name, strlen(text), text);
}

/* The coordinate variable of a dimension, its attributes copied (bounds left out: the
 * bounds variables are not copied, and a bounds attribute naming none would be wrong). */
static int define_coordinate(int in, int out, out_dim *d)
{
    char name[NC_MAX_NAME + 1];
    nc_type type;
    int natts, st = nc_inq_var(in, d->in_coord, name, &type, NULL, NULL, &natts);
    if (st == NC_NOERR)
        st = nc_def_var(out, name, type, 1, &d->out_dimid, &d->out_coord);
    for (int a = 0; a < natts && st == NC_NOERR; a++) {
        char att[NC_MAX_NAME + 1];
        st = nc_inq_attname(in, d->in_coord, a, att);
        if (st == NC_NOERR && strcmp(att, "bounds") != 0)
            st = nc_copy_att(in, d->in_coord, att, out, d->out_coord);
    }
    return st;
}

/* Every dimension some variable runs along (other than time), once, with its coordinate. */
static int define_dims(const netcdf_reader *r, int out, out_dim *dims, size_t *ndims)
{
    *ndims = 0;
    int st = NC_NOERR;
    for (size_t v = 0; v < r->nvars && st == NC_NOERR; v++)
        for (int k = 0; k < r->vars[v].ncoords && st == NC_NOERR; k++) {
            const netcdf_dim *dim = &r->vars[v].dims[k];
            size_t i = 0;
            while (i < *ndims && dims[i].dim->dimid != dim->dimid)
                i++;
            if (i < *ndims)
                continue;
            out_dim *d = &dims[(*ndims)++];
            *d = (out_dim){dim, -1, -1, -1};
            st = nc_def_dim(out, dim->name, dim->count, &d->out_dimid);
            if (st == NC_NOERR && netcdf_coordinate_variable(r->ncid, dim->dimid, &d->in_coord))
                st = define_coordinate(r->ncid, out, d);
            else
                d->in_coord = -1;
        }
    return st;
}

size_t slowscan_netcdf_maps_long_name(char *buf, size_t size, netcdf_map_kind kind, int test,
                                      const char *var, int tail_estimates)
{
    const char *name = slowscan_screen_test_name(test);
    int n;
    switch (kind) {
    case NETCDF_MAP_STATISTIC:
        n = slowscan_screen_test_rolling(test)
                ? snprintf(buf, size, "Kendall tau of the rolling %s of %s against time", name,
                           var)
                : snprintf(buf, size, "t-value of the drift of the lag-1 coefficient in a "
                           "drifting AR(1) fit (%s) of %s", name, var);
        break;
    case NETCDF_MAP_P_VALUE:
        n = snprintf(buf, size, "p-value of the %s test of %s against surrogates%s", name, var,
                     tail_estimates ? "; where the statistic lies beyond every surrogate, an "
                                      "estimate from a generalised Pareto fit to their upper "
                                      "tail" : "");
        break;
    case NETCDF_MAP_Q_VALUE:
        n = snprintf(buf, size, "Benjamini-Hochberg q-value of the %s test of %s over every "
                     "test of the run", name, var);
        break;
    default:
        n = snprintf(buf, size, "screening flag of the %s test of %s", name, var);
    }
    return n < 0 ? 0 : (size_t)n;
}

/* One map variable: float with _FillValue and units "1", or the byte flag. */
static const char *const MAP_KINDS[4] = {"statistic", "p_value", "q_value", "flag"};

static int define_map(const netcdf_maps *m, int out, const char *var, int test,
                      netcdf_map_kind kind, const int *dimids, int ndims, int *varid)
{
    char name[NC_MAX_NAME + 1], words[512];
    snprintf(name, sizeof name, "%s_%s_%s", var, slowscan_screen_test_name(test),
             MAP_KINDS[kind]);
    int flag = kind == NETCDF_MAP_FLAG;
    int st = nc_def_var(out, name, flag ? NC_BYTE : NC_FLOAT, ndims, dimids, varid);
    slowscan_netcdf_maps_long_name(words, sizeof words, kind, test, var, m->tail_estimates);
    if (st == NC_NOERR)
        st = put_text(out, *varid, "long_name", words);
    if (st == NC_NOERR && !flag)
        st = put_text(out, *varid, "units", "1");
    if (st == NC_NOERR && !flag)
        st = nc_put_att_float(out, *varid, "_FillValue", NC_FLOAT, 1, &MAP_FILL);
    if (st != NC_NOERR || !flag)
        return st;
    st = nc_put_att_schar(out, *varid, "_FillValue", NC_BYTE, 1, &FLAG_FILL);
    /* the flags as screen_flag numbers them, with the names the summary prints */
    int last = m->undecided ? SCREEN_FLAG_UNDECIDED : SCREEN_FLAG_INSUFFICIENT;
    signed char values[SCREEN_FLAG_UNDECIDED + 1];
    size_t len = 0;
    for (int f = 0; f <= last; f++) {
        values[f] = (signed char)f;
        len += (size_t)snprintf(words + len, sizeof words - len, "%s%s", f ? " " : "",
                                slowscan_screen_flag_name((screen_flag)f));
    }
    if (st == NC_NOERR)
        st = nc_put_att_schar(out, *varid, "flag_values", NC_BYTE, (size_t)last + 1, values);
    if (st == NC_NOERR)
        st = put_text(out, *varid, "flag_meanings", words);
    return st;
}

/* The four maps of every variable x test; their ids into varids[(v * ntests + j) * 4 + k]. */
static int define_maps(const netcdf_maps *m, int out, const out_dim *dims, size_t ndims,
                       int *varids)
{
    const netcdf_reader *r = m->reader;
    int st = NC_NOERR;
    for (size_t v = 0; v < r->nvars && st == NC_NOERR; v++) {
        const netcdf_variable *var = &r->vars[v];
        int dimids[NETCDF_MAX_DIMS];
        for (int k = 0; k < var->ncoords; k++)
            for (size_t i = 0; i < ndims; i++)
                if (dims[i].dim->dimid == var->dims[k].dimid)
                    dimids[k] = dims[i].out_dimid;
        for (size_t j = 0; j < m->ntests; j++)
            for (int k = 0; k < 4 && st == NC_NOERR; k++)
                st = define_map(m, out, var->name, m->tests[j], (netcdf_map_kind)k, dimids,
                                var->ncoords, &varids[(v * m->ntests + j) * 4 + (size_t)k]);
    }
    return st;
}

static int define_globals(const netcdf_maps *m, int out)
{
    int st = put_text(out, NC_GLOBAL, "Conventions", "CF-1.9");
    if (st == NC_NOERR)
        st = put_text(out, NC_GLOBAL, "title", "slowscan screening maps");
    if (st == NC_NOERR && m->history)
        st = put_text(out, NC_GLOBAL, "history", m->history);
    if (st == NC_NOERR)
        st = put_text(out, NC_GLOBAL, "source", m->reader->path);
    return st;
}

/* The selected values of each coordinate, copied in their own type. */
static int write_coordinates(const netcdf_reader *r, int out, const out_dim *dims, size_t ndims)
{
    int st = NC_NOERR;
    for (size_t i = 0; i < ndims && st == NC_NOERR; i++) {
        if (dims[i].in_coord < 0)
            continue;
        nc_type type;
        size_t size;
        st = nc_inq_vartype(r->ncid, dims[i].in_coord, &type);
        if (st == NC_NOERR)
            st = nc_inq_type(r->ncid, type, NULL, &size);
        void *buf = st == NC_NOERR ? malloc(dims[i].dim->count * size + 1) : NULL;
        if (st == NC_NOERR && !buf)
            st = NC_ENOMEM;
        if (st == NC_NOERR)
            st = nc_get_vara(r->ncid, dims[i].in_coord, &dims[i].dim->start,
                             &dims[i].dim->count, buf);
        if (st == NC_NOERR)
            st = nc_put_var(out, dims[i].out_coord, buf);
        free(buf);
    }
    return st;
}

static int write_maps(const netcdf_maps *m, int out, const int *varids)
{
    int st = NC_NOERR;
    for (size_t i = 0; i < m->reader->nvars * m->ntests && st == NC_NOERR; i++) {
        const test_maps *t = &m->maps[i];
        const int *id = &varids[i * 4];
        st = nc_put_var_float(out, id[0], t->statistic);
        if (st == NC_NOERR)
            st = nc_put_var_float(out, id[1], t->p_value);
        if (st == NC_NOERR)
            st = nc_put_var_float(out, id[2], t->q_value);
        if (st == NC_NOERR)
            st = nc_put_var_schar(out, id[3], t->flag);
    }
    return st;
}

/* Defines and fills the file at `out`. */
static int fill_file(const netcdf_maps *m, int out, out_dim *dims, int *varids)
{
    size_t ndims;
    int st = define_dims(m->reader, out, dims, &ndims);
    if (st == NC_NOERR)
        st = define_maps(m, out, dims, ndims, varids);
    if (st == NC_NOERR)
        st = define_globals(m, out);
    if (st == NC_NOERR)
        st = nc_enddef(out);
    if (st == NC_NOERR)
        st = write_coordinates(m->reader, out, dims, ndims);
    return st == NC_NOERR ? write_maps(m, out, varids) : st;
}

static void remove_temp(netcdf_maps *m)
{
    if (m->temp)
        unlink(m->temp);
    slowscan_atomic_temp_done(m->temp);
    slowscan_atomic_temp_done(m->temp);
    free(m->temp);
    m->temp = NULL;
}

int slowscan_netcdf_maps_write(netcdf_maps *m, io_error *err)
{
    if (m->written)
        return SLOWSCAN_OK;
    if (!m->temp)
        return maps_fail(m, err, SLOWSCAN_EIO, "the maps were not written", NC_NOERR);
    const netcdf_reader *r = m->reader;
    size_t most_dims = r->nvars * NETCDF_MAX_DIMS;
    out_dim *dims = malloc(most_dims * sizeof *dims);
    int *varids = malloc(r->nvars * m->ntests * 4 * sizeof *varids);
    int out = -1, st = dims && varids ? nc_create(m->temp, output_mode(r->ncid), &out) : NC_ENOMEM;
    if (st == NC_NOERR)
        st = nc_set_fill(out, NC_NOFILL, NULL);
    if (st == NC_NOERR)
        st = fill_file(m, out, dims, varids);
    if (out >= 0) {
        int closed = nc_close(out);
        st = st == NC_NOERR ? closed : st;
    }
    free(dims);
    free(varids);
    if (st != NC_NOERR) {
        remove_temp(m);
        return maps_fail(m, err, st == NC_ENOMEM ? SLOWSCAN_ENOMEM : SLOWSCAN_EIO,
                         "writing the maps", st);
    }
    m->written = 1;
    return SLOWSCAN_OK;
}

int slowscan_netcdf_maps_commit(netcdf_maps *m, io_error *err)
{
    int st = slowscan_netcdf_maps_write(m, err);
    if (st != SLOWSCAN_OK)
        return st;
    if (rename(m->temp, m->path) != 0) {
        char why[128];
        int e = errno;
        remove_temp(m);
        return io_fail(err, SLOWSCAN_EIO, "cannot write %s: %s", m->path,
                       io_strerror(e, why, sizeof why));
    }
    slowscan_atomic_temp_done(m->temp);
    free(m->temp);
    m->temp = NULL;
    return SLOWSCAN_OK;
}

void slowscan_netcdf_maps_free(netcdf_maps *m)
{
    if (!m)
        return;
    remove_temp(m);
    for (size_t i = 0; m->maps && i < m->reader->nvars * m->ntests; i++) {
        free(m->maps[i].statistic);
        free(m->maps[i].p_value);
        free(m->maps[i].q_value);
        free(m->maps[i].flag);
    }
    free(m->maps);
    slowscan_netcdf_close(m->reader);
    free(m->history);
    free(m->path);
    free(m);
}
