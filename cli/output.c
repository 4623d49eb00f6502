/* Output plumbing shared by the commands: atomic output files, number formatting, and the
 * per-series driver (with its progress line) every series command runs through. */
#include "cli.h"
#include "share.h"
#include "slowscan/status.h"

#include <errno.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

/* An output must not be an input (or the control run), another output of the same run, or
 * a second user of standard output. */
int cli_output_clashes(const cli_outputs *outs, const cli_options *opts, const char *path,
                       const char *option)
{
    int to_stdout = !path || strcmp(path, "-") == 0;
    if (to_stdout) {
        if (outs->stdout_user) {
            cli_error("option %s: standard output is already taken by %s; give a file",
                      option, outs->stdout_user);
            return 1;
        }
        return 0;
    }
    for (size_t f = 0; f <= opts->nfiles; f++) {
        const char *in = f < opts->nfiles ? opts->files[f] : opts->control_file;
        if (in && (strcmp(path, in) == 0 || slowscan_io_same_file(path, in))) {
            cli_error("option %s: output %s is an input file; refusing to overwrite it", option, path);
            return 1;
        }
    }
    /* The figures directory is made only when the outputs are committed: a file of the same
     * name was refused only then, after the figures had been put in place. */
    const char *dir = opts->figures_dir;
    if (dir && (strcmp(path, dir) == 0 || slowscan_io_same_file(path, dir))) {
        cli_error("option %s: output %s is also the --figures directory", option, path);
        return 1;
    }
    for (size_t j = 0; j < outs->count; j++) {
        const char *other = outs->files[j].path;
        if (other && (strcmp(other, path) == 0 || slowscan_io_same_file(other, path))) {
            cli_error("option %s: output %s is already written by another option", option, path);
            return 1;
        }
    }
    return 0;
}

int cli_outputs_open(cli_outputs *outs, const cli_options *opts, const char *path,
                     const char *option, FILE **fp)
{
    if (cli_output_clashes(outs, opts, path, option))
        return EXIT_BAD_INPUT;
    if (outs->count == sizeof outs->files / sizeof outs->files[0])
        return EXIT_INTERNAL;
    io_error err = {{0}};
    atomic_file *file = &outs->files[outs->count];
    if (slowscan_atomic_open(file, path, &err) != SLOWSCAN_OK) {
        cli_error("option %s: %s", option, err.message);
        return EXIT_BAD_INPUT;
    }
    if (!file->path)
        outs->stdout_user = option;
    outs->count++;
    *fp = file->fp;
    return EXIT_OK;
}

int cli_outputs_commit(cli_outputs *outs)
{
    int rc = EXIT_OK;
    /* Flush everything before renaming anything: a write error (a full disk) in one output
     * must not leave the others already in place. */
    for (size_t j = 0; j < outs->count; j++)
        if (fflush(outs->files[j].fp) != 0 || ferror(outs->files[j].fp)) {
            cli_error("cannot write %s: %s", outs->files[j].path ? outs->files[j].path
                                                                 : "standard output",
                      strerror(errno ? errno : EIO));
            rc = EXIT_BAD_INPUT;
        }
    /* The maps are written whole before anything is renamed; then figures, maps, tables: a
     * figure that cannot be put in place then still aborts every other output. */
    io_error err = {{0}};
    if (rc == EXIT_OK && outs->maps && slowscan_netcdf_maps_write(outs->maps, &err) != SLOWSCAN_OK) {
        cli_error("option --maps: %s", err.message);
        rc = EXIT_BAD_INPUT;
    }
    if (rc == EXIT_OK && outs->figures && slowscan_report_batch_commit(outs->figures, &err) != SLOWSCAN_OK) {
        cli_error("option --figures: %s", err.message);
        rc = EXIT_BAD_INPUT;
    }
    if (rc == EXIT_OK && outs->maps && slowscan_netcdf_maps_commit(outs->maps, &err) != SLOWSCAN_OK) {
        cli_error("option --maps: %s", err.message);
        rc = EXIT_BAD_INPUT;
    }
    for (size_t j = 0; j < outs->count; j++) {
        io_error commit_err = {{0}};
        if (rc != EXIT_OK) {
            slowscan_atomic_abort(&outs->files[j]);
        } else if (slowscan_atomic_commit(&outs->files[j], &commit_err) != SLOWSCAN_OK) {
            cli_error("%s", commit_err.message);
            rc = EXIT_BAD_INPUT;
        }
    }
    outs->count = 0;
    slowscan_report_batch_free(outs->figures);
    outs->figures = NULL;
    slowscan_netcdf_maps_free(outs->maps); /* removes the temporary file if not renamed */
    outs->maps = NULL;
    return rc;
}

