/* Option parsing: one table names every option, the commands that take it and the function
 * that stores its value, so each command accepts exactly its own options. */
#define _GNU_SOURCE /* sched_getaffinity: the cores this process may run on */
#include "cli.h"
#include "forced_inputs.h"
#include "modes_cli.h"
#include "share.h"
#include "slowscan/status.h"
#include "slowscan/surrogates.h"

#include <errno.h>
#include <limits.h>
#include <math.h>
#include <stdarg.h>
#include <stdlib.h>
#include <string.h>
#include <sched.h>
#include <unistd.h>

enum { C_DETREND = 1, C_INDICATORS = 2, C_SCREEN = 4, C_DEMO = 8, C_SURROGATES = 16, C_ROBUST = 32,
       C_RECOVERY = 64, C_MERGE = 128, C_FEEDBACK = 256, C_TIMESCALES = 512, C_EMULATE = 1024 };
#define C_MODES (C_TIMESCALES | C_EMULATE)
#define C_SERIES (C_DETREND | C_INDICATORS | C_SCREEN | C_SURROGATES | C_ROBUST | C_RECOVERY)
#define C_ROLLING (C_INDICATORS | C_SCREEN | C_ROBUST)
#define C_TESTING (C_SCREEN | C_ROBUST | C_RECOVERY)

typedef int (*option_setter)(cli_options *opts, const char *name, const char *value);

typedef struct {
    const char *name;
    int takes_value;
    int commands;
    option_setter set;
} option_spec;

static int set_time(cli_options *o, const char *n, const char *v) { (void)n; o->time_column = v; return EXIT_OK; }
static int set_vars(cli_options *o, const char *n, const char *v) { (void)n; o->vars = v; return EXIT_OK; }
static int set_resume(cli_options *o, const char *n, const char *v) { (void)n; (void)v; o->resume = 1; return EXIT_OK; }
static int set_select(cli_options *o, const char *n, const char *v) { (void)n; o->select = v; return EXIT_OK; }
static int set_resample(cli_options *o, const char *n, const char *v) { return cli_parse_positive(n, v, &o->resample); }
static int set_deseason(cli_options *o, const char *n, const char *v) { return cli_parse_positive(n, v, &o->deseason); }
static int set_deseason_window(cli_options *o, const char *n, const char *v) { return cli_parse_length(n, v, &o->deseason_window); }
static int set_bandwidth(cli_options *o, const char *n, const char *v) { return cli_parse_length(n, v, &o->bandwidth); }
static int set_window(cli_options *o, const char *n, const char *v) { return cli_parse_length(n, v, &o->window); }
static int set_output(cli_options *o, const char *n, const char *v) { (void)n; o->output = v; return EXIT_OK; }

static int set_windows(cli_options *o, const char *n, const char *v)
{
    return cli_parse_grid(n, v, o->windows, o->grid_text[0], &o->nwindows);
}
static int set_bandwidths(cli_options *o, const char *n, const char *v)
{
    return cli_parse_grid(n, v, o->bandwidths, o->grid_text[1], &o->nbandwidths);
}
static int set_fractions(cli_options *o, const char *n, const char *v) { (void)n; o->fractions_output = v; return EXIT_OK; }
static int set_noise_trend(cli_options *o, const char *n, const char *v) { (void)n; (void)v; o->noise_trend = 1; return EXIT_OK; }
static int set_projection(cli_options *o, const char *n, const char *v) { (void)n; o->projection_output = v; return EXIT_OK; }
static int set_control(cli_options *o, const char *n, const char *v) { (void)n; o->control_file = v; return EXIT_OK; }
static int set_json(cli_options *o, const char *n, const char *v) { (void)n; o->json_output = v; return EXIT_OK; }
static int set_rolling(cli_options *o, const char *n, const char *v) { (void)n; o->rolling_output = v; return EXIT_OK; }
static int set_out_dir(cli_options *o, const char *n, const char *v) { (void)n; o->out_dir = v; return EXIT_OK; }
static int set_progress(cli_options *o, const char *n, const char *v) { (void)v; o->progress = strcmp(n, "--progress") == 0; return EXIT_OK; }

