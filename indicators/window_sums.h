/* Private to indicators/: the one streaming mechanism behind every rolling indicator.
 *
 * A trailing window of W samples is summarised by power sums of (x - c) over its present
 * (finite) samples and by sums over its adjacent pairs (x_t, x_{t+1}) with both present,
 * h = x_t - c, tl = x_{t+1} - c. Adding the newest sample and dropping the oldest costs O(1).
 * The shift c keeps the sums small so that the central moments derived from them do not
 * cancel catastrophically; it is re-centred on the window mean (and every sum recomputed
 * exactly from the window) every W steps and earlier when the sums have lost their accuracy
 * (see window_sums.c), which costs O(1) amortised per step. */
#ifndef SLOWSCAN_INDICATORS_WINDOW_SUMS_H
#define SLOWSCAN_INDICATORS_WINDOW_SUMS_H

#include <stddef.h>

typedef struct {
    const double *x;     /* series (residual) */
    const double *level; /* un-detrended level, or NULL when no indicator needs it */
    size_t W;
    int keep_high;       /* keep orders 3 and 4 (skewness, kurtosis) */
    int keep_pairs;      /* keep the pair sums (lag1, ar1, recovery) */
    int complete;        /* no sample of x is missing and there is no level: every window
                            is full, and push/refresh take their fast paths */
    size_t end;          /* index of the newest sample in the window */
    size_t refreshed_at; /* value of `end` at the last exact recomputation */

    double c;                  /* shift of the power and pair sums */
    size_t n;                  /* present samples */
    double s1, s2, s3, s4;     /* sum (x - c)^k over present samples */
    double peak;               /* largest s2 since the last recomputation */
    size_t np;                 /* present pairs */
    double ph, pt, phh, ptt, pht; /* sums of h, tl, h^2, tl^2, h*tl over present pairs */
    double inv_n, inv_np;      /* 1/n and 1/np, kept by wsums_push: the derived quantities
                                  below run every step, and a division there would cost more
                                  than the whole update */
    size_t inv_n_of, inv_np_of; /* the counts those reciprocals belong to */
    double m2;                 /* derived, kept by push and refresh: sum (x - mean)^2 */
    double offset;             /* window mean minus c */
    int spread;                /* m2 resolvable: n >= 2 and above round-off */
    double floor;              /* derived: wsums_spread_floor of the power sums */
    size_t drift_spacing;      /* steps between drift re-centrings: max(W / 16, 1), fixed */
    double cl;                 /* shift of the level sum */
    size_t nl;                 /* present level samples */
    double sl;                 /* sum (level - cl) over them */
} window_sums;

/* An empty accumulator over x[n] (and level, may be NULL) for windows of W samples. */
void wsums_init(window_sums *s, const double *x, const double *level, size_t n, size_t W,
                int keep_high, int keep_pairs);
/* wsums_push's path for windows that may hold missing samples (tests each one). */
void wsums_push_general(window_sums *s, size_t i);
/* Brings inv_n and inv_np up to date with n and np (done by push and refresh). */
static inline void wsums_reciprocals(window_sums *s)
{
    if (s->n != s->inv_n_of) {
        s->inv_n = s->n ? 1.0 / (double)s->n : 0.0;
        s->inv_n_of = s->n;
    }
    if (s->np != s->inv_np_of) {
        s->inv_np = s->np ? 1.0 / (double)s->np : 0.0;
        s->inv_np_of = s->np;
    }
}
/* Re-centres c on the window mean and recomputes every sum exactly from the window. */
void wsums_refresh(window_sums *s);

/* Derived quantities, all O(1); inline because every indicator calls them every step. */

/* Relative resolution of the sums: an sd below WSUMS_RESOLUTION times the magnitude of the
 * values is indistinguishable from round-off (a constant window), so it counts as no spread. */
#define WSUMS_RESOLUTION 1e-14

/* A central sum of squares below this is round-off: RESOLUTION^2 times the sum of the
 * squared values (count * c^2 + raw sum of squares about c). */
static inline double wsums_spread_floor(double count, double c, double raw2)
{
    return WSUMS_RESOLUTION * WSUMS_RESOLUTION * (count * c * c + raw2);
}

/* Window mean minus c. */
static inline double wsums_offset(const window_sums *s)
{
    return s->offset;
}

