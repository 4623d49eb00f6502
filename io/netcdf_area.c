/* Area weights of a NetCDF variable's cells, for area-weighted means: the CF cell_measures
 * area variable when the file holds it, else cos(latitude) from a latitude coordinate. */
#include "netcdf_internal.h"
#include "slowscan/status.h"

#include <gsl/gsl_math.h> /* M_PI, which strict C11 lacks */
#include <math.h>
#include <netcdf.h>
#include <stdlib.h>
#include <string.h>

/* The latitude among the variable's dimensions: a coordinate variable in degrees_north (or
 * named lat/latitude); its position, -1 when none. *regular: equally spaced (1e-6). */
static int latitude_dim(const netcdf_reader *r, const netcdf_variable *v, int *regular)
{
    for (int d = 0; d < v->ncoords; d++) {
        const netcdf_dim *dim = &v->dims[d];
        int varid;
        char units[64];
        if (!dim->coord || !netcdf_coordinate_variable(r->ncid, dim->dimid, &varid))
            continue;
        netcdf_text_attribute(r->ncid, varid, "units", units, sizeof units);
        if (strncmp(units, "degrees_north", 13) != 0 && strcmp(units, "degree_north") != 0 &&
            strcmp(dim->name, "lat") != 0 && strcmp(dim->name, "latitude") != 0)
            continue;
        *regular = 1;
        double step = dim->length > 1 ? dim->coord[1] - dim->coord[0] : 0;
        for (size_t i = 2; i < dim->length; i++)
            if (fabs(dim->coord[i] - dim->coord[i - 1] - step) > 1e-6 * fabs(step))
                *regular = 0;
        return d;
    }
    return -1;
}

/* The cell_measures area variable, read whole, when it lies on the variable's own non-time
 * dimensions in the same order; 0 when there is none usable (note says why). */
static int measured_areas(const netcdf_reader *r, const netcdf_variable *v,
                          netcdf_area_weights *w, io_error *err)
{
    char text[512], name[260];
    netcdf_text_attribute(r->ncid, v->varid, "cell_measures", text, sizeof text);
    const char *a = strstr(text, "area:");
    if (!a || sscanf(a + 5, " %259s", name) != 1)
        return 0;
    snprintf(w->measure, sizeof w->measure, "%s", name);
    int varid, ndims, dims[NC_MAX_VAR_DIMS];
    if (nc_inq_varid(r->ncid, name, &varid) != NC_NOERR ||
        nc_inq_var(r->ncid, varid, NULL, NULL, &ndims, dims, NULL) != NC_NOERR)
        return 0; /* e.g. in another file (CF external_variables) */
    if (ndims != v->ncoords)
        return 0;
    size_t total = 1;
    for (int d = ndims - 1; d >= 0; d--) {
        if (dims[d] != v->dims[d].dimid)
            return 0;
        w->stride[d] = total;
        total *= v->dims[d].length;
    }
    w->areas = malloc((total ? total : 1) * sizeof *w->areas);
    if (!w->areas)
        return -netcdf_fail(r, err, SLOWSCAN_ENOMEM, "out of memory");
    int st = nc_get_var_double(r->ncid, varid, w->areas);
    if (st != NC_NOERR)
        return -netcdf_library_fail(r, err, st, "reading the cell areas");
    return 1;
}

int slowscan_netcdf_area_weights(const netcdf_reader *r, size_t variable,
                                 netcdf_area_weights *w, io_error *err)
{
    memset(w, 0, sizeof *w);
    w->lat_dim = -1;
    if (!r || variable >= r->nvars)
        return SLOWSCAN_EINVAL;
    const netcdf_variable *v = &r->vars[variable];
    int got = measured_areas(r, v, w, err);
    if (got < 0)
        return -got;
    if (got > 0) {
        w->kind = NETCDF_AREA_MEASURES;
        return SLOWSCAN_OK;
    }
    free(w->areas);
    w->areas = NULL;
    int regular = 0;
    w->lat_dim = latitude_dim(r, v, &regular);
    w->kind = w->lat_dim < 0 ? NETCDF_AREA_NONE
              : regular ? NETCDF_AREA_REGULAR_LATLON : NETCDF_AREA_IRREGULAR_LAT;
    return SLOWSCAN_OK;
}

double slowscan_netcdf_cell_weight(const netcdf_area_weights *w, const netcdf_series *cell)
{
    if (w->kind == NETCDF_AREA_MEASURES) {
        size_t k = 0;
        for (size_t d = 0; d < cell->ncoords; d++)
            k += cell->coord_index[d] * w->stride[d];
        return w->areas[k];
    }
    if (w->kind == NETCDF_AREA_NONE)
        return 1;
    return cos(cell->coord_value[w->lat_dim] * M_PI / 180);
}

void slowscan_netcdf_area_weights_free(netcdf_area_weights *w)
{
    free(w->areas);
    w->areas = NULL;
}