/* Warnings are printed by cli_warning, which has no options to read: --quiet sets this as it
 * is parsed, before any warning of the run (those of the options come after the parse). */
static int warnings_silenced;

static int set_quiet(cli_options *o, const char *n, const char *v)
{
    (void)n, (void)v;
    o->quiet = warnings_silenced = 1;
    return EXIT_OK;
}
static int set_ensemble(cli_options *o, const char *n, const char *v)
{
    o->ensemble.on = 1;
    if (strcmp(n, "--members") == 0)
        o->ensemble.members_text = v;
    o->ensemble.anomalies |= strcmp(n, "--member-anomalies") == 0;
    return EXIT_OK;
}
static int set_log(cli_options *o, const char *n, const char *v) { (void)n; (void)v; o->log_values = 1; return EXIT_OK; }

static int set_detrend(cli_options *o, const char *n, const char *v)
{
    o->detrend_text = v;
    if (slowscan_detrend_parse_method(v, &o->detrend) != SLOWSCAN_OK) {
        cli_error("option %s: unknown method '%s' (gaussian-linear, gaussian, moving, loess, "
                  "linear, poly:K with K from 1 to 12, difference, none)", n, v);
        return EXIT_BAD_INPUT;
    }
    return EXIT_OK;
}

static int set_min_coverage(cli_options *o, const char *n, const char *v)
{
    int rc = cli_parse_number(n, v, &o->min_coverage);
    if (rc == EXIT_OK && !(o->min_coverage > 0 && o->min_coverage <= 1)) {
        cli_error("option %s: %s is outside (0, 1]", n, v);
        return EXIT_BAD_INPUT;
    }
    return rc;
}

static int set_recovery(cli_options *o, const char *n, const char *v)
{
    if (strcmp(v, "log") == 0)
        o->recovery = RECOVERY_LOG_AR1;
    else if (strcmp(v, "increments") == 0)
        o->recovery = RECOVERY_INCREMENTS;
    else {
        cli_error("option %s: '%s' is neither 'log' nor 'increments'", n, v);
        return EXIT_BAD_INPUT;
    }
    return EXIT_OK;
}

/* A whole number in [min, max]; the message names the option and the range. */
static int set_whole(const char *n, const char *v, long min, long max, long *out)
{
    char *end;
    errno = 0;
    long x = strtol(v, &end, 10);
    if (end == v || *end != '\0' || x < min || x > max || errno == ERANGE) {
        if (max == LONG_MAX)
            cli_error("option %s: '%s' is not a whole number >= %ld", n, v, min);
        else
            cli_error("option %s: '%s' is not a whole number from %ld to %ld", n, v, min, max);
        return EXIT_BAD_INPUT;
    }
    *out = x;
    return EXIT_OK;
}

static int set_harmonics(cli_options *o, const char *n, const char *v) { return set_whole(n, v, 1, INT_MAX / 2, &o->harmonics); }
static int set_step(cli_options *o, const char *n, const char *v)
{
    return set_whole(n, v, 1, LONG_MAX, &o->step);
}

/* Enough for p-values of 1e-6; more would only fill memory (8 bytes x indicators each). */
enum { MAX_SURROGATES = 1000000 };

static int set_surrogates(cli_options *o, const char *n, const char *v)
{
    o->surrogates_auto = strcmp(v, "auto") == 0;
    if (o->surrogates_auto && strcmp(o->command, "screen") != 0) {
        cli_error("option %s auto: only for screen (give a number of surrogates)", n);
        return EXIT_BAD_INPUT;
    }
    if (o->surrogates_auto) {
        o->surrogates = 0; /* the rounds set each series' own range */
        return EXIT_OK;
    }
    return set_whole(n, v, 0, MAX_SURROGATES, &o->surrogates);
}

/* --surrogates auto: the whole run's surrogates, and one series' at most (sequential.h). */
static int set_budget(cli_options *o, const char *n, const char *v)
{
    return set_whole(n, v, 1, LONG_MAX, &o->budget);
}

