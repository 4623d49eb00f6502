/* The rounds of --surrogates auto (screen_sequential.h): each round walks the caller's
 * source once and hands the batch driver only the series still open, each with its replicate
 * range [drawn, drawn + add); the round's counts go into one vector of uint64 words (what a
 * shared run sums and a journal keeps), then sequential.h decides and sizes the next round.
 * The rounds depend on the counts alone, never on scheduling. */
#include "slowscan/screen_sequential.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

/* A round's vector, after the caller's reserve: for each series the round draws for, in
 * order, ROUND_HEAD words (why it has no null, iaaft draws unconverged) and ROUND_TEST words
 * per test (has a statistic, hits, draws). A process fills only its own series' words. The
 * layout is what --resume journals: changing it makes old journals refused. */
enum { ROUND_HEAD = 2, ROUND_TEST = 3 };

struct screen_sequential {
    sequential_config cfg;
    size_t series, per_series; /* tests: series x per_series, series-major */
    sequential_test *tests;
    size_t *drawn, *add;       /* per series: replicates drawn so far, in this round */
    int *open;                 /* per series: a test still open */
    int *no_null;              /* per series: why it has no null (a status), 0: it has one */
    size_t *unconverged;       /* per series: iaaft draws that hit the iteration limit */
    size_t budget, spent, rounds, undecided, tested;
    uint64_t *round;           /* the round's vector: reserve words, then the counts */
    size_t round_len, reserve, *round_at;
    size_t *map;               /* a round's batch index -> its series */
    size_t *order;             /* the inputs' order of the series (NULL: index order) */
    double *ratio, *hat;       /* scratch of the round's summary, one per test */
};

screen_sequential_hooks slowscan_screen_sequential_hooks_default(void)
{
    screen_sequential_hooks h;
    memset(&h, 0, sizeof h);
    return h;
}

void slowscan_screen_sequential_free(screen_sequential *q)
{
    if (!q)
        return;
    free(q->tests), free(q->drawn), free(q->add), free(q->open), free(q->no_null);
    free(q->unconverged), free(q->round_at), free(q->round), free(q->map);
    free(q->ratio), free(q->hat), free(q->order);
    free(q);
}

screen_sequential *slowscan_screen_sequential_alloc(const sequential_config *seq,
                                                    const screen_config *cfg, size_t series)
{
    if (!seq || !cfg || !(seq->fdr > 0 && seq->fdr < 1) ||
        !(seq->epsilon > 0 && seq->epsilon < 1) || seq->block == 0 || seq->first_round == 0 ||
        seq->max_per_series < seq->first_round)
        return NULL;
    screen_sequential *q = calloc(1, sizeof *q);
    if (!q)
        return NULL;
    q->cfg = *seq;
    q->series = series;
    q->per_series = slowscan_screen_test_count(cfg);
    size_t s1 = series + 1, tests = series * q->per_series + 1;
    q->tests = calloc(tests, sizeof *q->tests);
    q->drawn = calloc(s1, sizeof *q->drawn);
    q->add = calloc(s1, sizeof *q->add);
    q->open = calloc(s1, sizeof *q->open);
    q->no_null = calloc(s1, sizeof *q->no_null);
    q->unconverged = calloc(s1, sizeof *q->unconverged);
    q->round_at = calloc(s1, sizeof *q->round_at);
    q->map = calloc(s1, sizeof *q->map);
    q->ratio = calloc(tests, sizeof *q->ratio);
    q->hat = calloc(tests, sizeof *q->hat);
    if (!q->tests || !q->drawn || !q->add || !q->open || !q->no_null || !q->unconverged ||
        !q->round_at || !q->map || !q->ratio || !q->hat) {
        slowscan_screen_sequential_free(q);
        return NULL;
    }
    return q;
}

