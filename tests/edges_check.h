/* Suite edges, split over two files: the screening cases (test_edges.c) and the rest
 * (test_edges_calls.c: unit roots, a window of 10^6 samples, Kendall, recovery, the feedback
 * fit, and the command). */
#ifndef SLOWSCAN_TESTS_EDGES_CHECK_H
#define SLOWSCAN_TESTS_EDGES_CHECK_H

#include "slowscan/screen.h"

#include <stddef.h>

/* (test_edges.c) An AR(1) of coefficient 0.7 from GSL's mt19937 seeded with `seed`. */
void edges_ar1(double *x, size_t n, unsigned long seed);
/* Screens x on times 0, 1, ..., named `name` (copies of one series share random streams);
 * with ws NULL a workspace of its own. */
int edges_screen(screen_workspace *ws, const screen_config *cfg, const char *name,
                 const double *x, size_t n, screen_result *r, screen_detail *d);
/* Every number of a result is finite, or NaN with the reason that says why; p in (0, 1]. */
void edges_result_clean(const screen_result *r, const char *what);

void edges_unit_root(void);
void edges_long_window(void);
void edges_other_calls(void);
void edges_cli(void);

#endif
