/* Suite maps: screen --maps FILE.nc on the test grid that Debian's python3-netcdf4 writes
 * (tests/reference/netcdf_grid.py: packed noleap tas and float pr on time x lat(3) x lon(4),
 * one all-missing cell). The maps are read back with python3-netcdf4
 * (tests/reference/netcdf_maps.py) and compared with the CSV summary of the same run, row
 * by row; ncdump (netcdf-bin) shows the header; refusals leave no file. */
#include "check.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

enum { NT = 30, CELLS = 12, VARS = 2 };

/* Each option is taken once, so a run that sets its own --surrogates goes without the 19. */
static const char OPTIONS[] = "--seed 3 --threads 2 --window 12 --bandwidth 6";

/* The grid in `format` (its reference values are not needed here). */
static int make_grid(const char *path, const char *format)
{
    static double ref[VARS * CELLS * NT];
    char args[1200];
    snprintf(args, sizeof args, "netcdf_grid.py %s %s map_chunks", path, format);
    return check_python(args, ref, VARS * CELLS * NT) == VARS * CELLS * NT;
}

/* What netcdf_maps.py says of the maps against the summary: rows, rows that differ, cells
 * without rows, of those not fill everywhere, then the dimension lengths. */
static int compare(const char *maps, const char *summary, double *said, size_t max)
{
    char args[1200];
    snprintf(args, sizeof args, "netcdf_maps.py '%s' '%s'", maps, summary);
    return check_python(args, said, max);
}

static char *run(const char *extra, const char *grid, const char *out, int *rc, char **err)
{
    char cmd[2000];
    snprintf(cmd, sizeof cmd, "%s screen %s %s %s -o '%s' '%s'", check_binary(),
             strstr(extra, "--surrogates") ? "" : "--surrogates 19", OPTIONS, extra, out, grid);
    char *stdout_text = NULL;
    *rc = check_run(cmd, &stdout_text, err);
    free(stdout_text);
    return check_read_file(out);
}

/* The whole grid: every row of the summary in the maps, the all-missing cell fill in every
 * map, the summary itself unchanged by --maps, the header clean and CF. */
static void check_whole_grid(const char *format, const char *kind)
{
    char grid[512], maps[512], with[512], without[512];
    snprintf(grid, sizeof grid, "%s", check_tmp_path("grid.nc"));
    snprintf(maps, sizeof maps, "%s", check_tmp_path("maps.nc"));
    snprintf(with, sizeof with, "%s", check_tmp_path("with.csv"));
    snprintf(without, sizeof without, "%s", check_tmp_path("without.csv"));
    if (!make_grid(grid, format)) {
        CHECK(0, "%s: python3-netcdf4 wrote the grid", format);
        return;
    }
    int a, b;
    char *err_a = NULL, *err_b = NULL, extra[600];
    snprintf(extra, sizeof extra, "--maps '%s'", maps);
    char *sum_with = run(extra, grid, with, &a, &err_a);
    char *sum_without = run("", grid, without, &b, &err_b);
    CHECK(a == 0 && b == 0 && sum_with && sum_without && strcmp(sum_with, sum_without) == 0,
          "%s: the summary is the same with and without --maps (%d, %d): %s", format, a, b,
          err_a ? err_a : "");
    double said[8] = {0};
    int n = compare(maps, with, said, 8);
    /* 23 cells with data (24 less the all-missing tas[lat=0,lon=15]) x 3 tests */
    CHECK(n == 6 && said[0] == 69 && said[1] == 0 && said[2] == 1 && said[3] == 0 &&
              said[4] == 3 && said[5] == 4,
          "%s: python3-netcdf4 reads the maps as the summary (rows %g, differ %g, empty cells "
          "%g, not fill %g, dims %g x %g)", format, said[0], said[1], said[2], said[3], said[4],
          said[5]);
    char cmd[1200], *header = NULL, *format_kind = NULL;
    snprintf(cmd, sizeof cmd, "ncdump -h '%s'", maps);
    int h = check_run(cmd, &header, NULL);
    snprintf(cmd, sizeof cmd, "ncdump -k '%s'", maps);
    int k = check_run(cmd, &format_kind, NULL);
    /* CF 1.9 sections 2.6.1 (Conventions, history, source), 3.5 (flags), 2.5.1 (_FillValue) */
    static const char *const want[] = {
        ":Conventions = \"CF-1.9\"", ":history = \"slowscan screen --surrogates 19",
        ":source = \"", "float tas_variance_statistic(lat, lon)",
        "tas_variance_statistic:long_name = \"Kendall tau of the rolling variance of tas",
        "tas_recovery_trend_statistic:long_name = \"t-value", "tas_lag1_p_value:units = \"1\"",
        "pr_variance_q_value:_FillValue = 9.96921e+36f", "byte pr_lag1_flag(lat, lon)",
        "pr_lag1_flag:flag_values = 0b, 1b, 2b, 3b, 4b",
        "pr_lag1_flag:flag_meanings = \"untested none rising falling insufficient\"",
        "double lat(lat)", "lat:units = \"degrees_north\"", "lon:units = \"degrees_east\""};
    size_t missing = 0;
    for (size_t j = 0; j < sizeof want / sizeof want[0]; j++)
        if (!header || !strstr(header, want[j]))
            CHECK(0, "%s: ncdump -h shows %s", format, want[j]), missing++;
    CHECK(h == 0 && missing == 0 && !strstr(header, "time =") && !strstr(header, "bounds"),
          "%s: ncdump -h reads a header without time or bounds (%zu missing)", format, missing);
    CHECK(k == 0 && format_kind && strncmp(format_kind, kind, strlen(kind)) == 0,
          "%s input gives a %s file (ncdump -k: %s)", format, kind, format_kind ? format_kind : "");
    CHECK(check_scratch_files("maps.nc.tmp") == 0, "%s: no temporary file left", format);
    free(sum_with), free(sum_without), free(err_a), free(err_b), free(header), free(format_kind);
    remove(maps);
}