/* A number strictly between 0 and max (`bound`: max as the message writes it). */
static int set_open_interval(const char *n, const char *v, double max, const char *bound,
                             double *out)
{
    int rc = cli_parse_number(n, v, out);
    if (rc == EXIT_OK && !(*out > 0 && *out < max)) {
        cli_error("option %s: %s is outside (0, %s)", n, v, bound);
        return EXIT_BAD_INPUT;
    }
    return rc;
}

/* --risk E: the chance a test's interval misses its p. */
static int set_risk(cli_options *o, const char *n, const char *v)
{
    return set_open_interval(n, v, 0.5, "0.5", &o->risk);
}

static int set_risk_joint(cli_options *o, const char *n, const char *v)
{
    (void)n, (void)v;
    o->risk_joint = 1;
    return EXIT_OK;
}

static int set_max_per_series(cli_options *o, const char *n, const char *v)
{
    return set_whole(n, v, 64, MAX_SURROGATES, &o->max_per_series);
}

/* The bootstrap interval needs its 2.5% tails resolved by a dozen draws or more. */
static int set_projection_draws(cli_options *o, const char *n, const char *v)
{
    return set_whole(n, v, 500, MAX_SURROGATES, &o->projection_draws);
}

static int set_null(cli_options *o, const char *n, const char *v)
{
    surrogate_kind kind;
    if (slowscan_surrogate_lookup(v, &kind) == SLOWSCAN_OK) {
        o->null_model = (int)kind;
        o->use_control = 0;
        return EXIT_OK;
    }
    if (strcmp(v, "control") == 0) {
        o->null_model = SURROGATE_PHASE; /* phase surrogates, of the control run */
        o->use_control = 1;
        return EXIT_OK;
    }
    cli_error("option %s: unknown null model '%s' (phase, aaft, iaaft, ar1, block)", n, v);
    return EXIT_BAD_INPUT;
}

static int set_iaaft_tol(cli_options *o, const char *n, const char *v)
{
    return cli_parse_positive(n, v, &o->null_options.iaaft_tolerance);
}

static int set_iaaft_iterations(cli_options *o, const char *n, const char *v)
{
    long it = 0;
    int rc = set_whole(n, v, 1, 100000, &it);
    o->null_options.iaaft_max_iterations = (int)it;
    return rc;
}

static int set_block_length(cli_options *o, const char *n, const char *v)
{
    long len = 0;
    int rc = set_whole(n, v, 1, LONG_MAX, &len);
    o->null_options.block_length = (size_t)len;
    return rc;
}

static int set_fdr(cli_options *o, const char *n, const char *v)
{
    return set_open_interval(n, v, 1, "1", &o->fdr);
}

static int set_alternative(cli_options *o, const char *n, const char *v)
{
    static const char *names[] = {"increasing", "decreasing", "two-sided"};
    for (int i = 0; i < 3; i++)
        if (strcmp(v, names[i]) == 0) {
            o->alternative = i;
            return EXIT_OK;
        }
    cli_error("option %s: '%s' is not increasing, decreasing or two-sided", n, v);
    return EXIT_BAD_INPUT;
}

static int set_threads(cli_options *o, const char *n, const char *v)
{
    return set_whole(n, v, 1, CLI_MAX_THREADS, &o->threads);
}

static int set_seed(cli_options *o, const char *n, const char *v)
{
    long s = 0;
    int rc = set_whole(n, v, 0, LONG_MAX, &s);
    o->seed = (unsigned long)s;
    return rc;
}

static int set_figures(cli_options *o, const char *n, const char *v) { (void)n; o->figures_dir = v; return EXIT_OK; }
static int set_maps(cli_options *o, const char *n, const char *v) { (void)n; o->maps_output = v; return EXIT_OK; }

static int set_figure_format(cli_options *o, const char *n, const char *v)
{
    o->figure_format_text = v;
    if (slowscan_report_format_parse(v, &o->figure_format) != SLOWSCAN_OK) {
        cli_error("option %s: '%s' is not png, svg or pdf", n, v);
        return EXIT_BAD_INPUT;
    }
    return EXIT_OK;
}

