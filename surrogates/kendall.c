/* Kendall tau-b in O(n log n) by Knight's (1966) algorithm.
 *
 * 1. Keep the pairs with both values finite.
 * 2. Sort them by x, then y (merge sort), and count the pairs tied in x (n1) and tied in both
 *    x and y (n3) from the runs of the sorted order.
 * 3. Merge-sort the y column of that order, counting swaps: a swap is a pair i < j (in x order)
 *    with y_i > y_j strictly, i.e. a discordant pair. Pairs tied in x sit in increasing y after
 *    step 2 and pairs tied in y are never swapped, so neither is counted.
 * 4. Count the pairs tied in y (n2) from the runs of the sorted y.
 * With n0 = m(m-1)/2, concordant - discordant = n0 - n1 - n2 + n3 - 2 swaps, and
 * tau_b = that / sqrt((n0 - n1)(n0 - n2)).
 * Counts are 64-bit: n0 reaches 5e13 at m = 10^7. Merge sorts are bottom-up (no recursion),
 * start from insertion-sorted runs of 8 and ping-pong between the workspace arrays, so a call
 * never allocates. */
#include "slowscan/kendall.h"
#include "kendall_internal.h"
#include "slowscan/status.h"

#include <math.h>
#include <stddef.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

struct kendall_workspace {
    size_t nmax;
    double *x, *y;   /* the finite pairs */
    double *tx, *ty; /* merge scratch */
};

kendall_workspace *slowscan_kendall_alloc(size_t nmax)
{
    size_t len = nmax ? nmax : 1;
    if (len > SIZE_MAX / sizeof(double))
        return NULL;
    kendall_workspace *ws = calloc(1, sizeof *ws);
    if (!ws)
        return NULL;
    ws->nmax = nmax;
    ws->x = malloc(len * sizeof(double));
    ws->y = malloc(len * sizeof(double));
    ws->tx = malloc(len * sizeof(double));
    ws->ty = malloc(len * sizeof(double));
    if (!ws->x || !ws->y || !ws->tx || !ws->ty) {
        slowscan_kendall_free(ws);
        return NULL;
    }
    return ws;
}

void slowscan_kendall_free(kendall_workspace *ws)
{
    if (!ws)
        return;
    free(ws->x);
    free(ws->y);
    free(ws->tx);
    free(ws->ty);
    free(ws);
}

/* Short runs are sorted by insertion first: fewer merge passes over the whole array. */
#define RUN 8

static int pair_before(double ax, double ay, double bx, double by)
{
    return ax < bx || (ax == bx && ay < by);
}

/* Merges the sorted runs [lo,mid) and [mid,hi) of (sx,sy) into (dx,dy), ordered by x then y;
 * equal pairs keep their order. */
static void merge_pairs(const double *sx, const double *sy, double *dx, double *dy, size_t lo,
                        size_t mid, size_t hi)
{
    size_t i = lo, j = mid, k = lo;
    while (i < mid && j < hi) {
        int right_first = pair_before(sx[j], sy[j], sx[i], sy[i]);
        size_t from = right_first ? j++ : i++;
        dx[k] = sx[from];
        dy[k++] = sy[from];
    }
    size_t left = mid - i, right = hi - j;
    memcpy(dx + k, sx + i, left * sizeof(double));
    memcpy(dy + k, sy + i, left * sizeof(double));
    memcpy(dx + k + left, sx + j, right * sizeof(double));
    memcpy(dy + k + left, sy + j, right * sizeof(double));
}

static void insertion_pairs(double *x, double *y, size_t lo, size_t hi)
{
    for (size_t i = lo + 1; i < hi; i++) {
        double vx = x[i], vy = y[i];
        size_t j = i;
        for (; j > lo && pair_before(vx, vy, x[j - 1], y[j - 1]); j--) {
            x[j] = x[j - 1];
            y[j] = y[j - 1];
        }
        x[j] = vx;
        y[j] = vy;
    }
}

