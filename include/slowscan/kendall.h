/* slowscan — Kendall rank correlation tau-b in O(n log n) (module prefix: kendall_).
 *
 * Knight's (1966, J. Am. Stat. Assoc. 61:436) algorithm: sort by x (then y), count ties,
 * count discordant pairs as the swaps of a merge sort on y. Ties in x and in y are handled
 * (tau-b). The workspace holds all scratch so that repeated calls (one per surrogate) never
 * allocate. */
#ifndef SLOWSCAN_KENDALL_H
#define SLOWSCAN_KENDALL_H

#include "slowscan/export.h"

#include <stddef.h>

typedef struct kendall_workspace kendall_workspace;

SLOWSCAN_API
kendall_workspace *slowscan_kendall_alloc(size_t nmax);
SLOWSCAN_API
void slowscan_kendall_free(kendall_workspace *ws);

/* tau-b of (x_i, y_i) over the pairs where both are finite; `used` (may be NULL) receives
 * their number. n <= nmax of the workspace. Sets *tau = NaN and returns SLOWSCAN_ESHORT when
 * fewer than 2 pairs remain, SLOWSCAN_ECONST when x or y is constant over them. */
SLOWSCAN_API
int slowscan_kendall_tau_b(kendall_workspace *ws, const double *x, const double *y, size_t n,
                  double *tau, size_t *used);

#endif
