/* slowscan demo: writes the invented data sets of data/README.md: the lake stations (CSV),
 * the coastal shelf (NetCDF) and the forced runs of the two-layer model (one CSV each). */
#include "cli.h"
#include "slowscan/demo.h"
#include "slowscan/status.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static int write_demo(FILE *fp, const double *time, double *const *values, size_t nst)
{
    fputs("day", fp);
    for (size_t k = 0; k < nst; k++)
        fprintf(fp, ",%s", slowscan_demo_station_get(k)->name);
    fputc('\n', fp);
    for (size_t i = 0; i < DEMO_SAMPLES; i++) {
        fprintf(fp, "%.0f", time[i]);
        for (size_t k = 0; k < nst; k++)
            fprintf(fp, ",%.4f", values[k][i]);
        fputc('\n', fp);
    }
    return EXIT_OK;
}

/* The gridded demo, written beside its target and renamed into place. */
static int write_grid(const cli_options *opts, const char *dir)
{
    char path[4096];
    snprintf(path, sizeof path, "%s/shelf.nc", dir);
    char *temp = slowscan_atomic_temp_beside(path);
    if (!temp) {
        cli_error("option --out: cannot write in %s", dir);
        return EXIT_BAD_INPUT;
    }
    int st = slowscan_demo_grid_write(opts->seed, temp);
    if (st == SLOWSCAN_OK && rename(temp, path) != 0)
        st = SLOWSCAN_EIO;
    if (st != SLOWSCAN_OK)
        remove(temp);
    slowscan_atomic_temp_done(temp);
    if (st != SLOWSCAN_OK) {
        cli_error("demo: %s could not be written (%s)", path, slowscan_strerror(st));
    } else {
        fprintf(stderr, "slowscan: wrote %s (%d x %d cells, %d monthly samples)\n", path,
                DEMO_GRID_LAT, DEMO_GRID_LON, DEMO_GRID_MONTHS);
    }
    free(temp);
    return st == SLOWSCAN_OK ? EXIT_OK : st == SLOWSCAN_ENUMERIC ? EXIT_INTERNAL : EXIT_BAD_INPUT;
}

/* Columns of one forced experiment: year, its forcing (not for a control), then net_flux and
 * tas, or for an ensemble tas.mNN of every member and then net_flux.mNN. */
static void write_forced_header(FILE *fp, const demo_experiment *e)
{
    fputs(e->kind == DEMO_FORCING_NONE ? "year" : "year,forcing", fp);
    if (e->members == 1) {
        fputs(",net_flux,tas\n", fp);
        return;
    }
    for (size_t m = 0; m < e->members; m++)
        fprintf(fp, ",tas.m%02zu", m + 1);
    for (size_t m = 0; m < e->members; m++)
        fprintf(fp, ",net_flux.m%02zu", m + 1);
    fputc('\n', fp);
}

/* columns[0] year, [1] forcing, then per member its net flux and tas (2 + 2m, 3 + 2m). */
static void write_forced_rows(FILE *fp, const demo_experiment *e, double *const *columns)
{
    write_forced_header(fp, e);
    for (size_t i = 0; i < e->years; i++) {
        fprintf(fp, "%.0f", columns[0][i]);
        if (e->kind != DEMO_FORCING_NONE)
            fprintf(fp, ",%.4f", columns[1][i]);
        if (e->members == 1) {
            fprintf(fp, ",%.4f,%.4f\n", columns[2][i], columns[3][i]);
            continue;
        }
        for (size_t m = 0; m < e->members; m++)
            fprintf(fp, ",%.4f", columns[3 + 2 * m][i]);
        for (size_t m = 0; m < e->members; m++)
            fprintf(fp, ",%.4f", columns[2 + 2 * m][i]);
        fputc('\n', fp);
    }
}

enum { MAX_FORCED_COLUMNS = 2 + 2 * 16 };

/* One experiment as data/forced-NAME.csv. */
static int write_forced(const cli_options *opts, const char *dir, const demo_experiment *e)
{
    size_t ncolumns = 2 + 2 * e->members;
    double *store = ncolumns <= MAX_FORCED_COLUMNS ? malloc(ncolumns * e->years * sizeof *store) : NULL;
    if (!store) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    double *columns[MAX_FORCED_COLUMNS];
    for (size_t c = 0; c < ncolumns; c++)
        columns[c] = store + c * e->years;
    int rc = EXIT_OK;
    for (size_t m = 0; m < e->members && rc == EXIT_OK; m++)
        if (slowscan_demo_forced_run(opts->seed, e, m, columns[0], columns[1], columns[2 + 2 * m],
                                     columns[3 + 2 * m]) != SLOWSCAN_OK) {
            cli_error("demo: the forced run '%s' failed (seed %lu); try another --seed", e->name,
                      opts->seed);
            rc = EXIT_INTERNAL;
        }
    char path[4096];
    snprintf(path, sizeof path, "%s/forced-%s.csv", dir, e->name);
    cli_outputs outs = {0};
    FILE *fp = NULL;
    if (rc == EXIT_OK)
        rc = cli_outputs_open(&outs, opts, path, "--out", &fp);
    if (rc == EXIT_OK) {
        write_forced_rows(fp, e, columns);
        rc = cli_outputs_commit(&outs);
    } else {
        cli_outputs_abort(&outs);
    }
    if (rc == EXIT_OK)
        fprintf(stderr, "slowscan: wrote %s (%zu annual samples, %zu member%s)\n", path, e->years,
                e->members, e->members == 1 ? "" : "s");
    free(store);
    return rc;
}

static int write_forced_runs(const cli_options *opts, const char *dir)
{
    int rc = EXIT_OK;
    for (size_t k = 0; k < slowscan_demo_experiment_count() && rc == EXIT_OK; k++)
        rc = write_forced(opts, dir, slowscan_demo_experiment_get(k));
    return rc;
}

int cmd_demo(const cli_options *opts)
{
    const char *dir = opts->out_dir ? opts->out_dir : "data";
    size_t nst = slowscan_demo_station_count();
    double *time = malloc(DEMO_SAMPLES * sizeof *time);
    double *store = malloc(nst * DEMO_SAMPLES * sizeof *store);
    double *values[16];
    if (!time || !store || nst > 16) {
        free(time);
        free(store);
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    for (size_t k = 0; k < nst; k++)
        values[k] = store + k * DEMO_SAMPLES;
    int rc = EXIT_OK;
    if (slowscan_demo_generate(opts->seed, DEMO_SAMPLES, time, values) != SLOWSCAN_OK) {
        cli_error("demo: a simulated station left its stable state (seed %lu); try another --seed",
                  opts->seed);
        rc = EXIT_INTERNAL;
    }
    char path[4096];
    snprintf(path, sizeof path, "%s/stations.csv", dir);
    cli_outputs outs = {0};
    FILE *fp = NULL;
    if (rc == EXIT_OK)
        rc = cli_outputs_open(&outs, opts, path, "--out", &fp);
    if (rc == EXIT_OK)
        rc = write_demo(fp, time, values, nst);
    if (rc == EXIT_OK)
        rc = cli_outputs_commit(&outs);
    else
        cli_outputs_abort(&outs);
    if (rc == EXIT_OK)
        fprintf(stderr, "slowscan: wrote %s (%zu stations, %d weekly samples)\n", path, nst,
                DEMO_SAMPLES);
    free(time);
    free(store);
    if (rc == EXIT_OK)
        rc = write_grid(opts, dir);
    return rc == EXIT_OK ? write_forced_runs(opts, dir) : rc;
}
