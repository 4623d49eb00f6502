/* screen --maps FILE.nc: the run's statistic, p, q and flag per test on the grid of its one
 * NetCDF input (the library's netcdf_maps.h writes the file). The maps are opened with the
 * other outputs, so a bad path fails before any work, and filled from the run's stored
 * records once the q-values are known: each record carries its input and grid position. */
#include "screen.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

/* An argument as a POSIX shell would take it back: bare when it is plain, else quoted. */
static size_t put_argument(char *out, const char *arg)
{
    size_t len = 0, plain = *arg && strspn(arg, "abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ"
                                              "0123456789_./=:,%+-@") == strlen(arg);
    if (plain) {
        memcpy(out, arg, strlen(arg));
        return strlen(arg);
    }
    out[len++] = '\'';
    for (; *arg; arg++) {
        if (*arg == '\'') {
            memcpy(out + len, "'\\''", 4);
            len += 4;
        } else {
            out[len++] = *arg;
        }
    }
    out[len++] = '\'';
    return len;
}

/* "slowscan screen ARGS..." as given (the file's history attribute); NULL: no memory. */
static char *command_line(const cli_options *opts)
{
    size_t size = sizeof "slowscan";
    for (int i = 1; i < opts->argc; i++)
        size += 4 * strlen(opts->argv[i]) + 3;
    char *text = malloc(size);
    if (!text)
        return NULL;
    size_t len = (size_t)snprintf(text, size, "slowscan");
    for (int i = 1; i < opts->argc; i++) {
        text[len++] = ' ';
        len += put_argument(text + len, opts->argv[i]);
    }
    text[len] = '\0';
    return text;
}

/* The one NetCDF grid among the inputs, or a message naming --maps. */
static int grid_input(const cli_options *opts, size_t *input)
{
    size_t grids = 0;
    for (size_t f = 0; f < opts->nfiles; f++)
        if (cli_is_netcdf(opts->files[f]))
            *input = f, grids++;
    if (grids == 1)
        return EXIT_OK;
    if (grids == 0)
        cli_error("option --maps: no input is a NetCDF grid; maps are written for the cells of "
                  "one grid");
    else
        cli_error("option --maps: the inputs hold %zu NetCDF grids; maps are written for "
                  "exactly one", grids);
    return EXIT_BAD_INPUT;
}

int cli_screen_maps_open(const cli_options *opts, cli_outputs *outs, screen_run *run)
{
    int rc = grid_input(opts, &run->maps_input);
    if (rc != EXIT_OK || cli_output_clashes(outs, opts, opts->maps_output, "--maps"))
        return EXIT_BAD_INPUT;
    int tests[SCREEN_MAX_TESTS];
    size_t ntests = slowscan_screen_test_count(&run->cfg);
    for (size_t j = 0; j < ntests; j++)
        tests[j] = slowscan_screen_test_of(&run->cfg, j);
    char *history = command_line(opts);
    if (!history) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    netcdf_maps_spec spec = {.input = opts->files[run->maps_input],
                             .read = cli_netcdf_options(opts), .tests = tests,
                             .ntests = ntests, .history = history,
                             .tail_estimates = opts->tail.method != 0,
                             .undecided = opts->surrogates_auto};
    io_error err = {{0}};
    int st = slowscan_netcdf_maps_open(opts->maps_output, &spec, &outs->maps, &err);
    free(history);
    if (st != SLOWSCAN_OK) {
        cli_error("option --maps: %s", err.message);
        return st == SLOWSCAN_ENOMEM ? EXIT_INTERNAL : EXIT_BAD_INPUT;
    }
    run->maps = outs->maps;
    return EXIT_OK;
}

static int put_row(const screen_row *row, size_t index, void *context)
{
    (void)index;
    screen_run *run = context;
    const screen_origin *o = &row->origin;
    if (!o->gridded || o->input != run->maps_input)
        return EXIT_OK; /* a CSV series: not on the grid */
    int st = slowscan_netcdf_maps_put(run->maps, o->position.variable, o->position.cell,
                                      row->result.kind, row->result.statistic,
                                      row->result.p_value, row->q_value, row->flag);
    if (st == SLOWSCAN_OK)
        return EXIT_OK;
    cli_error("internal error: '%s' has no place in the maps", row->series);
    return EXIT_INTERNAL;
}

