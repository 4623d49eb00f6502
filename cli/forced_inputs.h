/* The inputs of the forced-run commands (feedback, timescales, emulate) made ready the same
 * way: their shared options' setter and checks, the chosen columns of a run as a table of
 * their own (annual means with --annual), anomalies against the baseline run (--baseline,
 * --baseline-mode, --baseline-offset), and lengths such as --skip on a run's axis. */
#ifndef SLOWSCAN_CLI_FORCED_INPUTS_H
#define SLOWSCAN_CLI_FORCED_INPUTS_H

#include "cli.h"

/* The setter of the shared rows of options.c's table; the checks between them. */
int cli_forced_set(cli_options *o, const char *name, const char *value);
void cli_forced_defaults(cli_options *o);
/* v is a or b: *out 0 or 1; else a refusal naming option n. */
int cli_forced_choice(const char *n, const char *v, const char *a, const char *b, int *out);
int cli_forced_check(const cli_options *o);

/* The refusal of a length option (`text` as written) that has no meaning on `axis`; the
 * exit code. */
int cli_forced_unmeasurable(const char *option, const char *text, const time_axis *axis);

/* A length option as the library's requests hold it: amount NaN when not given (text NULL). */
screen_length cli_forced_request(double amount, int percent, int unit, const char *text);

/* The index of column `name` of t, or a refusal naming the option and `what` (the file). */
int cli_forced_column(const series_table *t, const char *option, const char *name,
                      const char *what, size_t *k);

/* Columns cols[0..ncols) of t as a table of their own in *out (owned: free with
 * slowscan_series_table_free), as annual means by month length with --annual. `what` names t
 * in messages. */
int cli_forced_table(const cli_options *o, const series_table *t, const size_t *cols,
                     size_t ncols, const char *what, series_table *out);

/* The baseline's time at the run's time 0: --baseline-offset, else the CF branch times of a
 * NetCDF run (branch: NULL, or {parent day, child day}), else 0. */
double cli_forced_offset(const cli_options *o, const time_axis *axis, const double *branch);

/* Every column of t (a table made by cli_forced_table) minus the baseline's column of the same
 * name over t's period (shifted by offset), by --baseline-mode. Refuses (exit 1, naming
 * --baseline) a baseline without the column, or one that does not cover the period. */
int cli_forced_anomalies(const cli_options *o, const series_table *baseline, double offset,
                         series_table *t);

/* With --baseline FILE (a CSV run): read it whole into *baseline (*loaded 1); refuses a path
 * that is also an output. */
int cli_forced_load_baseline(const cli_options *o, const cli_outputs *outs,
                             series_table *baseline, int *loaded);

#endif

/* --ensemble in feedback and timescales (forced_ensemble.c): one member of an ensemble of
 * runs in one table, or their mean. */
typedef struct {
    const char *member;       /* the member suffix, or "mean" */
    const char *column;       /* the response column as the table names it (tas.m01), or
                                 NAME[mean] */
    series_table table;       /* the response (named as --response), then the flux when
                                 paired (named as --flux): what a single run would hold */
} cli_forced_member;

typedef int (*cli_forced_member_visit)(void *context, const cli_forced_member *m);

/* Groups the columns of t into ensembles (screen's --ensemble/--members rules), takes the
 * ensemble `response` (and `flux`, NULL: none, its members paired by suffix), gives the
 * split warning on the response's members, then visits each member in turn and their mean
 * (the mean of the members' response, and of their flux). An exit code (message printed). */
int cli_forced_ensemble(const cli_options *o, const series_table *t, const char *response,
                        const char *flux, cli_forced_member_visit visit, void *context);
