/* The gridded demo: monthly water clarity on an invented coastal shelf, written as a CF
 * NetCDF file (include/slowscan/demo.h, data/README.md). A bay in the middle of the grid is
 * pushed toward a fold by a slowly rising nutrient load; the open shelf around it is not; a
 * strip of land holds no data. The values are packed as shorts with a fill value and the
 * times are mid-month days on the noleap calendar, as model and satellite products come. */
#include "slowscan/demo.h"
#include "slowscan/status.h"

#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>
#include <math.h>
#include <netcdf.h>
#include <stdlib.h>
#include <string.h>

enum { SUBSTEPS = 10 };
static const double TAU_MONTHS = 3.0;  /* response time of the clear state */
static const double NOISE = 0.015;     /* per sqrt(month) */
static const double SCALE_METRES = 3.0; /* Secchi depth per unit of the state */
static const double SEASON_METRES = 0.5;
static const double SENSOR_METRES = 0.005;
static const double PACK_SCALE = 0.001, PACK_OFFSET = 10.0;
static const short FILL = -32767;

/* The loading at the end of the record, a(T): the bay's centre nears the fold (0.02), its
 * rim less, the open shelf keeps a = 1. */
static double final_forcing(size_t lat, size_t lon)
{
    double dy = ((double)lat - 3.5) / 2.5, dx = ((double)lon - 5.0) / 3.0;
    double bay = exp(-(dx * dx + dy * dy));
    return 1.0 - 0.98 * bay * (bay > 0.15);
}

static int is_land(size_t lat, size_t lon)
{
    return lon == 0 && lat >= 4; /* a headland on the western edge */
}

/* One cell's monthly Secchi depths (packed), by the normal form dx = (a - x^2) dt / tau. */
static int simulate_cell(gsl_rng *rng, double a_end, short *out, size_t n)
{
    double x = 1.0, h = 1.0 / SUBSTEPS;
    for (size_t i = 0; i < n; i++) {
        double a = 1.0 + (a_end - 1.0) * (double)i / (double)(n - 1);
        for (int k = 0; k < SUBSTEPS; k++)
            x += (a - x * x) * h / TAU_MONTHS + NOISE * sqrt(h) * gsl_ran_gaussian_ziggurat(rng, 1.0);
        if (!(x > -sqrt(a)))
            return SLOWSCAN_ENUMERIC;
        double season = SEASON_METRES * sin(2.0 * 3.14159265358979323846 * (double)(i % 12) / 12.0);
        double depth = 5.0 + SCALE_METRES * x + season +
                       SENSOR_METRES * gsl_ran_gaussian_ziggurat(rng, 1.0);
        out[i] = (short)lround((depth - PACK_OFFSET) / PACK_SCALE);
    }
    return SLOWSCAN_OK;
}

/* Every cell, [time][lat][lon]; one random stream per cell. */
static int simulate_grid(unsigned long seed, short *grid)
{
    gsl_rng *rng = gsl_rng_alloc(gsl_rng_mt19937);
    short *cell = malloc(DEMO_GRID_MONTHS * sizeof *cell);
    int st = rng && cell ? SLOWSCAN_OK : SLOWSCAN_ENOMEM;
    for (size_t j = 0; st == SLOWSCAN_OK && j < DEMO_GRID_LAT; j++)
        for (size_t i = 0; st == SLOWSCAN_OK && i < DEMO_GRID_LON; i++) {
            gsl_rng_set(rng, seed * 1000003UL + 5000 + j * DEMO_GRID_LON + i);
            if (is_land(j, i))
                for (size_t t = 0; t < DEMO_GRID_MONTHS; t++)
                    cell[t] = FILL;
            else
                st = simulate_cell(rng, final_forcing(j, i), cell, DEMO_GRID_MONTHS);
            for (size_t t = 0; st == SLOWSCAN_OK && t < DEMO_GRID_MONTHS; t++)
                grid[(t * DEMO_GRID_LAT + j) * DEMO_GRID_LON + i] = cell[t];
        }
    free(cell);
    gsl_rng_free(rng);
    return st;
}

static int text(int nc, int var, const char *name, const char *value)
{
    return nc_put_att_text(nc, var, name, strlen(value), value);
}

