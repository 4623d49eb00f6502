/* Reading NetCDF cells in blocks (include/slowscan/netcdf_input.h).
 *
 * A block is a run of cells (row-major over the variable's other dimensions) x all times,
 * held cell-major so that each cell's series is contiguous. Blocks are hyperslabs: whole
 * slices of the inner dimensions, as many as the memory budget allows, so that one
 * nc_get_vara reads a block.
 *
 * A variable stored in chunks of few time steps is different: every block would read every
 * chunk again. It is read once instead, in time slabs over all its selected cells, into a
 * temporary file laid out block by block ([time][cell] within a block), unlinked as soon as
 * it is made so that nothing is left behind even if the process is killed; the blocks are
 * then read back from it. */
#include "netcdf_internal.h"

#include <errno.h>
#include <math.h>
#include <netcdf.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

static const size_t DEFAULT_BUDGET = (size_t)64 << 20;

void netcdf_unpack(const netcdf_packing *p, double *x, size_t n)
{
    for (size_t i = 0; i < n; i++) {
        double raw = x[i];
        /* NaN is the usual fill of float files; an infinity is left as it is, for
         * slowscan_netcdf_next to refuse (a model's blow-up is not a gap) */
        int missing = isnan(raw) || (p->has_fill && raw == p->fill) ||
                      raw < p->valid_min || raw > p->valid_max;
        for (size_t m = 0; m < p->nmissing && !missing; m++)
            missing = raw == p->missing[m];
        x[i] = missing ? NAN : raw * p->scale + p->offset;
    }
}

void netcdf_drop_spill(netcdf_reader *r)
{
    if (r->spill)
        fclose(r->spill);
    r->spill = NULL;
    r->spilled_var = 0;
}

/* Cells a block may hold: the budget covers the block and the raw hyperslab. */
static size_t block_capacity(const netcdf_reader *r)
{
    size_t budget = r->options.memory_budget ? r->options.memory_budget : DEFAULT_BUDGET;
    size_t per_cell = 2 * r->nt * sizeof(double);
    size_t cells = budget / per_cell;
    return cells ? cells : 1;
}

/* The row-major multi-index (over the selected counts) of cell c. */
static void cell_index(const netcdf_variable *v, size_t c, size_t *idx)
{
    for (int k = v->ncoords - 1; k >= 0; k--) {
        idx[k] = c % v->dims[k].count;
        c /= v->dims[k].count;
    }
}

/* A hyperslab of the variable: start/count over all its dimensions in file order, time
 * from t0 for nt steps, other dimension k from the selection start + from[k] for count[k]. */
typedef struct {
    size_t start[NETCDF_MAX_DIMS], count[NETCDF_MAX_DIMS];
    size_t stride[NETCDF_MAX_DIMS]; /* of the raw buffer, per file dimension */
    size_t cells;
} hyperslab;

static void make_slab(const netcdf_variable *v, size_t t0, size_t nt, const size_t *from,
                      const size_t *count, hyperslab *h)
{
    h->cells = 1;
    for (int p = 0, k = 0; p < v->ndims; p++) {
        if (p == v->time_position) {
            h->start[p] = t0, h->count[p] = nt;
            continue;
        }
        h->start[p] = v->dims[k].start + from[k];
        h->count[p] = count[k];
        h->cells *= count[k++];
    }
    size_t s = 1;
    for (int p = v->ndims - 1; p >= 0; p--) {
        h->stride[p] = s;
        s *= h->count[p];
    }
}

/* Offset in the raw buffer of (time t, cell j of the slab, row-major over its counts). */
static size_t raw_offset(const netcdf_variable *v, const hyperslab *h, size_t t, size_t j)
{
    size_t off = t * h->stride[v->time_position];
    for (int p = v->ndims - 1; p >= 0; p--) {
        if (p == v->time_position)
            continue;
        off += (j % h->count[p]) * h->stride[p];
        j /= h->count[p];
    }
    return off;
}

/* The block of cells from `first`: whole slices of the dimensions inside the split one. */
static void plan_block(const netcdf_variable *v, size_t first, size_t capacity, size_t *from,
                       size_t *count)
{
    cell_index(v, first, from);
    int split = v->ncoords - 1;
    size_t inner = 1;
    while (split > 0 && inner * v->dims[split].count <= capacity)
        inner *= v->dims[split--].count;
    for (int k = 0; k < v->ncoords; k++)
        count[k] = k < split ? 1 : k > split ? v->dims[k].count : 0;
    if (v->ncoords > 0) {
        size_t room = capacity / inner ? capacity / inner : 1;
        size_t left = v->dims[split].count - from[split];
        count[split] = room < left ? room : left;
    }
}

