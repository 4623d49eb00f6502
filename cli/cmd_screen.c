/* slowscan screen: the main job, through the screening library. The batch driver
 * (screen_batch.h) screens every series; each result goes into the run's store
 * (screen_store.h), which keeps only the p-values in memory and spills the records of many
 * series to a temporary file; then q-values and flags (slowscan_screen_store_decide) and the
 * summary, JSON and figures, read back series by series, one row per series x test. This
 * file only turns the results into rows, messages and outputs. */
#include "cli.h"
#include "screen.h"
#include "share.h"
#include "slowscan/screen_batch.h"
#include "slowscan/significance.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>


static int open_outputs(const cli_options *opts, cli_outputs *outs, void *context)
{
    screen_run *run = context;
    int rc = cli_outputs_open(outs, opts, opts->output, "-o", &run->out);
    if (rc == EXIT_OK && opts->rolling_output) {
        rc = cli_outputs_open(outs, opts, opts->rolling_output, "--rolling", &run->rolling);
        if (rc == EXIT_OK)
            cli_put_header(run->rolling, opts, cli_rolling_header);
    }
    if (rc == EXIT_OK && opts->json_output)
        rc = cli_outputs_open(outs, opts, opts->json_output, "--json", &run->json);
    if (rc == EXIT_OK)
        rc = cli_figures_open(outs, opts, &run->figures);
    if (rc == EXIT_OK && opts->maps_output)
        rc = cli_screen_maps_open(opts, outs, run);
    return rc;
}

/* The window of test j in time units; NaN for a test of the whole residual. */
static double rolling_window(const screen_result *res, size_t j)
{
    return slowscan_screen_test_rolling(res->tests[j].kind) ? res->window : NAN;
}

/* Series kept in memory before the store spills to a temporary file; the suites set
 * SLOWSCAN_SPILL_AFTER to make small runs spill (not a user setting). */
static size_t spill_after(void)
{
    const char *text = getenv("SLOWSCAN_SPILL_AFTER");
    char *end;
    unsigned long v = text ? strtoul(text, &end, 10) : 0;
    return text && *text && !*end ? (size_t)v : SCREEN_STORE_SPILL_AFTER;
}

/* The results of many series wait for the q-values in a temporary file in $TMPDIR. */
static int store_failed(int status, const io_error *err)
{
    if (status != SLOWSCAN_EIO) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    cli_error("%s (set TMPDIR to a folder with room for the run's results)", err->message);
    return EXIT_BAD_INPUT;
}

/* One screened series as plain data: what the store and the messages need of it, accepted at
 * once by a lone process, or first sent to process 0 of a shared run (share.h). The name (with
 * its NUL) and the store's extra block follow the head. */
typedef struct {
    screen_result result;
    screen_variation constant;
    size_t name_size, extra_size;
} series_record;

/* The record of a series into *buf (grown as needed); its size, or 0 when out of memory. The
 * store's extra block: where the series came from, then the time unit of its window and
 * bandwidth and its file. */
static size_t make_record(const prepared_series *ps, const screen_result *res,
                          const screen_origin *origin, void **buf, size_t *cap)
{
    char extra[1024];
    memcpy(extra, origin, sizeof *origin);
    char *text = extra + sizeof *origin;
    size_t room = sizeof extra - sizeof *origin;
    size_t len = (size_t)snprintf(text, room, "%s%c%s", cli_time_unit(&ps->axis), 0, ps->source);
    /* The record goes to the journal and to other processes as bytes: its padding is zeroed
     * (an initializer leaves it undefined, and valgrind saw stack garbage written to the
     * journal) and the result copied bytewise, its own padding being zero from the library. */
    series_record head;
    memset(&head, 0, sizeof head);
    memcpy(&head.result, res, sizeof *res);
    head.constant = ps->constant;
    head.name_size = strlen(ps->name) + 1;
    head.extra_size = sizeof *origin + (len < room ? len : room - 1) + 1;
    size_t size = sizeof head + head.name_size + head.extra_size;
    if (cli_share_room(buf, cap, size) != EXIT_OK)
        return 0;
    char *out = *buf;
    memcpy(out, &head, sizeof head);
    memcpy(out + sizeof head, ps->name, head.name_size);
    memcpy(out + sizeof head + head.name_size, extra, head.extra_size);
    return size;
}