/* One run on the NETCDF4 grid with `options` and --maps NAME.nc (summary NAME.csv): its exit
 * code and message, summary text, what netcdf_maps.py says of the maps against the summary
 * (n values in said), and the maps' header. 0: no grid to run on. */
typedef struct {
    int rc, n;
    double said[8];
    char *summary, *err, *header;
} maps_run;

static int run_maps(const char *options, const char *name, maps_run *r)
{
    char grid[512], maps[512], summary[512], file[64];
    snprintf(grid, sizeof grid, "%s", check_tmp_path("grid.nc"));
    snprintf(file, sizeof file, "%s.nc", name);
    snprintf(maps, sizeof maps, "%s", check_tmp_path(file));
    snprintf(file, sizeof file, "%s.csv", name);
    snprintf(summary, sizeof summary, "%s", check_tmp_path(file));
    *r = (maps_run){0};
    if (!make_grid(grid, "NETCDF4"))
        return 0;
    char extra[1200], cmd[1200];
    snprintf(extra, sizeof extra, "%s --maps '%s'", options, maps);
    r->summary = run(extra, grid, summary, &r->rc, &r->err);
    r->n = compare(maps, summary, r->said, 8);
    snprintf(cmd, sizeof cmd, "ncdump -h '%s'", maps);
    check_run(cmd, &r->header, NULL);
    return 1;
}

static void maps_run_free(maps_run *r)
{
    free(r->summary), free(r->err), free(r->header);
}

/* --vars and --select subset the maps' variables and dimensions; without surrogates p and q
 * are fill and every flag untested. */
static void check_subset(void)
{
    maps_run r;
    if (!run_maps("--vars tas --select lat=0:10,lon=5:15 --surrogates 0", "sub", &r))
        return;
    const double *said = r.said;
    /* lat 0, 10 x lon 5, 10, 15 of tas: 6 cells, tas[lat=0,lon=15] all missing */
    CHECK(r.rc == 0 && r.n == 6 && said[0] == 15 && said[1] == 0 && said[2] == 1 &&
              said[3] == 0 && said[4] == 2 && said[5] == 3,
          "--select lat=0:10,lon=5:15: maps of 2 x 3 cells equal the summary (rc %d, rows %g, "
          "differ %g, empty %g, not fill %g, dims %g x %g): %s", r.rc, said[0], said[1],
          said[2], said[3], said[4], said[5], r.err ? r.err : "");
    CHECK(r.header && !strstr(r.header, "pr_") && strstr(r.header, "tas_lag1_flag"),
          "--vars tas: only tas is mapped");
    maps_run_free(&r);
}

/* --surrogates auto with a budget too small to settle every test: the maps equal the summary,
 * 'undecided' included, which flag_values and flag_meanings then describe (CF 1.9 section
 * 3.5: every flag value has its meaning). */
static void check_undecided(void)
{
    maps_run r;
    if (!run_maps("--surrogates auto --budget 300", "auto", &r))
        return;
    CHECK(r.rc == 0 && r.summary && strstr(r.summary, ",undecided,") && r.n == 6 &&
              r.said[0] == 69 && r.said[1] == 0 && r.said[3] == 0,
          "--surrogates auto: the maps equal the summary, undecided included (rc %d, rows %g, "
          "differ %g): %s", r.rc, r.said[0], r.said[1], r.err ? r.err : "");
    CHECK(r.header && strstr(r.header, "tas_lag1_flag:flag_values = 0b, 1b, 2b, 3b, 4b, 5b") &&
              strstr(r.header, "flag_meanings = \"untested none rising falling insufficient "
                               "undecided\""),
          "--surrogates auto: flag_values and flag_meanings go on to undecided");
    maps_run_free(&r);
}