/* sum (x - mean)^2 over the present samples (a tiny negative value is round-off: 0). */
static inline double wsums_central2(const window_sums *s)
{
    return s->m2;
}

/* Non-zero when the spread is resolvable: n >= 2 and the central sum above the floor. */
static inline int wsums_has_spread(const window_sums *s)
{
    return s->spread;
}

/* Brings the reciprocals and the derived m2, offset and spread up to date with the sums:
 * once per step, shared by the re-centring policy and every indicator of the step. */
static inline void wsums_derive(window_sums *s)
{
    wsums_reciprocals(s);
    s->offset = s->n ? s->s1 * s->inv_n : 0.0;
    double v = s->n ? s->s2 - s->s1 * (s->s1 * s->inv_n) : 0.0;
    s->m2 = v > 0.0 ? v : 0.0;
    s->floor = wsums_spread_floor((double)s->n, s->c, s->s2);
    s->spread = s->n >= 2 && s->m2 > s->floor;
}

/* Pairs: sum (h - hbar)^2 (never negative) and sum (h - hbar)(tl - tlbar). */
static inline double wsums_pair_shh(const window_sums *s)
{
    if (s->np == 0)
        return 0.0;
    double v = s->phh - s->ph * (s->ph * s->inv_np);
    return v > 0.0 ? v : 0.0;
}

static inline double wsums_pair_sht(const window_sums *s)
{
    return s->np ? s->pht - s->ph * (s->pt * s->inv_np) : 0.0;
}

/* Non-zero when at least 2 pairs and the spread of their h is resolvable. */
static inline int wsums_has_pair_spread(const window_sums *s)
{
    return s->np >= 2 &&
           wsums_pair_shh(s) > wsums_spread_floor((double)s->np, s->c, s->phh);
}

/* For a series without missing samples the window always holds W samples and W-1 pairs, so
 * no sample needs a test. Every sum still runs on its own: deriving the pairs' sums of squares
 * from the window's (s2 minus the newest sample's square) cancels badly when one sample
 * dominates the window, a spike of 1e8 in noise of 1 costing ar1 1% (found in review).
 * Inline, like push and maintain below: they run once per window of every surrogate, where a
 * call per step cost more than the arithmetic. */
static inline void wsums_slide_complete(window_sums *s, size_t i)
{
    const double *x = s->x;
    size_t j = i - s->W;
    double c = s->c, old = x[j] - c, old_next = x[j + 1] - c, prev = x[i - 1] - c, v = x[i] - c;
    double old2 = old * old, v2 = v * v;
    s->s1 += v - old;
    s->s2 += v2 - old2;
    if (s->keep_high) {
        s->s3 += v2 * v - old2 * old;
        s->s4 += v2 * v2 - old2 * old2;
    }
    if (s->s2 > s->peak)
        s->peak = s->s2;
    if (s->keep_pairs) { /* pair (i-1, i) in, pair (i-W, i-W+1) out */
        s->ph += prev - old;
        s->pt += v - old_next;
        s->phh += prev * prev - old2;
        s->ptt += v2 - old_next * old_next;
        s->pht += prev * v - old * old_next;
    }
    s->end = i;
}

/* Slides the window so that it ends at sample i (called for i = 0, 1, 2, ... in order):
 * adds sample i and the pair (i-1, i), drops sample i-W and the pair (i-W, i-W+1). */
static inline void wsums_push(window_sums *s, size_t i)
{
    if (s->complete && i >= s->W)
        wsums_slide_complete(s, i);
    else
        wsums_push_general(s, i);
    wsums_derive(s);
}

/* The re-centring policy (window_sums.c) after a push; call once the window is full. */
enum { WSUMS_COLLAPSE_FACTOR = 64, WSUMS_DRIFT_SPACING_DIVISOR = 16 };

static inline void wsums_maintain(window_sums *s)
{
    size_t since = s->end - s->refreshed_at;
    if (since >= s->W) {
        wsums_refresh(s);
        return;
    }
    if (s->n == 0)
        return;
    double central = wsums_central2(s), floor = s->floor; /* both from wsums_derive */
    if ((double)WSUMS_COLLAPSE_FACTOR * central + floor < s->peak) {
        wsums_refresh(s);
        return;
    }
    double d = wsums_offset(s);
    if (since >= s->drift_spacing && (double)s->n * d * d > central + floor)
        wsums_refresh(s);
}

#endif
