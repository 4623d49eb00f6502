/* The shared run of timescales and emulate (modes_run.h). */
#include "modes_run.h"
#include "modes_cli.h"
#include "forced_inputs.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* The command's hooks, wrapped so that the shared driver's one context carries them all. */
typedef struct {
    modes_visitor visit;
    int (*open)(const cli_options *, cli_outputs *, void *);
    int (*finish)(const cli_options *, void *);
    void *context;
    series_table baseline; /* --baseline FILE */
    int has_baseline;
} modes_walk;

static int walk_open(const cli_options *opts, cli_outputs *outs, void *context)
{
    modes_walk *w = context;
    int rc = w->open ? w->open(opts, outs, w->context) : EXIT_OK;
    if (rc == EXIT_OK)
        rc = cli_forced_load_baseline(opts, outs, &w->baseline, &w->has_baseline);
    return rc;
}

static int walk_finish(const cli_options *opts, void *context)
{
    modes_walk *w = context;
    return w->finish ? w->finish(opts, w->context) : EXIT_OK;
}

/* The index of column `name` in t, or (size_t)-1. */
static size_t column_index(const series_table *t, const char *name)
{
    for (size_t k = 0; name && k < t->nseries; k++)
        if (strcmp(t->names[k], name) == 0)
            return k;
    return (size_t)-1;
}

/* The file row of sample i, for messages (the sample's position when resampled). */
static size_t file_row(const series_table *t, size_t i)
{
    return t->rows ? t->rows[i] : i + 2;
}

/* The library's refusal of a run's samples (slowscan_timescales_select) in the options'
 * words. */
static int series_refused(const cli_options *opts, const series_table *t, size_t k, size_t f,
                          const timescales_selection *sel)
{
    const char *source = cli_source_name(t->source);
    switch (sel->refusal) {
    case TIMESCALES_REFUSAL_UNIT:
        return cli_forced_unmeasurable("--skip", opts->forced.skip.text, &t->axis);
    case TIMESCALES_REFUSAL_MISSING:
        cli_error("%s: row %zu, column '%s': missing value; %s needs a complete record "
                  "(cut the span with --from/--until)", source, file_row(t, sel->sample),
                  t->names[sel->column ? f : k], opts->command);
        break;
    default:
        cli_error("%s: column '%s': %zu samples after the onset (%g)%s; %s with --max-modes %ld "
                  "needs at least %zu", source, t->names[k], sel->count, sel->onset,
                  sel->skip > 0 ? " and --skip" : "", opts->command, opts->modes.max_modes,
                  sel->need);
    }
    return EXIT_BAD_INPUT;
}

int cli_modes_series(const cli_options *opts, const series_table *t, size_t k, size_t f,
                     modes_series *s, double **owned)
{
    const cli_forced_length *skip_len = &opts->forced.skip;
    screen_length skip = cli_forced_request(skip_len->amount, skip_len->percent, skip_len->unit,
                                            skip_len->text);
    *owned = malloc((t->n ? t->n : 1) * sizeof **owned);
    if (!*owned) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    int joint = f != (size_t)-1;
    timescales_selection sel;
    if (slowscan_timescales_select(t->time, t->values[k], joint ? t->values[f] : NULL, t->n,
                                   &t->axis, opts->modes.onset, &skip,
                                   (size_t)opts->modes.max_modes, *owned, &sel) != SLOWSCAN_OK)
        return series_refused(opts, t, k, f, &sel);
    size_t i = sel.first;
    *s = (modes_series){.source = cli_source_name(t->source), .name = t->names[k],
                        .n = sel.count, .t = *owned, .time = t->time + i, .y = t->values[k] + i,
                        .flux = joint ? t->values[f] + i : NULL, .onset = sel.onset,
                        .dt = sel.dt, .axis = &t->axis, .time_name = t->time_name,
                        .flux_name = joint ? t->names[f] : NULL};
    return EXIT_OK;
}

int cli_modes_refuse(const cli_options *opts, const modes_series *s, int status)
{
    (void)opts;
    if (status == SLOWSCAN_ENOMEM) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    const char *why = status == SLOWSCAN_ECONST ? "the response does not vary"
                      : status == SLOWSCAN_ENUMERIC ? "no number of modes could be fitted"
                      : status == SLOWSCAN_ESHORT ? "too few samples"
                      : "the times or values cannot be fitted (a time before the onset?)";
    cli_error("%s: column '%s': %s", s->source, s->name, why);
    return EXIT_BAD_INPUT;
}

/* The column an option names in table t, or a refusal naming the option, file and columns. */
int cli_modes_column(const series_table *t, const char *option, const char *name, size_t *k)
{
    *k = column_index(t, name);
    if (*k != (size_t)-1)
        return EXIT_OK;
    char list[512] = "";
    size_t used = 0;
    for (size_t j = 0; j < t->nseries && used < sizeof list; j++)
        used += (size_t)snprintf(list + used, sizeof list - used, "%s%s", j ? ", " : "", t->names[j]);
    cli_error("%s: option %s: there is no column '%s' (columns: %s)", cli_source_name(t->source),
              option, name, list);
    return EXIT_BAD_INPUT;
}