/* Each series in input order: its warnings, rows, leakage and progress. */
typedef struct {
    const cli_options *opts;
    screen_run *run;
    const screen_origin *origins; /* the source's, by series index */
    cli_leakage_tally leakage;
    size_t total;
    cli_progress progress;
    record_spill *shared; /* a shared run: this process's records, gathered after its share */
    void *record;         /* the record being made */
    size_t record_cap;
    int rc; /* the exit code of a failed sink */
    size_t rank, ranks; /* this process's share: the batch's series k is the run's
                           replayed + k ranks + rank */
} ordered_sink;

/* A record into the run's store (the figures read each test's null from the quantiles of its
 * result), with the series' warnings and each insufficient test's. */
static int accept_record(const void *data, size_t size, void *context)
{
    ordered_sink *sink = context;
    screen_run *run = sink->run;
    series_record head;
    if (size >= sizeof head)
        memcpy(&head, data, sizeof head);
    if (size < sizeof head || size != sizeof head + head.name_size + head.extra_size ||
        head.extra_size <= sizeof(screen_origin)) { /* every process runs the same binary */
        cli_error("a series' record arrived damaged (%zu bytes)", size);
        return EXIT_INTERNAL;
    }
    const screen_result *res = &head.result;
    const char *name = (const char *)data + sizeof head;
    const char *extra = name + head.name_size, *unit = extra + sizeof(screen_origin);
    prepared_series ps = {.name = name, .source = unit + strlen(unit) + 1,
                          .constant = head.constant};
    for (size_t w = 0; w < res->nwarnings; w++)
        cli_screen_warn(sink->opts, &ps, &res->warnings[w]);
    for (size_t j = 0; j < res->ntests; j++) {
        const screen_test *t = &res->tests[j];
        /* a constant series was warned about when its paths were made */
        if (isnan(t->statistic) && !ps.constant)
            cli_screen_insufficient(&ps, t);
    }
    /* the table's first column: FILE:SERIES when there are several inputs */
    int width = (int)strlen(ps.name) + (run->several ? (int)strlen(ps.source) + 1 : 0);
    if (res->ntests > 0 && width > run->name_width)
        run->name_width = width;
    io_error err = {{0}};
    screen_origin origin;
    memcpy(&origin, extra, sizeof origin);
    /* --ensemble: the ensemble means go to their own store (their own BH family) */
    screen_store *store = cli_ensemble_store_for(run, origin.input, name);
    int st = slowscan_screen_store_add(store, name, res, extra, head.extra_size, &err);
    if (st != SLOWSCAN_OK)
        return store_failed(st, &err);
    cli_tally_leakage(&sink->leakage, ps.source, ps.name, &res->leakage, res->leakage_tested);
    cli_progress_series_done(&sink->progress);
    return EXIT_OK;
}

size_t cli_screen_series_rows(screen_run *run, size_t k, screen_row *rows, int *rc)
{
    screen_stored s;
    io_error err = {{0}};
    int st = slowscan_screen_store_read(run->store, k, &s, &err);
    if (st != SLOWSCAN_OK) {
        *rc = store_failed(st, &err);
        return 0;
    }
    const screen_result *res = &s.result;
    screen_origin origin;
    memcpy(&origin, s.extra, sizeof origin);
    const char *unit = (const char *)s.extra + sizeof origin;
    for (size_t j = 0; j < res->ntests; j++)
        rows[j] = (screen_row){s.name, res->n, rolling_window(res, j), res->bandwidth,
                               s.q_value[j], res->tests[j], s.flag[j], res->harmonics,
                               res->leakage, res->leakage_tested, unit + strlen(unit) + 1, unit,
                               origin, cli_ensemble_role(run, origin.input, s.name), NAN,
                               NAN, NAN};
    for (size_t j = 0; run->seq && j < res->ntests; j++) { /* --surrogates auto */
        rows[j].flag = slowscan_screen_sequential_flag(run->seq->run, k, j, &res->tests[j],
                                                       s.flag[j]);
        slowscan_screen_sequential_interval(run->seq->run, k, j, &rows[j].p_low, &rows[j].p_high);
    }
    *rc = EXIT_OK;
    return res->ntests;
}

