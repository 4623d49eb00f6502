/* Suite netcdf: the CF NetCDF reader (io/netcdf_*.c) against Debian's python3-netcdf4, which
 * writes the test grid (tests/reference/netcdf_grid.py: packed shorts with _FillValue and
 * valid_range, a float with missing_value, a noleap monthly axis in "days since", bounds) and
 * reads it back masked and unpacked: the reference values. Classic (64-bit offset) and
 * NetCDF-4 files, contiguous and one-map-per-chunk layouts, whole and in blocks of two cells. */
#include "check.h"
#include "slowscan/netcdf_input.h"
#include "slowscan/status.h"

#include <dirent.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

enum { NT = 30, CELLS = 12, VARS = 2 };

/* Writes the grid in `format`/`layout` and the reference values into ref[VARS*CELLS*NT]. */
static int make_grid(const char *path, const char *format, const char *layout, double *ref)
{
    char args[600];
    snprintf(args, sizeof args, "netcdf_grid.py %s %s %s", path, format, layout);
    return check_python(args, ref, VARS * CELLS * NT) == VARS * CELLS * NT;
}

/* Entries of a directory other than . and .. */
static size_t directory_entries(const char *dir)
{
    DIR *d = opendir(dir);
    size_t n = 0;
    for (struct dirent *e; d && (e = readdir(d));)
        n += strcmp(e->d_name, ".") != 0 && strcmp(e->d_name, "..") != 0;
    if (d)
        closedir(d);
    return n;
}

/* Reads every cell and compares with the reference; the temporary directory stays empty. */
static void check_layout(const char *format, const char *layout, size_t budget)
{
    static double ref[VARS * CELLS * NT];
    const char *path = check_tmp_path("grid.nc");
    char spill_dir[512];
    snprintf(spill_dir, sizeof spill_dir, "%s", check_tmp_path("spill"));
    mkdir(spill_dir, 0700);
    if (!make_grid(path, format, layout, ref)) {
        CHECK(0, "%s %s: python3-netcdf4 wrote the grid", format, layout);
        return;
    }
    netcdf_read_options o = slowscan_netcdf_read_options_default();
    o.memory_budget = budget;
    o.temp_dir = spill_dir;
    netcdf_reader *r;
    io_error err;
    int st = slowscan_netcdf_open(path, &o, &r, &err);
    CHECK(st == SLOWSCAN_OK, "%s %s: open: %s", format, layout, err.message);
    if (st != SLOWSCAN_OK)
        return;
    size_t n, cells = 0, bad = 0, all_missing = 0, leftover = 0;
    time_axis axis;
    const char *time_name;
    const double *time = slowscan_netcdf_times(r, &n, &axis, &time_name);
    CHECK(n == NT && axis.unit == TIME_AXIS_MONTHS && axis.calendar == CALENDAR_NOLEAP &&
              time[0] == 1850 * 12 && time[NT - 1] == 1850 * 12 + NT - 1 &&
              strcmp(time_name, "time") == 0 && slowscan_netcdf_series_count(r) == VARS * CELLS,
          "%s %s: noleap mid-month days on the month index, %zu cells", format, layout,
          slowscan_netcdf_series_count(r));
    netcdf_series s;
    while ((st = slowscan_netcdf_next(r, &s, &err)) == SLOWSCAN_OK) {
        const double *want = ref + cells * NT;
        bad += check_max_diff(s.values, want, NT) > 1e-9 * 300;
        all_missing += s.all_missing;
        leftover += directory_entries(spill_dir);
        if (cells == 7)
            CHECK(strcmp(s.name, "tas[lat=0,lon=15]") == 0 && s.all_missing &&
                      s.coord_index[1] == 3,
                  "cell 7 is named %s, all missing", s.name);
        cells++;
    }
    CHECK(st == NETCDF_END && cells == VARS * CELLS && bad == 0 && all_missing == 1,
          "%s %s (budget %zu B): %zu cells read, %zu differ from python3-netcdf4, %zu all "
          "missing (status %d: %s)", format, layout, budget, cells, bad, all_missing, st,
          err.message);
    CHECK(leftover == 0, "%s %s: no temporary file visible while reading (%zu seen)", format,
          layout, leftover);
    slowscan_netcdf_close(r);
    CHECK(directory_entries(spill_dir) == 0, "%s %s: nothing left after close", format, layout);
}

