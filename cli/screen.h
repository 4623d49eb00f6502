/* slowscan screen: the row and run state shared by cmd_screen.c and screen_json.c. */
#ifndef SLOWSCAN_CLI_SCREEN_H
#define SLOWSCAN_CLI_SCREEN_H

#include "cli.h"
#include "trend_test.h"

#include <gsl/gsl_histogram.h>

typedef struct {
    char *series;
    const char *label; /* the indicator's name, or "recovery_trend" */
    size_t n;
    double window, bandwidth, q_value;
    trend_result result; /* tau, p, the null's quantiles */
    const char *flag;
    int harmonics; /* the cycle removed: -1 none, 0 the mean cycle, K harmonics */
    detrend_leakage leakage; /* the series' trend-leakage test (valid when leakage_tested) */
    int leakage_tested;
    gsl_histogram *null_hist; /* with --figures: the null distribution, binned; else NULL */
} screen_row;

typedef struct {
    FILE *out, *rolling;
    screen_row *rows;
    size_t nrows, cap;
    trend_tester tester;
    FILE *json;
    report_batch *figures; /* --figures DIR */
    size_t figure_series;  /* series drawn so far (rows of series s start at s x tests) */
} screen_run;

/* Writes the run as JSON: every parameter needed to reproduce it, then the rows. */
void screen_write_json(FILE *fp, const cli_options *opts, const screen_run *run);

/* screen --figures (screen_figures.c): the null of one row, kept binned (a few hundred bytes
 * a row, so memory stays bounded for many series); then, after the q-values, one figure per
 * series and the overview. */
int screen_keep_null(screen_row *row, const double *null, size_t m);
int screen_figures(const cli_options *opts, const cli_inputs *in, void *context);

#endif
