/* screen --surrogates auto: the library's rounds (screen_sequential.h) over the inputs, before
 * the run's one ordinary pass, which draws no surrogates and takes its p-values, counts and
 * flags from them. What only the command does is here, in the rounds' hooks: each round's
 * walk of the inputs (a grid is re-read a table at a time), the counts summed over the
 * processes of slowscan-mpi, the rounds journaled with --resume and taken back on a restart,
 * the trace, the messages. */
#include "cli.h"
#include "screen.h"
#include "share.h"
#include "slowscan/message.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

int cli_sequential_check(const cli_options *opts)
{
    int risk = opts->risk != 1e-2 || opts->risk_joint;
    if (!opts->surrogates_auto && (opts->budget > 0 || opts->max_per_series != 100000 || risk)) {
        cli_error("option %s: only with --surrogates auto",
                  opts->budget > 0                ? "--budget"
                  : opts->max_per_series != 100000 ? "--max-per-series"
                  : opts->risk_joint               ? "--risk-joint"
                                                   : "--risk");
        return EXIT_BAD_INPUT;
    }
    if (opts->surrogates_auto && opts->ensemble.on) {
        cli_error("option --surrogates auto: not with --ensemble yet (its pooled tests are not "
                  "sequential; give a fixed number of surrogates)");
        return EXIT_BAD_INPUT;
    }
    return EXIT_OK;
}

/* The processes of a shared run each put two words in front of a round's counts: the
 * series it failed at + 1 (0: none), and its exit code. */
static size_t share_words(const cli_share *s)
{
    return s ? 2 * s->ranks : 0;
}

/* A round's walk of the inputs: this process's series, in order (the library skips those
 * the round does not draw for). */
static int walk_next(void *state, size_t index, screen_input *in, screen_detail *d)
{
    cli_sequential *c = state;
    c->failed_at = c->src.walked; /* walked counts every process's series */
    return cli_screen_next_series(&c->src, index, in, d);
}

static void walk_release(void *state, size_t index)
{
    cli_screen_release_series(&((cli_sequential *)state)->src, index);
}

/* Before a round is drawn: the walk restarted; in a shared run the messages held back until
 * the processes agree. */
static int round_begin(void *context, size_t round)
{
    (void)round;
    cli_sequential *c = context;
    const cli_share *s = cli_share_get();
    c->text = NULL, c->len = 0, c->held = NULL;
    if (s && (c->held = open_memstream(&c->text, &c->len)))
        c->before = cli_messages_to(c->held);
    c->src = (input_source){.rank = s ? s->rank : 0, .ranks = s ? s->ranks : 1, .rc = EXIT_OK};
    cli_cursor_start(&c->src.cursor, c->opts, c->in);
    c->rc = cli_screen_source_arrays(c->in, &c->src, c->series);
    return c->rc == EXIT_OK ? SLOWSCAN_OK : SLOWSCAN_ENOMEM;
}

/* A shared round's end: the counts summed over the processes; when some failed, the failure
 * first in input order is the run's, its words printed by process 0 (sent by the process
 * that met it), as a lone process would have printed them. */
static int share_round(const cli_share *s, const cli_sequential *c, int rc, uint64_t *words,
                       size_t nwords)
{
    const char *text = c->text;
    uint64_t *head = words;
    head[s->rank] = rc != EXIT_OK ? (uint64_t)c->failed_at + 1 : 0;
    head[s->ranks + s->rank] = (uint64_t)(int64_t)rc;
    /* the processes started without waiting for each other (share.h): a process that could
     * not start takes no part in the sum, so its outcome is known before the first one */
    int started = cli_share_settle(s);
    if (started != EXIT_OK)
        return started;
    if (s->sum(s, words, nwords) != EXIT_OK)
        return EXIT_INTERNAL;
    size_t who = s->ranks;
    for (size_t r = 0; r < s->ranks; r++)
        if (head[r] && (who == s->ranks || head[r] < head[who]))
            who = r;
    if (who == s->ranks) {
        if (s->rank == 0 && text)
            fputs(text, stderr);
        return EXIT_OK;
    }
    if (s->rank == who && who != 0)
        s->send(s, SHARE_FAILED, text ? text : "", text ? strlen(text) + 1 : 1);
    if (s->rank == 0 && who == 0 && text)
        fputs(text, stderr);
    if (s->rank == 0 && who != 0) {
        void *buf = NULL;
        size_t size = 0, cap = 0;
        share_kind kind;
        if (s->receive(s, who, &kind, &buf, &size, &cap) == EXIT_OK && size > 0)
            fputs((const char *)buf, stderr);
        free(buf);
    }
    int failed = (int)(int64_t)head[s->ranks + who];
    return failed == EXIT_OK ? EXIT_INTERNAL : failed;
}