/* The rows of every series of `store` (the run's, or with --ensemble the means'), counting
 * on from *index. */
static int each_stored_row(screen_run *run, screen_store *store, screen_row_visitor visit,
                           void *context, size_t *index)
{
    screen_store *own = run->store;
    run->store = store; /* cli_screen_series_rows reads the run's store */
    size_t series = slowscan_screen_store_count(store);
    int rc = EXIT_OK;
    for (size_t k = 0; rc == EXIT_OK && k < series; k++) {
        screen_row rows[SCREEN_MAX_TESTS];
        size_t tests = cli_screen_series_rows(run, k, rows, &rc);
        for (size_t j = 0; rc == EXIT_OK && j < tests; j++)
            rc = visit(&rows[j], (*index)++, context);
    }
    run->store = own;
    return rc;
}

int cli_screen_each_row(screen_run *run, screen_row_visitor visit, void *context)
{
    size_t index = 0;
    int rc = each_stored_row(run, run->store, visit, context, &index);
    if (rc == EXIT_OK && run->ensemble)
        rc = each_stored_row(run, cli_ensemble_means(run), visit, context, &index);
    return rc == EXIT_OK && run->ensemble ? cli_ensemble_pooled_rows(run, visit, context, index)
                                          : rc;
}

static int put_series(void *state, const screen_batch_item *item)
{
    ordered_sink *sink = state;
    const prepared_series *ps = item->prepared;
    /* with --resume the rolling rows are journaled too: written to memory first */
    char *rows = NULL;
    size_t nrows = 0;
    FILE *rolling = sink->run->rolling;
    if (rolling && sink->run->resume.journal && !(rolling = open_memstream(&rows, &nrows)))
        return SLOWSCAN_ENOMEM;
    if (rolling)
        cli_write_rolling(rolling, sink->opts, ps, (double *const *)item->paths);
    if (rolling && rolling != sink->run->rolling) {
        fclose(rolling);
        fwrite(rows, 1, nrows, sink->run->rolling);
    }
    screen_result patched;
    const screen_result *res = item->result;
    if (sink->run->seq) { /* --surrogates auto: the rounds' p-values and counts */
        memcpy(&patched, res, sizeof patched); /* padding and all: it becomes a record */
        size_t g = sink->run->resume.replayed + item->index * sink->ranks + sink->rank;
        slowscan_screen_sequential_patch(sink->run->seq->run, g, &patched);
        res = &patched;
    }
    size_t size = make_record(ps, res, &sink->origins[item->index], &sink->record,
                              &sink->record_cap);
    io_error err = {{0}};
    if (size > 0 && cli_screen_journal(sink->run, sink->record, size, rows, nrows) != EXIT_OK)
        size = 0, sink->rc = EXIT_BAD_INPUT; /* the journal's message is printed */
    if (size > 0 && cli_ensemble_collect(sink->run, sink->origins[item->index].input, item) != EXIT_OK)
        size = 0, sink->rc = EXIT_INTERNAL; /* its message is printed */
    free(rows);
    if (size == 0 && sink->rc != EXIT_OK) {
        /* nothing more to say */
    } else if (size == 0) {
        cli_error("out of memory");
        sink->rc = EXIT_INTERNAL;
    } else if (sink->shared) {
        int st = slowscan_spill_append(sink->shared, sink->record, size, &err);
        sink->rc = st == SLOWSCAN_OK ? EXIT_OK : store_failed(st, &err);
    } else {
        sink->rc = accept_record(sink->record, size, sink);
    }
    return sink->rc == EXIT_OK ? SLOWSCAN_OK : SLOWSCAN_ENOMEM;
}

/* The failure that ended a run, in the words of the per-series commands. */
static int refuse(const cli_options *opts, const screen_batch_failure *f, const ordered_sink *sink)
{
    if (sink->rc != EXIT_OK)
        return sink->rc; /* the sink's own failure, already reported */
    for (size_t w = 0; w < f->result.nwarnings; w++)
        cli_screen_warn(opts, &f->prepared, &f->result.warnings[w]);
    if (f->detail.control)
        return cli_control_refuse(opts, f->input.control, &f->prepared, &f->detail);
    return cli_screen_refuse(opts, &f->prepared, &f->detail);
}

