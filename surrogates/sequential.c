/* Sequential Monte Carlo tests under Benjamini-Hochberg (sequential.h): the decisions of a
 * round from the counts, the reported p, and the size of the next round. */
#include "slowscan/sequential.h"
#include "slowscan/significance.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

sequential_config slowscan_sequential_config_default(void)
{
    return (sequential_config){.fdr = 0.05, .epsilon = 1e-2, .max_per_series = 100000,
                               .budget = 0, .first_round = 64, .block = 64, .joint = 0,
                               .spending = SEQUENTIAL_SPEND_DRAWS};
}

size_t slowscan_sequential_max_rounds(const sequential_config *cfg)
{
    size_t rounds = 1;
    for (size_t n = cfg->first_round ? cfg->first_round : 1; n < cfg->max_per_series; n *= 2)
        rounds++;
    return rounds;
}

size_t slowscan_sequential_budget(const sequential_config *cfg, size_t tested)
{
    return cfg->budget > 0 ? cfg->budget : 200 * tested;
}

void slowscan_sequential_p(const sequential_test *t, double *p, double *lo, double *hi)
{
    if (!t->tested || t->drawn == 0) {
        *p = *lo = *hi = NAN;
        return;
    }
    *p = (1.0 + (double)t->hits) / (1.0 + (double)t->drawn);
    slowscan_sequential_interval(t->hits, t->drawn, 0.05, lo, hi);
}

/* in[r] rejected by BH at level fdr over the `count` values (NaN: not in the family). */
static int bh_rejects(const double *p, size_t count, double fdr, double *q, unsigned char *in)
{
    int st = slowscan_significance_bh(p, count, q, NULL);
    for (size_t r = 0; st == SLOWSCAN_OK && r < count; r++)
        in[r] = !isnan(q[r]) && q[r] <= fdr;
    return st;
}

double slowscan_sequential_alpha(const sequential_config *cfg, size_t tested)
{
    double rounds = (double)slowscan_sequential_max_rounds(cfg);
    return cfg->epsilon / (cfg->joint ? (double)(tested ? tested : 1) * rounds : rounds);
}

double slowscan_sequential_alpha_at(const sequential_config *cfg, size_t tested, size_t from,
                                    size_t to)
{
    if (cfg->spending == SEQUENTIAL_SPEND_ROUNDS)
        return slowscan_sequential_alpha(cfg, tested);
    /* half in proportion to the draws, half evenly over the doublings (in log n), so that a
     * test settled after a few rounds still has a fair share */
    double k = (double)(cfg->max_per_series ? cfg->max_per_series : 1);
    double f = (double)(cfg->first_round ? cfg->first_round : 1);
    double a = fmin((double)from, k), b = fmin((double)to, k);
    double spent = 0.5 * (b - a) / k + 0.5 * (log1p(b / f) - log1p(a / f)) / log1p(k / f);
    return cfg->epsilon * spent / (cfg->joint ? (double)(tested ? tested : 1) : 1.0);
}

/* A test's interval after new draws. At the cap K the test has become the fixed-K Monte
 * Carlo test (Besag & Clifford 1991: a sequential test that runs to its largest size is the
 * fixed-size one), whose p, (1 + hits) / (1 + K), is known exactly: its interval is that
 * point, so BH settles it on the p a --surrogates K run gives (replicate j is the same draw),
 * and a run capped at K reproduces the decisions of a fixed-K run for the tests it carries
 * to the cap instead of leaving them undecided. Below the cap: the Clopper-Pearson interval
 * at the level the risk spending gives to the draws since the last one. */
static void update_interval(const sequential_config *cfg, size_t tested, sequential_test *t)
{
    if (cfg->max_per_series > 0 && t->drawn >= cfg->max_per_series) {
        t->lo = t->hi = (1.0 + (double)t->hits) / (1.0 + (double)t->drawn);
    } else {
        size_t before = t->interval_at ? t->interval_at - 1 : 0;
        double alpha = slowscan_sequential_alpha_at(cfg, tested, before, t->drawn);
        slowscan_sequential_interval(t->hits, t->drawn, alpha, &t->lo, &t->hi);
    }
    t->interval_at = t->drawn + 1;
}

int slowscan_sequential_decide(const sequential_config *cfg, sequential_test *tests,
                               size_t count, size_t *open)
{
    size_t m = 0;
    for (size_t r = 0; r < count; r++)
        m += tests[r].tested != 0;
    double *buf = calloc(3 * count + 1, sizeof *buf);
    unsigned char *sure = malloc(2 * count + 1);
    if (!buf || !sure) {
        free(buf), free(sure);
        return SLOWSCAN_ENOMEM;
    }
    double *upper = buf, *lower = buf + count, *q = buf + 2 * count;
    for (size_t r = 0; r < count; r++) {
        sequential_test *t = &tests[r];
        if (t->tested && t->interval_at != t->drawn + 1) /* +1: 0 means "none yet" */
            update_interval(cfg, m, t);
        upper[r] = t->tested ? t->hi : NAN;
        lower[r] = t->tested ? t->lo : NAN;
    }
    int st = bh_rejects(upper, count, cfg->fdr, q, sure);
    if (st == SLOWSCAN_OK)
        st = bh_rejects(lower, count, cfg->fdr, q, sure + count);
    *open = 0;
    for (size_t r = 0; st == SLOWSCAN_OK && r < count; r++) {
        sequential_test *t = &tests[r];
        t->decision = !t->tested         ? SEQUENTIAL_UNTESTED
                      : sure[r]          ? SEQUENTIAL_REJECTED
                      : !sure[count + r] ? SEQUENTIAL_ACCEPTED
                                         : SEQUENTIAL_OPEN;
        *open += t->decision == SEQUENTIAL_OPEN;
    }
    free(buf);
    free(sure);
    return st;
}

