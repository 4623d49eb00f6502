/* slowscan screen: the row and run state shared by cmd_screen.c, screen_json.c and
 * cli_screen_figures.c. */
#ifndef SLOWSCAN_CLI_SCREEN_H
#define SLOWSCAN_CLI_SCREEN_H

#include "cli.h"

typedef struct {
    char *series;
    size_t n;
    double window, bandwidth, q_value;
    screen_test result; /* kind, tau, p, the null's quantiles */
    screen_flag flag;
    int harmonics; /* the cycle removed: -1 none, 0 the mean cycle, K harmonics */
    detrend_leakage leakage; /* the series' trend-leakage test (valid when leakage_tested) */
    int leakage_tested;
} screen_row;

typedef struct {
    FILE *out, *rolling;
    screen_row *rows;
    size_t nrows, cap;
    screen_config cfg;
    FILE *json;
    report_batch *figures; /* --figures DIR */
    size_t figure_series;  /* series drawn so far (rows of series s start at s x tests) */
} screen_run;

/* Writes the run as JSON: every parameter needed to reproduce it, then the rows. */
void cli_screen_json(FILE *fp, const cli_options *opts, const screen_run *run);

/* screen --figures (screen_figures.c): after the q-values, one figure per series (its tests'
 * nulls summarised by the quantiles of the rows, so memory stays bounded for many series)
 * and the overview. */
int cli_screen_figures(const cli_options *opts, const cli_inputs *in, void *context);

#endif