/* A series that fails in a round of --surrogates auto, in the same words. */
static int refuse_round(const cli_options *opts, const screen_batch_failure *f)
{
    ordered_sink none = {.rc = EXIT_OK};
    return refuse(opts, f, &none);
}

/* Surrogates drawn inside a series still running (the batch driver calls this one at a time). */
static void series_progress(void *state, const screen_progress *progress)
{
    ordered_sink *sink = state;
    cli_progress_surrogates(&sink->progress, progress);
}

/* Every series of this process through the library's batch driver: threads over whole
 * series, or over one series' surrogates when series are fewer than threads; results in
 * input order. */
static int screen_share(const cli_options *opts, const cli_inputs *in, ordered_sink *sink,
                        input_source *src)
{
    size_t all = sink->total;
    if (cli_screen_source_arrays(in, src, all) != EXIT_OK)
        return EXIT_INTERNAL;
    sink->origins = src->origins;
    sink->rank = src->rank, sink->ranks = src->ranks;
    /* this process's series: every ranks-th from its own rank, after the journal's */
    size_t left = all - src->skip;
    size_t mine = left / src->ranks + (src->rank < left % src->ranks);
    screen_source source = {cli_screen_next_series, cli_screen_release_series, mine, src};
    /* Only --rolling needs the paths handed on: the figures read the null's quantiles from
     * the results and prepare the series again once the q-values exist. */
    screen_sink ordered = {.put = put_series, .state = sink,
                           .keep_series = sink->run->rolling != NULL || sink->run->ensemble,
                           .progress = opts->progress > 0 ? series_progress : NULL};
    screen_batch_failure failure;
    int st = slowscan_screen_batch_run(&sink->run->cfg, &source, &ordered, &failure);
    return st == SLOWSCAN_OK ? EXIT_OK : src->rc != EXIT_OK ? src->rc : refuse(opts, &failure, sink);
}

/* A run shared by several processes: each screens its share, its messages held back; then
 * process 0 takes every record in input order (the others send theirs). */
static int screen_shared(const cli_options *opts, const cli_inputs *in, ordered_sink *sink,
                         input_source *src, const cli_share *share)
{
    src->rank = share->rank, src->ranks = share->ranks, src->share = share;
    char *text = NULL;
    size_t len = 0;
    FILE *held = open_memstream(&text, &len);
    FILE *before = held ? cli_messages_to(held) : NULL;
    io_error err = {{0}};
    /* even a process that cannot start ends its stream, so that process 0 waits for nothing */
    int rc = (sink->shared = slowscan_spill_alloc(spill_after(), NULL))
                 ? screen_share(opts, in, sink, src)
                 : store_failed(SLOWSCAN_ENOMEM, &err);
    if (held) {
        cli_messages_to(before);
        fclose(held);
    }
    /* what process 0 said of the inputs while it walked them (a grid's notices) comes first;
     * a failure's words wait for their place in input order */
    if (rc == EXIT_OK && share->rank == 0 && text)
        fputs(text, stderr);
    share_outcome mine = {sink->shared ? slowscan_spill_count(sink->shared) : 0, rc, text};
    rc = cli_share_gather(share, sink->shared, &mine, accept_record, sink);
    free(text);
    slowscan_spill_free(sink->shared);
    return rc;
}

/* A series taken from the journal (--resume): to the outputs as if just computed. */
static int replay_series(void *state, const void *record, size_t size)
{
    ordered_sink *sink = state;
    int round = sink->run->seq ? cli_sequential_replay(sink->run->seq, record, size) : 0;
    if (round != 0) { /* --surrogates auto: a finished round, kept for the rounds */
        sink->run->resume.rounds += round > 0;
        return round > 0 ? SLOWSCAN_OK : SLOWSCAN_ENOMEM;
    }
    const void *series;
    size_t series_size;
    const char *rows;
    size_t rows_size;
    if (cli_screen_unjournal(record, size, &series, &series_size, &rows, &rows_size) != EXIT_OK)
        return SLOWSCAN_EINVAL;
    if (sink->run->rolling)
        fwrite(rows, 1, rows_size, sink->run->rolling);
    return accept_record(series, series_size, sink) == EXIT_OK ? SLOWSCAN_OK : SLOWSCAN_EINVAL;
}