int cli_screen_maps_fill(screen_run *run)
{
    return cli_screen_each_row(run, put_row, run);
}

/* The two horizontal dimensions of a view: the two longer than one (the others, a level
 * chosen with --select, are single); 0 when there are not exactly two. */
static int horizontal_dims(const netcdf_maps_view *v, size_t *y, size_t *x)
{
    size_t found = 0, dims[2] = {0, 0};
    for (size_t k = 0; k < v->ndims; k++)
        if (v->dim_length[k] > 1 || v->ndims == 2) {
            if (found < 2)
                dims[found] = k;
            found++;
        }
    *y = dims[0], *x = dims[1];
    return found == 2;
}

/* A map figure's arrays for one variable: per test its statistic (NaN for fill) and flags. */
typedef struct {
    report_map_test tests[SCREEN_MAX_TESTS];
    double *statistic, *x, *y;
    unsigned char *flagged;
} map_arrays;

static const double *coordinates(const netcdf_maps_view *v, size_t k, double *indices)
{
    if (v->dim_value[k])
        return v->dim_value[k];
    for (size_t i = 0; i < v->dim_length[k]; i++)
        indices[i] = (double)i;
    return indices;
}

static int fill_arrays(screen_run *run, size_t variable, size_t cells, map_arrays *a)
{
    size_t ntests = slowscan_screen_test_count(&run->cfg);
    a->statistic = malloc(ntests * cells * sizeof *a->statistic);
    a->flagged = malloc(ntests * cells * sizeof *a->flagged);
    if (!a->statistic || !a->flagged)
        return EXIT_INTERNAL;
    for (size_t j = 0; j < ntests; j++) {
        int kind = slowscan_screen_test_of(&run->cfg, j);
        netcdf_maps_view v;
        slowscan_netcdf_maps_view(run->maps, variable, kind, &v);
        double *stat = a->statistic + j * cells;
        unsigned char *flagged = a->flagged + j * cells;
        for (size_t i = 0; i < cells; i++) {
            stat[i] = v.statistic[i] == v.fill ? NAN : (double)v.statistic[i];
            flagged[i] = v.flag[i] == SCREEN_FLAG_RISING || v.flag[i] == SCREEN_FLAG_FALLING;
        }
        a->tests[j] = (report_map_test){.label = slowscan_screen_test_name(kind),
                                        .rolling = slowscan_screen_test_rolling(kind),
                                        .statistic = stat, .flagged = flagged};
    }
    return EXIT_OK;
}

static int draw_variable(screen_run *run, size_t variable)
{
    netcdf_maps_view v;
    slowscan_netcdf_maps_view(run->maps, variable, slowscan_screen_test_of(&run->cfg, 0), &v);
    size_t iy, ix;
    if (!horizontal_dims(&v, &iy, &ix)) {
        cli_warning("option --figures: no map of %s: it has %zu dimensions besides time with "
                    "more than one value (a map needs two; choose the others with --select)",
                    v.variable, v.ndims);
        return EXIT_OK;
    }
    size_t ny = v.dim_length[iy], nx = v.dim_length[ix];
    map_arrays a = {0};
    a.x = malloc(nx * sizeof *a.x);
    a.y = malloc(ny * sizeof *a.y);
    int rc = a.x && a.y ? fill_arrays(run, variable, nx * ny, &a) : EXIT_INTERNAL;
    if (rc == EXIT_OK) {
        report_map_data data = {.name = v.variable, .x_name = v.dim_name[ix],
                                .y_name = v.dim_name[iy], .nx = nx, .ny = ny,
                                .x = coordinates(&v, ix, a.x), .y = coordinates(&v, iy, a.y),
                                .tests = a.tests,
                                .ntests = slowscan_screen_test_count(&run->cfg)};
        rc = cli_figure_draw(run->figures, &slowscan_report_map_figure, &data, "map", v.variable);
    } else {
        cli_error("out of memory");
    }
    free(a.statistic), free(a.flagged), free(a.x), free(a.y);
    return rc;
}

int cli_screen_maps_figures(screen_run *run)
{
    int rc = EXIT_OK;
    for (size_t k = 0; rc == EXIT_OK && k < slowscan_netcdf_maps_variables(run->maps); k++)
        rc = draw_variable(run, k);
    return rc;
}
