/* screen --surrogates auto: rounds of surrogates over every series (the library's
 * sequential.h decides after each round which tests are settled and how many surrogates each
 * open series gets next), before the run's one ordinary pass, which draws no surrogates and
 * takes its p-values, counts and flags from here.
 *
 * Each round walks the inputs again (a grid is re-read a table at a time) and hands the batch
 * driver only the series still open, each with its replicate range [drawn, drawn + add), so
 * replicate j of a series is the draw a fixed --surrogates run makes as its j-th. The rounds
 * depend on the counts alone: the same for any --threads. */
#include "cli.h"
#include "screen.h"
#include "share.h"
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

/* A round's counts travel as one vector of uint64 (summed over the processes of a shared run,
 * journaled with --resume): first, for a shared run, each process's failure (the failing
 * series + 1, 0: none) and exit code; then, for each series the round draws for, in order,
 * ROUND_HEAD words (why it has no null, iaaft draws unconverged) and ROUND_TEST words per test
 * (has a statistic, hits, draws). A process fills only its own series' words. */
enum { ROUND_HEAD = 2, ROUND_TEST = 3 };

static size_t round_width(const screen_sequential *q)
{
    return ROUND_HEAD + ROUND_TEST * q->per_series;
}

/* One round's walk of the inputs (this process's series); map: the batch's index -> series. */
typedef struct {
    input_source src;
    screen_sequential *seq;
    size_t last; /* one past the last series of this process the round draws for */
    size_t *map;
    size_t failed_at; /* the series whose reading failed */
    int first;        /* round 1: every series, for its statistics */
} round_walk;

static int round_next(void *state, size_t index, screen_input *in, screen_detail *d)
{
    round_walk *w = state;
    screen_sequential *q = w->seq;
    while (w->src.walked < w->last) {
        w->failed_at = w->src.walked;
        int st = cli_screen_next_series(&w->src, index, in, d);
        if (st != SLOWSCAN_OK)
            return st;
        size_t g = w->src.walked - 1; /* walked counts every process's series */
        if (w->first || q->add[g] > 0) {
            in->null_range = 1;
            in->null_first = q->drawn[g];
            in->null_count = q->add[g];
            w->map[index] = g;
            return SLOWSCAN_OK;
        }
        cli_screen_release_series(&w->src, index);
    }
    return SCREEN_BATCH_END;
}

static void round_release(void *state, size_t index)
{
    round_walk *w = state;
    cli_screen_release_series(&w->src, index);
}

/* A series' round: its tests' counts, what it warned of, into its words of the vector. */
static int round_put(void *state, const screen_batch_item *item)
{
    round_walk *w = state;
    screen_sequential *q = w->seq;
    size_t g = w->map[item->index];
    uint64_t *v = q->round + q->round_at[g];
    const screen_result *r = item->result;
    for (size_t k = 0; k < r->nwarnings; k++) {
        if (r->warnings[k].kind == SCREEN_WARN_NO_SURROGATES)
            v[0] = (uint64_t)(int64_t)r->warnings[k].status;
        if (r->warnings[k].kind == SCREEN_WARN_IAAFT_UNCONVERGED)
            v[1] += r->warnings[k].count;
    }
    for (size_t j = 0; j < r->ntests && j < q->per_series; j++) {
        const screen_test *s = &r->tests[j];
        uint64_t *t = v + ROUND_HEAD + ROUND_TEST * j;
        t[0] = !isnan(s->statistic) && v[0] == 0;
        if (!isnan(s->p_value))
            t[1] = slowscan_screen_test_hits(s), t[2] = s->null_used;
    }
    return SLOWSCAN_OK;
}

/* The round's vector laid out: round_at[g], where series g's words start (every process
 * knows every series' place, so the vectors add up word for word). */
static int round_layout(screen_sequential *q, int first, size_t ranks)
{
    size_t at = 2 * ranks;
    for (size_t g = 0; g < q->series; g++)
        if (first || q->add[g] > 0)
            q->round_at[g] = at, at += round_width(q);
    free(q->round);
    q->round_len = at;
    q->round_head = 2 * ranks;
    return (q->round = calloc(at + 1, sizeof *q->round)) ? EXIT_OK : EXIT_INTERNAL;
}