static int set_format(cli_options *o, const char *n, const char *v)
{
    if (strcmp(v, "csv") != 0 && strcmp(v, "table") != 0) {
        cli_error("option %s: '%s' is neither 'csv' nor 'table'", n, v);
        return EXIT_BAD_INPUT;
    }
    o->format = v;
    return EXIT_OK;
}

static const option_spec options[] = {
    {"--time", 1, C_SERIES | C_FEEDBACK | C_MODES, set_time},
    {"--vars", 1, C_SERIES | C_FEEDBACK, set_vars},
    {"--from", 1, C_SERIES | C_FEEDBACK | C_MODES, cli_set_from},
    {"--until", 1, C_SERIES | C_FEEDBACK | C_MODES, cli_set_until},
    {"--log", 0, C_SERIES, set_log},
    {"--resample", 1, C_SERIES | C_FEEDBACK | C_MODES, set_resample},
    {"--max-gap", 1, C_SERIES | C_FEEDBACK | C_MODES, cli_set_max_gap},
    {"--select", 1, C_SERIES | C_FEEDBACK, set_select},
    {"--resume", 0, C_SCREEN, set_resume},
    {"--calendar", 1, C_SERIES | C_FEEDBACK | C_MODES, cli_set_calendar},
    {"--time-format", 1, C_SERIES | C_FEEDBACK | C_MODES, cli_set_time_format},
    {"--time-units", 1, C_SERIES | C_FEEDBACK | C_MODES, cli_set_time_units},
    {"--age", 0, C_SERIES, cli_set_age},
    {"--missing", 1, C_SERIES | C_FEEDBACK | C_MODES, cli_set_missing},
    {"--detrend", 1, C_SERIES, set_detrend},
    {"--bandwidth", 1, C_SERIES, set_bandwidth},
    {"--deseason", 1, C_SERIES, set_deseason},
    {"--deseason-window", 1, C_SERIES, set_deseason_window},
    {"--harmonics", 1, C_SERIES, set_harmonics},
    {"--window", 1, C_ROLLING | C_FEEDBACK, set_window},
    {"--indicators", 1, C_ROLLING, cli_set_indicators},
    {"--min-coverage", 1, C_ROLLING, set_min_coverage},
    {"--recovery", 1, C_ROLLING, set_recovery},
    {"--step", 1, C_ROLLING, set_step},
    {"--band", 1, C_ROLLING, cli_set_band},
    {"--surrogates", 1, C_TESTING | C_SURROGATES, set_surrogates},
    {"--null", 1, C_TESTING | C_SURROGATES, set_null},
    {"--budget", 1, C_SCREEN, set_budget},
    {"--max-per-series", 1, C_SCREEN, set_max_per_series},
    {"--risk", 1, C_SCREEN, set_risk},
    {"--risk-joint", 0, C_SCREEN, set_risk_joint},
    {"--iaaft-tol", 1, C_TESTING | C_SURROGATES, set_iaaft_tol},
    {"--iaaft-iterations", 1, C_TESTING | C_SURROGATES, set_iaaft_iterations},
    {"--block-length", 1, C_TESTING | C_SURROGATES, set_block_length},
    {"--fdr", 1, C_TESTING | C_MERGE, set_fdr},
    {"--alternative", 1, C_TESTING, set_alternative},
    {"--rolling", 1, C_SCREEN, set_rolling},
    {"--json", 1, C_SCREEN | C_RECOVERY | C_FEEDBACK | C_MODES, set_json},
    {"--maps", 1, C_SCREEN, set_maps},
    {"--control", 1, C_TESTING | C_SURROGATES, set_control},
    {"--noise-trend", 0, C_TESTING, set_noise_trend},
    {"--project", 1, C_RECOVERY, set_projection},
    {"--project-draws", 1, C_RECOVERY, set_projection_draws},
    {"--windows", 1, C_ROBUST, set_windows},
    {"--bandwidths", 1, C_ROBUST, set_bandwidths},
    {"--fractions", 1, C_ROBUST, set_fractions},
    {"--detrends", 1, C_ROBUST, cli_set_detrends},
    {"--format", 1, C_SCREEN, set_format},
    {"--tail", 1, C_SCREEN, cli_set_tail},
    {"--ensemble", 0, C_SCREEN | C_FEEDBACK | C_TIMESCALES, set_ensemble},
    {"--members", 1, C_SCREEN | C_FEEDBACK | C_TIMESCALES, set_ensemble},
    {"--member-anomalies", 0, C_SCREEN, set_ensemble},
    {"--figures", 1, C_TESTING | C_FEEDBACK | C_MODES, set_figures},
    {"--figure-format", 1, C_TESTING | C_FEEDBACK | C_MODES, set_figure_format},
    {"-o", 1, C_SERIES | C_MERGE | C_FEEDBACK | C_MODES, set_output},
    {"--output", 1, C_SERIES | C_FEEDBACK | C_MODES, set_output},
    {"--progress", 0, C_SERIES | C_MODES, set_progress},
    {"--no-progress", 0, C_SERIES | C_MODES, set_progress},
    {"--quiet", 0, C_SERIES | C_FEEDBACK | C_MODES, set_quiet},
    {"--out", 1, C_DEMO, set_out_dir},
    {"--seed", 1, C_DEMO | C_TESTING | C_SURROGATES, set_seed},
    {"--threads", 1, C_TESTING, set_threads},
    /* shared by the forced-run commands (forced_inputs.c) */
    {"--flux", 1, C_FEEDBACK | C_TIMESCALES, cli_forced_set},
    {"--response", 1, C_FEEDBACK | C_MODES, cli_forced_set},
    {"--skip", 1, C_FEEDBACK | C_MODES, cli_forced_set},
    {"--baseline", 1, C_FEEDBACK | C_MODES, cli_forced_set},
    {"--baseline-mode", 1, C_FEEDBACK | C_MODES, cli_forced_set},
    {"--baseline-offset", 1, C_FEEDBACK | C_MODES, cli_forced_set},
    {"--annual", 0, C_FEEDBACK | C_MODES, cli_forced_set},
    {"--stride", 1, C_FEEDBACK, cli_feedback_set},
    {"--fit", 1, C_FEEDBACK, cli_feedback_set},
    {"--noise-ratio", 1, C_FEEDBACK, cli_feedback_set},
    {"--fit-span", 1, C_FEEDBACK, cli_feedback_set},
    {"--scale", 1, C_FEEDBACK, cli_feedback_set},
    {"--area-mean", 0, C_FEEDBACK, cli_feedback_set},
    /* timescales and emulate (modes_options.c) */
    {"--joint", 0, C_TIMESCALES, cli_set_joint},
    {"--max-modes", 1, C_MODES, cli_set_max_modes},
    {"--onset", 1, C_MODES, cli_set_onset},
    {"--step", 1, C_EMULATE, cli_set_step_run},
    {"--step-forcing", 1, C_EMULATE, cli_set_step_forcing},
    {"--forcing", 1, C_EMULATE, cli_set_forcing},
    {"--compare", 1, C_EMULATE, cli_set_compare},
    {"--control", 1, C_EMULATE, cli_set_noise_run},
    {"--band-level", 1, C_EMULATE, cli_set_band_level},
    {"--persist", 1, C_EMULATE, cli_set_persist},
    {"--empirical", 0, C_EMULATE, cli_set_empirical},
};