/* Dimensions, coordinates and attributes (CF 1.9). */
static int define(int nc, int *vars)
{
    int dims[3], st = NC_NOERR;
    const char *names[3] = {"time", "lat", "lon"};
    const size_t lengths[3] = {DEMO_GRID_MONTHS, DEMO_GRID_LAT, DEMO_GRID_LON};
    for (int d = 0; d < 3 && st == NC_NOERR; d++)
        st = nc_def_dim(nc, names[d], lengths[d], &dims[d]);
    for (int d = 0; d < 3 && st == NC_NOERR; d++)
        st = nc_def_var(nc, names[d], NC_DOUBLE, 1, &dims[d], &vars[d]);
    if (st == NC_NOERR)
        st = nc_def_var(nc, "secchi", NC_SHORT, 3, dims, &vars[3]);
    static const struct {
        int var; /* 0-2 the coordinates, 3 the data, -1 global */
        const char *name, *value;
    } attributes[] = {
        {0, "units", "days since 1981-01-01"}, {0, "calendar", "noleap"}, {0, "axis", "T"},
        {0, "standard_name", "time"}, {1, "units", "degrees_north"}, {1, "axis", "Y"},
        {2, "units", "degrees_east"}, {2, "axis", "X"},
        {3, "long_name", "Secchi depth (monthly mean)"}, {3, "units", "m"},
        {-1, "Conventions", "CF-1.9"},
        {-1, "title", "Invented demo data: water clarity on a coastal shelf (slowscan demo; "
                      "see data/README.md)"}};
    for (size_t a = 0; a < sizeof attributes / sizeof attributes[0] && st == NC_NOERR; a++)
        st = text(nc, attributes[a].var < 0 ? NC_GLOBAL : vars[attributes[a].var],
                  attributes[a].name, attributes[a].value);
    const double scale = PACK_SCALE, offset = PACK_OFFSET;
    if (st == NC_NOERR)
        st = nc_put_att_short(nc, vars[3], "_FillValue", NC_SHORT, 1, &FILL);
    if (st == NC_NOERR)
        st = nc_put_att_double(nc, vars[3], "scale_factor", NC_DOUBLE, 1, &scale);
    if (st == NC_NOERR)
        st = nc_put_att_double(nc, vars[3], "add_offset", NC_DOUBLE, 1, &offset);
    return st;
}

/* Mid-month day numbers of the noleap calendar (days since 1981-01-01). */
static void month_times(double *time)
{
    static const int start[13] = {0, 31, 59, 90, 120, 151, 181, 212, 243, 273, 304, 334, 365};
    for (size_t t = 0; t < DEMO_GRID_MONTHS; t++) {
        size_t m = t % 12;
        time[t] = 365.0 * (double)(t / 12) + 0.5 * (start[m] + start[m + 1]);
    }
}

static int put_data(int nc, const int *vars, const short *grid)
{
    double time[DEMO_GRID_MONTHS], lat[DEMO_GRID_LAT], lon[DEMO_GRID_LON];
    month_times(time);
    for (size_t j = 0; j < DEMO_GRID_LAT; j++)
        lat[j] = -33.0 + 0.25 * (double)j;
    for (size_t i = 0; i < DEMO_GRID_LON; i++)
        lon[i] = 151.0 + 0.25 * (double)i;
    int st = nc_put_var_double(nc, vars[0], time);
    if (st == NC_NOERR)
        st = nc_put_var_double(nc, vars[1], lat);
    if (st == NC_NOERR)
        st = nc_put_var_double(nc, vars[2], lon);
    if (st == NC_NOERR)
        st = nc_put_var_short(nc, vars[3], grid);
    return st;
}

int slowscan_demo_grid_write(unsigned long seed, const char *path)
{
    short *grid = malloc((size_t)DEMO_GRID_MONTHS * DEMO_GRID_LAT * DEMO_GRID_LON * sizeof *grid);
    if (!grid)
        return SLOWSCAN_ENOMEM;
    int st = simulate_grid(seed, grid), nc = -1, vars[4];
    /* classic 64-bit offset: the same bytes for the same numbers (no creation times inside) */
    if (st == SLOWSCAN_OK && nc_create(path, NC_CLOBBER | NC_64BIT_OFFSET, &nc) != NC_NOERR)
        st = SLOWSCAN_EIO;
    if (st == SLOWSCAN_OK && (define(nc, vars) != NC_NOERR || nc_enddef(nc) != NC_NOERR ||
                              put_data(nc, vars, grid) != NC_NOERR))
        st = SLOWSCAN_EIO;
    if (nc >= 0 && nc_close(nc) != NC_NOERR && st == SLOWSCAN_OK)
        st = SLOWSCAN_EIO;
    free(grid);
    return st;
}