/* --select by coordinate values, and its refusals. */
static void check_select(void)
{
    static double ref[VARS * CELLS * NT];
    const char *path = check_tmp_path("grid.nc");
    if (!make_grid(path, "NETCDF4", "series_chunks", ref))
        return;
    netcdf_read_options o = slowscan_netcdf_read_options_default();
    o.vars = "pr";
    o.select = "lat=10:0,lon=5";
    netcdf_reader *r;
    io_error err;
    int st = slowscan_netcdf_open(path, &o, &r, &err);
    netcdf_series s;
    int ok = st == SLOWSCAN_OK && slowscan_netcdf_series_count(r) == 2 &&
             slowscan_netcdf_next(r, &s, &err) == SLOWSCAN_OK &&
             strcmp(s.name, "pr[lat=0,lon=5]") == 0 &&
             check_max_diff(s.values, ref + (CELLS + 5) * NT, NT) < 1e-9 &&
             slowscan_netcdf_next(r, &s, &err) == SLOWSCAN_OK &&
             strcmp(s.name, "pr[lat=10,lon=5]") == 0 &&
             slowscan_netcdf_next(r, &s, &err) == NETCDF_END;
    CHECK(ok, "--select lat=10:0,lon=5 on pr: two cells in order (%s)", err.message);
    if (st == SLOWSCAN_OK)
        slowscan_netcdf_close(r);
    static const struct {
        const char *vars, *select, *needle;
    } refused[] = {{"tas", "lat=20:30", "no lat in that range (lat runs from -10 to 10)"},
                   {"tas", "lon=7", "lon has no value 7 (nearest: 5)"},
                   {"tas", "lev=850", "no variable read has a dimension 'lev'"},
                   {"tas", "time=0:5", "the time span is chosen with --from and --until"},
                   {"tas", "lat", "\"lat\" is not DIM=VALUE or DIM=FROM:TO"},
                   {"tos", NULL, "option --vars: there is no variable 'tos'"},
                   {"tas,tas", NULL, "variable 'tas' is listed twice"},
                   {"lat", NULL, "variable 'lat' does not run along the time axis 'time'"}};
    for (size_t k = 0; k < sizeof refused / sizeof refused[0]; k++) {
        o.vars = refused[k].vars;
        o.select = refused[k].select;
        st = slowscan_netcdf_open(path, &o, &r, &err);
        CHECK(st == SLOWSCAN_EINVAL && strstr(err.message, refused[k].needle) &&
                  strstr(err.message, "grid.nc: "),
              "refused: %s (got: %s)", refused[k].needle, err.message);
        if (st == SLOWSCAN_OK)
            slowscan_netcdf_close(r);
    }
}

/* Files that are not what they claim (common practice, no source). */
static void check_bad_files(void)
{
    netcdf_reader *r;
    io_error err;
    const char *text = check_tmp_path("not.nc");
    check_write_file(text, "time,x\n1,2\n");
    int st = slowscan_netcdf_open(text, NULL, &r, &err);
    CHECK(st == SLOWSCAN_EIO && strstr(err.message, "not.nc: cannot read it as NetCDF"),
          "a CSV is not NetCDF: %s", err.message);
    /* ncgen (netcdf-bin) from CDL: no time axis, and an unknown calendar */
    static const char *const cdl[][2] = {
        {"netcdf a { dimensions: x = 3 ; variables: float v(x) ; data: v = 1, 2, 3 ; }",
         "no time axis"},
        {"netcdf b { dimensions: time = 3 ; variables: double time(time) ; "
         "time:units = \"days since 2000-01-01\" ; time:calendar = \"lunar\" ; float v(time) ; "
         "data: time = 0, 1, 2 ; v = 1, 2, 3 ; }",
         "calendar = \"lunar\" is not a CF calendar"},
        {"netcdf c { dimensions: time = 3 ; variables: double time(time) ; "
         "time:units = \"days since 2000-01-01\" ; float v(time) ; "
         "data: time = 0, 2, 1 ; v = 1, 2, 3 ; }",
         "index 2: time 1 is not after the one before"}};
    for (size_t k = 0; k < sizeof cdl / sizeof cdl[0]; k++) {
        const char *cdl_path = check_tmp_path("bad.cdl"), *nc = check_tmp_path("bad.nc");
        check_write_file(cdl_path, cdl[k][0]);
        char cmd[1200];
        snprintf(cmd, sizeof cmd, "ncgen -o '%s' '%s'", nc, cdl_path);
        int made = check_run(cmd, NULL, NULL) == 0;
        st = made ? slowscan_netcdf_open(nc, NULL, &r, &err) : -99;
        CHECK(made && st == SLOWSCAN_EINVAL && strstr(err.message, cdl[k][1]),
              "ncgen file refused: %s (got %d: %s)", cdl[k][1], st, made ? err.message : "");
        if (st == SLOWSCAN_OK)
            slowscan_netcdf_close(r);
    }
}