/* Whether the pairs are already in (x, y) order; the sort is then skipped. */
static int pairs_sorted(const double *x, const double *y, size_t m)
{
    for (size_t i = 1; i < m; i++)
        if (pair_before(x[i], y[i], x[i - 1], y[i - 1]))
            return 0;
    return 1;
}

/* Sorts the pairs by x, then y. */
static void sort_pairs(kendall_workspace *ws, size_t m)
{
    if (pairs_sorted(ws->x, ws->y, m))
        return;
    for (size_t lo = 0; lo < m; lo += RUN)
        insertion_pairs(ws->x, ws->y, lo, RUN < m - lo ? lo + RUN : m);
    double *sx = ws->x, *sy = ws->y, *dx = ws->tx, *dy = ws->ty, *t;
    for (size_t w = RUN; w < m; w *= 2) {
        for (size_t lo = 0; lo < m; lo += 2 * w) {
            size_t mid = w < m - lo ? lo + w : m;
            size_t hi = 2 * w < m - lo ? lo + 2 * w : m;
            merge_pairs(sx, sy, dx, dy, lo, mid, hi);
        }
        t = sx, sx = dx, dx = t;
        t = sy, sy = dy, dy = t;
    }
    if (sx != ws->x) {
        memcpy(ws->x, sx, m * sizeof(double));
        memcpy(ws->y, sy, m * sizeof(double));
    }
}

/* A comparison whose outcome is a coin toss: tells GCC to select with conditional moves
 * rather than branch (a mispredicted branch per merged element costs more than the merge). */
#if defined(__GNUC__) && !defined(__clang__) && __GNUC__ >= 9
#define UNPREDICTABLE(c) __builtin_expect_with_probability((c), 1, 0.5)
#else
#define UNPREDICTABLE(c) (c)
#endif

/* Merging two sorted runs [lo,mid) and [mid,hi) of y, counting the swaps: the pairs (left,
 * right) with left > right strictly (on equality the left element goes first, uncounted).
 *
 * A merge runs from both ends at once: the front takes the smaller head (left on a tie), the
 * back the larger tail (right on a tie), half of the output each. Every right element r is
 * counted once, against the left elements greater than r: at the front these are all lefts
 * not yet taken (mid - i); at the back exactly the lefts the back has already taken (they
 * are > r, and the front only takes values <= r). Each end is a chain of load, compare,
 * select, advance whose speed is the load latency, so the passes below run two merges side
 * by side: four independent chains. */
typedef struct {
    ptrdiff_t i, j;   /* front: next left, next right; its next output is i + j - mid */
    ptrdiff_t bi, bj; /* back: the same, moving down; its next output is bi + bj - mid + 1 */
    ptrdiff_t lo, mid, hi, split; /* the front fills [lo, split), the back [split, hi) */
    int64_t swaps;
} merge_state;

static merge_state merge_start(size_t lo, size_t mid, size_t hi)
{
    ptrdiff_t L = (ptrdiff_t)lo, M = (ptrdiff_t)mid, H = (ptrdiff_t)hi;
    return (merge_state){L, M, M - 1, H - 1, L, M, H, L + (H - L + 1) / 2, 0};
}

/* How many steps of both ends are safe without looking at run boundaries: each step moves
 * every cursor by at most one, so the smallest distance to a boundary bounds them. */
static inline ptrdiff_t merge_safe_steps(const merge_state *m)
{
    ptrdiff_t k = m->i + m->j - m->mid, bk = m->bi + m->bj - m->mid + 1;
    ptrdiff_t steps = m->split - k;
    steps = bk - m->split + 1 < steps ? bk - m->split + 1 : steps;
    steps = m->mid - m->i < steps ? m->mid - m->i : steps;
    steps = m->hi - m->j < steps ? m->hi - m->j : steps;
    steps = m->bi - m->lo + 1 < steps ? m->bi - m->lo + 1 : steps;
    steps = m->bj - m->mid + 1 < steps ? m->bj - m->mid + 1 : steps;
    return steps;
}