int slowscan_screen_sequential_order(screen_sequential *q, const size_t *order)
{
    if (!q || q->rounds > 0)
        return SLOWSCAN_EINVAL;
    size_t *copy = NULL;
    if (order) {
        char *seen = calloc(q->series + 1, 1);
        copy = malloc((q->series + 1) * sizeof *copy);
        int st = seen && copy ? SLOWSCAN_OK : SLOWSCAN_ENOMEM;
        for (size_t k = 0; st == SLOWSCAN_OK && k < q->series; k++) { /* a permutation */
            if (order[k] >= q->series || seen[order[k]])
                st = SLOWSCAN_EINVAL;
            else
                seen[order[k]] = 1, copy[k] = order[k];
        }
        free(seen);
        if (st != SLOWSCAN_OK) {
            free(copy);
            return st;
        }
    }
    free(q->order);
    q->order = copy;
    return SLOWSCAN_OK;
}

static size_t round_width(const screen_sequential *q)
{
    return ROUND_HEAD + ROUND_TEST * q->per_series;
}

/* Whether series g is drawn for in this round (round 1: every series, for its statistics). */
static int in_round(const screen_sequential *q, size_t g, int first)
{
    return first || q->add[g] > 0;
}

/* The round's vector laid out: round_at[g], where series g's words start (every process
 * knows every series' place, so the vectors add up word for word). */
static int round_layout(screen_sequential *q, int first)
{
    size_t at = q->reserve;
    for (size_t g = 0; g < q->series; g++)
        if (in_round(q, g, first))
            q->round_at[g] = at, at += round_width(q);
    free(q->round);
    q->round_len = at;
    return (q->round = calloc(at + 1, sizeof *q->round)) ? SLOWSCAN_OK : SLOWSCAN_ENOMEM;
}

/* Whether any test of series g has a statistic (set by round 1). */
static int series_tested(const screen_sequential *q, size_t g)
{
    for (size_t j = 0; j < q->per_series; j++)
        if (q->tests[g * q->per_series + j].tested)
            return 1;
    return 0;
}

/* The counts of the round in q->round added to the run's. */
static void round_apply(screen_sequential *q, int first)
{
    for (size_t g = 0; g < q->series; g++) {
        if (!in_round(q, g, first))
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
        /* a series that drew nothing (no null, or no test with a statistic: an empty cell of
         * a grid) keeps its nominal count, as a fixed run reports M for it, but costs the
         * budget nothing: empty cells must not starve the rounds of the others */
        if (!q->no_null[g] && series_tested(q, g))
            q->spent += q->add[g];
    }
}

/* One round's walk of the caller's source: its k-th series is series k ranks + rank. */
typedef struct {
    screen_sequential *q;
    screen_source *base;
    size_t rank, ranks;
    size_t walked; /* the base source's series walked so far */
    size_t last;   /* one past the last series of this process the round draws for */
    int first;
} round_walk;

static int round_next(void *state, size_t index, screen_input *in, screen_detail *d)
{
    round_walk *w = state;
    screen_sequential *q = w->q;
    for (size_t g; (g = w->walked * w->ranks + w->rank) < w->last;) {
        q->map[index] = g; /* the series a failure of the source is at */
        int st = w->base->next(w->base->state, w->walked, in, d);
        if (st != SLOWSCAN_OK)
            return st;
        w->walked++;
        if (in_round(q, g, w->first)) {
            in->null_range = 1;
            in->null_first = q->drawn[g];
            in->null_count = q->add[g];
            return SLOWSCAN_OK;
        }
        if (w->base->release)
            w->base->release(w->base->state, w->walked - 1);
    }
    return SCREEN_BATCH_END;
}

static void round_release(void *state, size_t index)
{
    round_walk *w = state;
    if (w->base->release)
        w->base->release(w->base->state, w->q->map[index] / w->ranks);
}

