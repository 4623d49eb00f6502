/* slowscan command line: shared declarations of the cli/ files. */
#ifndef SLOWSCAN_CLI_H
#define SLOWSCAN_CLI_H

#include "slowscan/detrend.h"
#include "slowscan/indicators.h"
#include "slowscan/io.h"
#include "slowscan/netcdf_input.h"
#include "slowscan/netcdf_maps.h"
#include "slowscan/null_trend.h"
#include "slowscan/report.h"
#include "slowscan/screen.h"
#include "slowscan/surrogates.h"
#include "feedback.h"
#include "slowscan/timescales.h"
#include "modes.h"

#include <stddef.h>
#include <stdio.h>

/* Exit codes (DESIGN §4). */
enum { EXIT_OK = 0, EXIT_BAD_INPUT = 1, EXIT_INTERNAL = 2 };

/* A length given as "N%" of the span or as a bare number of time units. */
typedef struct {
    double amount;
    int percent;
    const char *text; /* as the user wrote it, for messages */
    length_unit unit; /* a calendar unit (30y, 6mon, 10d), else the axis' own */
} cli_length;

/* The suffix that writes a length's unit ("%", "y", "mon", "d", or none). */
const char *cli_length_suffix(int percent, length_unit unit);

/* A list of lengths for robustness grids: "A:B:STEP" or "A,B,C" (all in % or all in time units). */
enum { CLI_MAX_GRID = 64 };
/* Detrending methods of one robustness grid (--detrends). */
enum { CLI_MAX_DETRENDS = 8 };

/* screen --ensemble, --members, --member-anomalies (screen_ensemble.c). */
typedef struct {
    int on;                   /* --ensemble, or implied by the other two */
    const char *members_text; /* --members A,B,C as given, NULL: any NAME.MEMBER */
    int anomalies;            /* --member-anomalies: members minus the ensemble mean */
} cli_ensemble_options;

/* screen --tail gpd (screen_tail.c). */
typedef struct {
    int method;       /* tail_method: TAIL_OFF unless given */
    const char *text; /* as given, NULL: not given */
} cli_tail_options;

