/* The streaming window accumulator shared by every rolling indicator (see window_sums.h).
 *
 * Accuracy. With c near the window mean, x - c is computed exactly for data far from zero
 * (Sterbenz) and the central sums follow from the raw sums with little cancellation; each
 * add/drop adds round-off of the order of eps times the largest sum seen since the last exact
 * recomputation. Three rules bound both effects:
 *   - every W steps the sums are recomputed from the window (nothing older survives);
 *   - immediately when the spread has collapsed: the central sum of squares fell below 1/64
 *     of the largest raw sum of squares since the last recomputation. This covers both a
 *     quiet stretch following a noisy one (old round-off would swamp the new spread) and a
 *     mean that ran away from c by more than ~8 sd (cancellation in the moment formulas);
 *   - when the mean has drifted from c by more than one window sd, but no sooner than W/16
 *     steps after the last recomputation, which keeps the cost O(1) amortised even for a
 *     series that trends steadily through the window.
 * A collapse needs the spread to fall 64-fold, which a finite double range allows only a
 * bounded number of times per window, so it does not break the amortised bound either. */
#include "window_sums.h"

#include <math.h>

static void clear_power(window_sums *s)
{
    s->n = 0;
    s->s1 = s->s2 = s->s3 = s->s4 = 0.0;
    s->peak = 0.0;
}

static void clear_pairs(window_sums *s)
{
    s->np = 0;
    s->ph = s->pt = s->phh = s->ptt = s->pht = 0.0;
}

/* Whether no sample is missing (surrogates of a gap-free residual never are). */
static int all_finite(const double *x, size_t n)
{
    int finite = 1;
    for (size_t i = 0; i < n; i++)
        finite &= isfinite(x[i]);
    return finite;
}

void wsums_init(window_sums *s, const double *x, const double *level, size_t n, size_t W,
                int keep_high, int keep_pairs)
{
    s->x = x;
    s->level = level;
    s->W = W;
    s->keep_high = keep_high;
    s->keep_pairs = keep_pairs;
    s->complete = !level && all_finite(x, n);
    s->end = 0;
    s->refreshed_at = 0;
    s->c = 0.0;
    clear_power(s);
    clear_pairs(s);
    s->cl = 0.0;
    s->nl = 0;
    s->sl = 0.0;
    s->inv_n = s->inv_np = 0.0;
    s->inv_n_of = s->inv_np_of = 0;
    s->m2 = s->offset = 0.0;
    s->spread = 0;
    s->floor = 0.0;
    s->drift_spacing = W / WSUMS_DRIFT_SPACING_DIVISOR ? W / WSUMS_DRIFT_SPACING_DIVISOR : 1;
}

/* sign = +1 adds the sample, -1 removes it. */
static void power_update(window_sums *s, double v, double sign)
{
    double d = v - s->c, d2 = d * d;
    s->s1 += sign * d;
    s->s2 += sign * d2;
    if (s->keep_high) {
        s->s3 += sign * d2 * d;
        s->s4 += sign * d2 * d2;
    }
}

static void pair_update(window_sums *s, double a, double b, double sign)
{
    double h = a - s->c, tl = b - s->c;
    s->ph += sign * h;
    s->pt += sign * tl;
    s->phh += sign * h * h;
    s->ptt += sign * tl * tl;
    s->pht += sign * h * tl;
}

static void drop(window_sums *s, size_t j)
{
    const double *x = s->x;
    if (isfinite(x[j])) {
        power_update(s, x[j], -1.0);
        /* An empty window has sums exactly zero: discard the round-off residue. */
        if (--s->n == 0)
            clear_power(s);
    }
    if (s->keep_pairs && isfinite(x[j]) && isfinite(x[j + 1])) {
        pair_update(s, x[j], x[j + 1], -1.0);
        if (--s->np == 0)
            clear_pairs(s);
    }
    if (s->level && isfinite(s->level[j])) {
        s->sl -= s->level[j] - s->cl;
        if (--s->nl == 0)
            s->sl = 0.0;
    }
}