/* The same cells as tables of at most five series, the all-missing one left out, each with
 * its grid position. */
static void check_tables(void)
{
    static double ref[VARS * CELLS * NT];
    const char *path = check_tmp_path("grid.nc");
    if (!make_grid(path, "NETCDF4", "map_chunks", ref))
        return;
    netcdf_reader *r;
    io_error err;
    int st = slowscan_netcdf_open(path, NULL, &r, &err);
    size_t tables = 0, series = 0, all_missing = 0, bad = 0, cell = 0;
    series_table t;
    while (st == SLOWSCAN_OK && (st = slowscan_netcdf_next_table(r, 5, &t, &all_missing, &err)) ==
                                    SLOWSCAN_OK) {
        tables++;
        for (size_t k = 0; k < t.nseries; k++, cell++) {
            if (cell == 7)
                cell++; /* tas[lat=0,lon=15], all missing */
            bad += check_max_diff(t.values[k], ref + cell * NT, NT) > 1e-9 * 300;
            /* each series' place: variable (tas, pr) and cell row-major over lat x lon */
            bad += !t.grid || t.grid[k].variable != cell / CELLS || t.grid[k].cell != cell % CELLS;
        }
        series += t.nseries;
        bad += t.n != NT || t.axis.unit != TIME_AXIS_MONTHS || t.rows != NULL;
        slowscan_series_table_free(&t);
    }
    CHECK(st == NETCDF_END && tables == 5 && series == 23 && all_missing == 1 && bad == 0,
          "tables of at most 5 cells: %zu tables, %zu series, %zu all missing, %zu bad (%s)",
          tables, series, all_missing, bad, err.message);
    if (r)
        slowscan_netcdf_close(r);
}

/* The command on the grid and on the same cells as a dated CSV (noleap, written by
 * python3-netcdf4 from what it reads): the same summary, byte for byte, at 2 threads. */
static void check_command_matches_csv(void)
{
    static double ref[VARS * CELLS * NT];
    const char *nc = check_tmp_path("cmd.nc"), *csv = check_tmp_path("cmd.csv");
    char args[1200];
    snprintf(args, sizeof args, "netcdf_grid.py %s NETCDF4 map_chunks %s", nc, csv);
    if (check_python(args, ref, VARS * CELLS * NT) != VARS * CELLS * NT) {
        CHECK(0, "python3-netcdf4 wrote the grid and its CSV");
        return;
    }
    char *grid_out = NULL, *grid_err = NULL, *csv_out = NULL, *csv_err = NULL;
    snprintf(args, sizeof args, "%s screen --surrogates 19 --seed 3 --threads 2 --window 12 "
             "--bandwidth 6 '%s'", check_binary(), nc);
    int a = check_run(args, &grid_out, &grid_err);
    snprintf(args, sizeof args, "%s screen --surrogates 19 --seed 3 --threads 2 --window 12 "
             "--bandwidth 6 --calendar noleap '%s'", check_binary(), csv);
    int b = check_run(args, &csv_out, &csv_err);
    CHECK(a == 0 && b == 0 && grid_out && csv_out && strcmp(grid_out, csv_out) == 0 &&
              strstr(grid_out, "\"tas[lat=10,lon=15]\",variance,"),
          "screen of the grid = screen of its cells as a noleap CSV (%d, %d): %.300s | %.300s",
          a, b, grid_err ? grid_err : "", csv_err ? csv_err : "");
    CHECK(grid_err && strstr(grid_err, "1 cell holds no value at all"),
          "the all-missing cell is counted once: %s", grid_err ? grid_err : "");
    free(grid_out), free(grid_err), free(csv_out), free(csv_err);
}

void suite_netcdf(void)
{
    check_command_matches_csv();
    check_tables();
    check_layout("NETCDF3_64BIT_OFFSET", "contiguous", 0);
    check_layout("NETCDF3_64BIT_OFFSET", "contiguous", 2 * 2 * NT * sizeof(double));
    check_layout("NETCDF4", "series_chunks", 5 * 2 * NT * sizeof(double));
    check_layout("NETCDF4", "map_chunks", 0);
    check_layout("NETCDF4", "map_chunks", 5 * 2 * NT * sizeof(double));
    check_select();
    check_bad_files();
}