typedef struct {
    const char *command;
    /* input */
    const char *time_column, *vars;
    const char *select; /* --select DIM=A:B,... for NetCDF inputs */
    double from, until, resample; /* NaN: not given (from/until: or given as a date) */
    const char *from_text, *until_text; /* --from/--until as written (dates, ages) */
    double max_gap;          /* --max-gap: steps --resample may bridge; NaN: 2 original steps */
    calendar_kind calendar;  /* --calendar (standard) */
    int calendar_given;
    const char *time_format; /* --time-format, NULL: numbers or ISO 8601 dates */
    const char *time_units;  /* --time-units "UNIT since DATE", NULL: numbers as they are */
    int age;                 /* --age: the time column counts back (before present) */
    double missing[16];      /* --missing codes */
    size_t nmissing;
    int log_values;
    /* detrending */
    detrend_spec detrend;
    const char *detrend_text;
    cli_length bandwidth;
    double deseason; /* NaN: not given */
    cli_length deseason_window; /* --deseason-window LEN; text NULL: not given (whole record) */
    long harmonics;  /* --harmonics K; 0: not given (mean cycle, or 3 for a non-whole period) */
    /* indicators */
    cli_length window;
    indicator_kind indicators[INDICATOR_COUNT];
    size_t nindicators;
    const char *indicators_text;
    double min_coverage;
    recovery_method recovery;
    long step;              /* --step K; 0: the default per indicator (slowscan_rolling_step) */
    double band_lo, band_hi; /* --band LO:HI for spectral_exponent; both 0: all frequencies */
    const char *band_text;
    int drift_test; /* screen: the model-based "recovery_trend" test (ar1_drift.h) */
    int noise_trend; /* --noise-trend: its innovation variance may drift linearly too */
    const char *projection_output; /* recovery --project FILE: crossing of lambda = 0 */
    long projection_draws;         /* --project-draws: residual-bootstrap draws (>= 500) */
    /* significance (screen) */
    long surrogates;
    int null_model;  /* surrogate_kind */
    int use_control; /* --null control: phase surrogates of the control run */
    const char *control_file;
    surrogate_options null_options;
    double fdr;
    int alternative; /* significance_alternative, -1: the indicator's own direction */
    int surrogates_auto;  /* screen --surrogates auto: sequential tests (sequential.h) */
    long budget;          /* --budget N: surrogates of the whole run; 0: 200 per test */
    long max_per_series;  /* --max-per-series K: 100000 */
    double risk;          /* --risk E: resampling risk per test (or joint), 1e-3 */
    int risk_joint;       /* --risk-joint: E for all tests together */
    /* outputs */
    const char *output, *rolling_output, *json_output, *fractions_output;
    const char *maps_output; /* screen --maps FILE.nc */
    /* robustness grid */
    cli_length windows[CLI_MAX_GRID], bandwidths[CLI_MAX_GRID];
    size_t nwindows, nbandwidths;
    char grid_text[2][CLI_MAX_GRID][32];
    detrend_spec detrends[CLI_MAX_DETRENDS]; /* --detrends; none given: the single --detrend */
    char detrend_labels[CLI_MAX_DETRENDS][32]; /* each method as written, for outputs */
    size_t ndetrends;
    const char *figures_dir;          /* --figures DIR, NULL: no figures */
    const char *figure_format_text;   /* --figure-format as given, NULL: not given */
    report_format figure_format;      /* png unless --figure-format says otherwise */
    const char *format; /* "csv" or "table" */
    int progress;       /* -1: auto (stderr is a TTY) */
    int quiet;          /* --quiet: no warnings (errors still) */
    const char *out_dir; /* demo */
    int repeat_walk;     /* a second walk over the inputs (figures): its notices were given */
    int resume;          /* screen --resume: journal finished series, take them back on rerun */
    unsigned long seed;
    long threads;
    /* positional */
    const char **files;
    size_t nfiles;
    /* the command line as given (the history of NetCDF outputs) */
    int argc;
    char **argv;
    cli_ensemble_options ensemble;
    cli_feedback_options feedback; /* slowscan feedback (cli/feedback.h) */
    cli_forced_options forced; /* shared by feedback, timescales, emulate (forced.h) */
    cli_modes_options modes; /* timescales, emulate (modes.h) */
    cli_tail_options tail;   /* screen --tail */
} cli_options;

/* screen --tail METHOD (screen_tail.c), and its help. */
extern const char cli_tail_help[];
int cli_set_tail(cli_options *o, const char *name, const char *value);

/* The null model's name in outputs and random streams ("control" with --null control). */
const char *cli_null_name(const cli_options *opts);

/* Prints "slowscan: MESSAGE" on stderr. */
void cli_error(const char *fmt, ...) __attribute__((format(printf, 1, 2)));
void cli_warning(const char *fmt, ...) __attribute__((format(printf, 1, 2)));

/* Parses argv[first..argc) for `command`; returns EXIT_OK, EXIT_BAD_INPUT (message printed),
 * or -1 when help was printed. */
int cli_parse(const char *command, int argc, char **argv, int first, cli_options *opts);
void cli_options_free(cli_options *opts);

/* Help texts. */
int cli_help(const char *topic, FILE *out);

/* One series prepared for analysis: cut, resampled, logged, deseasoned and detrended
 * (slowscan_screen_prepare; its source is the file as messages name it). */
typedef screen_prepared prepared_series;

/* The defaults of `command` that decide numbers, from slowscan_screen_config_default() (clears o). */
void cli_science_defaults(const char *command, cli_options *o);
/* The options as the screening library's configuration (screen.h). */
void cli_screen_config(const cli_options *opts, screen_config *cfg);
/* Prints the message of a library refusal (the same words whichever command meets it) and
 * returns the exit code. */
int cli_screen_refuse(const cli_options *opts, const prepared_series *ps, const screen_detail *d);
/* Prints one warning of a screened series. */
/* A refusal that skips only this series (SCREEN_RULE_NULL_TOO_LITTLE), printed as a warning. */
void cli_screen_notice(const cli_options *o, const prepared_series *ps, const screen_detail *d);
void cli_screen_warn(const cli_options *opts, const prepared_series *ps, const screen_warning *w);
/* Prints the warning of a test without a statistic (flagged insufficient). */
void cli_screen_insufficient(const prepared_series *ps, const screen_test *test);
/* Prints the warning of a series left without a trend (constant, too few samples, round-off
 * residual), if it is one. */
