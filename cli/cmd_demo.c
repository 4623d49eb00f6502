/* slowscan demo: writes the invented lake-station data set (data/README.md) as a CSV. */
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
    if (st != SLOWSCAN_OK) {
        remove(temp);
        cli_error("demo: %s could not be written (%s)", path, slowscan_strerror(st));
    } else {
        fprintf(stderr, "slowscan: wrote %s (%d x %d cells, %d monthly samples)\n", path,
                DEMO_GRID_LAT, DEMO_GRID_LON, DEMO_GRID_MONTHS);
    }
    free(temp);
    return st == SLOWSCAN_OK ? EXIT_OK : st == SLOWSCAN_ENUMERIC ? EXIT_INTERNAL : EXIT_BAD_INPUT;
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
    return rc == EXIT_OK ? write_grid(opts, dir) : rc;
}