/* The journal's record of a round: a tag no series record starts with, the round's number,
 * its counts (the vector without the processes' words). */
static const uint64_t round_tag = UINT64_MAX;

static int journal_round(const cli_sequential *c, size_t round, const uint64_t *counts,
                         size_t ncounts)
{
    if (!c->screen->resume.journal)
        return EXIT_OK;
    size_t body = ncounts * sizeof *counts;
    uint64_t number = round;
    unsigned char *rec = malloc(2 * sizeof number + body);
    if (!rec) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    memcpy(rec, &round_tag, sizeof round_tag);
    memcpy(rec + sizeof round_tag, &number, sizeof number);
    memcpy(rec + 2 * sizeof number, counts, body);
    int rc = cli_resume_record(&c->screen->resume, rec, 2 * sizeof number + body);
    free(rec);
    return rc;
}

/* After this process drew its share: the failure told, the walk ended, the counts summed
 * over the processes of a shared run, then journaled. */
static int round_end(void *context, size_t round, int status, const screen_batch_failure *f,
                     size_t series, uint64_t *words, size_t nwords)
{
    cli_sequential *c = context;
    if (status != SLOWSCAN_OK && c->rc == EXIT_OK && c->src.rc == EXIT_OK)
        c->failed_at = series;
    int rc = status == SLOWSCAN_OK ? EXIT_OK
             : c->rc != EXIT_OK    ? c->rc
             : c->src.rc != EXIT_OK ? c->src.rc
                                    : c->refuse(c->opts, f);
    cli_screen_source_end(&c->src, c->series);
    const cli_share *s = cli_share_get();
    if (c->held) {
        cli_messages_to(c->before);
        fclose(c->held);
    }
    if (s)
        rc = share_round(s, c, rc, words, nwords);
    free(c->text);
    c->text = NULL, c->held = NULL;
    if (rc == EXIT_OK)
        rc = journal_round(c, round, words + share_words(s), nwords - share_words(s));
    c->rc = rc;
    return rc == EXIT_OK ? SLOWSCAN_OK : SLOWSCAN_EINVAL;
}

int cli_sequential_replay(cli_sequential *c, const void *record, size_t size)
{
    uint64_t tag;
    if (size < 2 * sizeof tag)
        return 0;
    memcpy(&tag, record, sizeof tag);
    if (tag != round_tag)
        return 0;
    void **grown = realloc(c->journaled, (c->njournaled + 1) * sizeof *grown);
    size_t *sizes = realloc(c->journaled_size, (c->njournaled + 1) * sizeof *sizes);
    if (grown)
        c->journaled = grown;
    if (sizes)
        c->journaled_size = sizes;
    void *copy = grown && sizes ? malloc(size) : NULL;
    if (!copy)
        return -1;
    memcpy(copy, record, size);
    c->journaled[c->njournaled] = copy;
    c->journaled_size[c->njournaled++] = size;
    return 1;
}

/* A round's counts from the journal, when it holds them. */
static int journaled_round(void *context, size_t round, uint64_t *counts, size_t ncounts,
                           int *taken)
{
    cli_sequential *c = context;
    if (round >= c->njournaled)
        return SLOWSCAN_OK;
    const unsigned char *rec = c->journaled[round];
    size_t body = ncounts * sizeof *counts;
    uint64_t number;
    memcpy(&number, rec + sizeof round_tag, sizeof number);
    if (c->journaled_size[round] != 2 * sizeof number + body || number != round) {
        cli_error("option --resume: %s: round %zu of --surrogates auto does not match this "
                  "run; remove the journal", c->screen->resume.path, round + 1);
        c->rc = EXIT_BAD_INPUT;
        return SLOWSCAN_EINVAL;
    }
    memcpy(counts, rec + 2 * sizeof number, body);
    *taken = 1;
    return SLOWSCAN_OK;
}

/* SLOWSCAN_SEQUENTIAL_TRACE=1 (not a user setting; for the bench's diagnosis): after each
 * round, where its surrogates went and what is still open, on stderr. */
static void trace_round(void *context, const screen_sequential_round *r)
{
    (void)context;
    fprintf(stderr, "trace round %zu: drew %zu; open tests %zu (series %zu, %zu tests at the "
                    "cap); hi/lo of open: median %.3g max %.3g; p of open: %.3g..%.3g; next "
                    "round asks %zu, gets %zu (%zu series cut); budget left %zu\n",
            r->round, r->drew, r->open_tests, r->open_series, r->at_cap, r->ratio_median,
            r->ratio_max, r->p_min, r->p_max, r->asked, r->given, r->cut, r->budget_left);
}

