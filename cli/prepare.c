/* From input files to prepared series: read, cut to --from/--until, check or make a regular
 * grid, take logs, then per series deseason and detrend. Every failure prints one message
 * naming the file, row, column or option, and returns an exit code. */
#include "cli.h"
#include "slowscan/screen_memory.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

/* How a source is named in messages: io/ records standard input as "-". */
static const char *shown(const char *source)
{
    return strcmp(source, "-") == 0 ? "standard input" : source;
}

static int io_fail(int status, const io_error *err)
{
    cli_error("%s", err->message);
    return status == SLOWSCAN_ENOMEM ? EXIT_INTERNAL : EXIT_BAD_INPUT;
}

/* Rows of a table below which nothing can be said (fewer than 8 samples). */
enum { MIN_ROWS = 8 };

int cli_ready_table(const cli_options *opts, series_table *t, int first)
{
    io_error err = {{0}};
    int st;
    double from, until;
    if (cli_span_on_axis(opts, t, &from, &until) != EXIT_OK)
        return EXIT_BAD_INPUT;
    if (!isnan(from) || !isnan(until))
        if ((st = slowscan_table_select_span(t, from, until, &err)) != SLOWSCAN_OK)
            return io_fail(st, &err);
    if ((st = cli_grid(opts, t, first, &err)) != SLOWSCAN_OK)
        return io_fail(st, &err);
    if (opts->log_values && (st = slowscan_table_log(t, &err)) != SLOWSCAN_OK)
        return io_fail(st, &err);
    if (t->n < MIN_ROWS) {
        cli_error("%s: %zu samples in the analysed span; at least %d are needed", shown(t->source), t->n,
                  MIN_ROWS);
        return EXIT_BAD_INPUT;
    }
    return EXIT_OK;
}

/* The control run is read with the same columns, grid and logarithm as the inputs, but never
 * cut by --from/--until: those select the forced run's span, not the control's. */
int cli_load_whole_table(const cli_options *opts, const char *path, const char *option,
                         const char *what, series_table *table)
{
    for (size_t f = 0; f < opts->nfiles; f++)
        if (slowscan_io_same_file(path, opts->files[f])) {
            cli_error("option %s: %s is also an input; %s must be another file", option, path,
                      what);
            return EXIT_BAD_INPUT;
        }
    csv_read_options ro;
    time_units units;
    if (cli_check_netcdf_name(path, option) != EXIT_OK ||
        cli_read_options(opts, &units, &ro) != EXIT_OK)
        return EXIT_BAD_INPUT;
    io_error err = {{0}};
    int st = slowscan_csv_read_table(path, &ro, table, &err);
    if (st != SLOWSCAN_OK) {
        cli_error("option %s: %s", option, err.message);
        return st == SLOWSCAN_ENOMEM ? EXIT_INTERNAL : EXIT_BAD_INPUT;
    }
    cli_options whole = *opts;
    whole.from = whole.until = NAN;
    whole.from_text = whole.until_text = NULL;
    int rc = cli_ready_table(&whole, table, 1);
    if (rc != EXIT_OK)
        slowscan_series_table_free(table);
    return rc;
}

static int load_control(const cli_options *opts, cli_inputs *in)
{
    int rc = cli_load_whole_table(opts, opts->control_file, "--control", "a control run",
                                  &in->control);
    in->has_control = rc == EXIT_OK;
    return rc;
}

/* A NetCDF input is opened once here, so that a bad file, variable or --select fails before
 * any work, and its cells counted; its cells are read later, a table at a time. */