static int command_bit(const char *command)
{
    static const char *names[] = {"detrend", "indicators", "screen", "demo", "surrogates",
                                  "robustness", "recovery", "merge", "feedback", "timescales",
                                  "emulate"};
    for (int i = 0; i < (int)(sizeof names / sizeof names[0]); i++)
        if (strcmp(command, names[i]) == 0)
            return 1 << i;
    return 0;
}

/* The science defaults are the library's (cli_science_defaults); the command adds its own
 * (outputs, grids, threads). */
static void set_defaults(const char *command, cli_options *o)
{
    cli_science_defaults(command, o);
    cli_modes_defaults(o);
    cli_forced_defaults(o);
    o->format = "csv";
    o->figure_format = REPORT_PNG;
    o->progress = -1;
    if (strcmp(command, "feedback") == 0)
        cli_feedback_defaults(o);
    /* The default grid is centred on screen's own choice (50%, 10%): windows in even steps
     * from 30% to 70%, bandwidths in equal ratios (about sqrt 2) from half to twice 10%. */
    cli_parse_grid("--windows", "30%:70%:10%", o->windows, o->grid_text[0], &o->nwindows);
    cli_parse_grid("--bandwidths", "5%,7%,10%,14%,20%", o->bandwidths, o->grid_text[1], &o->nbandwidths);
    /* the cores this process may use: under mpirun (which binds each process to its cores)
     * or taskset that is fewer than the machine's */
    long cores = sysconf(_SC_NPROCESSORS_ONLN);
    cpu_set_t mask;
    if (sched_getaffinity(0, sizeof mask, &mask) == 0 && CPU_COUNT(&mask) < cores)
        cores = CPU_COUNT(&mask);
    o->threads = cores < 1 ? 1 : cores > CLI_MAX_THREADS ? CLI_MAX_THREADS : cores;
}