static int run_series(const cli_options *opts, const cli_inputs *in, void *context)
{
    screen_run *run = context;
    /* --ensemble adds each ensemble's mean to its table as a column before the walk (the
     * inputs are the run's own, loaded for it by cli_run_series_command) */
    int ens = cli_ensemble_start(opts, (cli_inputs *)in, run);
    if (ens != EXIT_OK)
        return ens;
    ordered_sink sink = {.opts = opts, .run = run, .total = cli_inputs_series_count(in)};
    input_source src = {.ranks = 1, .rc = EXIT_OK};
    const cli_share *share = cli_share_get();
    if (share && opts->resume) {
        cli_error("option --resume: not in a run shared by several processes (journal each "
                  "job of a split field instead, and merge their summaries)");
        return EXIT_BAD_INPUT;
    }
    cli_progress_start(&sink.progress, opts, sink.total);
    /* --surrogates auto: the journal's rounds are taken back before the rounds run, its
     * series (the ordinary pass's) to the outputs as ever */
    int rc = opts->surrogates_auto ? cli_sequential_start(opts, run, sink.total) : EXIT_OK;
    if (rc == EXIT_OK)
        rc = cli_resume_open(opts, replay_series, &sink, &run->resume);
    /* --surrogates auto: its rounds first; the ordinary pass then draws no surrogates */
    if (rc == EXIT_OK && opts->surrogates_auto)
        rc = cli_sequential_run(opts, in, run, refuse_round);
    if (rc != EXIT_OK)
        return rc;
    cli_cursor_start(&src.cursor, opts, in);
    src.skip = run->resume.replayed; /* the journal's series come first, in order */
    rc = share ? screen_shared(opts, in, &sink, &src, share) : screen_share(opts, in, &sink, &src);
    if (rc == EXIT_OK && (!share || share->rank == 0))
        cli_report_leakage(opts, &sink.leakage);
    cli_screen_source_end(&src, sink.total);
    free(sink.record);
    return rc;
}

int cli_screen_journal(screen_run *run, const void *series, size_t series_size, const char *rows,
                       size_t rows_size)
{
    if (!run->resume.journal)
        return EXIT_OK;
    void *record;
    size_t size;
    if (cli_screen_encode(series, series_size, rows, rows_size, &record, &size) != EXIT_OK) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    int rc = cli_resume_record(&run->resume, record, size);
    free(record);
    return rc;
}

typedef struct {
    const cli_options *opts;
    FILE *out;
    int width; /* the table's first column */
} row_writer;

static int write_csv_row(const screen_row *row, size_t index, void *context)
{
    (void)index;
    const row_writer *w = context;
    cli_put_series(w->out, w->opts, row->file, row->series);
    fprintf(w->out, ",%s,%zu,", slowscan_screen_test_name(row->result.kind), row->n);
    const double cells[] = {row->window, row->bandwidth, row->result.tau, row->result.statistic,
                            row->result.p_value, row->q_value};
    for (size_t c = 0; c < sizeof cells / sizeof cells[0]; c++) {
        cli_put_number(w->out, cells[c]);
        fputc(',', w->out);
    }
    int seq = w->opts->surrogates_auto;
    fprintf(w->out, "%s,%ld,%s", w->opts->surrogates > 0 || seq ? cli_null_name(w->opts) : "none",
            seq ? (long)row->result.surrogates : w->opts->surrogates,
            slowscan_screen_flag_name(row->flag));
    if (seq) { /* the Monte Carlo interval of p */
        fputc(',', w->out);
        cli_put_number(w->out, row->p_low);
        fputc(',', w->out);
        cli_put_number(w->out, row->p_high);
    }
    if (row->role) { /* --ensemble */
        fprintf(w->out, ",%s,", row->role);
        cli_put_number(w->out, row->share_flagged);
    }
    cli_screen_tail_cell(w->out, w->opts, ",", &row->result);
    fputc('\n', w->out);
    return EXIT_OK;
}

static const char *fixed(char buf[32], double v, int digits, int sign)
{
    if (isnan(v))
        return "NA";
    snprintf(buf, 32, sign ? "%+.*f" : "%.*f", digits, v);
    return buf;
}

