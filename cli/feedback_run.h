/* slowscan feedback: one run (an input file) made ready for the regression: its two columns
 * taken from the table, annual means, anomalies against the baseline run. */
#ifndef SLOWSCAN_CLI_FEEDBACK_RUN_H
#define SLOWSCAN_CLI_FEEDBACK_RUN_H

#include "cli.h"

typedef struct {
    const char *source; /* as messages name it */
    const char *member; /* --ensemble: the member suffix or "mean"; NULL: no ensemble */
    time_axis axis;
    size_t n;
    series_table table;             /* the two columns (cli_forced_table), owned */
    double *time, *flux, *response; /* its time and columns */
    double noise_ratio; /* --noise-ratio, or estimated from the baseline run (TLS) */
    int ratio_estimated;
    int has_branch;     /* a NetCDF run's CF branch times, day numbers of its calendar */
    double branch_parent_day, branch_child_day;
    double baseline_offset; /* the baseline's time at the run's time 0 (as used) */
} cli_feedback_run;

/* The run's columns (--flux, --response) of table t, as annual means with --annual. */
int cli_feedback_take(const cli_options *o, const series_table *t, cli_feedback_run *run);
/* With --baseline: anomalies of both columns against the baseline table over the same
 * period, and the noise ratio from it when TLS needs one. */
int cli_feedback_anomalies(const cli_options *o, const series_table *baseline,
                           cli_feedback_run *run);
void cli_feedback_run_free(cli_feedback_run *run);

/* feedback_grid.c: --area-mean over a NetCDF grid: a table of two columns (--flux and
 * --response, each the area-weighted mean over its cells) handed to `visit` (which may take
 * it over, leaving it zeroed), with the file's CF branch times (branch[0] 1 when found, then
 * the parent's and the child's day numbers). */
typedef int (*cli_feedback_visit)(void *context, series_table *t, const double *branch);
int cli_feedback_grid(const cli_options *o, const char *path, cli_feedback_visit visit,
                      void *context);

/* feedback_figure.c: the figure of a run (--figures). */
int cli_feedback_figure(report_batch *figures, const cli_options *o, const cli_feedback_run *r,
                        const feedback_window *w, size_t count, const char *verdict);

#endif