/* The row of the option for this command (a name may have a row per command: --step, --control). */
static const option_spec *find_option(const char *arg, int bit, size_t *name_len)
{
    const char *eq = strchr(arg, '=');
    size_t len = eq && arg[1] == '-' ? (size_t)(eq - arg) : strlen(arg);
    const option_spec *found = NULL;
    for (size_t i = 0; i < sizeof options / sizeof options[0]; i++)
        if (strlen(options[i].name) == len && strncmp(arg, options[i].name, len) == 0 &&
            (!found || (options[i].commands & bit))) {
            *name_len = len;
            found = &options[i];
        }
    return found;
}

enum { NOPTIONS = sizeof options / sizeof options[0] };

/* Every option is taken once. When the last of two values silently won, a value set early
 * in a script (or a wrapper's default) could override the user's own without a word, and
 * a run's options no longer said what it did. Lists are one value (--vars a,b); -o and
 * --output are one option, as are --progress and --no-progress. Returns the spelling
 * that came first, or NULL when this is the first time; given[] is indexed by table row. */
static const char *given_before(const char **given, const option_spec *spec)
{
    const char *name = spec->name;
    if (strcmp(name, "-o") == 0)
        name = "--output";
    else if (strcmp(name, "--no-progress") == 0)
        name = "--progress";
    size_t slot = 0;
    while (strcmp(options[slot].name, name) != 0) /* the first row of that name */
        slot++;
    const char *before = given[slot];
    given[slot] = spec->name;
    return before;
}

/* One option at argv[*i]; advances *i past its value. */
static int parse_one(cli_options *o, int bit, int argc, char **argv, int *i, const char **given)
{
    const char *arg = argv[*i];
    size_t len = 0;
    const option_spec *spec = find_option(arg, bit, &len);
    if (!spec || !(spec->commands & bit)) {
        cli_error("%s: unknown option '%s' (see 'slowscan help %s')", o->command, arg, o->command);
        return EXIT_BAD_INPUT;
    }
    const char *before = given_before(given, spec);
    if (before && strcmp(before, spec->name) != 0) {
        cli_error("options %s and %s set the same thing: give one of them once", before,
                  spec->name);
        return EXIT_BAD_INPUT;
    }
    if (before) {
        cli_error("option %s is given twice: give it once%s", spec->name,
                  spec->takes_value ? " (a list is one value: A,B,...)" : "");
        return EXIT_BAD_INPUT;
    }
    const char *value = NULL;
    if (arg[len] == '=')
        value = arg + len + 1;
    else if (spec->takes_value) {
        if (*i + 1 >= argc) {
            cli_error("option %s needs a value", spec->name);
            return EXIT_BAD_INPUT;
        }
        value = argv[++*i];
    }
    if (value && !spec->takes_value) {
        cli_error("option %s takes no value", spec->name);
        return EXIT_BAD_INPUT;
    }
    return spec->set(o, spec->name, value);
}

