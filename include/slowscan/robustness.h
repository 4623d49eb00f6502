/* slowscan — the trend tests over a grid of choices (module prefix: robustness_).
 *
 * One series is screened once per cell of a grid — detrending method x window x bandwidth —
 * so a claim can be shown not to hinge on one choice. The rolling indicators get a cell per
 * (method, window, bandwidth); recovery_trend, a test of the whole residual, one per
 * (method, bandwidth). Each method and bandwidth is detrended once and reused for every
 * window. Cells come back in a fixed order through a callback, as plain records; refusals as
 * a status and a screen_detail (screen.h) with the cell they met. Nothing here prints. */
#ifndef SLOWSCAN_ROBUSTNESS_H
#define SLOWSCAN_ROBUSTNESS_H

#include "slowscan/export.h"
#include "slowscan/screen.h"

#include <stddef.h>

enum { ROBUSTNESS_MAX_LENGTHS = 64, ROBUSTNESS_MAX_METHODS = 8 };

/* The grid. A list left empty (count 0) is the base configuration's own single value. */
typedef struct {
    screen_length windows[ROBUSTNESS_MAX_LENGTHS];
    size_t nwindows;
    screen_length bandwidths[ROBUSTNESS_MAX_LENGTHS]; /* only for methods with a bandwidth */
    size_t nbandwidths;
    detrend_spec methods[ROBUSTNESS_MAX_METHODS];
    size_t nmethods;
} robustness_grid;

/* Every list empty: the grid of the single cell cfg describes. */
SLOWSCAN_API
robustness_grid slowscan_robustness_grid_default(void);

/* Grid positions: a window index of ROBUSTNESS_NO_WINDOW marks recovery_trend (no window). */
#define ROBUSTNESS_NO_WINDOW ((size_t)-1)

/* One test in one cell. */
typedef struct {
    int kind;               /* screen_test_kind or indicator_kind */
    size_t test;            /* its index among the run's tests (slowscan_screen_test_of) */
    size_t method;          /* index into the grid's methods (0 for the base method) */
    size_t window_index;    /* ROBUSTNESS_NO_WINDOW for recovery_trend */
    size_t bandwidth_index; /* 0 when the method has no bandwidth */
    double window;          /* time units ((W-1) dt); NaN for recovery_trend */
    double bandwidth;       /* time units; NaN when the method has none */
    double tau, statistic, p_value; /* as on screen_test */
    screen_reason reason;
} robustness_record;

/* One cell: its records and the warnings met making it (in the order they arose). */
typedef struct {
    size_t method, window_index, bandwidth_index;
    size_t nrecords;
    robustness_record records[SCREEN_MAX_TESTS];
    size_t nwarnings;
    screen_warning warnings[SCREEN_MAX_WARNINGS];
} robustness_cell;

/* Where a refusal arose, for its message: the cell whose choices were in force (window_index
 * ROBUSTNESS_NO_WINDOW when no window was; bandwidth_index 0 when the method has none). */
typedef struct {
    size_t method, window_index, bandwidth_index;
} robustness_position;

/* Called once per cell, in order: per method, the rolling cells (windows, then bandwidths
 * within a window), then its recovery_trend cells (per bandwidth). A cell refused after it
 * warned comes with no records, just before the refusal returns. Non-zero stops the grid. */
typedef int (*robustness_cell_sink)(void *context, const robustness_cell *cell);

/* Two screening workspaces (the rolling cells and recovery_trend, each sized for its own
 * tests) and the prepared series of every bandwidth. NULL on failure. */
typedef struct robustness_workspace robustness_workspace;
SLOWSCAN_API
robustness_workspace *slowscan_robustness_workspace_alloc(size_t threads);
SLOWSCAN_API
void slowscan_robustness_workspace_free(robustness_workspace *ws);
/* Bytes the grid of one series holds at once (its two screening workspaces and a prepared
 * series per bandwidth), n samples and cfg->surrogates per test; as
 * slowscan_screen_memory_estimate. */
SLOWSCAN_API
size_t slowscan_robustness_memory_estimate(const screen_config *cfg, const robustness_grid *grid,
                                           size_t n);

/* Runs the grid on one series: per method, each bandwidth is prepared (with the first
 * window, and the control run attached when in->control and the series varies), then the
 * cells are tested and handed to `sink`. The tests are cfg's (cfg->detrend, ->window and
 * ->bandwidth stand in for empty lists). A refusal returns its status with *detail and
 * *where filled; SLOWSCAN_EINVAL with detail->rule SCREEN_RULE_NONE when the sink stopped
 * the grid, or the grid is larger than its limits. */
SLOWSCAN_API
int slowscan_robustness_series(robustness_workspace *ws, const robustness_grid *grid,
                               const screen_config *cfg, const screen_input *in,
                               robustness_cell_sink sink, void *context, screen_detail *detail,
                               robustness_position *where);

/* The prepared series of bandwidth b of the last method run (also after a refusal, as far as
 * it got), or NULL. Valid until the next call. */
SLOWSCAN_API
const screen_prepared *slowscan_robustness_workspace_prepared(const robustness_workspace *ws,
                                                              size_t b);

/* The cell of the grid that is cfg's own choice (its detrend, window and bandwidth) for a
 * series of n samples spanning `span`: methods compared by kind and degree, windows in
 * samples, bandwidths in time units (relative 1e-9); -1 where it is not on the grid (window
 * and bandwidth stay -1 when the method is not, or cfg's window is refused). A method
 * without a bandwidth has bandwidth 0. Lengths in calendar units are measured on `axis`. */
typedef struct {
    long method, window, bandwidth;
} robustness_own_cell;
SLOWSCAN_API
robustness_own_cell slowscan_robustness_own_cell(const robustness_grid *grid,
                                                 const screen_config *cfg, size_t n, double span,
                                                 const time_axis *axis);

/* How the cells of one test (and method) came out. */
typedef struct {
    size_t cells, with_statistic, positive, with_p, significant; /* p <= 0.05 */
} robustness_counts;

SLOWSCAN_API
robustness_counts slowscan_robustness_counts_default(void);
/* Adds n records to counts[record.method * ntests + record.test]. */
SLOWSCAN_API
void slowscan_robustness_tally(robustness_counts *counts, size_t ntests,
                               const robustness_record *records, size_t n);
/* counts[i * ntests + test] summed over i < nmethods. */
SLOWSCAN_API
robustness_counts slowscan_robustness_total(const robustness_counts *counts, size_t nmethods,
                                            size_t ntests, size_t test);
/* Shares among the cells where the quantity exists: statistic > 0 among cells with a
 * statistic, p <= 0.05 among cells with a p; NaN where it exists nowhere. */
SLOWSCAN_API
void slowscan_robustness_shares(const robustness_counts *counts, double *positive,
                                double *significant);

#endif