/* What series s asks for: doubling, capped by K. */
static size_t request(const sequential_config *cfg, size_t drawn)
{
    size_t want = drawn == 0 ? cfg->first_round : drawn;
    size_t room = cfg->max_per_series > drawn ? cfg->max_per_series - drawn : 0;
    return want < room ? want : room;
}

/* Sum of the requests cut to c. */
static size_t cut_sum(const size_t *add, size_t series, size_t c)
{
    size_t sum = 0;
    for (size_t s = 0; s < series; s++)
        sum += add[s] < c ? add[s] : c;
    return sum;
}

/* Cuts the requests to the largest common cap (a multiple of block) that fits in `left`, then
 * hands what is left a block at a time to the series cut, in the order `order` gives them
 * (NULL: index order). */
static size_t grant_common_cap(const sequential_config *cfg, size_t series, size_t *add,
                               size_t left, const size_t *order)
{
    size_t block = cfg->block ? cfg->block : 1, lo = 0, hi = 0;
    for (size_t s = 0; s < series; s++)
        hi = add[s] > hi ? add[s] : hi;
    hi = hi / block + 1; /* caps in blocks: lo fits, hi does not */
    while (hi - lo > 1) {
        size_t mid = lo + (hi - lo) / 2;
        if (cut_sum(add, series, mid * block) <= left)
            lo = mid;
        else
            hi = mid;
    }
    size_t cap = lo * block, total = cut_sum(add, series, cap);
    left -= total;
    for (size_t k = 0; k < series; k++) {
        size_t s = order ? order[k] : k;
        size_t over = add[s] > cap ? add[s] - cap : 0, extra = left >= block ? block : 0;
        extra = over < extra ? over : extra;
        add[s] = (add[s] < cap ? add[s] : cap) + extra;
        left -= extra, total += extra;
    }
    return total;
}

void slowscan_sequential_next_in_order(const sequential_config *cfg, size_t series,
                                       const size_t *drawn, const int *open, size_t spent,
                                       size_t budget, const size_t *order, size_t *add,
                                       size_t *total)
{
    size_t left = budget > spent ? budget - spent : 0, asked = 0;
    for (size_t s = 0; s < series; s++) {
        add[s] = open[s] ? request(cfg, drawn[s]) : 0;
        asked += add[s];
    }
    *total = asked <= left ? asked : grant_common_cap(cfg, series, add, left, order);
}

void slowscan_sequential_next(const sequential_config *cfg, size_t series,
                              const size_t *drawn, const int *open, size_t spent,
                              size_t budget, size_t *add, size_t *total)
{
    slowscan_sequential_next_in_order(cfg, series, drawn, open, spent, budget, NULL, add, total);
}

/* BH's threshold on the reported p of the tested tests: fdr max(k, 1) / m. */
static int final_threshold(const sequential_config *cfg, const sequential_test *tests,
                           size_t count, double *t)
{
    double *p = calloc(2 * (count + 1), sizeof *p), lo, hi;
    if (!p)
        return SLOWSCAN_ENOMEM;
    size_t m = 0, k = 0;
    for (size_t r = 0; r < count; r++) {
        p[r] = NAN;
        if (tests[r].tested)
            slowscan_sequential_p(&tests[r], &p[r], &lo, &hi), m++;
    }
    int st = slowscan_significance_bh(p, count, p + count, NULL);
    for (size_t r = 0; st == SLOWSCAN_OK && r < count; r++)
        k += !isnan(p[count + r]) && p[count + r] <= cfg->fdr;
    *t = cfg->fdr * (double)(k ? k : 1) / (double)(m ? m : 1);
    free(p);
    return st;
}

int slowscan_sequential_finish(const sequential_config *cfg, sequential_test *tests,
                               size_t count, size_t *open)
{
    double t = 0;
    int st = final_threshold(cfg, tests, count, &t);
    *open = 0;
    for (size_t r = 0; st == SLOWSCAN_OK && r < count; r++) {
        sequential_test *s = &tests[r];
        if (s->decision != SEQUENTIAL_OPEN || !s->tested || s->interval_at == 0)
            continue;
        s->decision = s->hi <= t ? SEQUENTIAL_REJECTED
                      : s->lo > t ? SEQUENTIAL_ACCEPTED
                                  : SEQUENTIAL_OPEN;
        *open += s->decision == SEQUENTIAL_OPEN;
    }
    return st;
}