/* One output at each end. Few live values (cursors, the count), so that two merges side by
 * side stay in registers: a cursor spilled to memory would put a store-to-load delay into
 * the very chain this is meant to shorten. */
static inline void merge_step_both(merge_state *m, const double *s, double *d)
{
    ptrdiff_t i = m->i, j = m->j, bi = m->bi, bj = m->bj, mid = m->mid;
    double a = s[i], b = s[j];
    ptrdiff_t right = UNPREDICTABLE(b < a);
    d[i + j - mid] = b < a ? b : a;
    int64_t swaps = (mid - i) & -right;
    m->j = j + right;
    m->i = i + 1 - right;
    double ta = s[bi], tb = s[bj];
    ptrdiff_t left = UNPREDICTABLE(ta > tb);
    d[bi + bj - mid + 1] = ta > tb ? ta : tb;
    swaps += (mid - 1 - bi) & (left - 1);
    m->bi = bi - left;
    m->bj = bj - (1 - left);
    m->swaps += swaps;
}

/* Each end finishes on its own once a run is used up at one of them. */
static int64_t merge_finish(merge_state *m, const double *s, double *d)
{
    for (ptrdiff_t steps; (steps = merge_safe_steps(m)) > 0;)
        while (steps-- > 0)
            merge_step_both(m, s, d);
    while (m->i + m->j - m->mid < m->split) {
        ptrdiff_t right = m->i >= m->mid || (m->j < m->hi && s[m->j] < s[m->i]);
        d[m->i + m->j - m->mid] = right ? s[m->j] : s[m->i];
        m->swaps += right * (m->mid - m->i);
        m->j += right;
        m->i += 1 - right;
    }
    while (m->bi + m->bj - m->mid + 1 >= m->split) {
        ptrdiff_t left = m->bi >= m->lo && (m->bj < m->mid || s[m->bi] > s[m->bj]);
        d[m->bi + m->bj - m->mid + 1] = left ? s[m->bi] : s[m->bj];
        m->swaps += (1 - left) * (m->mid - 1 - m->bi);
        m->bi -= left;
        m->bj -= 1 - left;
    }
    return m->swaps;
}

/* One merge pass of runs of width w over y[0..m) from s into d: merges in pairs. */
static int64_t merge_pass(const double *s, double *d, size_t m, size_t w)
{
    int64_t swaps = 0;
    for (size_t lo = 0; lo < m; lo += 4 * w) {
        size_t lo2 = 2 * w < m - lo ? lo + 2 * w : m;
        merge_state a = merge_start(lo, w < m - lo ? lo + w : m, lo2);
        merge_state b = merge_start(lo2, w < m - lo2 ? lo2 + w : m, 2 * w < m - lo2 ? lo2 + 2 * w : m);
        for (ptrdiff_t steps; (steps = merge_safe_steps(&a)) > 0;) {
            ptrdiff_t other = merge_safe_steps(&b);
            if (other <= 0)
                break;
            for (steps = steps < other ? steps : other; steps-- > 0;) {
                merge_step_both(&a, s, d);
                merge_step_both(&b, s, d);
            }
        }
        swaps += merge_finish(&a, s, d) + merge_finish(&b, s, d);
    }
    return swaps;
}

/* Insertion sort of y[lo..hi); each shift moves one element past one strictly greater
 * element, i.e. resolves exactly one discordant pair. */
static int64_t insertion_count(double *y, size_t lo, size_t hi)
{
    int64_t swaps = 0;
    for (size_t i = lo + 1; i < hi; i++) {
        double v = y[i];
        size_t j = i;
        for (; j > lo && v < y[j - 1]; j--)
            y[j] = y[j - 1];
        swaps += (int64_t)(i - j);
        y[j] = v;
    }
    return swaps;
}

