/* The inputs a command walks: CSV tables, read whole and made ready once, and NetCDF grids,
 * read a table of cells at a time (slowscan_netcdf_next_table) so that a field of 10^5 cells
 * never sits in memory at once; each table of cells is made ready like a CSV table. */
#include "cli.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

/* Cells per table of a grid: what 8 MiB of values hold, between 1 and 4096. */
static size_t cells_per_table(size_t n)
{
    size_t cells = ((size_t)8 << 20) / (n ? n * sizeof(double) : 1);
    return cells < 1 ? 1 : cells > 4096 ? 4096 : cells;
}

/* A CSV input is read a table of series at a time when its file is larger than this
 * (SLOWSCAN_STREAM_AFTER bytes, for the test suite; not a user setting). */
static long long stream_after(void)
{
    const char *text = getenv("SLOWSCAN_STREAM_AFTER");
    return text && *text ? atoll(text) : (long long)64 << 20;
}

int cli_too_wide(const char *path)
{
    struct stat st;
    return path && strcmp(path, "-") != 0 && stat(path, &st) == 0 && S_ISREG(st.st_mode) &&
           (long long)st.st_size > stream_after();
}

int cli_is_netcdf(const char *path)
{
    if (!path || strcmp(path, "-") == 0)
        return 0;
    FILE *fp = fopen(path, "rb");
    unsigned char head[8] = {0};
    size_t got = fp ? fread(head, 1, sizeof head, fp) : 0;
    if (fp)
        fclose(fp);
    int classic = got >= 4 && memcmp(head, "CDF", 3) == 0 &&
                  (head[3] == 1 || head[3] == 2 || head[3] == 5);
    int hdf5 = got == 8 && memcmp(head, "\x89HDF\r\n\x1a\n", 8) == 0;
    return classic || hdf5;
}

/* A file named *.nc that is not NetCDF (an error page saved under the data's name, a first
 * block overwritten) would be read as a CSV table and refused for its bytes, a message that
 * hides what is wrong. Files that cannot be opened are left to the reader's own message. */
int cli_check_netcdf_name(const char *path, const char *option)
{
    size_t n = path ? strlen(path) : 0;
    if (n < 4 || strcmp(path + n - 3, ".nc") != 0 || access(path, R_OK) != 0 ||
        cli_is_netcdf(path))
        return EXIT_OK;
    cli_error("%s%s%s%s: not a NetCDF file, though named .nc: it begins with neither the "
              "classic signature (CDF) nor HDF5's", option ? "option " : "",
              option ? option : "", option ? ": " : "", path);
    return EXIT_BAD_INPUT;
}

netcdf_read_options cli_netcdf_options(const cli_options *o)
{
    netcdf_read_options r = slowscan_netcdf_read_options_default();
    r.vars = o->vars;
    r.select = o->select;
    /* the reader's blocks (and its slabs of a map-chunked variable) within 32 MiB: with the
     * tables of cells above, a grid of any size runs in tens of megabytes */
    r.memory_budget = (size_t)32 << 20;
    return r;
}

void cli_cursor_start(cli_cursor *c, const cli_options *opts, const cli_inputs *in)
{
    memset(c, 0, sizeof *c);
    c->opts = opts;
    c->in = in;
}

void cli_cursor_end(cli_cursor *c)
{
    slowscan_series_table_free(&c->chunk);
    slowscan_netcdf_close(c->reader);
    c->reader = NULL;
    c->table = NULL;
}

/* The grid being read is done: say how many cells had no value, close it. */
static void finish_grid(cli_cursor *c)
{
    if (c->all_missing > 0 && !c->opts->repeat_walk)
        cli_warning("%s: %zu cell%s no value at all (every time missing) and %s not analysed",
                    c->opts->files[c->input - 1], c->all_missing,
                    c->all_missing == 1 ? " holds" : "s hold", c->all_missing == 1 ? "is" : "are");
    slowscan_netcdf_close(c->reader);
    c->reader = NULL;
}

/* A table just read (status st of the reading, its message in err) becomes the table walked:
 * made ready like a CSV table, notices said on the first walk only. */
static int take_chunk(cli_cursor *c, int st, const io_error *err, int suspect_codes)
{
    if (st != SLOWSCAN_OK) {
        cli_error("%s", err->message);
        return st == SLOWSCAN_ENOMEM ? EXIT_INTERNAL : EXIT_BAD_INPUT;
    }
    int first = c->chunks++ == 0 && !c->opts->repeat_walk;
    if (suspect_codes && !c->opts->repeat_walk)
        cli_series_notices(&c->chunk);
    int rc = cli_ready_table(c->opts, &c->chunk, first);
    if (rc == EXIT_OK) {
        c->table = &c->chunk;
        c->next = 0;
    }
    return rc;
}

/* The next table of series of the streamed CSV, or of cells of the grid, being read;
 * CLI_CURSOR_END at its end. */
static int next_chunk(cli_cursor *c)
{
    slowscan_series_table_free(&c->chunk);
    c->table = NULL;
    io_error err = {{0}};
    if (c->columns) {
        const series_table *h = slowscan_csv_columns_header(c->columns);
        if (c->column_first >= h->nseries) {
            c->columns = NULL;
            return CLI_CURSOR_END;
        }
        int st = slowscan_csv_columns_table(c->columns, c->column_first,
                                            cells_per_table(h->n), &c->chunk, &err);
        c->column_first += c->chunk.nseries;
        return take_chunk(c, st, &err, 1);
    }
    size_t n;
    slowscan_netcdf_times(c->reader, &n, NULL, NULL);
    int st = slowscan_netcdf_next_table(c->reader, cells_per_table(n), &c->chunk,
                                        &c->all_missing, &err);
    if (st == NETCDF_END) {
        finish_grid(c);
        return CLI_CURSOR_END;
    }
    return take_chunk(c, st, &err, 0);
}

/* Opens input c->input (a grid's reader, or a CSV table as read). */
static int open_input(cli_cursor *c)
{
    size_t f = c->input++;
    if (c->in->columns && c->in->columns[f]) {
        c->columns = c->in->columns[f];
        c->column_first = c->chunks = 0;
        return EXIT_OK;
    }
    if (!c->in->grid_cells || c->in->grid_cells[f] == 0) {
        c->table = &c->in->tables[f];
        c->next = 0;
        return EXIT_OK;
    }
    netcdf_read_options o = cli_netcdf_options(c->opts);
    io_error err = {{0}};
    int st = slowscan_netcdf_open(c->opts->files[f], &o, &c->reader, &err);
    if (st != SLOWSCAN_OK) {
        cli_error("%s", err.message);
        return st == SLOWSCAN_ENOMEM ? EXIT_INTERNAL : EXIT_BAD_INPUT;
    }
    c->all_missing = c->chunks = 0;
    return EXIT_OK;
}

int cli_cursor_next(cli_cursor *c, const series_table **t, size_t *k)
{
    for (;;) {
        if (c->table && c->next < c->table->nseries) {
            *t = c->table;
            *k = c->next++;
            return EXIT_OK;
        }
        int rc = EXIT_OK;
        if (c->reader || c->columns) {
            rc = next_chunk(c);
            if (rc == CLI_CURSOR_END)
                continue;
        } else if (c->input < c->in->ntables) {
            c->table = NULL;
            rc = open_input(c);
        } else {
            return CLI_CURSOR_END;
        }
        if (rc != EXIT_OK)
            return rc;
    }
}