int cli_modes_ready(const cli_options *opts, const series_table *t, size_t k, size_t f,
                    const series_table *baseline, series_table *out)
{
    const size_t cols[2] = {k, f};
    int rc = cli_forced_table(opts, t, cols, f == (size_t)-1 ? 1 : 2, cli_source_name(t->source),
                              out);
    if (rc == EXIT_OK && baseline) {
        rc = cli_forced_anomalies(opts, baseline, cli_forced_offset(opts, &out->axis, NULL), out);
        if (rc != EXIT_OK)
            slowscan_series_table_free(out);
    }
    return rc;
}

/* Series k of t as the command's (the flux beside it with --joint), visited: with --baseline
 * or --annual through a table of its own (cli_modes_ready); a member of an ensemble (NULL:
 * none) keeps its own column name and member in the rows. */
static int visit_one(const cli_options *opts, const series_table *t, size_t k, modes_walk *w,
                     const cli_forced_member *member)
{
    size_t f = (size_t)-1;
    if (opts->modes.joint && cli_modes_column(t, "--flux", opts->forced.flux, &f) != EXIT_OK)
        return EXIT_BAD_INPUT;
    series_table ready = {0};
    int own = w->has_baseline || opts->forced.annual;
    int rc = own ? cli_modes_ready(opts, t, k, f, w->has_baseline ? &w->baseline : NULL, &ready)
                 : EXIT_OK;
    modes_series s;
    double *owned = NULL;
    if (rc == EXIT_OK)
        rc = own ? cli_modes_series(opts, &ready, 0, f == (size_t)-1 ? f : 1, &s, &owned)
                 : cli_modes_series(opts, t, k, f, &s, &owned);
    if (rc == EXIT_OK && member) {
        s.name = member->column;
        s.member = member->member;
    }
    if (rc == EXIT_OK)
        rc = w->visit(opts, &s, w->context);
    free(owned);
    if (own)
        slowscan_series_table_free(&ready);
    return rc;
}

typedef struct {
    const cli_options *opts;
    modes_walk *walk;
} member_visit;

static int visit_member(void *context, const cli_forced_member *m)
{
    member_visit *v = context;
    return visit_one(v->opts, &m->table, 0, v->walk, m);
}

/* Every series of the inputs: the --response column of each table, or every column; with
 * --ensemble the members of the --response ensemble of each table, and their mean. */
static int walk(const cli_options *opts, const cli_inputs *in, void *context)
{
    modes_walk *w = context;
    cli_cursor c;
    cli_cursor_start(&c, opts, in);
    const series_table *t;
    size_t k, r = 0;
    int rc;
    member_visit mv = {opts, w};
    while ((rc = cli_cursor_next(&c, &t, &k)) == EXIT_OK) {
        if (opts->ensemble.on) {
            if (k == 0 && (rc = cli_forced_ensemble(opts, t, opts->forced.response,
                                                    opts->modes.joint ? opts->forced.flux : NULL,
                                                    visit_member, &mv)) != EXIT_OK)
                break;
            continue;
        }
        if (opts->forced.response && k == 0 &&
            (rc = cli_modes_column(t, "--response", opts->forced.response, &r)) != EXIT_OK)
            break;
        if (opts->forced.response && k != r)
            continue;
        if ((rc = visit_one(opts, t, k, w, NULL)) != EXIT_OK)
            break;
    }
    cli_cursor_end(&c);
    return rc == CLI_CURSOR_END ? EXIT_OK : rc;
}

void cli_modes_say(const cli_options *opts, const char *fmt, ...)
{
    if (opts->quiet)
        return;
    va_list ap;
    va_start(ap, fmt);
    cli_progress_message_begin();
    fprintf(stderr, "slowscan: %s: ", opts->command);
    vfprintf(stderr, fmt, ap);
    fputc('\n', stderr);
    cli_progress_message_end();
    va_end(ap);
}

int cli_modes_run(const cli_options *opts,
                  int (*open)(const cli_options *, cli_outputs *, void *),
                  modes_visitor visit, int (*finish)(const cli_options *, void *),
                  void *context)
{
    modes_walk w = {visit, open, finish, context, {0}, 0};
    series_command cmd = {.open = walk_open, .finish = walk_finish, .context = &w, .run = walk};
    int rc = cli_run_series_command(opts, &cmd);
    if (w.has_baseline)
        slowscan_series_table_free(&w.baseline);
    return rc;
}

int cli_modes_read_ref(const cli_options *opts, const cli_series_ref *ref, const char *option,
                       int cut, series_table *table, size_t *k)
{
    memset(table, 0, sizeof *table);
    const char *files[1] = {ref->file};
    cli_options local = *opts;
    local.files = files;
    local.nfiles = 1;
    local.vars = NULL;
    local.control_file = NULL;
    local.use_control = 0;
    if (!cut) {
        local.from = local.until = NAN;
        local.from_text = local.until_text = NULL;
    }
    if (cli_is_netcdf(ref->file) || cli_too_wide(ref->file)) {
        cli_error("option %s: %s: give a CSV table of moderate size (a NetCDF file or a CSV "
                  "read in parts is not taken here)", option, ref->file);
        return EXIT_BAD_INPUT;
    }
    cli_inputs in;
    int rc = cli_inputs_load(&local, &in);
    if (rc == EXIT_OK) {
        *table = in.tables[0];
        memset(&in.tables[0], 0, sizeof in.tables[0]);
    }
    cli_inputs_free(&in);
    if (rc == EXIT_OK)
        rc = cli_modes_column(table, option, ref->column, k);
    if (rc != EXIT_OK)
        slowscan_series_table_free(table);
    return rc;
}
