/* A program outside the project using libslowscan through its installed headers and
 * `pkg-config --cflags --libs slowscan` alone (tests/test_library.c builds and runs it).
 *
 * usage: screen_one FILE.csv
 * For the first series of FILE: the default detrending of `slowscan screen` (gaussian-linear,
 * bandwidth 10% of the span), rolling lag-1 autocorrelation in trailing windows of 50% of the
 * record, and Kendall's tau of it against time — printed with 12 significant digits, as screen
 * prints its statistic column. Exit 1 with a message on any failure. */
#include <slowscan.h>

#include <math.h>
#include <stdio.h>
#include <stdlib.h>

/* tau of series 0 of a table on a regular grid of step dt. */
static int lag1_tau(const series_table *table, double dt, double *tau)
{
    size_t n = table->n;
    double span = table->time[n - 1] - table->time[0];
    /* DESIGN §3: bandwidth 10% of the span; W = round(p/100 (n-1)) + 1 for p = 50. */
    detrend_spec detrend = {DETREND_GAUSSIAN_LINEAR, 0.10 * span, 0};
    rolling_spec rolling = {.window = (size_t)floor(0.5 * (double)(n - 1) + 0.5) + 1,
                            .min_coverage = 0.8, .dt = dt, .recovery = RECOVERY_LOG_AR1};
    indicator_kind lag1 = INDICATOR_LAG1;
    double *residual = malloc(n * sizeof *residual), *path = malloc(n * sizeof *path);
    kendall_workspace *kendall = slowscan_kendall_alloc(n);
    int st = residual && path && kendall ? SLOWSCAN_OK : SLOWSCAN_ENOMEM;
    if (st == SLOWSCAN_OK)
        st = slowscan_detrend_apply(&detrend, dt, table->values[0], n, NULL, residual);
    if (st == SLOWSCAN_OK)
        st = slowscan_rolling_compute(&rolling, residual, NULL, n, &lag1, 1, &path);
    if (st == SLOWSCAN_OK)
        st = slowscan_kendall_tau_b(kendall, table->time, path, n, tau, NULL);
    slowscan_kendall_free(kendall);
    free(path);
    free(residual);
    return st;
}

int main(int argc, char **argv)
{
    if (argc != 2) {
        fprintf(stderr, "usage: screen_one FILE.csv\n");
        return 1;
    }
    series_table table;
    io_error err;
    csv_read_options options = slowscan_csv_read_options_default();
    double dt, tau;
    if (slowscan_csv_read_table(argv[1], &options, &table, &err) != SLOWSCAN_OK) {
        fprintf(stderr, "screen_one: %s\n", err.message);
        return 1;
    }
    int st = slowscan_table_check_grid(&table, &dt, &err);
    if (st != SLOWSCAN_OK)
        fprintf(stderr, "screen_one: %s\n", err.message);
    else if ((st = lag1_tau(&table, dt, &tau)) != SLOWSCAN_OK)
        fprintf(stderr, "screen_one: %s: %s\n", argv[1], slowscan_strerror(st));
    else
        printf("%.12g\n", tau);
    slowscan_series_table_free(&table);
    return st == SLOWSCAN_OK ? 0 : 1;
}