/* The counts of the round in q->round added to the run's. */
static void round_apply(screen_sequential *q, int first)
{
    for (size_t g = 0; g < q->series; g++) {
        if (!first && q->add[g] == 0)
            continue;
        const uint64_t *v = q->round + q->round_at[g];
        if (v[0])
            q->no_null[g] = (int)(int64_t)v[0];
        q->unconverged[g] += v[1];
        for (size_t j = 0; j < q->per_series; j++) {
            sequential_test *t = &q->tests[g * q->per_series + j];
            const uint64_t *c = v + ROUND_HEAD + ROUND_TEST * j;
            if (first)
                t->series = g, t->tested = c[0] != 0;
            t->hits += c[1];
            t->drawn += c[2];
        }
        q->drawn[g] += q->add[g];
        q->spent += q->add[g];
    }
}

/* This process's share of a round through the batch driver; *failed_at: the series that
 * failed. */
static int run_round(const cli_options *opts, const cli_inputs *in, screen_run *run,
                     screen_sequential *q, int first, size_t rank, size_t ranks,
                     int (*refuse)(const cli_options *, const screen_batch_failure *))
{
    round_walk w = {.src = {.rank = rank, .ranks = ranks, .rc = EXIT_OK}, .seq = q,
                    .first = first};
    size_t count = 0;
    for (size_t g = rank; g < q->series; g += ranks)
        if (first || q->add[g] > 0)
            count++, w.last = g + 1;
    cli_cursor_start(&w.src.cursor, opts, in);
    int rc = (w.map = calloc(q->series + 1, sizeof *w.map)) ? EXIT_OK : EXIT_INTERNAL;
    if (rc != EXIT_OK)
        cli_error("out of memory");
    if (rc == EXIT_OK)
        rc = cli_screen_source_arrays(in, &w.src, q->series);
    if (rc == EXIT_OK) {
        screen_source source = {round_next, round_release, count, &w};
        screen_sink sink = {.put = round_put, .state = &w};
        screen_batch_failure failure;
        int st = slowscan_screen_batch_run(&run->cfg, &source, &sink, &failure);
        if (st != SLOWSCAN_OK && w.src.rc == EXIT_OK)
            w.failed_at = w.map[failure.index];
        rc = st == SLOWSCAN_OK ? EXIT_OK : w.src.rc != EXIT_OK ? w.src.rc : refuse(opts, &failure);
    }
    q->failed_at = w.failed_at;
    cli_screen_source_end(&w.src, q->series);
    free(w.map);
    return rc;
}

/* A shared round's end: the counts summed over the processes; when some failed, the failure
 * first in input order is the run's, its words printed by process 0 (sent by the process
 * that met it), as a lone process would have printed them. */