int cli_sequential_start(const cli_options *opts, screen_run *run, size_t series)
{
    cli_sequential *c = run->seq = calloc(1, sizeof *c);
    sequential_config cfg = slowscan_sequential_config_default();
    cfg.fdr = opts->fdr;
    cfg.max_per_series = (size_t)opts->max_per_series;
    cfg.epsilon = opts->risk;
    cfg.joint = opts->risk_joint;
    cfg.budget = opts->budget > 0 ? (size_t)opts->budget : 0;
    if (!c || !(c->run = slowscan_screen_sequential_alloc(&cfg, &run->cfg, series))) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    c->series = series;
    return EXIT_OK;
}

void cli_sequential_free(cli_sequential *c)
{
    if (!c)
        return;
    slowscan_screen_sequential_free(c->run);
    for (size_t r = 0; r < c->njournaled; r++)
        free(c->journaled[r]);
    free(c->journaled), free(c->journaled_size);
    free(c);
}

int cli_sequential_run(const cli_options *opts, const cli_inputs *in, screen_run *run,
                       int (*refuse)(const cli_options *, const screen_batch_failure *))
{
    cli_sequential *c = run->seq;
    const cli_share *s = cli_share_get();
    c->opts = opts, c->in = in, c->screen = run, c->refuse = refuse, c->rc = EXIT_OK;
    screen_sequential_hooks hooks = slowscan_screen_sequential_hooks_default();
    hooks.reserve = share_words(s);
    hooks.rank = s ? s->rank : 0, hooks.ranks = s ? s->ranks : 1;
    hooks.replay = journaled_round, hooks.begin = round_begin, hooks.end = round_end;
    hooks.decided = getenv("SLOWSCAN_SEQUENTIAL_TRACE") ? trace_round : NULL;
    hooks.context = c;
    screen_source source = {walk_next, walk_release, 0, c};
    screen_batch_failure failure;
    int st = slowscan_screen_sequential_run(c->run, &run->cfg, &source, &hooks, &failure);
    if (st == SLOWSCAN_OK || c->rc != EXIT_OK)
        return c->rc;
    cli_error("out of memory");
    return EXIT_INTERNAL;
}

/* The library's words, printed as warnings. */
static void say(size_t (*writer)(char *, size_t, const screen_sequential_summary *),
                const screen_sequential_summary *s)
{
    char text[1024];
    if (writer(text, sizeof text, s) > 0)
        cli_warning("%s", text);
}

void cli_sequential_report(const cli_sequential *c)
{
    screen_sequential_summary s = slowscan_screen_sequential_summary(c->run);
    say(slowscan_message_sequential_floor, &s);
    say(slowscan_message_sequential_undecided, &s);
}

void cli_sequential_json(FILE *fp, const cli_sequential *c)
{
    screen_sequential_summary q = slowscan_screen_sequential_summary(c->run);
    fprintf(fp, "  \"sequential\": {\n    \"procedure\": \"rounds of surrogates; Clopper-Pearson "
                "intervals of every Monte Carlo p (an interval at n draws after one at n' has "
                "level 1 - epsilon (F(n) - F(n')), F(n) = (n / K + log(1 + n / first_round) / "
                "log(1 + K / first_round)) / 2, K = max_per_series; with risk 'joint' epsilon is "
                "divided by the tests); "
                "Benjamini-Hochberg on their upper and lower limits settles each test "
                "(after Gandy and Hahn's MMCTest and QuickMMCTest); when the budget is spent, "
                "open tests whose interval lies on one side of BH's threshold on the reported p "
                "take that side, the rest are undecided; p = (1 + hits) / (1 + surrogates)\",\n");
    fprintf(fp, "    \"fdr\": %g,\n    \"epsilon\": %g,\n    \"risk\": \"%s\",\n    \"budget\": %zu,\n"
                "    \"max_per_series\": %zu,\n    \"first_round\": %zu,\n    \"block\": %zu,\n"
                "    \"growth\": 2,\n    \"max_rounds\": %zu,\n    \"rounds\": %zu,\n"
                "    \"surrogates_drawn\": %zu,\n    \"tests\": %zu,\n    \"undecided\": %zu,\n"
                "    \"p_interval\": \"Clopper-Pearson 95%%\"\n  },\n",
            q.config.fdr, q.config.epsilon, q.config.joint ? "joint" : "per test", q.budget,
            q.config.max_per_series, q.config.first_round,
            q.config.block, q.max_rounds, q.rounds, q.spent,
            q.tested, q.undecided);
}