void cli_outputs_abort(cli_outputs *outs)
{
    for (size_t j = 0; j < outs->count; j++)
        slowscan_atomic_abort(&outs->files[j]);
    outs->count = 0;
    slowscan_report_batch_free(outs->figures); /* removes every figure drawn so far */
    outs->figures = NULL;
    slowscan_netcdf_maps_free(outs->maps);
    outs->maps = NULL;
}

int cli_figures_open(cli_outputs *outs, const cli_options *opts, report_batch **figures)
{
    *figures = NULL;
    if (!opts->figures_dir)
        return EXIT_OK;
    io_error err = {{0}};
    int st = slowscan_report_batch_open(&outs->figures, opts->figures_dir, opts->figure_format, &err);
    if (st != SLOWSCAN_OK) {
        cli_error("option --figures: %s", err.message);
        return st == SLOWSCAN_ENOMEM ? EXIT_INTERNAL : EXIT_BAD_INPUT;
    }
    /* The test hook of the geometry test: a box manifest beside every figure. */
    const char *boxes = getenv("SLOWSCAN_FIGURE_BOXES");
    slowscan_report_batch_record_boxes(outs->figures, boxes && *boxes && strcmp(boxes, "0") != 0);
    *figures = outs->figures;
    return EXIT_OK;
}

int cli_figure_draw(report_batch *figures, const report_figure_type *type, const void *data,
                    const char *prefix, const char *name)
{
    io_error err = {{0}};
    int st = slowscan_report_batch_draw(figures, type, data, prefix, name, &err);
    if (st == SLOWSCAN_OK)
        return EXIT_OK;
    cli_error("option --figures: %s", err.message);
    return st == SLOWSCAN_EIO ? EXIT_BAD_INPUT : EXIT_INTERNAL;
}

int cli_several_inputs(const cli_options *opts)
{
    return opts->nfiles > 1;
}

void cli_put_header(FILE *fp, const cli_options *opts, const char *columns)
{
    if (cli_several_inputs(opts))
        fputs("file,", fp);
    fputs(columns, fp);
}

void cli_put_series(FILE *fp, const cli_options *opts, const char *source, const char *name)
{
    if (cli_several_inputs(opts)) {
        cli_put_field(fp, source);
        fputc(',', fp);
    }
    cli_put_field(fp, name);
}

void cli_put_number(FILE *fp, double v)
{
    if (isfinite(v))
        fprintf(fp, "%.12g", v == 0 ? 0.0 : v); /* no "-0" */
    else
        fputs("NA", fp);
}

const double *cli_figure_times(const prepared_series *ps, double **owned, char *label,
                               size_t size)
{
    *owned = NULL;
    if (ps->axis.unit == TIME_AXIS_NUMBER) {
        snprintf(label, size, "%s%s", ps->axis.backward ? "-" : "", ps->time_name);
        return ps->time;
    }
    snprintf(label, size, "%s (year)", ps->time_name);
    if (!(*owned = malloc(ps->n * sizeof **owned)))
        return NULL;
    for (size_t i = 0; i < ps->n; i++)
        (*owned)[i] = slowscan_time_axis_decimal_year(&ps->axis, ps->time[i]);
    return *owned;
}

