/* slowscan screen: the row and run state shared by cmd_screen.c and screen_json.c. */
#ifndef SLOWSCAN_CLI_SCREEN_H
#define SLOWSCAN_CLI_SCREEN_H

#include "cli.h"
#include "slowscan/kendall.h"

/* Quantiles of the null distribution reported in --json. */
enum { SCREEN_QUANTILES = 5 };
extern const double screen_quantile_levels[SCREEN_QUANTILES];

typedef struct {
    char *series;
    indicator_kind indicator;
    size_t n;
    double window, bandwidth, tau, p_value, q_value;
    const char *flag;
    size_t null_used;                       /* finite null values behind p */
    double quantile[SCREEN_QUANTILES];      /* of the null tau distribution */
} screen_row;

typedef struct {
    FILE *out, *rolling;
    screen_row *rows;
    size_t nrows, cap;
    kendall_workspace *kendall;
    size_t kendall_n;
    /* significance: made once per series length and reused (plan once, draw many) */
    surrogate_plan *plan;
    null_trend_workspace *null_ws[CLI_MAX_THREADS]; /* one per thread */
    size_t null_n, nthreads;
    double *null; /* nindicators x surrogates */
    double *sorted; /* surrogates: scratch for the quantiles */
    FILE *json;
} screen_run;

/* Writes the run as JSON: every parameter needed to reproduce it, then the rows. */
void screen_write_json(FILE *fp, const cli_options *opts, const screen_run *run);

#endif