/* Reads the hyperslab and unpacks it into the block, cell-major. */
static int read_direct(netcdf_reader *r, const netcdf_variable *v, io_error *err)
{
    size_t from[NETCDF_MAX_DIMS], count[NETCDF_MAX_DIMS];
    plan_block(v, r->cell_at, r->block_capacity, from, count);
    hyperslab h;
    make_slab(v, 0, r->nt, from, count, &h);
    int st = nc_get_vara_double(r->ncid, v->varid, h.start, h.count, r->raw);
    if (st != NC_NOERR)
        return netcdf_library_fail(r, err, st, v->name);
    for (size_t j = 0; j < h.cells; j++)
        for (size_t t = 0; t < r->nt; t++)
            r->block[j * r->nt + t] = r->raw[raw_offset(v, &h, t, j)];
    r->block_first = r->cell_at;
    r->block_cells = h.cells;
    netcdf_unpack(&v->packing, r->block, h.cells * r->nt);
    return SLOWSCAN_OK;
}

/* Blocks of the spill: fixed runs of `capacity` cells; block b's region starts at
 * b * capacity * nt doubles and holds [time][cell] for its cells. */
static size_t spill_block_cells(const netcdf_variable *v, size_t capacity, size_t b)
{
    size_t first = b * capacity;
    return v->ncells - first < capacity ? v->ncells - first : capacity;
}

static int spill_write(netcdf_reader *r, const double *buf, size_t count, size_t offset,
                       io_error *err)
{
    if (fseeko(r->spill, (off_t)(offset * sizeof *buf), SEEK_SET) != 0 ||
        fwrite(buf, sizeof *buf, count, r->spill) != count) {
        char why[128];
        return netcdf_fail(r, err, SLOWSCAN_EIO, "writing the temporary copy of a time-chunked "
                           "variable: %s", io_strerror(errno, why, sizeof why));
    }
    return SLOWSCAN_OK;
}

/* One slab of `steps` times from t0 over every selected cell, scattered to the blocks. */
static int spill_slab(netcdf_reader *r, const netcdf_variable *v, size_t t0, size_t steps,
                      double *slab, io_error *err)
{
    size_t from[NETCDF_MAX_DIMS] = {0}, count[NETCDF_MAX_DIMS];
    for (int k = 0; k < v->ncoords; k++)
        count[k] = v->dims[k].count;
    hyperslab h;
    make_slab(v, t0, steps, from, count, &h);
    int st = nc_get_vara_double(r->ncid, v->varid, h.start, h.count, slab);
    if (st != NC_NOERR)
        return netcdf_library_fail(r, err, st, v->name);
    size_t capacity = r->block_capacity;
    for (size_t b = 0, first = 0; first < v->ncells && st == SLOWSCAN_OK; b++, first += capacity) {
        size_t cells = spill_block_cells(v, capacity, b);
        for (size_t t = 0; t < steps; t++)
            for (size_t j = 0; j < cells; j++)
                r->block[t * cells + j] = slab[raw_offset(v, &h, t, first + j)];
        st = spill_write(r, r->block, steps * cells, first * r->nt + t0 * cells, err);
    }
    return st;
}

/* Copies a time-chunked variable into the temporary file, each chunk read once. */
static int make_spill(netcdf_reader *r, const netcdf_variable *v, io_error *err)
{
    netcdf_drop_spill(r);
    int made = io_unnamed_temporary(r->options.temp_dir, "slowscan-netcdf", &r->spill, err);
    if (made != SLOWSCAN_OK)
        return made;
    /* slabs of as many steps as the budget holds for every cell, at least one */
    size_t budget = r->block_capacity * r->nt; /* doubles in r->raw */
    size_t steps = budget / v->ncells ? budget / v->ncells : 1;
    double *slab = steps * v->ncells <= budget ? r->raw : malloc(v->ncells * sizeof *slab);
    if (!slab)
        return netcdf_fail(r, err, SLOWSCAN_ENOMEM, "out of memory");
    int st = SLOWSCAN_OK;
    for (size_t t0 = 0; t0 < r->nt && st == SLOWSCAN_OK; t0 += steps)
        st = spill_slab(r, v, t0, t0 + steps <= r->nt ? steps : r->nt - t0, slab, err);
    if (slab != r->raw)
        free(slab);
    r->spilled_var = (size_t)(v - r->vars) + 1;
    return st;
}

