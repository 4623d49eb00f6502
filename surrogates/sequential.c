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
    return (sequential_config){.fdr = 0.05, .epsilon = 1e-3, .max_per_series = 100000,
                               .budget = 0, .first_round = 64, .block = 64};
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

int slowscan_sequential_decide(const sequential_config *cfg, sequential_test *tests,
                               size_t count, size_t *open)
{
    size_t m = 0;
    for (size_t r = 0; r < count; r++)
        m += tests[r].tested != 0;
    /* Bonferroni over the tests and every round any of them may take */
    double alpha = cfg->epsilon / ((double)(m ? m : 1) * (double)slowscan_sequential_max_rounds(cfg));
    double *buf = calloc(3 * count + 1, sizeof *buf);
    unsigned char *sure = malloc(2 * count + 1);
    if (!buf || !sure) {
        free(buf), free(sure);
        return SLOWSCAN_ENOMEM;
    }
    double *upper = buf, *lower = buf + count, *q = buf + 2 * count;
    for (size_t r = 0; r < count; r++) {
        sequential_test *t = &tests[r];
        if (t->tested && t->interval_at != t->drawn + 1) { /* +1: 0 means "none yet" */
            slowscan_sequential_interval(t->hits, t->drawn, alpha, &t->lo, &t->hi);
            t->interval_at = t->drawn + 1;
        }
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

typedef struct {
    size_t want, series;
} wish;

static int by_want(const void *a, const void *b)
{
    const wish *x = a, *y = b;
    if (x->want != y->want)
        return x->want < y->want ? -1 : 1;
    return x->series < y->series ? -1 : (x->series > y->series);
}

/* Grants the requests whole, smallest first (ties by series), while the budget lasts; the
 * first that does not fit gets what is left in whole blocks, and the rest nothing. The
 * smallest requests are the series closest to being settled for the least work. */
static size_t grant_smallest_first(const sequential_config *cfg, size_t series, size_t *add,
                                   size_t left)
{
    size_t block = cfg->block ? cfg->block : 1, total = 0, count = 0;
    wish *w = malloc((series + 1) * sizeof *w);
    for (size_t s = 0; s < series; s++) {
        if (w && add[s] > 0)
            w[count++] = (wish){add[s], s};
        if (w)
            add[s] = 0;
    }
    if (!w) { /* no room to sort: in series order */
        for (size_t s = 0; s < series; s++) {
            add[s] = add[s] <= left ? add[s] : left - left % block;
            left -= add[s], total += add[s];
        }
        return total;
    }
    qsort(w, count, sizeof *w, by_want);
    for (size_t k = 0; k < count && left >= block; k++) {
        size_t a = w[k].want <= left ? w[k].want : left - left % block;
        add[w[k].series] = a;
        left -= a, total += a;
    }
    free(w);
    return total;
}

void slowscan_sequential_next(const sequential_config *cfg, size_t series,
                              const size_t *drawn, const int *open, size_t spent,
                              size_t budget, size_t *add, size_t *total)
{
    size_t left = budget > spent ? budget - spent : 0, asked = 0;
    for (size_t s = 0; s < series; s++) {
        add[s] = open[s] ? request(cfg, drawn[s]) : 0;
        asked += add[s];
    }
    *total = asked <= left ? asked : grant_smallest_first(cfg, series, add, left);
}
