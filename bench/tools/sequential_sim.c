/* A simulated bench_sequential, for trying the procedure in seconds instead of an hour (not
 * built by make; `gcc -O2 -std=c11 -Wall -Wextra -Iinclude -o build/sequential_sim
 * bench/tools/sequential_sim.c build/libslowscan.a -lgsl -lgslcblas -lfftw3 -lfftw3_threads
 * -lcsv -lnetcdf -ludunits2 -lpthread -lm`).
 *
 * Usage: sequential_sim FILE [RISK [REPEATS]]. FILE: one true Monte Carlo p per line, three
 * per series in series order (e.g. (hits + 0.5) / (draws + 1) from an auto run's summary).
 * Each repeat runs the rounds as `screen --surrogates auto --budget 1000/series` does (decide,
 * next, finish; hits binomial, the tests of a series independent, which the real surrogates
 * are not), and two M = 10^4 references (binomial hits); prints auto's recovery of the first
 * reference's BH discoveries and its extra ones, and the second reference's, i.e. how well
 * the reference reproduces itself. SPEND_ROUNDS=1: the even split of the risk over rounds;
 * REACH=1: when the budget is short, the series cheapest to settle first (tried, no gain);
 * TRACE=1: the rounds on stderr. */
#include "slowscan/sequential.h"
#include "slowscan/significance.h"
#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
enum { T = 3 };
static double t_hat(const sequential_test *t, size_t m)
{
    double *p = malloc(m * sizeof *p), *q = malloc(m * sizeof *q);
    for (size_t i = 0; i < m; i++)
        p[i] = (1.0 + t[i].hits) / (1.0 + t[i].drawn);
    slowscan_significance_bh(p, m, q, NULL);
    size_t k = 0;
    for (size_t i = 0; i < m; i++)
        k += q[i] <= 0.05;
    free(p), free(q);
    return 0.05 * (double)(k ? k : 1) / (double)m;
}

/* draws test i needs for its interval (level a) to exclude t, if p stays at its estimate */
static double need_of(const sequential_test *x, double t, double a, double K)
{
    double p = (0.5 + x->hits) / (1.0 + x->drawn);
    for (double n = x->drawn > 64 ? x->drawn : 64; n <= K; n *= 1.1) {
        double lo, hi;
        size_t h = (size_t)llround(p * n);
        slowscan_sequential_interval(h, (size_t)n, a, &lo, &hi);
        if (hi <= t || lo > t)
            return n;
    }
    return INFINITY;
}

static void reach(const sequential_config *cfg, const sequential_test *t, size_t S, const size_t *drawn,
                  const int *op, size_t spent, size_t budget, size_t *add, size_t *total)
{
    size_t left = budget > spent ? budget - spent : 0, asked = 0;
    for (size_t s = 0; s < S; s++) {
        size_t want = drawn[s] ? drawn[s] : 64, room = cfg->max_per_series - drawn[s];
        add[s] = op[s] ? (want < room ? want : room) : 0;
        asked += add[s];
    }
    if (asked <= left) { *total = asked; return; }
    double th = t_hat(t, S * T), K = (double)cfg->max_per_series, a = cfg->epsilon * 0.3;
    double *need = malloc(S * sizeof *need);
    for (size_t s = 0; s < S; s++) {
        need[s] = INFINITY;
        if (!add[s]) continue;
        double worst = 0; int any = 0;
        for (size_t j = 0; j < T; j++) {
            const sequential_test *x = &t[s * T + j];
            if (x->decision != SEQUENTIAL_OPEN) continue;
            double n = need_of(x, th, a, K);
            if (isfinite(n)) { any = 1; worst = n > worst ? n : worst; }
        }
        if (any) need[s] = worst - drawn[s];
    }
    *total = 0;
    for (;;) { /* cheapest first */
        size_t best = S;
        for (size_t s = 0; s < S; s++)
            if (add[s] && isfinite(need[s]) && (best == S || need[s] < need[best])) best = s;
        if (best == S) break;
        size_t g = (size_t)ceil(fmax(need[best], 64) / 64) * 64;
        g = g < add[best] ? add[best] : g; /* at least its doubling */
        size_t room = cfg->max_per_series - drawn[best];
        g = g < room ? g : room;
        g = g < left ? g : left / 64 * 64;
        add[best] = g; need[best] = INFINITY; left -= g; *total += g;
        if (g == 0) break;
        need[best] = NAN;
    }
    for (size_t s = 0; s < S; s++)
        if (!isnan(need[s])) add[s] = 0;
    free(need);
}