/* Reads block (cell_at / capacity) back from the spill, cell-major. */
static int read_spilled(netcdf_reader *r, const netcdf_variable *v, io_error *err)
{
    size_t b = r->cell_at / r->block_capacity, cells = spill_block_cells(v, r->block_capacity, b);
    size_t first = b * r->block_capacity, count = cells * r->nt;
    if (fseeko(r->spill, (off_t)(first * r->nt * sizeof(double)), SEEK_SET) != 0 ||
        fread(r->raw, sizeof(double), count, r->spill) != count) {
        char why[128];
        return netcdf_fail(r, err, SLOWSCAN_EIO, "reading the temporary copy back: %s",
                           io_strerror(errno, why, sizeof why));
    }
    for (size_t j = 0; j < cells; j++)
        for (size_t t = 0; t < r->nt; t++)
            r->block[j * r->nt + t] = r->raw[t * cells + j];
    r->block_first = first;
    r->block_cells = cells;
    netcdf_unpack(&v->packing, r->block, count);
    return SLOWSCAN_OK;
}

static int load_block(netcdf_reader *r, io_error *err)
{
    const netcdf_variable *v = &r->vars[r->var_at];
    if (!r->block) {
        r->block_capacity = block_capacity(r);
        r->block = malloc(r->block_capacity * r->nt * sizeof *r->block);
        r->raw = malloc(r->block_capacity * r->nt * sizeof *r->raw);
        if (!r->block || !r->raw)
            return netcdf_fail(r, err, SLOWSCAN_ENOMEM, "out of memory for a block of %zu "
                               "cells x %zu times", r->block_capacity, r->nt);
    }
    if (!v->time_chunked || v->ncells <= r->block_capacity)
        return read_direct(r, v, err);
    int st = SLOWSCAN_OK;
    if (r->spilled_var != (size_t)r->var_at + 1)
        st = make_spill(r, v, err);
    return st == SLOWSCAN_OK ? read_spilled(r, v, err) : st;
}

size_t slowscan_netcdf_series_name(char *buf, size_t size, const char *variable,
                                   const char *const *coord_name, const double *coord_value,
                                   size_t ncoords)
{
    char scratch[1];
    if (size == 0) /* snprintf with size 0 only measures */
        buf = scratch;
    size_t len = (size_t)snprintf(buf, size, "%s", variable);
    for (size_t k = 0; k < ncoords; k++)
        len += (size_t)snprintf(len < size ? buf + len : NULL, len < size ? size - len : 0,
                                "%s%s=%.10g", k ? "," : "[", coord_name[k], coord_value[k]);
    if (ncoords)
        len += (size_t)snprintf(len < size ? buf + len : NULL, len < size ? size - len : 0,
                                "]");
    return len;
}

static void series_name(netcdf_reader *r, const netcdf_variable *v, netcdf_series *s)
{
    slowscan_netcdf_series_name(r->name, sizeof r->name, v->name, s->coord_name,
                                s->coord_value, s->ncoords);
    s->name = r->name;
}

int slowscan_netcdf_next(netcdf_reader *r, netcdf_series *s, io_error *err)
{
    /* a variable with an empty dimension besides time (an unlimited one still at length 0)
     * has no cell: handing one out divided by its count of 0 (found by fuzzing,
     * tests/fuzz/regressions/netcdf/empty-dimension-no-cells) */
    while (r->var_at < r->nvars && r->vars[r->var_at].ncells == 0)
        r->var_at++;
    if (r->var_at >= r->nvars)
        return NETCDF_END;
    const netcdf_variable *v = &r->vars[r->var_at];
    if (r->block_cells == 0 || r->cell_at < r->block_first ||
        r->cell_at >= r->block_first + r->block_cells) {
        int st = load_block(r, err);
        if (st != SLOWSCAN_OK)
            return st;
    }
    memset(s, 0, sizeof *s);
    s->variable = v->name;
    s->variable_index = r->var_at;
    s->cell = r->cell_at;
    s->ncoords = (size_t)v->ncoords;
    size_t idx[NETCDF_MAX_DIMS];
    cell_index(v, r->cell_at, idx);
    for (int k = 0; k < v->ncoords; k++) {
        const netcdf_dim *d = &v->dims[k];
        s->coord_name[k] = d->name;
        s->coord_index[k] = d->start + idx[k];
        s->coord_value[k] = d->coord ? d->coord[d->start + idx[k]] : (double)(d->start + idx[k]);
    }
    series_name(r, v, s);
    s->n = r->nt;
    s->values = r->block + (r->cell_at - r->block_first) * r->nt;
    s->all_missing = 1;
    for (size_t t = 0; t < r->nt; t++) {
        if (isinf(s->values[t]))
            return netcdf_fail(r, err, SLOWSCAN_EINVAL, "variable '%s', cell %s, time index "
                               "%zu: the value is infinite (declare it a _FillValue or "
                               "missing_value if it marks missing data)", v->name, s->name, t);
        s->all_missing = s->all_missing && isnan(s->values[t]);
    }
    if (++r->cell_at == v->ncells) {
        r->var_at++;
        r->cell_at = 0;
        r->block_cells = 0;
    }
    return SLOWSCAN_OK;
}