/* One message naming --maps, exit 1, and no file (nor temporary file) left. */
static void check_refused(const char *what, const char *args, const char *needle,
                          const char *target)
{
    char cmd[2000], *out = NULL, *err = NULL;
    snprintf(cmd, sizeof cmd, "%s screen --surrogates 19 %s %s", check_binary(), OPTIONS, args);
    int rc = check_run(cmd, &out, &err);
    size_t lines = 0;
    for (const char *c = err ? err : ""; *c; c++)
        lines += *c == '\n';
    struct stat st;
    int left = target && stat(target, &st) == 0 && !S_ISDIR(st.st_mode);
    CHECK(rc == 1 && lines == 1 && err && strstr(err, "option --maps") && strstr(err, needle) && !left &&
              check_scratch_files("maps.nc.tmp") == 0 && check_scratch_files("out.nc.tmp") == 0,
          "%s: refused naming --maps, nothing left (rc %d, %zu lines): %s", what, rc, lines,
          err ? err : "");
    free(out), free(err);
}

/* Bad places and inputs: common practice, no source. */
static void check_refusals(void)
{
    /* copied: check_tmp_path and check_run share a ring of 16 buffers */
    char grid[512], csv[512], dir[512], maps[512], other[512];
    snprintf(grid, sizeof grid, "%s", check_tmp_path("grid.nc"));
    snprintf(csv, sizeof csv, "%s", check_tmp_path("plain.csv"));
    snprintf(dir, sizeof dir, "%s", check_tmp_path("adir"));
    snprintf(maps, sizeof maps, "%s", check_tmp_path("out.nc"));
    snprintf(other, sizeof other, "%s", check_tmp_path("other.nc"));
    if (!make_grid(grid, "NETCDF4") || !make_grid(other, "NETCDF4"))
        return;
    check_write_file(csv, "t,x\n1,2\n2,3\n3,1\n4,5\n5,2\n6,4\n7,3\n8,6\n9,2\n10,5\n");
    mkdir(dir, 0700);
    char args[2000];
    snprintf(args, sizeof args, "--maps '%s' '%s'", dir, grid);
    check_refused("a directory", args, "is a directory", NULL);
    snprintf(args, sizeof args, "--maps '%s/no/such/out.nc' '%s'", dir, grid);
    check_refused("a missing folder", args, "No such file or directory", NULL);
    snprintf(args, sizeof args, "--maps - -o '%s.csv' '%s'", maps, grid);
    check_refused("standard output", args, "cannot be written to standard output", NULL);
    snprintf(args, sizeof args, "--maps '%s' '%s'", maps, csv);
    check_refused("a CSV input", args, "no input is a NetCDF grid", maps);
    snprintf(args, sizeof args, "--maps '%s' '%s' '%s'", maps, grid, other);
    check_refused("two grids", args, "hold 2 NetCDF grids", maps);
    snprintf(args, sizeof args, "--maps '%s' '%s'", grid, grid);
    check_refused("the input itself", args, "is an input file", NULL);
    snprintf(args, sizeof args, "--maps '%s' --select lat=20:30 '%s'", maps, grid);
    /* the grid refuses --select before the maps are opened: the message names the option */
    char cmd[2400], *err = NULL;
    snprintf(cmd, sizeof cmd, "%s screen --surrogates 19 %s %s", check_binary(), OPTIONS, args);
    int rc = check_run(cmd, NULL, &err);
    CHECK(rc == 1 && !check_file_exists(maps) && check_scratch_files("out.nc.tmp") == 0,
          "a bad --select leaves no maps: %s", err ? err : "");
    free(err);
    /* a run that fails after the maps are opened (a window longer than the span) */
    snprintf(cmd, sizeof cmd, "%s screen --surrogates 19 --window 500 --maps '%s' '%s'",
             check_binary(), maps, grid);
    err = NULL;
    rc = check_run(cmd, NULL, &err);
    CHECK(rc == 1 && !check_file_exists(maps) && check_scratch_files("out.nc.tmp") == 0,
          "a run that fails after opening the maps leaves none (rc %d): %s", rc, err ? err : "");
    free(err);
}

void suite_maps(void)
{
    check_whole_grid("NETCDF4", "netCDF-4");
    check_whole_grid("NETCDF3_64BIT_OFFSET", "64-bit offset");
    check_subset();
    check_undecided();
    check_refusals();
}