/* A series' round: its tests' counts, what it warned of, into its words of the vector. */
static int round_put(void *state, const screen_batch_item *item)
{
    screen_sequential *q = ((round_walk *)state)->q;
    size_t g = q->map[item->index];
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

/* This process's share of a round through the batch driver; *failed: the series that
 * failed. */
static int draw_round(screen_sequential *q, const screen_config *cfg, screen_source *base,
                      const screen_sequential_hooks *h, int first,
                      screen_batch_failure *failure, size_t *failed)
{
    round_walk w = {.q = q, .base = base, .rank = h->rank, .ranks = h->ranks ? h->ranks : 1,
                    .first = first};
    size_t count = 0;
    for (size_t g = w.rank; g < q->series; g += w.ranks)
        if (in_round(q, g, first))
            count++, w.last = g + 1;
    screen_source source = {round_next, round_release, count, &w};
    screen_sink sink = {.put = round_put, .state = &w, .progress = h->progress};
    int st = slowscan_screen_batch_run(cfg, &source, &sink, failure);
    *failed = st == SLOWSCAN_OK ? 0 : q->map[failure->index];
    return st;
}

/* One round's counts, from the caller (a journal) or drawn (and handed to the caller, who
 * may sum them over processes), then added to the run's. */
static int one_round(screen_sequential *q, const screen_config *cfg, screen_source *source,
                     const screen_sequential_hooks *h, int first, screen_batch_failure *failure)
{
    int st = round_layout(q, first);
    void *ctx = h->context;
    int replayed = 0;
    if (st == SLOWSCAN_OK && h->replay)
        st = h->replay(ctx, q->rounds, q->round + q->reserve, q->round_len - q->reserve,
                       &replayed);
    if (st != SLOWSCAN_OK)
        return st;
    if (!replayed) {
        st = h->begin ? h->begin(ctx, q->rounds) : SLOWSCAN_OK;
        size_t failed = 0;
        if (st == SLOWSCAN_OK)
            st = draw_round(q, cfg, source, h, first, failure, &failed);
        if (h->end)
            st = h->end(ctx, q->rounds, st, st == SLOWSCAN_OK ? NULL : failure, failed,
                        q->round, q->round_len);
    }
    if (st == SLOWSCAN_OK)
        round_apply(q, first);
    return st;
}

/* After a round: the decisions, which series are open, the next round's sizes. */
static int plan_next(screen_sequential *q, size_t *total)
{
    size_t open = 0;
    int st = slowscan_sequential_decide(&q->cfg, q->tests, q->series * q->per_series, &open);
    if (st != SLOWSCAN_OK)
        return st;
    q->undecided = open;
    for (size_t g = 0; g < q->series; g++) {
        q->open[g] = 0;
        for (size_t j = 0; j < q->per_series; j++)
            q->open[g] |= q->tests[g * q->per_series + j].decision == SEQUENTIAL_OPEN;
    }
    slowscan_sequential_next_in_order(&q->cfg, q->series, q->drawn, q->open, q->spent, q->budget,
                                      q->order, q->add, total);
    return SLOWSCAN_OK;
}

static int by_value(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

/* Where a round's surrogates went and what is still open (for the caller's trace). */
static screen_sequential_round round_summary(const screen_sequential *q, size_t drew,
                                             size_t given)
{
    screen_sequential_round r = {.round = q->rounds, .drew = drew, .given = given,
                                 .budget_left = q->budget > q->spent ? q->budget - q->spent : 0};
    for (size_t g = 0; g < q->series; g++) {
        size_t want = q->drawn[g] ? q->drawn[g] : q->cfg.first_round;
        size_t room = q->cfg.max_per_series - q->drawn[g];
        want = want < room ? want : room;
        r.open_series += q->open[g] != 0;
        r.asked += q->open[g] ? want : 0;
        r.cut += q->open[g] && q->add[g] < want;
        for (size_t j = 0; j < q->per_series; j++) {
            const sequential_test *t = &q->tests[g * q->per_series + j];
            if (t->decision != SEQUENTIAL_OPEN || !t->tested)
                continue;
            r.at_cap += q->drawn[g] >= q->cfg.max_per_series;
            q->ratio[r.open_tests] = t->lo > 0 ? t->hi / t->lo : INFINITY;
            q->hat[r.open_tests++] = (1.0 + (double)t->hits) / (1.0 + (double)t->drawn);
        }
    }
    size_t n = r.open_tests;
    if (n) {
        qsort(q->ratio, n, sizeof *q->ratio, by_value);
        qsort(q->hat, n, sizeof *q->hat, by_value);
    }
    r.ratio_median = n ? q->ratio[n / 2] : NAN, r.ratio_max = n ? q->ratio[n - 1] : NAN;
    r.p_min = n ? q->hat[0] : NAN, r.p_max = n ? q->hat[n - 1] : NAN;
    return r;
}

/* Round 1 gives every series first_round (within the budget, counted as if every test had
 * a statistic), and every test its statistic; then the budget is the tested tests'. */
static void first_plan(screen_sequential *q, size_t *add)
{
    q->budget = slowscan_sequential_budget(&q->cfg, q->series * q->per_series);
    for (size_t g = 0; g < q->series; g++)
        q->open[g] = 1;
    slowscan_sequential_next_in_order(&q->cfg, q->series, q->drawn, q->open, 0, q->budget,
                                      q->order, q->add, add);
}

int slowscan_screen_sequential_run(screen_sequential *q, const screen_config *cfg,
                                   screen_source *source, const screen_sequential_hooks *hooks,
                                   screen_batch_failure *failure)
{
    memset(failure, 0, sizeof *failure);
    screen_sequential_hooks none = slowscan_screen_sequential_hooks_default();
    const screen_sequential_hooks *h = hooks ? hooks : &none;
    if (!q || !cfg || !source || q->rounds > 0 || (h->ranks > 1 && h->rank >= h->ranks))
        return SLOWSCAN_EINVAL;
    q->reserve = h->reserve;
    size_t add = 0, rounds = slowscan_sequential_max_rounds(&q->cfg); /* the risk's spread */
    first_plan(q, &add);
    int st = SLOWSCAN_OK;
    for (int first = 1; st == SLOWSCAN_OK && (first || add > 0) && q->rounds < rounds;
         first = 0) {
        size_t before = q->spent;
        st = one_round(q, cfg, source, h, first, failure);
        q->rounds++;
        if (first) {
            for (size_t r = 0; r < q->series * q->per_series; r++)
                q->tested += q->tests[r].tested != 0;
            q->budget = slowscan_sequential_budget(&q->cfg, q->tested);
        }
        if (st == SLOWSCAN_OK)
            st = plan_next(q, &add);
        if (st == SLOWSCAN_OK && h->decided) {
            screen_sequential_round r = round_summary(q, q->spent - before, add);
            h->decided(h->context, &r);
        }
    }
    /* the budget is spent: the open tests against BH's threshold on the reported p */
    if (st == SLOWSCAN_OK)
        st = slowscan_sequential_finish(&q->cfg, q->tests, q->series * q->per_series,
                                        &q->undecided);
    return st;
}

void slowscan_screen_sequential_patch(const screen_sequential *q, size_t g, screen_result *res)
{
    if (!q || g >= q->series)
        return;
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

screen_flag slowscan_screen_sequential_flag(const screen_sequential *q, size_t g, size_t j,
                                            const screen_test *s, screen_flag stored)
{
    if (!q || g >= q->series || j >= q->per_series)
        return stored;
    switch (q->tests[g * q->per_series + j].decision) {
    case SEQUENTIAL_REJECTED: return s->statistic > 0 ? SCREEN_FLAG_RISING : SCREEN_FLAG_FALLING;
    case SEQUENTIAL_ACCEPTED: return SCREEN_FLAG_NONE;
    case SEQUENTIAL_OPEN: return SCREEN_FLAG_UNDECIDED;
    default: return stored;
    }
}

void slowscan_screen_sequential_interval(const screen_sequential *q, size_t g, size_t j,
                                         double *lo, double *hi)
{
    double p;
    *lo = *hi = NAN;
    if (q && g < q->series && j < q->per_series)
        slowscan_sequential_p(&q->tests[g * q->per_series + j], &p, lo, hi);
}

screen_sequential_summary slowscan_screen_sequential_summary(const screen_sequential *q)
{
    screen_sequential_summary s;
    memset(&s, 0, sizeof s);
    if (!q)
        return s;
    s.config = q->cfg;
    s.series = q->series, s.per_series = q->per_series;
    s.budget = q->budget, s.spent = q->spent, s.rounds = q->rounds;
    s.max_rounds = slowscan_sequential_max_rounds(&q->cfg);
    s.tested = q->tested, s.undecided = q->undecided;
    return s;
}