void cli_screen_detrended(const prepared_series *ps);

/* The inputs of a run: every CSV table read and made ready (span, grid, log); a NetCDF grid
 * is only checked here (its cells are read a table at a time by a cli_cursor). */
typedef struct {
    series_table *tables; /* one per input; zeroed for a grid */
    size_t ntables;       /* inputs */
    size_t *grid_cells;   /* per input: the cells of a NetCDF grid (an upper bound on its
                             series: all-missing cells are skipped), 0 for a CSV table */
    csv_column_store **columns; /* per input: a CSV too large to hold, read a table of
                                   series at a time (NULL: held whole in tables[f]) */
    series_table control; /* --control FILE: read like the inputs, but never cut in time */
    int has_control;
    size_t *grid_times;   /* per input: a NetCDF grid's time steps (0 for a CSV table) */
} cli_inputs;

int cli_inputs_load(const cli_options *opts, cli_inputs *inputs);
void cli_inputs_free(cli_inputs *inputs);
/* Reads a CSV run beside the inputs (--control, feedback --baseline) like them but never cut
 * in time; `option` and `what` name it in messages. */
int cli_load_whole_table(const cli_options *opts, const char *path, const char *option,
                         const char *what, series_table *table);
/* Number of series over all tables; series k of the run in order. */
size_t cli_inputs_series_count(const cli_inputs *inputs);

/* Detrends series `k` of table `t`; returns EXIT_OK or an exit code (message printed). */
int cli_prepare_series(const cli_options *opts, const series_table *table, size_t k,
                       prepared_series *ps);
void cli_prepared_free(prepared_series *ps);
/* W of opts->window for the table's grid (the rule of DESIGN §3), or an exit code. */
int cli_series_window(const cli_options *opts, const series_table *table, size_t *window);

/* Rolling indicators of a prepared series: values[j] (j < opts->nindicators) gets ps->n
 * entries, allocated here and released by cli_indicator_values_free even on failure. A
 * constant series gets NA everywhere, with a warning. */
int cli_indicator_values(const cli_options *opts, const prepared_series *ps, double **values);
void cli_indicator_values_free(const cli_options *opts, double **values);

/* The outputs of a command, opened before any work (so an unwritable path fails first) and
 * committed together at the end, or all removed. */
typedef struct {
    atomic_file files[4];
    size_t count;
    const char *stdout_user; /* the option writing to standard output, if any */
    report_batch *figures;   /* --figures DIR, committed after the files */
    netcdf_maps *maps;       /* screen --maps FILE: written with the files' flush, renamed
                                after the figures */
} cli_outputs;

/* 1 (message printed) when `path` is an input, the control run, another output of the run,
 * or standard output taken twice. */
int cli_output_clashes(const cli_outputs *outs, const cli_options *opts, const char *path,
                       const char *option);
/* Opens `path` (NULL or "-" = stdout) after checking it is not one of the inputs. */
int cli_outputs_open(cli_outputs *outs, const cli_options *opts, const char *path,
                     const char *option, FILE **fp);
int cli_outputs_commit(cli_outputs *outs);
/* With --figures DIR: checks (or makes) the directory now, before any work, and hands back
 * the run's figure batch (NULL without --figures). */
int cli_figures_open(cli_outputs *outs, const cli_options *opts, report_batch **figures);
/* Draws one figure of the run (PLplot: from the main thread only). */
int cli_figure_draw(report_batch *figures, const report_figure_type *type, const void *data,
                    const char *prefix, const char *name);
void cli_outputs_abort(cli_outputs *outs);

/* Writes a number the way every slowscan CSV does: %.12g, NA for non-finite. */
/* With more than one input every output row starts with the file it came from: the header's
 * "file," and the row's file field (so series of the same name in two files stay apart). */
int cli_several_inputs(const cli_options *opts);
void cli_put_header(FILE *fp, const cli_options *opts, const char *columns);
void cli_put_series(FILE *fp, const cli_options *opts, const char *source, const char *name);
void cli_put_number(FILE *fp, double v);
/* A series' times as a figure's x values: decimal years on a dated axis (in *owned, which
 * the caller frees; NULL when out of memory), else its own times; label names the axis. */