/* A full run of RUN = 8: its discordant pairs counted directly (28 comparisons), then sorted
 * by an optimal 19-comparator network (Knuth, The Art of Computer Programming 3, §5.3.4),
 * all without branches — an insertion sort mispredicts on nearly every shift here. */
/* Orders a <= b with minsd/maxsd: the values stay in registers and nothing branches. GCC
 * turns the plain conditional pair into a compare and a branch around a swap (mispredicted
 * half of the time on random data), so x86-64 spells the instructions out; their operand
 * order gives exactly the selects below (the second operand on a tie). */
#if defined(__SSE2__)
#include <emmintrin.h>
#define EXCHANGE(a, b)                                                                     \
    do {                                                                                   \
        __m128d a_ = _mm_set_sd(a), b_ = _mm_set_sd(b);                                    \
        (a) = _mm_cvtsd_f64(_mm_min_sd(b_, a_));                                           \
        (b) = _mm_cvtsd_f64(_mm_max_sd(a_, b_));                                           \
    } while (0)
#else
#define EXCHANGE(a, b)                                                                     \
    do {                                                                                   \
        double lo_ = (b) < (a) ? (b) : (a), hi_ = (b) < (a) ? (a) : (b);                   \
        (a) = lo_, (b) = hi_;                                                              \
    } while (0)
#endif

static int64_t run8_count_sort(double *y)
{
    double v0 = y[0], v1 = y[1], v2 = y[2], v3 = y[3], v4 = y[4], v5 = y[5], v6 = y[6], v7 = y[7];
    /* y[p] > y[q] for q > p: 28 independent comparisons, from registers. */
    int64_t swaps = (v0 > v1) + (v0 > v2) + (v0 > v3) + (v0 > v4) + (v0 > v5) + (v0 > v6) + (v0 > v7);
    swaps += (v1 > v2) + (v1 > v3) + (v1 > v4) + (v1 > v5) + (v1 > v6) + (v1 > v7);
    swaps += (v2 > v3) + (v2 > v4) + (v2 > v5) + (v2 > v6) + (v2 > v7);
    swaps += (v3 > v4) + (v3 > v5) + (v3 > v6) + (v3 > v7);
    swaps += (v4 > v5) + (v4 > v6) + (v4 > v7) + (v5 > v6) + (v5 > v7) + (v6 > v7);
    EXCHANGE(v0, v1); EXCHANGE(v2, v3); EXCHANGE(v4, v5); EXCHANGE(v6, v7); EXCHANGE(v0, v2);
    EXCHANGE(v1, v3); EXCHANGE(v4, v6); EXCHANGE(v5, v7); EXCHANGE(v1, v2); EXCHANGE(v5, v6);
    EXCHANGE(v0, v4); EXCHANGE(v3, v7); EXCHANGE(v1, v5); EXCHANGE(v2, v6); EXCHANGE(v1, v4);
    EXCHANGE(v3, v6); EXCHANGE(v2, v4); EXCHANGE(v3, v5); EXCHANGE(v3, v4);
    y[0] = v0, y[1] = v1, y[2] = v2, y[3] = v3, y[4] = v4, y[5] = v5, y[6] = v6, y[7] = v7;
    return swaps;
}

/* Sorts ws->y[0..m) in place (via ws->ty) and returns the number of swaps. */
static int64_t sort_count_swaps(kendall_workspace *ws, size_t m)
{
    int64_t swaps = 0;
    for (size_t lo = 0; lo < m; lo += RUN)
        swaps += RUN <= m - lo ? run8_count_sort(ws->y + lo) : insertion_count(ws->y, lo, m);
    double *s = ws->y, *d = ws->ty, *t;
    for (size_t w = RUN; w < m; w *= 2) {
        swaps += merge_pass(s, d, m, w);
        t = s, s = d, d = t;
    }
    if (s != ws->y)
        memcpy(ws->y, s, m * sizeof(double));
    return swaps;
}