static int check_grid(const cli_options *opts, size_t f, size_t *cells, size_t *times)
{
    if (opts->control_file) {
        cli_error("option --control: %s is a NetCDF grid; a control run is read for CSV inputs "
                  "only", opts->files[f]);
        return EXIT_BAD_INPUT;
    }
    netcdf_read_options o = cli_netcdf_options(opts);
    netcdf_reader *r;
    io_error err = {{0}};
    int st = slowscan_netcdf_open(opts->files[f], &o, &r, &err);
    if (st != SLOWSCAN_OK)
        return io_fail(st, &err);
    *cells = slowscan_netcdf_series_count(r);
    slowscan_netcdf_times(r, times, NULL, NULL);
    slowscan_netcdf_close(r);
    if (*cells == 0) { /* blame --select only when it was given: a dimension of length 0
                        * leaves no cell either (found by fuzzing) */
        if (opts->select)
            cli_error("%s: --select leaves no cell to analyse", opts->files[f]);
        else
            cli_error("%s: no cell to analyse (a dimension of its data variables has length 0)",
                      opts->files[f]);
        return EXIT_BAD_INPUT;
    }
    return EXIT_OK;
}

/* A CSV too large to hold is read once into a temporary copy and walked a table of series
 * at a time (cli/inputs.c); its header's notices are given now. */
static int open_columns(const cli_options *opts, const csv_read_options *ro, size_t f,
                        cli_inputs *in)
{
    io_error err = {{0}};
    int st = slowscan_csv_open_columns(opts->files[f], ro, NULL, &in->columns[f], &err);
    if (st != SLOWSCAN_OK)
        return io_fail(st, &err);
    cli_input_notices(opts, slowscan_csv_columns_header(in->columns[f]));
    return EXIT_OK;
}

int cli_inputs_load(const cli_options *opts, cli_inputs *in)
{
    memset(in, 0, sizeof *in);
    in->tables = calloc(opts->nfiles, sizeof *in->tables);
    in->grid_cells = calloc(opts->nfiles, sizeof *in->grid_cells);
    in->columns = calloc(opts->nfiles, sizeof *in->columns);
    in->grid_times = calloc(opts->nfiles, sizeof *in->grid_times);
    if (!in->tables || !in->grid_cells || !in->columns || !in->grid_times)
        return EXIT_INTERNAL;
    csv_read_options ro;
    time_units units;
    int rc = cli_read_options(opts, &units, &ro);
    for (size_t f = 0; rc == EXIT_OK && f < opts->nfiles; f++) {
        for (size_t g = 0; g < f; g++)
            if (strcmp(opts->files[f], opts->files[g]) == 0 || slowscan_io_same_file(opts->files[f], opts->files[g])) {
                cli_error("%s: the same input is given twice", opts->files[f]);
                return EXIT_BAD_INPUT;
            }
        in->ntables = f + 1;
        if (cli_check_netcdf_name(opts->files[f], NULL) != EXIT_OK)
            return EXIT_BAD_INPUT;
        if (cli_is_netcdf(opts->files[f])) {
            rc = check_grid(opts, f, &in->grid_cells[f], &in->grid_times[f]);
            continue;
        }
        if (cli_too_wide(opts->files[f])) {
            rc = open_columns(opts, &ro, f, in);
            continue;
        }
        io_error err = {{0}};
        int st = slowscan_csv_read_table(opts->files[f], &ro, &in->tables[f], &err);
        if (st != SLOWSCAN_OK)
            return io_fail(st, &err);
        cli_input_notices(opts, &in->tables[f]);
        rc = cli_ready_table(opts, &in->tables[f], 1);
    }
    if (rc != EXIT_OK)
        return rc;
    int grids = 0;
    for (size_t f = 0; f < in->ntables; f++)
        grids |= in->grid_cells[f] > 0;
    if (opts->select && !grids) {
        cli_error("option --select %s: it chooses cells of a NetCDF grid, and no input is one "
                  "(for CSV columns use --vars)", opts->select);
        return EXIT_BAD_INPUT;
    }
    return opts->control_file ? load_control(opts, in) : EXIT_OK;
}

