/* The shared run of timescales and emulate: the response column(s) read through the input
 * machinery, measured from the onset of the step, checked, and handed to the command. */
#ifndef SLOWSCAN_CLI_MODES_RUN_H
#define SLOWSCAN_CLI_MODES_RUN_H

#include "cli.h"
#include "slowscan/timescales.h"
#include "slowscan/emulate.h"

/* One response (and, --joint, its flux) ready to fit: samples from the onset on (and from
 * --skip after it). Arrays valid during the visit. */
typedef struct {
    const char *source, *name, *flux_name, *time_name;
    size_t n;
    const double *t;    /* time since the onset */
    const double *time; /* the same samples' own times */
    const double *y, *flux; /* flux NULL without --joint */
    double onset, dt;
    const time_axis *axis;
    const char *member; /* --ensemble: the member suffix or "mean" (NULL: no ensemble) */
} modes_series;

typedef int (*modes_visitor)(const cli_options *opts, const modes_series *s, void *context);

/* Reads the inputs (the --response column, with --flux, or every column), opens the outputs
 * with `open`, visits each response, finishes, then commits or removes every output. */
int cli_modes_run(const cli_options *opts,
                  int (*open)(const cli_options *, cli_outputs *, void *),
                  modes_visitor visit, int (*finish)(const cli_options *, void *),
                  void *context);

/* Column k of table t (and flux column f, or (size_t)-1) as a modes_series in *s: the samples
 * slowscan_timescales_select chooses, their times since the onset in *owned (free() it), the
 * rest borrowed from t (keep t while s is used). Refusals (a missing value, too few samples
 * after --skip) printed. */
int cli_modes_series(const cli_options *opts, const series_table *t, size_t k, size_t f,
                     modes_series *s, double **owned);

/* Column k (and f, or (size_t)-1) of t as a table of their own in *out (owned; free with
 * slowscan_series_table_free): annual means with --annual, anomalies against the baseline
 * run when given (NULL: none). An exit code (message printed). */
int cli_modes_ready(const cli_options *opts, const series_table *t, size_t k, size_t f,
                    const series_table *baseline, series_table *out);

/* The column `name` of t, or a refusal naming the option, the file and its columns. */
int cli_modes_column(const series_table *t, const char *option, const char *name, size_t *k);

/* Reads the CSV of a FILE:COL option (or the input file's column) like an input (--time,
 * the grid; --from/--until when `cut`); *k is the column's index. An exit code (message
 * printed). */
int cli_modes_read_ref(const cli_options *opts, const cli_series_ref *ref, const char *option,
                       int cut, series_table *table, size_t *k);

/* The message of a library refusal of series s; the exit code. */
int cli_modes_refuse(const cli_options *opts, const modes_series *s, int status);

/* "unresolved", "multiscale", both joined by ';', or "none". */
void cli_modes_flag_names(unsigned flags, char *buf, size_t size);

/* A verdict line on stderr, "slowscan: COMMAND: ...", silenced by --quiet. */
void cli_modes_say(const cli_options *opts, const char *fmt, ...) __attribute__((format(printf, 2, 3)));

/* timescales --figures: the modes over the data and the residuals. */
int cli_timescales_figure(report_batch *figures, const modes_series *s, const timescales_result *r);

/* emulate --figures: actual and emulated response, the noise band (lower, upper: from
 * slowscan_emulate_band), the departure. */
int cli_emulate_figure(report_batch *figures, const cli_options *opts, const modes_series *s,
                       const double *time, const double *emulated, const double *actual,
                       const double *lower, const double *upper, size_t n,
                       const emulate_departure *dep);

#endif