int cli_parse(const char *command, int argc, char **argv, int first, cli_options *o)
{
    set_defaults(command, o);
    o->argc = argc;
    o->argv = argv;
    int bit = command_bit(command);
    o->files = calloc((size_t)argc, sizeof *o->files);
    if (!o->files)
        return EXIT_INTERNAL;
    const char *given[NOPTIONS] = {0};
    for (int i = first; i < argc; i++) {
        const char *arg = argv[i];
        if (strcmp(arg, "--help") == 0 || strcmp(arg, "-h") == 0) {
            cli_help(command, stdout);
            return -1;
        }
        if (arg[0] == '-' && arg[1] != '\0') {
            int rc = parse_one(o, bit, argc, argv, &i, given);
            if (rc != EXIT_OK)
                return rc;
        } else {
            o->files[o->nfiles++] = arg;
        }
    }
    if (o->use_control != (o->control_file != NULL)) {
        cli_error(o->use_control ? "option --null control needs --control FILE (the control run)"
                                 : "option --control needs --null control");
        return EXIT_BAD_INPUT;
    }
    if (isnan(o->deseason) && (o->deseason_window.text || o->harmonics)) {
        cli_error("option %s needs --deseason PERIOD (the cycle to remove)",
                  o->deseason_window.text ? "--deseason-window" : "--harmonics");
        return EXIT_BAD_INPUT;
    }
    if (o->projection_draws > 0 && !o->projection_output) {
        cli_error("option --project-draws needs --project FILE");
        return EXIT_BAD_INPUT;
    }
    if (o->projection_draws == 0)
        o->projection_draws = 1000;
    int exponent = 0;
    for (size_t j = 0; j < o->nindicators; j++)
        exponent |= o->indicators[j] == INDICATOR_SPECTRAL_EXPONENT;
    if (o->band_text && !exponent)
        cli_warning("option --band %s has no effect without spectral_exponent in --indicators",
                    o->band_text);
    if (o->figure_format_text && !o->figures_dir) {
        cli_error("option --figure-format needs --figures DIR");
        return EXIT_BAD_INPUT;
    }
    if (o->progress < 0)
        o->progress = isatty(STDERR_FILENO);
    if ((bit & (C_MODES | C_FEEDBACK)) && cli_forced_check(o) != EXIT_OK)
        return EXIT_BAD_INPUT;
    if ((bit & C_MODES) && cli_modes_check(o) != EXIT_OK)
        return EXIT_BAD_INPUT;
    if (bit != C_DEMO && o->nfiles == 0 && !(bit == C_EMULATE && o->modes.step.text)) {
        cli_error("%s: no input file given (a CSV file, or - for standard input)", command);
        return EXIT_BAD_INPUT;
    }
    if (bit == C_FEEDBACK && cli_feedback_check(o) != EXIT_OK)
        return EXIT_BAD_INPUT;
    if (bit == C_DEMO && o->nfiles > 0) {
        cli_error("demo: takes no input file (write the data set with --out DIR)");
        return EXIT_BAD_INPUT;
    }
    return EXIT_OK;
}

void cli_options_free(cli_options *o)
{
    free(o->files);
    o->files = NULL;
}

/* Where messages go: stderr, unless a process of a shared run holds them back (share.h). */
static FILE *message_target;

FILE *cli_messages_to(FILE *fp)
{
    FILE *previous = message_target;
    message_target = fp;
    return previous;
}

static void vreport(const char *kind, const char *fmt, va_list ap)
{
    FILE *fp = message_target ? message_target : stderr;
    cli_progress_message_begin();
    fprintf(fp, "slowscan: %s", kind);
    vfprintf(fp, fmt, ap);
    fputc('\n', fp);
    cli_progress_message_end();
}

void cli_error(const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    vreport("", fmt, ap);
    va_end(ap);
}

void cli_warning(const char *fmt, ...)
{
    if (warnings_silenced)
        return;
    va_list ap;
    va_start(ap, fmt);
    vreport("warning: ", fmt, ap);
    va_end(ap);
}

/* The null's name in the outputs, which is also its streams' (screen_config.null_name). */
const char *cli_null_name(const cli_options *o)
{
    screen_config cfg = slowscan_screen_config_default();
    cfg.null_kind = (surrogate_kind)o->null_model;
    cfg.null_name = slowscan_surrogate_name(cfg.null_kind);
    if (o->use_control)
        slowscan_screen_config_control(&cfg);
    return cfg.null_name;
}