const double *cli_figure_times(const prepared_series *ps, double **owned, char *label,
                               size_t size);
/* The unit of lengths on a series' axis for outputs: days, months, years, or "" for a time
 * column of plain numbers (its own unit). */
const char *cli_time_unit(const time_axis *axis);
/* A time of the series' axis: a date on a dated axis, else the number (an age as written). */
void cli_put_time(FILE *fp, const time_axis *axis, double v);
/* JSON (RFC 8259): a string with its escapes; a number, or null when not finite. */
void cli_json_string(FILE *fp, const char *s);
void cli_json_number(FILE *fp, double v);
/* Writes a CSV field, quoted when it holds a delimiter, quote or line break (RFC 4180). */
void cli_put_field(FILE *fp, const char *s);

/* progress.c: the progress line on stderr ("screen: series 12/40, 3.1 series/s, ETA 9 s",
 * then ", surrogates 384/1000 of NAME" while a series is drawing its null), when enabled: on a
 * terminal rewritten in place, elsewhere one line per update every few seconds. */
typedef struct {
    int enabled, terminal;
    const char *what; /* the command */
    size_t done, total;
    double start, last_shown; /* monotonic seconds */
    /* the latest surrogate count of a series not yet done (the library's screen_progress) */
    char series[48];
    size_t surrogates_index, surrogates_done, surrogates_total;
    double every;     /* seconds between updates */
    size_t columns;   /* the terminal's width less one (0: not known, or not a terminal) */
} cli_progress;
void cli_progress_start(cli_progress *p, const cli_options *opts, size_t total);
void cli_progress_series_done(cli_progress *p);
void cli_progress_surrogates(cli_progress *p, const screen_progress *s);
/* Around every message on stderr (cli_error, cli_warning): clears a progress line standing
 * on the terminal, so the message starts on a clean line (the next update draws it again),
 * and keeps the line from being drawn, from any thread, until the message is out. */
void cli_progress_message_begin(void);
void cli_progress_message_end(void);
/* 1 while a progress line stands on the terminal unfinished (async-signal-safe). */
int cli_progress_line_standing(void);

/* Called once per prepared series, in input order. */
typedef int (*series_visitor)(const cli_options *opts, const prepared_series *ps, void *context);
/* Prepares every series of the inputs in turn and hands it to `visit`. */
int cli_for_each_series(const cli_options *opts, const cli_inputs *in, series_visitor visit,
                        void *context);
/* Called once per series of the inputs, before any preparation (commands that prepare a
 * series several ways, like robustness). */
typedef int (*table_visitor)(const cli_options *opts, const cli_inputs *in,
                             const series_table *table, size_t k, void *context);

/* How messages name an input ("standard input" for "-"). */
const char *cli_source_name(const char *source);
/* The control run's series `name` as the library takes it (values NULL when there is none). */
screen_input cli_control_input(const cli_inputs *in, const char *name);
/* The message of a refusal met with the control run; returns the exit code. */
int cli_control_refuse(const cli_options *opts, const screen_input *control,
                       const prepared_series *ps, const screen_detail *d);

/* Series whose residual keeps part of the trend at an edge, counted over a run in input
 * order and reported once at its end (one line each for a few, a summary for many). */
enum { CLI_LEAKAGE_NAMED = 3 };
typedef struct {
    size_t count, tested;
    const char *source[CLI_LEAKAGE_NAMED], *name[CLI_LEAKAGE_NAMED]; /* into text */
    detrend_leakage first[CLI_LEAKAGE_NAMED];
    /* copies of the names: a series' own strings may be gone (a grid's table, a record
     * read back) when the tally is reported */
    char text[CLI_LEAKAGE_NAMED][2][512];
} cli_leakage_tally;
void cli_tally_leakage(cli_leakage_tally *tally, const char *source, const char *name,
                       const detrend_leakage *leakage, int tested);
void cli_report_leakage(const cli_options *opts, const cli_leakage_tally *tally);

/* With --null control: makes ps->null_source the residual of the control run's series of the
 * same name, cut to ps->n samples and detrended with ps's bandwidth in time units. */