/* A table for people: aligned columns, the series names padded to the longest. */
static int write_table_row(const screen_row *row, size_t index, void *context)
{
    (void)index;
    const row_writer *w = context;
    char tau[32], p[32], q[32], name[1024];
    snprintf(name, sizeof name, "%s%s%s", cli_several_inputs(w->opts) ? row->file : "",
             cli_several_inputs(w->opts) ? ":" : "", row->series);
    /* with --tail the flag is padded to align the p_source column after it */
    fprintf(w->out, w->opts->tail.method ? "%-*s  %-14s %9s %10s %10s  %-12s"
                                         : "%-*s  %-14s %9s %10s %10s  %s", w->width, name,
            slowscan_screen_test_name(row->result.kind), fixed(tau, row->result.statistic, 3, 1),
            fixed(p, row->result.p_value, 4, 0), fixed(q, row->q_value, 4, 0),
            slowscan_screen_flag_name(row->flag));
    cli_screen_tail_cell(w->out, w->opts, " ", &row->result);
    fputc('\n', w->out);
    return EXIT_OK;
}

static int write_summary(const cli_options *opts, screen_run *run)
{
    row_writer w = {opts, run->out, run->name_width > 6 ? run->name_width : 6};
    if (strcmp(opts->format, "table") != 0) {
        cli_put_header(run->out, opts, opts->ensemble.on
                       ? "series,indicator,n,window,bandwidth,tau,statistic,p_value,"
                         "q_value,null,surrogates,flag,role,share_flagged"
                       : opts->surrogates_auto
                       ? "series,indicator,n,window,bandwidth,tau,statistic,p_value,"
                         "q_value,null,surrogates,flag,p_low,p_high"
                       : "series,indicator,n,window,bandwidth,tau,statistic,p_value,"
                         "q_value,null,surrogates,flag");
        fprintf(run->out, "%s\n", cli_screen_tail_columns(opts));
        return cli_screen_each_row(run, write_csv_row, &w);
    }
    fprintf(run->out, opts->tail.method ? "%-*s  %-14s %9s %10s %10s  %-12s p_source\n"
                                        : "%-*s  %-14s %9s %10s %10s  %s\n",
            w.width, "series", "indicator", "statistic", "p", "q", "flag");
    return cli_screen_each_row(run, write_table_row, &w);
}

/* q-values over every test of the run (Benjamini-Hochberg) and the flags, then the outputs,
 * read back series by series from the store. */
static int finish(const cli_options *opts, void *context)
{
    screen_run *run = context;
    if (slowscan_screen_store_decide(run->store, opts->fdr) != SLOWSCAN_OK) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    int rc = cli_ensemble_finish(opts, run);
    if (rc == EXIT_OK)
        rc = run->json ? cli_screen_json(run->json, opts, run) : EXIT_OK;
    if (rc == EXIT_OK && run->maps)
        rc = cli_screen_maps_fill(run);
    if (rc == EXIT_OK && run->seq)
        cli_sequential_report(run->seq);
    return rc == EXIT_OK ? write_summary(opts, run) : rc;
}

int cmd_screen(const cli_options *opts)
{
    if (cli_share_get() && opts->rolling_output) {
        cli_error("option --rolling: not available when the run is shared by several processes "
                  "(mpirun -np K with K > 1); write the rolling paths with one process");
        return EXIT_BAD_INPUT;
    }
    if (cli_screen_tail_check(opts) != EXIT_OK || cli_sequential_check(opts) != EXIT_OK)
        return EXIT_BAD_INPUT;
    screen_run run = {0};
    run.several = cli_several_inputs(opts);
    cli_screen_config(opts, &run.cfg);
    if (!(run.store = slowscan_screen_store_alloc(spill_after(), NULL))) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    series_command cmd = {open_outputs, NULL, finish, &run, NULL, cli_screen_figures, run_series};
    if (opts->surrogates > 0 && opts->surrogates < 19)
        cli_warning("option --surrogates %ld: with fewer than 19 surrogates no p-value can reach "
                    "0.05 (the smallest is 1/(M+1))", opts->surrogates);
    cli_resume_clean(opts);
    int rc = cli_run_series_command(opts, &cmd);
    /* the journal goes once the outputs are in place; a failed run keeps it */
    cli_resume_close(&run.resume, rc == EXIT_OK);
    cli_ensemble_free(&run);
    cli_sequential_free(run.seq);
    slowscan_screen_store_free(run.store);
    return rc;
}