void cli_inputs_free(cli_inputs *in)
{
    if (in->has_control)
        slowscan_series_table_free(&in->control);
    for (size_t f = 0; f < in->ntables; f++)
        slowscan_series_table_free(&in->tables[f]);
    for (size_t f = 0; in->columns && f < in->ntables; f++)
        slowscan_csv_columns_close(in->columns[f]);
    free(in->columns);
    free(in->tables);
    free(in->grid_cells);
    free(in->grid_times);
    memset(in, 0, sizeof *in);
}

size_t cli_inputs_series_count(const cli_inputs *in)
{
    size_t total = 0;
    for (size_t f = 0; f < in->ntables; f++)
        total += in->tables[f].nseries + (in->grid_cells ? in->grid_cells[f] : 0) +
                 (in->columns && in->columns[f]
                      ? slowscan_csv_columns_header(in->columns[f])->nseries : 0);
    return total;
}

int cli_series_window(const cli_options *o, const series_table *t, size_t *window)
{
    screen_config cfg;
    cli_screen_config(o, &cfg);
    screen_detail d = {0};
    int st = slowscan_screen_config_on_axis(&cfg, &t->axis, &d);
    if (st == SLOWSCAN_OK)
        st = slowscan_screen_window(&cfg, t->n, t->time[t->n - 1] - t->time[0], window, &d);
    if (st == SLOWSCAN_OK)
        return EXIT_OK;
    prepared_series named = {.name = "", .source = shown(t->source)};
    return cli_screen_refuse(o, &named, &d);
}

int cli_prepare_series(const cli_options *o, const series_table *t, size_t k, prepared_series *ps)
{
    screen_config cfg;
    cli_screen_config(o, &cfg);
    screen_input in = {.name = t->names[k], .source = shown(t->source), .time_name = t->time_name, .time = t->time, .values = t->values[k], .n = t->n, .control = NULL, .axis = t->axis};
    screen_detail d;
    if (slowscan_screen_prepare(&cfg, &in, ps, &d) == SLOWSCAN_OK)
        return EXIT_OK;
    return cli_screen_refuse(o, ps, &d);
}

void cli_prepared_free(prepared_series *ps)
{
    slowscan_screen_prepared_free(ps);
}

void cli_indicator_values_free(const cli_options *o, double **values)
{
    for (size_t j = 0; j < o->nindicators; j++) {
        free(values[j]);
        values[j] = NULL;
    }
}

int cli_indicator_values(const cli_options *o, const prepared_series *ps, double **values)
{
    for (size_t j = 0; j < o->nindicators; j++)
        values[j] = malloc(ps->n * sizeof(double));
    screen_workspace *ws = slowscan_screen_workspace_alloc(1);
    int missing = !ws;
    for (size_t j = 0; j < o->nindicators; j++)
        missing |= !values[j];
    if (missing) {
        slowscan_screen_workspace_free(ws);
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    screen_config cfg;
    cli_screen_config(o, &cfg);
    screen_warning warning;
    screen_detail d;
    int warned, rc = EXIT_OK;
    if (slowscan_screen_indicators(ws, &cfg, ps, values, &warning, &warned, &d) != SLOWSCAN_OK)
        rc = cli_screen_refuse(o, ps, &d);
    else if (warned)
        cli_screen_warn(o, ps, &warning);
    slowscan_screen_workspace_free(ws);
    return rc;
}

const char *cli_source_name(const char *source)
{
    return shown(source);
}

screen_input cli_control_input(const cli_inputs *in, const char *name)
{
    return slowscan_screen_control_input(&in->control, name, shown(in->control.source));
}

int cli_attach_control(const cli_options *o, const cli_inputs *in, prepared_series *ps)
{
    if (!in->has_control)
        return EXIT_OK;
    screen_input control = cli_control_input(in, ps->name);
    screen_config cfg;
    cli_screen_config(o, &cfg);
    screen_detail d;
    if (slowscan_screen_attach_control(&cfg, ps, &control, &d) == SLOWSCAN_OK)
        return EXIT_OK;
    return cli_control_refuse(o, &control, ps, &d);
}