int cli_attach_control(const cli_options *opts, const cli_inputs *in, prepared_series *ps);

/* How a series command runs: open its outputs (after the inputs are read, before any work),
 * visit every series, then finish (write what needs all series). NULL hooks are skipped. */
typedef struct {
    int (*open)(const cli_options *opts, cli_outputs *outs, void *context);
    series_visitor visit;
    int (*finish)(const cli_options *opts, void *context);
    void *context;
    table_visitor visit_table; /* used instead of visit when set */
    /* After finish, before the commit: figures that need the whole run (screen's q-values);
     * the inputs are still loaded, so series can be prepared again instead of kept. */
    int (*figures)(const cli_options *opts, const cli_inputs *in, void *context);
    /* Used instead of visit and visit_table when set: the command runs its series itself
     * (screen, through the library's batch driver). */
    int (*run)(const cli_options *opts, const cli_inputs *in, void *context);
} series_command;
/* Load, open, visit, finish, then commit every output — or remove them all on failure. */
int cli_run_series_command(const cli_options *opts, const series_command *command);

/* The memory this process may still take (cli/memory.c): the room under the tightest cgroup
 * limit (v2 or v1) and MemAvailable, the smaller; INFINITY where nothing limits or nothing
 * could be read. */
typedef struct {
    double available, cgroup_room, cgroup_limit, cgroup_usage, meminfo;
} cli_memory;
void cli_memory_read(cli_memory *m);
/* needed bytes against what is available: EXIT_OK, or EXIT_BAD_INPUT after the message
 * "WHAT: the run needs about X of memory, more than the Y available (...); ADVICE". */
int cli_memory_check(size_t needed, const char *what, const char *advice);
/* screen, robustness and recovery: the run's estimate (slowscan_screen_memory_estimate) for
 * the longest input series, checked before any work; the message names the option that
 * asks too much (--surrogates, --budget, --max-per-series, --threads) or the input. */
int cli_memory_guard(const cli_options *opts, const cli_inputs *in);

/* The long rolling-indicator table `series,time,indicator,value` (indicators, screen --rolling). */
extern const char cli_rolling_header[];
void cli_write_rolling(FILE *fp, const cli_options *opts, const prepared_series *ps,
                       double *const *values);

/* The most threads --threads accepts. */
enum { CLI_MAX_THREADS = 256 };

/* --detrends LIST (cmd_robustness.c): comma-separated methods as --detrend takes them. */
int cli_set_detrends(cli_options *opts, const char *name, const char *value);

/* The command line run (main.c): what `slowscan ARGS` does, its exit code. */
int cli_main(int argc, char **argv);

/* Commands. */
int cmd_detrend(const cli_options *opts);
int cmd_indicators(const cli_options *opts);
int cmd_screen(const cli_options *opts);
int cmd_demo(const cli_options *opts);
int cmd_surrogates(const cli_options *opts);
int cmd_robustness(const cli_options *opts);
int cmd_recovery(const cli_options *opts);
int cmd_merge(const cli_options *opts);
int cmd_feedback(const cli_options *opts);

/* inputs.c: a walk over every series of the inputs in order — CSV tables as read, NetCDF
 * grids a table of cells at a time, each made ready like a CSV table (cli_ready_table). */
typedef struct {
    const cli_options *opts;
    const cli_inputs *in;
    size_t input;               /* the next input to open */
    const series_table *table;  /* the table being walked (an input's, or chunk) */
    size_t next;                /* its next series */
    series_table chunk;         /* cells of the grid being read */
    struct netcdf_reader *reader;
    csv_column_store *columns;  /* the streamed CSV being read */
    size_t column_first;        /* its next series */
    size_t all_missing, chunks; /* of the grid being read */
} cli_cursor;
enum { CLI_CURSOR_END = -1 };
void cli_cursor_start(cli_cursor *c, const cli_options *opts, const cli_inputs *in);
/* The next series as (table, index): EXIT_OK, CLI_CURSOR_END, or an exit code (printed). The
 * table stays valid until the next call. */
