/* slowscan feedback: the two columns of a run taken from its table, annual means of monthly
 * records, and anomalies against a baseline (control) run, by the forced-run commands' shared
 * code (forced_inputs.c). */
#include "feedback_run.h"
#include "forced_inputs.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

/* --flux and --response of t (what: t as messages name it) as a table of their own. */
static int take_columns(const cli_options *o, const series_table *t, const char *option,
                        const char *what, series_table *out)
{
    size_t k[2];
    int rc = cli_forced_column(t, option, o->forced.flux, what, &k[0]);
    if (rc == EXIT_OK)
        rc = cli_forced_column(t, option, o->forced.response, what, &k[1]);
    return rc == EXIT_OK ? cli_forced_table(o, t, k, 2, what, out) : rc;
}

/* The run's arrays point into its table. */
static void point(cli_feedback_run *run)
{
    run->n = run->table.n;
    run->axis = run->table.axis;
    run->time = run->table.time;
    run->flux = run->table.values[0];
    run->response = run->table.values[1];
}

int cli_feedback_take(const cli_options *o, const series_table *t, cli_feedback_run *run)
{
    memset(run, 0, sizeof *run);
    run->source = cli_source_name(t->source);
    run->noise_ratio = o->feedback.noise_ratio;
    run->baseline_offset = NAN;
    char what[600];
    snprintf(what, sizeof what, "%s", run->source);
    int rc = take_columns(o, t, o->forced.flux ? "--flux" : "--response", what, &run->table);
    if (rc == EXIT_OK)
        point(run);
    return rc;
}

int cli_feedback_anomalies(const cli_options *o, const series_table *baseline,
                           cli_feedback_run *run)
{
    const double branch[2] = {run->branch_parent_day, run->branch_child_day};
    double offset = cli_forced_offset(o, &run->axis, run->has_branch ? branch : NULL);
    run->baseline_offset = offset;
    int rc = cli_forced_anomalies(o, baseline, offset, &run->table);
    if (rc != EXIT_OK || o->feedback.fit != FEEDBACK_TLS || !isnan(o->feedback.noise_ratio))
        return rc;
    series_table b;
    char what[600];
    snprintf(what, sizeof what, "the baseline run %s", o->forced.baseline);
    rc = take_columns(o, baseline, "--baseline", what, &b);
    if (rc != EXIT_OK)
        return rc;
    int st = slowscan_feedback_noise_ratio(b.time, b.values[0], b.values[1], b.n,
                                           run->time[0] + offset, run->time[run->n - 1] + offset,
                                           &run->noise_ratio);
    run->ratio_estimated = 1;
    if (st != SLOWSCAN_OK) {
        cli_error("option --fit tls: the noise ratio cannot be estimated from %s (%s); give "
                  "--noise-ratio", o->forced.baseline, slowscan_strerror(st));
        rc = EXIT_BAD_INPUT;
    }
    slowscan_series_table_free(&b);
    return rc;
}

void cli_feedback_run_free(cli_feedback_run *run)
{
    slowscan_series_table_free(&run->table);
    run->time = run->flux = run->response = NULL;
}
