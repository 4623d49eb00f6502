/* screen --maps FILE.nc: the run's statistic, p, q and flag per test on the grid of its one
 * NetCDF input (the library's netcdf_maps.h writes the file). The maps are opened with the
 * other outputs, so a bad path fails before any work, and filled from the run's stored
 * records once the q-values are known: each record carries its input and grid position. */
#include "screen.h"
#include "slowscan/status.h"

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
    netcdf_maps_spec spec = {opts->files[run->maps_input], cli_netcdf_options(opts), tests,
                             ntests, history};
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