int cli_cursor_next(cli_cursor *c, const series_table **t, size_t *k);
void cli_cursor_end(cli_cursor *c);
/* 1 when a CSV input is large enough to be read a table of series at a time. */
int cli_too_wide(const char *path);
/* 1 when the file starts like a NetCDF file (classic, 64-bit offset, CDF-5 or HDF5). */
int cli_is_netcdf(const char *path);
/* EXIT_BAD_INPUT, with the message (naming option when not NULL), for a readable file named
 * *.nc that is not NetCDF (inputs.c). */
int cli_check_netcdf_name(const char *path, const char *option);
/* The NetCDF reading options of the command's. */
netcdf_read_options cli_netcdf_options(const cli_options *o);
/* Cut to --from/--until, the grid, logs; `first` says whether notices (gaps) are due. */
int cli_ready_table(const cli_options *opts, series_table *t, int first);

/* option_values.c: numbers and lengths of option values (a message naming the option on
 * refusal; exit codes). */
int cli_parse_number(const char *name, const char *value, double *out);
int cli_parse_positive(const char *name, const char *value, double *out);
int cli_parse_length(const char *name, const char *value, cli_length *len);
/* EXIT_BAD_INPUT, with the message, when the list v holds an empty item (option_values.c). */
int cli_list_check(const char *name, const char *v);
/* The setters of --indicators and --band (option_values.c). */
int cli_set_indicators(cli_options *o, const char *n, const char *v);
int cli_set_band(cli_options *o, const char *n, const char *v);
int cli_parse_grid(const char *name, const char *v, cli_length *items, char (*texts)[32],
                   size_t *count);

/* time_options.c: setters of the options about time and missing values (options.c's table). */
int cli_set_from(cli_options *o, const char *n, const char *v);
int cli_set_until(cli_options *o, const char *n, const char *v);
int cli_set_max_gap(cli_options *o, const char *n, const char *v);
int cli_set_time_format(cli_options *o, const char *n, const char *v);
int cli_set_time_units(cli_options *o, const char *n, const char *v);
int cli_set_age(cli_options *o, const char *n, const char *v);
int cli_set_calendar(cli_options *o, const char *n, const char *v);
int cli_set_missing(cli_options *o, const char *n, const char *v);

/* signals.c: SIGTERM, SIGINT and SIGHUP remove every temporary output and exit with
 * 128 + the signal number. */
void cli_handle_stops(void);
/* What the stop's message ends with (a static text, e.g. that a journal is kept); NULL: the
 * plain ending. */
void cli_stop_note(const char *note);

/* resume.c: screen --resume's journal beside the summary (FILE.journal). */
typedef struct {
    struct journal *journal; /* NULL without --resume */
    char path[4200];
    size_t replayed;         /* series the journal gave back */
    size_t rounds;           /* --surrogates auto: rounds it gave back (counted by the replay) */
} cli_resume;
int cli_resume_open(const cli_options *o,
                    int (*replay)(void *context, const void *record, size_t size),
                    void *context, cli_resume *r);
int cli_resume_record(cli_resume *r, const void *record, size_t size);
void cli_resume_close(cli_resume *r, int finished);
/* Removes the temporaries a killed run left beside the outputs (before they are opened). */
void cli_resume_clean(const cli_options *o);
/* The stop says nothing (the processes of a shared run other than process 0; any process
 * once its command has ended). */
void cli_stops_quiet(void);

/* input_checks.c: reading options from the command's (CF units parsed on the calendar), the
 * --from/--until span on a table's axis, the grid (gaps or --resample), notices on what the
 * reader left out or suspects. Each returns an exit code (the message printed). */
int cli_read_options(const cli_options *o, time_units *units, csv_read_options *ro);
int cli_span_on_axis(const cli_options *o, const series_table *t, double *from, double *until);
int cli_grid(const cli_options *o, series_table *t, int announce, io_error *err);
void cli_input_notices(const cli_options *o, const series_table *t);
/* The values that look like missing-value codes, per series of a table. */
void cli_series_notices(const series_table *t);

/* feedback_options.c: the setter of feedback's rows of the option table, its defaults, and
 * the checks between its options (after the parse). */
int cli_feedback_set(cli_options *o, const char *name, const char *value);
void cli_feedback_defaults(cli_options *o);
int cli_feedback_check(const cli_options *o);
/* help_feedback.c: `slowscan help feedback`. */
void cli_help_feedback(FILE *out);

#endif