/* Pairs tied within runs of equal values of a sorted column (and, if b != NULL, of b too). */
static int64_t tied_pairs(const double *a, const double *b, size_t m)
{
    int64_t total = 0, run = 1;
    for (size_t i = 1; i < m; i++) {
        if (a[i] == a[i - 1] && (!b || b[i] == b[i - 1])) {
            run++;
        } else {
            total += run * (run - 1) / 2;
            run = 1;
        }
    }
    return total + run * (run - 1) / 2;
}

/* x finite and strictly increasing (NaN fails every comparison, so the chain of > tests and
 * finite ends cover it): the pairs are then in order and untied in x whatever y holds. */
static int x_strictly_increasing(const double *x, size_t n)
{
    if (n == 0 || !isfinite(x[0]) || !isfinite(x[n - 1]))
        return 0;
    for (size_t i = 1; i < n; i++)
        if (!(x[i] > x[i - 1])) /* predictable: time never turns back */
            return 0;
    return 1;
}

int kendall_time_like(const double *x, size_t n)
{
    return x_strictly_increasing(x, n);
}

/* tau-b from the m finite pairs in the workspace (y alone when x is time-like). */
static int tau_of_pairs(kendall_workspace *ws, size_t m, int time_like, double *tau)
{
    if (m < 2)
        return SLOWSCAN_ESHORT;
    if (!time_like)
        sort_pairs(ws, m);
    int64_t n0 = (int64_t)m * (int64_t)(m - 1) / 2;
    int64_t n1 = time_like ? 0 : tied_pairs(ws->x, NULL, m);
    int64_t n3 = time_like ? 0 : tied_pairs(ws->x, ws->y, m);
    int64_t swaps = sort_count_swaps(ws, m);
    int64_t n2 = tied_pairs(ws->y, NULL, m);
    if (n1 == n0 || n2 == n0)
        return SLOWSCAN_ECONST;
    /* The product of the two pair counts can exceed 2^63, so it is formed in double; one
     * correctly rounded root of it keeps tau = +-1 exact when there are no ties. */
    double denom = sqrt((double)(n0 - n1) * (double)(n0 - n2));
    double t = (double)(n0 - n1 - n2 + n3 - 2 * swaps) / denom;
    /* |tau_b| <= 1 exactly; only the two rounded roots could push it past. */
    *tau = t > 1.0 ? 1.0 : (t < -1.0 ? -1.0 : t);
    return SLOWSCAN_OK;
}

/* The finite values of y[n] into ws->y; their number. */
static size_t keep_finite_y(kendall_workspace *ws, const double *y, size_t n)
{
    size_t m = 0;
    for (size_t i = 0; i < n; i++) { /* written always, kept when finite: no branch */
        ws->y[m] = y[i];
        m += isfinite(y[i]);
    }
    return m;
}

int kendall_tau_b_time_like(kendall_workspace *ws, const double *y, size_t n, double *tau,
                            size_t *used)
{
    *tau = NAN;
    if (n > ws->nmax)
        return SLOWSCAN_EINVAL;
    size_t m = keep_finite_y(ws, y, n);
    if (used)
        *used = m;
    return tau_of_pairs(ws, m, 1, tau);
}

int slowscan_kendall_tau_b(kendall_workspace *ws, const double *x, const double *y, size_t n,
                  double *tau, size_t *used)
{
    if (tau)
        *tau = NAN;
    if (used)
        *used = 0;
    if (!ws || !tau || (n && (!x || !y)) || n > ws->nmax)
        return SLOWSCAN_EINVAL;
    /* The trend statistic's case, x = time, needs neither the x column nor its sort. */
    int time_like = x_strictly_increasing(x, n);
    size_t m = 0;
    if (time_like) {
        m = keep_finite_y(ws, y, n);
    } else {
        for (size_t i = 0; i < n; i++) {
            ws->x[m] = x[i];
            ws->y[m] = y[i];
            m += isfinite(x[i]) & isfinite(y[i]);
        }
    }
    if (used)
        *used = m;
    return tau_of_pairs(ws, m, time_like, tau);
}