static int share_round(const cli_share *s, screen_sequential *q, int rc, const char *text)
{
    uint64_t *head = q->round;
    head[s->rank] = rc != EXIT_OK ? (uint64_t)q->failed_at + 1 : 0;
    head[s->ranks + s->rank] = (uint64_t)(int64_t)rc;
    /* the processes started without waiting for each other (share.h): a process that could
     * not start takes no part in the sum, so its outcome is known before the first one */
    int started = cli_share_settle(s);
    if (started != EXIT_OK)
        return started;
    if (s->sum(s, q->round, q->round_len) != EXIT_OK)
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

/* A shared round: this process's share, its messages held back until the processes agree. */
static int shared_round(const cli_options *opts, const cli_inputs *in, screen_run *run,
                        screen_sequential *q, int first, const cli_share *s,
                        int (*refuse)(const cli_options *, const screen_batch_failure *))
{
    char *text = NULL;
    size_t len = 0;
    FILE *held = open_memstream(&text, &len);
    FILE *before = held ? cli_messages_to(held) : NULL;
    int rc = run_round(opts, in, run, q, first, s->rank, s->ranks, refuse);
    if (held) {
        cli_messages_to(before);
        fclose(held);
    }
    rc = share_round(s, q, rc, text);
    free(text);
    return rc;
}

/* The journal's record of a round: a tag no series record starts with, the round's number,
 * its counts (the vector without the processes' failures). */
static const uint64_t round_tag = UINT64_MAX;

int cli_sequential_replay(screen_sequential *q, const void *record, size_t size)
{
    uint64_t tag;
    if (size < 2 * sizeof tag)
        return 0;
    memcpy(&tag, record, sizeof tag);
    if (tag != round_tag)
        return 0;
    void **grown = realloc(q->journaled, (q->njournaled + 1) * sizeof *grown);
    size_t *sizes = realloc(q->journaled_size, (q->njournaled + 1) * sizeof *sizes);
    if (grown)
        q->journaled = grown;
    if (sizes)
        q->journaled_size = sizes;
    void *copy = grown && sizes ? malloc(size) : NULL;
    if (!copy)
        return -1;
    memcpy(copy, record, size);
    q->journaled[q->njournaled] = copy;
    q->journaled_size[q->njournaled++] = size;
    return 1;
}

/* The round's counts from the journal, when it holds them (1), else 0; -1: damaged. */
static int journaled_round(screen_sequential *q)
{
    if (q->rounds >= q->njournaled)
        return 0;
    const unsigned char *rec = q->journaled[q->rounds];
    size_t body = (q->round_len - q->round_head) * sizeof *q->round;
    uint64_t number;
    memcpy(&number, rec + sizeof round_tag, sizeof number);
    if (q->journaled_size[q->rounds] != 2 * sizeof number + body || number != q->rounds)
        return -1;
    memcpy(q->round + q->round_head, rec + 2 * sizeof number, body);
    return 1;
}

static int journal_round(screen_run *run, const screen_sequential *q)
{
    if (!run->resume.journal)
        return EXIT_OK;
    size_t body = (q->round_len - q->round_head) * sizeof *q->round;
    uint64_t number = q->rounds;
    unsigned char *rec = malloc(2 * sizeof number + body);
    if (!rec) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    memcpy(rec, &round_tag, sizeof round_tag);
    memcpy(rec + sizeof round_tag, &number, sizeof number);
    memcpy(rec + 2 * sizeof number, q->round + q->round_head, body);
    int rc = cli_resume_record(&run->resume, rec, 2 * sizeof number + body);
    free(rec);
    return rc;
}

/* One round's counts, from the journal or drawn (shared by the processes of a run), then
 * journaled and added to the run's. */
static int one_round(const cli_options *opts, const cli_inputs *in, screen_run *run,
                     screen_sequential *q, int first,
                     int (*refuse)(const cli_options *, const screen_batch_failure *))
{
    const cli_share *share = cli_share_get();
    if (round_layout(q, first, share ? share->ranks : 1) != EXIT_OK) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    int rc = EXIT_OK, replayed = journaled_round(q);
    if (replayed < 0) {
        cli_error("option --resume: %s: round %zu of --surrogates auto does not match this "
                  "run; remove the journal", run->resume.path, q->rounds + 1);
        return EXIT_BAD_INPUT;
    }
    if (!replayed)
        rc = share ? shared_round(opts, in, run, q, first, share, refuse)
                   : run_round(opts, in, run, q, first, 0, 1, refuse);
    if (rc == EXIT_OK && !replayed)
        rc = journal_round(run, q);
    if (rc == EXIT_OK)
        round_apply(q, first);
    return rc;
}

int cli_sequential_start(const cli_options *opts, screen_run *run, size_t series)
{
    screen_sequential *q = run->seq = calloc(1, sizeof *q);
    const screen_config *cfg = &run->cfg;
    if (!q) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    q->cfg = slowscan_sequential_config_default();
    q->cfg.fdr = opts->fdr;
    q->cfg.max_per_series = (size_t)opts->max_per_series;
    q->cfg.epsilon = opts->risk;
    q->cfg.joint = opts->risk_joint;
    q->cfg.budget = opts->budget > 0 ? (size_t)opts->budget : 0;
    q->series = series;
    q->per_series = slowscan_screen_test_count(cfg);
    size_t s1 = series + 1;
    q->tests = calloc(s1 * q->per_series + 1, sizeof *q->tests);
    q->drawn = calloc(s1, sizeof *q->drawn);
    q->add = calloc(s1, sizeof *q->add);
    q->open = calloc(s1, sizeof *q->open);
    q->no_null = calloc(s1, sizeof *q->no_null);
    q->unconverged = calloc(s1, sizeof *q->unconverged);
    q->round_at = calloc(s1, sizeof *q->round_at);
    if (!q->tests || !q->drawn || !q->add || !q->open || !q->no_null || !q->unconverged ||
        !q->round_at) {
        cli_error("out of memory");
        return EXIT_INTERNAL;
    }
    return EXIT_OK;
}

void cli_sequential_free(screen_sequential *q)
{
    if (!q)
        return;
    free(q->tests), free(q->drawn), free(q->add), free(q->open), free(q->no_null);
    free(q->unconverged), free(q->round_at), free(q->round);
    for (size_t r = 0; r < q->njournaled; r++)
        free(q->journaled[r]);
    free(q->journaled), free(q->journaled_size);
    free(q);
}

/* After a round: the decisions, which series are open, the next round's sizes. */
static int plan_next(screen_sequential *q, size_t *total)
{
    size_t open = 0;
    if (slowscan_sequential_decide(&q->cfg, q->tests, q->series * q->per_series, &open) !=
        SLOWSCAN_OK)
        return EXIT_INTERNAL;
    q->undecided = open;
    for (size_t g = 0; g < q->series; g++) {
        q->open[g] = 0;
        for (size_t j = 0; j < q->per_series; j++)
            q->open[g] |= q->tests[g * q->per_series + j].decision == SEQUENTIAL_OPEN;
    }
    slowscan_sequential_next(&q->cfg, q->series, q->drawn, q->open, q->spent, q->budget, q->add,
                             total);
    return EXIT_OK;
}

static int by_value(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

/* SLOWSCAN_SEQUENTIAL_TRACE=1 (not a user setting; for the bench's diagnosis): after each
 * round, where its surrogates went and what is still open, on stderr. */
static void trace_round(const screen_sequential *q, size_t drawn_before, size_t add_next)
{
    if (!getenv("SLOWSCAN_SEQUENTIAL_TRACE"))
        return;
    size_t open_tests = 0, open_series = 0, at_cap = 0, cut = 0, asked = 0;
    double *ratio = malloc((q->series * q->per_series + 1) * sizeof *ratio), *hat = NULL;
    hat = malloc((q->series * q->per_series + 1) * sizeof *hat);
    for (size_t g = 0; ratio && hat && g < q->series; g++) {
        size_t want = q->drawn[g] ? q->drawn[g] : q->cfg.first_round;
        size_t room = q->cfg.max_per_series - q->drawn[g];
        want = want < room ? want : room;
        open_series += q->open[g] != 0;
        asked += q->open[g] ? want : 0;
        cut += q->open[g] && q->add[g] < want;
        for (size_t j = 0; j < q->per_series; j++) {
            const sequential_test *t = &q->tests[g * q->per_series + j];
            if (t->decision != SEQUENTIAL_OPEN || !t->tested)
                continue;
            at_cap += q->drawn[g] >= q->cfg.max_per_series;
            ratio[open_tests] = t->lo > 0 ? t->hi / t->lo : INFINITY;
            hat[open_tests++] = (1.0 + (double)t->hits) / (1.0 + (double)t->drawn);
        }
    }
    if (ratio && hat && open_tests) {
        qsort(ratio, open_tests, sizeof *ratio, by_value);
        qsort(hat, open_tests, sizeof *hat, by_value);
    }
    fprintf(stderr, "trace round %zu: drew %zu; open tests %zu (series %zu, %zu tests at the "
                    "cap); hi/lo of open: median %.3g max %.3g; p of open: %.3g..%.3g; next "
                    "round asks %zu, gets %zu (%zu series cut); budget left %zu\n",
            q->rounds, q->spent - drawn_before, open_tests, open_series, at_cap,
            open_tests ? ratio[open_tests / 2] : NAN, open_tests ? ratio[open_tests - 1] : NAN,
            open_tests ? hat[0] : NAN, open_tests ? hat[open_tests - 1] : NAN, asked, add_next,
            cut, q->budget > q->spent ? q->budget - q->spent : 0);
    free(ratio), free(hat);
}

int cli_sequential_run(const cli_options *opts, const cli_inputs *in, screen_run *run,
                       int (*refuse)(const cli_options *, const screen_batch_failure *))
{
    screen_sequential *q = run->seq;
    size_t total = q->series;
    /* round 1 gives every series first_round (within the budget, counted as if every test
     * had a statistic), and every test its statistic */
    q->budget = slowscan_sequential_budget(&q->cfg, total * q->per_series);
    size_t add = 0;
    for (size_t g = 0; g < total; g++)
        q->open[g] = 1;
    slowscan_sequential_next(&q->cfg, total, q->drawn, q->open, 0, q->budget, q->add, &add);
    int rc = EXIT_OK;
    size_t rounds = slowscan_sequential_max_rounds(&q->cfg); /* the risk is spread over these */
    for (int first = 1; rc == EXIT_OK && (first || add > 0) && q->rounds < rounds; first = 0) {
        size_t before = q->spent;
        rc = one_round(opts, in, run, q, first, refuse);
        q->rounds++;
        if (first) {
            for (size_t r = 0; r < total * q->per_series; r++)
                q->tested += q->tests[r].tested != 0;
            q->budget = slowscan_sequential_budget(&q->cfg, q->tested);
        }
        if (rc == EXIT_OK && (rc = plan_next(q, &add)) != EXIT_OK)
            cli_error("out of memory");
        if (rc == EXIT_OK)
            trace_round(q, before, add);
    }
    /* the budget is spent: the open tests against BH's threshold on the reported p */
    if (rc == EXIT_OK && slowscan_sequential_finish(&q->cfg, q->tests, total * q->per_series,
                                                    &q->undecided) != SLOWSCAN_OK) {
        cli_error("out of memory");
        rc = EXIT_INTERNAL;
    }
    return rc;
}

void cli_sequential_patch(const screen_sequential *q, size_t g, screen_result *res)
{
    for (size_t j = 0; j < res->ntests && j < q->per_series; j++) {
        const sequential_test *t = &q->tests[g * q->per_series + j];
        screen_test *s = &res->tests[j];
        double lo, hi;
        s->surrogates = q->drawn[g];
        if (t->tested)
            slowscan_sequential_p(t, &s->p_value, &lo, &hi), s->null_used = t->drawn;
        if (q->no_null[g] && !isnan(s->statistic))
            s->reason = SCREEN_REASON_NO_SURROGATES;
    }
    if (q->no_null[g] && res->nwarnings < SCREEN_MAX_WARNINGS)
        res->warnings[res->nwarnings++] =
            (screen_warning){SCREEN_WARN_NO_SURROGATES, 0, q->drawn[g], q->no_null[g]};
    if (q->unconverged[g] && res->nwarnings < SCREEN_MAX_WARNINGS)
        res->warnings[res->nwarnings++] =
            (screen_warning){SCREEN_WARN_IAAFT_UNCONVERGED, q->unconverged[g], q->drawn[g], 0};
}

screen_flag cli_sequential_flag(const screen_sequential *q, size_t g, size_t j,
                                const screen_test *s, screen_flag stored)
{
    switch (q->tests[g * q->per_series + j].decision) {
    case SEQUENTIAL_REJECTED: return s->statistic > 0 ? SCREEN_FLAG_RISING : SCREEN_FLAG_FALLING;
    case SEQUENTIAL_ACCEPTED: return SCREEN_FLAG_NONE;
    case SEQUENTIAL_OPEN: return SCREEN_FLAG_UNDECIDED;
    default: return stored;
    }
}

void cli_sequential_interval(const screen_sequential *q, size_t g, size_t j, double *lo,
                             double *hi)
{
    double p;
    slowscan_sequential_p(&q->tests[g * q->per_series + j], &p, lo, hi);
}

void cli_sequential_report(const cli_options *opts, const screen_sequential *q)
{
    (void)opts;
    double m = (double)q->tested, floor_p = 1.0 / ((double)q->cfg.max_per_series + 1.0);
    /* BH rejects the k smallest p when the k-th is at or below q k / m: with every p at or
     * above the floor 1/(K+1), a discovery needs at least floor m / q tests tied there */
    double ties = ceil(floor_p * m / q->cfg.fdr - 1e-9);
    if (q->tested > 0 && floor_p > q->cfg.fdr / m && ties > m)
        cli_warning("option --surrogates auto: no discovery is possible: the smallest p, "
                    "1/(K+1) = %.3g with --max-per-series %zu, is above q = %g; raise "
                    "--max-per-series", floor_p, q->cfg.max_per_series, q->cfg.fdr);
    else if (q->tested > 0 && floor_p > q->cfg.fdr / m)
        cli_warning("option --surrogates auto: no test can be a discovery alone: the smallest "
                    "p, 1/(K+1) = %.3g with --max-per-series %zu, is above q/m = %.3g for %zu "
                    "tests, so discoveries need at least %.0f tests tied at that floor; raise "
                    "--max-per-series", floor_p, q->cfg.max_per_series, q->cfg.fdr / m,
                    q->tested, ties);
    if (q->undecided > 0)
        cli_warning("option --surrogates auto: %zu of %zu tests undecided: the budget (%zu "
                    "surrogates, --budget) ran out before their side of the FDR threshold "
                    "was settled", q->undecided, q->tested, q->budget);
}

void cli_sequential_json(FILE *fp, const screen_sequential *q)
{
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
            q->cfg.fdr, q->cfg.epsilon, q->cfg.joint ? "joint" : "per test", q->budget, q->cfg.max_per_series, q->cfg.first_round,
            q->cfg.block, slowscan_sequential_max_rounds(&q->cfg), q->rounds, q->spent,
            q->tested, q->undecided);
}