const char *cli_time_unit(const time_axis *axis)
{
    const char *name = slowscan_time_axis_unit_name(axis->unit);
    return name ? name : "";
}

void cli_put_time(FILE *fp, const time_axis *axis, double v)
{
    char text[64];
    if (!isfinite(v) || axis->unit == TIME_AXIS_NUMBER) {
        cli_put_number(fp, axis->backward ? -v : v); /* ages as written */
        return;
    }
    slowscan_time_axis_format(axis, v, text, sizeof text);
    fputs(text, fp);
}

void cli_put_field(FILE *fp, const char *s)
{
    if (!strpbrk(s, ",;\t\"\r\n")) {
        fputs(s, fp);
        return;
    }
    fputc('"', fp);
    for (; *s; s++) {
        if (*s == '"')
            fputc('"', fp);
        fputc(*s, fp);
    }
    fputc('"', fp);
}

/* The one loop over the series of a run, in input order, with progress. */
static int for_each_table_series(const cli_options *opts, const cli_inputs *in,
                                 table_visitor visit, void *context)
{
    cli_progress progress;
    cli_progress_start(&progress, opts, cli_inputs_series_count(in));
    cli_cursor cursor;
    cli_cursor_start(&cursor, opts, in);
    const series_table *t;
    size_t k;
    int rc;
    while ((rc = cli_cursor_next(&cursor, &t, &k)) == EXIT_OK) {
        rc = visit(opts, in, t, k, context);
        if (rc != EXIT_OK)
            break;
        cli_progress_series_done(&progress);
    }
    cli_cursor_end(&cursor);
    return rc == CLI_CURSOR_END ? EXIT_OK : rc;
}

void cli_tally_leakage(cli_leakage_tally *tally, const char *source, const char *name,
                       const detrend_leakage *leakage, int tested)
{
    tally->tested += tested != 0;
    if (!tested || !leakage->leaking)
        return;
    if (tally->count < CLI_LEAKAGE_NAMED) {
        char (*text)[512] = tally->text[tally->count];
        snprintf(text[0], sizeof text[0], "%s", source ? source : "");
        snprintf(text[1], sizeof text[1], "%s", name ? name : "");
        tally->source[tally->count] = source ? text[0] : NULL;
        tally->name[tally->count] = text[1];
        tally->first[tally->count] = *leakage;
    }
    tally->count++;
}

typedef struct {
    series_visitor visit;
    void *context;
    cli_leakage_tally leakage;
} prepared_visit;

static int prepare_and_visit(const cli_options *opts, const cli_inputs *in,
                             const series_table *t, size_t k, void *c)
{
    prepared_visit *pv = c;
    prepared_series ps;
    int rc = cli_prepare_series(opts, t, k, &ps);
    if (rc == EXIT_OK)
        cli_tally_leakage(&pv->leakage, ps.source, ps.name, &ps.leakage, ps.leakage_tested);
    if (rc == EXIT_OK) /* a series that does not vary needs none: the library's rule */
        rc = cli_attach_control(opts, in, &ps);
    if (rc == EXIT_OK)
        rc = pv->visit(opts, &ps, pv->context);
    cli_prepared_free(&ps);
    return rc;
}

int cli_for_each_series(const cli_options *opts, const cli_inputs *in, series_visitor visit,
                        void *context)
{
    prepared_visit pv = {.visit = visit, .context = context};
    int rc = for_each_table_series(opts, in, prepare_and_visit, &pv);
    if (rc == EXIT_OK)
        cli_report_leakage(opts, &pv.leakage);
    return rc;
}

/* The outputs of the running command, for the exit handler below: PLplot ends the process on
 * a fatal error (report/figure.c), and the temporary files of the tables must not outlive it. */