static void add(window_sums *s, size_t i)
{
    const double *x = s->x;
    if (isfinite(x[i])) {
        /* Into an empty window (no pairs either) the shift may move freely: take the
         * sample itself, so a series resuming after a long gap starts centred. */
        if (s->n == 0)
            s->c = x[i];
        power_update(s, x[i], 1.0);
        s->n++;
        if (s->s2 > s->peak)
            s->peak = s->s2;
    }
    if (s->keep_pairs && i > 0 && isfinite(x[i - 1]) && isfinite(x[i])) {
        pair_update(s, x[i - 1], x[i], 1.0);
        s->np++;
    }
    if (s->level && isfinite(s->level[i])) {
        if (s->nl == 0)
            s->cl = s->level[i];
        s->sl += s->level[i] - s->cl;
        s->nl++;
    }
}

void wsums_push_general(window_sums *s, size_t i)
{
    if (i >= s->W)
        drop(s, i - s->W);
    add(s, i);
    s->end = i;
}

/* Mean of the finite values of v[lo..hi]; `count` receives their number (mean 0 if none). */
static double finite_mean(const double *v, size_t lo, size_t hi, size_t *count)
{
    double sum = 0.0;
    size_t k = 0;
    for (size_t j = lo; j <= hi; j++)
        if (isfinite(v[j])) {
            sum += v[j];
            k++;
        }
    *count = k;
    return k ? sum / (double)k : 0.0;
}

/* wsums_refresh for a window with every sample present: straight sums, no tests. */
static void refresh_complete(window_sums *s, size_t lo, size_t hi)
{
    const double *x = s->x;
    double sum = 0.0;
    for (size_t j = lo; j <= hi; j++)
        sum += x[j];
    double c = sum / (double)(hi - lo + 1), s1 = 0, s2 = 0, s3 = 0, s4 = 0;
    double ph = 0, pt = 0, phh = 0, ptt = 0, pht = 0;
    for (size_t j = lo; j <= hi; j++) {
        double d = x[j] - c, d2 = d * d;
        s1 += d, s2 += d2;
        if (s->keep_high)
            s3 += d2 * d, s4 += d2 * d2;
        if (s->keep_pairs && j < hi) {
            double next = x[j + 1] - c;
            ph += d, pt += next, phh += d2, ptt += next * next, pht += d * next;
        }
    }
    s->c = c, s->s1 = s1, s->s2 = s2, s->s3 = s3, s->s4 = s4, s->n = hi - lo + 1;
    s->ph = ph, s->pt = pt, s->phh = phh, s->ptt = ptt, s->pht = pht, s->np = hi - lo;
    s->peak = s2;
    s->refreshed_at = hi;
    wsums_derive(s);
}

void wsums_refresh(window_sums *s)
{
    if (s->complete && s->end + 1 >= s->W) {
        refresh_complete(s, s->end + 1 - s->W, s->end);
        return;
    }
    size_t hi = s->end, lo = hi + 1 >= s->W ? hi + 1 - s->W : 0;
    size_t count;
    double mean = finite_mean(s->x, lo, hi, &count);
    clear_power(s);
    clear_pairs(s);
    if (count)
        s->c = mean;
    for (size_t j = lo; j <= hi; j++) {
        if (isfinite(s->x[j])) {
            power_update(s, s->x[j], 1.0);
            s->n++;
        }
        if (s->keep_pairs && j < hi && isfinite(s->x[j]) && isfinite(s->x[j + 1])) {
            pair_update(s, s->x[j], s->x[j + 1], 1.0);
            s->np++;
        }
    }
    s->peak = s->s2;
    if (s->level) {
        double lmean = finite_mean(s->level, lo, hi, &s->nl);
        s->cl = s->nl ? lmean : s->cl;
        s->sl = 0.0;
        for (size_t j = lo; j <= hi; j++)
            if (isfinite(s->level[j]))
                s->sl += s->level[j] - s->cl;
    }
    s->refreshed_at = hi;
    wsums_derive(s);
}

