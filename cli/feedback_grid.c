/* slowscan feedback --area-mean: a gridded NetCDF run reduced to the area-weighted means of
 * its --flux and --response variables (cell areas from cell_measures, else cos(latitude)),
 * streamed cell by cell, then handed on as a table of two columns. */
#include "feedback_run.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

/* Says how the cells of `var` are weighted when it is not exact. */
static void weights_notice(const char *path, const char *var, const netcdf_area_weights *w)
{
    if (w->kind != NETCDF_AREA_MEASURES && w->measure[0])
        cli_warning("%s: %s: the cell_measures area '%s' is not in this file (or not on the "
                    "variable's grid); weighting by %s", path, var, w->measure,
                    w->kind == NETCDF_AREA_NONE ? "equal cells" : "cos(latitude)");
    if (w->kind == NETCDF_AREA_IRREGULAR_LAT)
        cli_warning("%s: %s: latitudes not equally spaced (a Gaussian grid?) and no cell "
                    "areas; cos(latitude) weights are only approximate", path, var);
    else if (w->kind == NETCDF_AREA_NONE)
        cli_warning("%s: %s: no cell areas and no latitude coordinate (a curvilinear grid?); "
                    "every cell weighs the same, which is not an area mean", path, var);
}

/* Adds one cell into sum[] and wsum[] (per time step, finite values only). */
static void accumulate(const netcdf_series *s, double w, double *sum, double *wsum)
{
    for (size_t i = 0; i < s->n; i++)
        if (isfinite(s->values[i]) && isfinite(w)) {
            sum[i] += w * s->values[i];
            wsum[i] += w;
        }
}

/* The table: time, then the two means (NaN at a time with no cell present). */
static int make_table(netcdf_reader *r, const char *path, const cli_options *o, double *sum,
                      double *wsum, series_table *t)
{
    size_t n;
    const char *time_name;
    const double *time = slowscan_netcdf_times(r, &n, &t->axis, &time_name);
    const char *names[2] = {o->forced.flux, o->forced.response};
    t->source = strdup(path);
    t->time_name = strdup(time_name);
    t->time = malloc(n * sizeof *t->time);
    t->names = calloc(2, sizeof *t->names);
    t->values = calloc(2, sizeof *t->values);
    if (!t->source || !t->time_name || !t->time || !t->names || !t->values)
        return EXIT_INTERNAL;
    t->n = n;
    t->nseries = 2;
    memcpy(t->time, time, n * sizeof *time);
    for (int k = 0; k < 2; k++) {
        t->names[k] = strdup(names[k]);
        t->values[k] = malloc(n * sizeof(double));
        if (!t->names[k] || !t->values[k])
            return EXIT_INTERNAL;
        for (size_t i = 0; i < n; i++)
            t->values[k][i] = wsum[k * n + i] > 0 ? sum[k * n + i] / wsum[k * n + i] : NAN;
    }
    return EXIT_OK;
}

/* Every cell of both variables into the weighted sums. */
static int sum_cells(netcdf_reader *r, const char *path, const cli_options *o, size_t n,
                     double *sum, double *wsum)
{
    netcdf_area_weights w[2];
    io_error err = {{0}};
    int st = SLOWSCAN_OK;
    for (size_t k = 0; k < 2 && st == SLOWSCAN_OK; k++) {
        st = slowscan_netcdf_area_weights(r, k, &w[k], &err);
        if (st == SLOWSCAN_OK)
            weights_notice(path, k ? o->forced.response : o->forced.flux, &w[k]);
    }
    netcdf_series s;
    while (st == SLOWSCAN_OK && (st = slowscan_netcdf_next(r, &s, &err)) == SLOWSCAN_OK) {
        size_t k = s.variable_index;
        accumulate(&s, slowscan_netcdf_cell_weight(&w[k], &s), sum + k * n, wsum + k * n);
    }
    slowscan_netcdf_area_weights_free(&w[0]);
    slowscan_netcdf_area_weights_free(&w[1]);
    if (st == NETCDF_END)
        return EXIT_OK;
    cli_error("%s", err.message);
    return st == SLOWSCAN_ENOMEM ? EXIT_INTERNAL : EXIT_BAD_INPUT;
}

int cli_feedback_grid(const cli_options *o, const char *path, cli_feedback_visit visit,
                      void *context)
{
    if (!o->feedback.area_mean) {
        cli_error("%s: a NetCDF grid needs --area-mean (feedback fits one global series of "
                  "--flux against one of --response)", path);
        return EXIT_BAD_INPUT;
    }
    char vars[600];
    snprintf(vars, sizeof vars, "%s,%s", o->forced.flux, o->forced.response);
    netcdf_read_options ro = cli_netcdf_options(o);
    ro.vars = vars;
    netcdf_reader *r = NULL;
    io_error err = {{0}};
    if (slowscan_netcdf_open(path, &ro, &r, &err) != SLOWSCAN_OK) {
        cli_error("%s", err.message);
        return EXIT_BAD_INPUT;
    }
    size_t n;
    slowscan_netcdf_times(r, &n, NULL, NULL);
    double *acc = calloc(4 * n, sizeof *acc);
    series_table t = {0};
    int found = 0;
    double branch[3] = {0, NAN, NAN};
    int rc = slowscan_netcdf_branch_days(r, &found, &branch[1], &branch[2], &err) == SLOWSCAN_OK
             ? EXIT_OK : EXIT_BAD_INPUT;
    branch[0] = found;
    if (rc != EXIT_OK)
        cli_error("%s", err.message);
    if (rc == EXIT_OK)
        rc = acc ? sum_cells(r, path, o, n, acc, acc + 2 * n) : EXIT_INTERNAL;
    if (rc == EXIT_OK)
        rc = make_table(r, path, o, acc, acc + 2 * n, &t);
    slowscan_netcdf_close(r);
    free(acc);
    if (rc == EXIT_OK)
        rc = cli_ready_table(o, &t, 1);
    if (rc == EXIT_OK)
        rc = visit(context, &t, branch);
    slowscan_series_table_free(&t);
    return rc;
}