static cli_outputs *live_outputs;

static void abort_live_outputs(void)
{
    if (live_outputs)
        cli_outputs_abort(live_outputs);
    live_outputs = NULL;
}

int cli_run_series_command(const cli_options *opts, const series_command *cmd)
{
    cli_inputs in;
    cli_outputs outs = {0};
    static int registered;
    if (!registered)
        registered = atexit(abort_live_outputs) == 0;
    live_outputs = &outs;
    /* in a run shared by several processes (share.h) only process 0 writes outputs */
    const cli_share *share = cli_share_get();
    int writer = !share || share->rank == 0;
    int rc = cli_inputs_load(opts, &in);
    if (rc == EXIT_OK)
        rc = cli_memory_guard(opts, &in); /* a run that cannot fit is refused before it starts */
    if (rc == EXIT_OK && cmd->open && writer)
        rc = cmd->open(opts, &outs, cmd->context);
    if (share) /* no process goes on with work another cannot do (share.h) */
        rc = cli_share_begin(share, rc);
    if (rc == EXIT_OK && cmd->run)
        rc = cmd->run(opts, &in, cmd->context);
    else if (rc == EXIT_OK)
        rc = cmd->visit_table ? for_each_table_series(opts, &in, cmd->visit_table, cmd->context)
                              : cli_for_each_series(opts, &in, cmd->visit, cmd->context);
    if (rc == EXIT_OK && cmd->finish && writer)
        rc = cmd->finish(opts, cmd->context);
    if (rc == EXIT_OK && cmd->figures && outs.figures)
        rc = cmd->figures(opts, &in, cmd->context);
    if (rc == EXIT_OK && writer)
        rc = cli_outputs_commit(&outs);
    else
        cli_outputs_abort(&outs);
    live_outputs = NULL;
    cli_inputs_free(&in);
    return share ? share->agree(share, rc) : rc; /* every process ends as process 0 does */
}

const char cli_rolling_header[] = "series,time,indicator,value\n";

void cli_write_rolling(FILE *fp, const cli_options *opts, const prepared_series *ps,
                       double *const *values)
{
    screen_config cfg;
    cli_screen_config(opts, &cfg);
    rolling_spec spec = slowscan_screen_rolling_spec(&cfg, ps);
    for (size_t j = 0; j < opts->nindicators; j++) {
        const char *name = slowscan_indicator_name(opts->indicators[j]);
        /* Only the windows evaluated on the indicator's step have a row; an evaluated window
         * whose value is undefined is NA, as at step 1. */
        size_t step = slowscan_rolling_step(&spec, opts->indicators[j], ps->n);
        int power = slowscan_indicator_scale_power(opts->indicators[j]);
        for (size_t i = ps->window - 1; i < ps->n; i++) {
            if (!rolling_evaluated(step, ps->n, i))
                continue;
            cli_put_series(fp, opts, ps->source, ps->name);
            fputc(',', fp);
            cli_put_time(fp, &ps->axis, ps->time[i]);
            fprintf(fp, ",%s,", name);
            /* the series' own units (a 1e300 series' variance is beyond doubles: NA) */
            cli_put_number(fp, slowscan_screen_unscale(ps, values[j][i], power));
            fputc('\n', fp);
        }
    }
}

void cli_json_string(FILE *fp, const char *s)
{
    fputc('"', fp);
    for (const unsigned char *c = (const unsigned char *)s; *c; c++) {
        if (*c == '"' || *c == '\\')
            fprintf(fp, "\\%c", *c);
        else if (*c < 0x20)
            fprintf(fp, "\\u%04x", *c);
        else
            fputc(*c, fp);
    }
    fputc('"', fp);
}

void cli_json_number(FILE *fp, double v)
{
    if (isfinite(v))
        fprintf(fp, "%.17g", v);
    else
        fputs("null", fp); /* RFC 8259 has no NaN */
}