int main(int argc, char **argv)
{
    FILE *f = fopen(argv[1], "r");
    double eps = argc > 2 ? atof(argv[2]) : 1e-3;
    int reps = argc > 3 ? atoi(argv[3]) : 5;
    size_t cap = 1 << 16, m = 0;
    double *p = malloc(cap * sizeof *p);
    while (fscanf(f, "%lf", &p[m]) == 1)
        if (++m == cap)
            p = realloc(p, (cap *= 2) * sizeof *p);
    size_t S = m / T;
    m = S * T;
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    double rec2 = 0, ext2 = 0, rec = 0, ext = 0, work = 0, und = 0, nref = 0;
    for (int rep = 0; rep < reps; rep++) {
        gsl_rng_set(r, 100 + rep);
        sequential_config cfg = slowscan_sequential_config_default();
        cfg.epsilon = eps;
        cfg.budget = 1000 * S;
        if (getenv("SPEND_ROUNDS"))
            cfg.spending = SEQUENTIAL_SPEND_ROUNDS;
        sequential_test *t = calloc(m, sizeof *t);
        size_t *drawn = calloc(S, sizeof *drawn), *add = calloc(S, sizeof *add), total, open;
        int *op = calloc(S, sizeof *op);
        for (size_t i = 0; i < m; i++)
            t[i] = (sequential_test){.series = i / T, .tested = 1};
        for (size_t s = 0; s < S; s++)
            op[s] = 1;
        size_t budget = slowscan_sequential_budget(&cfg, m), spent = 0, R = slowscan_sequential_max_rounds(&cfg);
        slowscan_sequential_next(&cfg, S, drawn, op, 0, budget, add, &total);
        for (size_t round = 0; total > 0 && round < R; round++) {
            for (size_t s = 0; s < S; s++) {
                for (size_t j = 0; j < T; j++) {
                    t[s * T + j].hits += gsl_ran_binomial(r, p[s * T + j], (unsigned)add[s]);
                    t[s * T + j].drawn += add[s];
                }
                drawn[s] += add[s], spent += add[s];
            }
            slowscan_sequential_decide(&cfg, t, m, &open);
            for (size_t s = 0; s < S; s++) {
                op[s] = 0;
                for (size_t j = 0; j < T; j++)
                    op[s] |= t[s * T + j].decision == SEQUENTIAL_OPEN;
            }
            if (getenv("REACH"))
                reach(&cfg, t, S, drawn, op, spent, budget, add, &total);
            else
                slowscan_sequential_next(&cfg, S, drawn, op, spent, budget, add, &total);
            if (getenv("TRACE"))
                fprintf(stderr, "round %zu open %zu spent %zu next %zu\n", round + 1, open, spent, total);
        }
        slowscan_sequential_finish(&cfg, t, m, &open);
        double *pr = malloc(m * sizeof *pr), *q = malloc(m * sizeof *q);
        for (size_t i = 0; i < m; i++)
            pr[i] = (1.0 + gsl_ran_binomial(r, p[i], 10000)) / 10001.0;
        slowscan_significance_bh(pr, m, q, NULL);
        double *pr2 = malloc(m * sizeof *pr2), *q2 = malloc(m * sizeof *q2);
        for (size_t i = 0; i < m; i++)
            pr2[i] = (1.0 + gsl_ran_binomial(r, p[i], 10000)) / 10001.0;
        slowscan_significance_bh(pr2, m, q2, NULL);
        size_t ref = 0, both = 0, extra = 0, both2 = 0, extra2 = 0;
        for (size_t i = 0; i < m; i++) {
            int a = q2[i] <= 0.05, b = q[i] <= 0.05;
            both2 += a && b, extra2 += a && !b;
        }
        free(pr2), free(q2);
        for (size_t i = 0; i < m; i++) {
            int a = t[i].decision == SEQUENTIAL_REJECTED, b = q[i] <= 0.05;
            ref += b, both += a && b, extra += a && !b;
        }
        rec2 += (double)both2 / ref, ext2 += (double)extra2 / ref;
        rec += (double)both / ref, ext += (double)extra / ref, work += 1e4 * S / (double)spent;
        und += open, nref += ref;
        free(pr), free(q), free(t), free(drawn), free(add), free(op);
    }
    printf("recovered %.1f%% extra %.1f%% work %.1fx undecided %.1f reference %.1f\n", 100 * rec / reps,
           100 * ext / reps, work / reps, und / reps, nref / reps);
    printf("a second M = 10^4 run (other surrogates) against the first: recovered %.1f%% extra %.1f%%\n", 100 * rec2 / reps, 100 * ext2 / reps);
    return 0;
}
