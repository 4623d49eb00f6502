/* slowscan screen: the row and run state shared by cmd_screen.c and screen_json.c. */
#ifndef SLOWSCAN_CLI_SCREEN_H
#define SLOWSCAN_CLI_SCREEN_H

#include "cli.h"
#include "trend_test.h"

typedef struct {
    char *series;
    const char *label; /* the indicator's name, or "recovery_trend" */
    size_t n;
    double window, bandwidth, q_value;
    trend_result result; /* tau, p, the null's quantiles */
    const char *flag;
} screen_row;

typedef struct {
    FILE *out, *rolling;
    screen_row *rows;
    size_t nrows, cap;
    trend_tester tester;
    FILE *json;
} screen_run;

/* Writes the run as JSON: every parameter needed to reproduce it, then the rows. */
void screen_write_json(FILE *fp, const cli_options *opts, const screen_run *run);

#endif
