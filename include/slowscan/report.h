/* slowscan — figures (module prefix: report_).
 *
 * A figure is one page of panels laid out in rows (each row split into one or more cells),
 * written by PLplot's cairo drivers as PNG, SVG or PDF. The module owns the device: one
 * PLplot stream per figure (made, drawn and ended in slowscan_report_batch_draw), the page size, the
 * fonts and our palette. A figure type is a draw function plus a layout function; the four
 * types below are built on it and later ones plug in the same way.
 *
 * Figures of a run are collected in a batch: each is drawn into a temporary file in the
 * figure directory and only renamed into place by slowscan_report_batch_commit, so a failed run leaves
 * no figure, whole or partial. PLplot is not thread-safe: draw from one thread only.
 * Like io/, report/ never prints or exits; errors come back as a status and an io_error. */
#ifndef SLOWSCAN_REPORT_H
#define SLOWSCAN_REPORT_H

#include "slowscan/export.h"

#include "slowscan/io.h"

#include <stddef.h>

typedef enum { REPORT_PNG, REPORT_SVG, REPORT_PDF } report_format;

/* "png", "svg" or "pdf"; SLOWSCAN_EINVAL otherwise. */
SLOWSCAN_API
int slowscan_report_format_parse(const char *name, report_format *format);
SLOWSCAN_API
const char *slowscan_report_format_extension(report_format format);

/* Page geometry, in pixels for PNG and points for SVG/PDF: every figure is REPORT_PAGE_WIDTH
 * wide; its height is REPORT_PAGE_TOP + the rows' heights + REPORT_PAGE_BOTTOM. Text sizes
 * are fixed lengths (not fractions of the page), and where labels go is worked out from
 * their measured extents when the figure is drawn. */
enum {
    REPORT_PAGE_WIDTH = 880,
    REPORT_PAGE_TOP = 56,
    REPORT_PAGE_BOTTOM = 44,
    REPORT_ROW_HEIGHT = 165,       /* stacked time-series panels */
    REPORT_TALL_ROW_HEIGHT = 300,  /* scatter and heat-map panels */
    REPORT_MAX_ROWS = 24,
    REPORT_MAX_COLS = 12
};

/* The panel layout of a figure: rows from the top, each with its own number of cells. */
typedef struct {
    size_t rows;
    size_t cols[REPORT_MAX_ROWS];
    int row_height;   /* REPORT_ROW_HEIGHT or REPORT_TALL_ROW_HEIGHT */
    int right_margin; /* extra room on the right (keys), page units */
    int heights[REPORT_MAX_ROWS]; /* a row's own height; 0: row_height */
} report_layout;

/* A rectangle in normalised page coordinates (0..1, y upwards), as PLplot's plvpor takes. */
typedef struct {
    double x0, x1, y0, y1;
} report_box;

SLOWSCAN_API
int slowscan_report_page_height(const report_layout *layout);
/* `panels` equal cells, row by row, at most max_cols to a row. */
SLOWSCAN_API
void slowscan_report_layout_grid(report_layout *layout, size_t panels, size_t max_cols, int row_height);
/* The plotting area of cell `col` of row `row` (room for its title and axis labels left
 * around it). The tests use it to find the panels in a PNG. */
SLOWSCAN_API
report_box slowscan_report_cell(const report_layout *layout, size_t row, size_t col);

typedef struct report_figure report_figure;

/* A figure type: what layout the data needs, and how to draw it onto an open page. */
typedef struct {
    const char *name;
    void (*layout)(const void *data, report_layout *layout);
    int (*draw)(report_figure *figure, const void *data);
} report_figure_type;

/* The layout of the page being drawn, for draw functions. */
SLOWSCAN_API
const report_layout *slowscan_report_figure_layout(const report_figure *figure);

typedef struct report_batch report_batch;

/* Opens the figure directory: made if missing (its parent must exist), refused when it is
 * not a directory or a probe file cannot be created in it. */
SLOWSCAN_API
int slowscan_report_batch_open(report_batch **batch, const char *dir, report_format format, io_error *err);
/* Draws one figure into a temporary file in the directory; `name` (any text: a series name)
 * is made safe for a file name, prefixed with `prefix-` and made unique within the batch. */
SLOWSCAN_API
int slowscan_report_batch_draw(report_batch *batch, const report_figure_type *type, const void *data,
                      const char *prefix, const char *name, io_error *err);
/* With `on`, every figure drawn from now on gets a manifest FIGURE.EXT.boxes beside it,
 * committed with it: a line "page 0 0 W H", then per string and panel drawn its kind ("text"
 * or "panel"), its box x0 y0 x1 y1 in page units from the top left, and its text (or the
 * panel's name), tab-separated. Text boxes are measured from the rendered glyphs. The
 * geometry test reads it; the CLI turns it on when SLOWSCAN_FIGURE_BOXES is set. */
SLOWSCAN_API
void slowscan_report_batch_record_boxes(report_batch *batch, int on);
/* Renames every figure into place; on failure the ones not yet renamed are removed. */
SLOWSCAN_API
int slowscan_report_batch_commit(report_batch *batch, io_error *err);
/* Removes every temporary file (and the directory when this batch made it and it is empty),
 * then frees the batch. Safe on NULL and after commit. */
SLOWSCAN_API
void slowscan_report_batch_free(report_batch *batch);
SLOWSCAN_API
size_t slowscan_report_batch_count(const report_batch *batch);
/* The final path of figure i of the batch (in drawing order). */
SLOWSCAN_API
const char *slowscan_report_batch_path(const report_batch *batch, size_t i);

/* `name` made safe for a file name into out[size]: letters, digits, '-', '_' and '.' kept,
 * everything else '_', no leading '.', at most size-1 bytes; "series" when nothing is left. */
SLOWSCAN_API
void slowscan_report_safe_name(const char *name, char *out, size_t size);

/* ---- figure types ---------------------------------------------------------------------- */

/* One test of a series: its indicator path (NULL for a test without one), its statistic,
 * and its null distribution summarised by quantiles. */
typedef struct {
    const char *label;          /* "variance", "recovery_trend", ... */
    const char *statistic_name; /* "tau" or "t(a1)" */
    const double *path;         /* n values or NULL */
    double statistic, p_value, q_value;
    double null_q01, null_q05, null_q50, null_q95, null_q99; /* NaN without a null */
    size_t surrogates;          /* M behind p (its floor is 1/(M+1)); 0: none */
    const char *verdict;        /* "rising", "falling", "none", ...; NULL: not shown */
    int flagged;                /* the verdict is a flag (drawn in the mark colour) */
} report_series_test;

/* Per-series figure, read from the top: the record with its trend and the first window
 * shaded on the time axis; every indicator path standardised on one panel, each named at its
 * right end; then one line per test: its null distribution as two nested intervals (5-95%
 * and 1-99%) with the median, the observed statistic as a point, and p, q and the verdict
 * in words. Rolling tests share a Kendall-tau axis, recovery_trend has its own. */
typedef struct {
    const char *name, *time_name, *source;
    size_t n;
    const double *time, *value, *trend;
    size_t window; /* W, samples */
    const report_series_test *tests;
    size_t ntests;
} report_series_data;
extern SLOWSCAN_API const report_figure_type slowscan_report_series_figure;

/* Screening overview: per test, every series' statistic against -log10(q). The series with
 * flag set are named, strongest first (smallest q, then the larger |statistic|), each where
 * its name touches no other name or flagged point: the first REPORT_OVERVIEW_LABELS may be
 * moved off their point with a leader line, later ones only beside it, at most 40; the
 * number left unnamed is given in a box in the emptiest corner. */
enum { REPORT_OVERVIEW_LABELS = 20 };
typedef struct {
    const char *series;
    size_t test; /* index into the overview's labels */
    double statistic, q_value;
    int flagged;
} report_overview_point;
typedef struct {
    const char *const *labels;          /* per test: indicator name */
    const char *const *statistic_names; /* per test: "tau" or "t(a1)" */
    size_t ntests;
    const report_overview_point *points;
    size_t npoints;
    double fdr;
} report_overview_data;
extern SLOWSCAN_API const report_figure_type slowscan_report_overview_figure;

/* Robustness heat-maps: one panel per detrending method x test. An indicator's panel has
 * windows across and bandwidths up, each cell coloured by tau, cells with p <= 0.05 marked; a
 * method without a bandwidth has a single row. With `drift`, each method also has a
 * recovery_trend panel: one column of cells over bandwidth, coloured by t(a1) on its own
 * scale with the value written in. The run's own choice is outlined (index -1: none). */
typedef struct {
    const char *name, *time_name;
    size_t nwindows, nbandwidths;
    const char *const *window_labels, *const *bandwidth_labels;
    size_t nindicators;
    const char *const *indicator_labels;
    size_t ndetrends;
    const char *const *detrend_labels;
    const int *detrend_has_bandwidth; /* per method; 0: only bandwidth index 0 is used */
    const double *tau, *p_value; /* [method][indicator][window][bandwidth], p NaN without surrogates */
    int drift;                   /* recovery_trend panels */
    const double *drift_t, *drift_p; /* [method][bandwidth] */
    long default_detrend, default_window, default_bandwidth;
    int have_p;
} report_robustness_data;
extern SLOWSCAN_API const report_figure_type slowscan_report_robustness_figure;

/* The projected time at which lambda reaches zero, with its bootstrap interval, drawn as a
 * marked extrapolation; or the note that no crossing falls within twice the record. */
typedef struct {
    int has_crossing;
    double time, lo, hi;  /* hi = +INFINITY: the interval is open above (runs off the panel) */
    int beyond_horizon; /* no crossing within 2x the record */
    double horizon;     /* end of the projection's reach (the panel extends to it when the
                           interval is open above) */
    size_t path_n;      /* the fitted path continued past the record (drawn dashed), or 0 */
    const double *path_time, *path_lambda;
} report_crossing;

/* Recovery-rate figure: lambda(t) with its 95% band and the zero line. crossing may be NULL. */
typedef struct {
    const char *name, *time_name;
    size_t n;
    const double *time, *lambda, *lo, *hi;
    double t_a1, p_value; /* p NaN without surrogates */
    const report_crossing *crossing;
} report_recovery_data;
extern SLOWSCAN_API const report_figure_type slowscan_report_recovery_figure;

/* Feedback figure of a forced run (slowscan feedback): the flux against the response with
 * each window's fitted line over the response's range in that window, and lambda at each
 * window's middle time with its interval, weak and reversed windows marked. */
typedef struct {
    const char *name;                 /* the run */
    const char *flux_name, *response_name, *time_name;
    size_t n;
    const double *flux, *response;    /* n samples (NaN missing) */
    size_t windows;
    const double *middle, *lambda, *lo, *hi, *forcing; /* per window */
    const double *t_min, *t_max;      /* the response's range in each window */
    const unsigned *flags;            /* feedback.h's FEEDBACK_FLAG_* bits */
    const char *verdict;              /* the run's drift verdict in words */
} report_feedback_data;
extern SLOWSCAN_API const report_figure_type slowscan_report_feedback_figure;

/* Maps of one variable of a NetCDF grid (screen --maps with --figures): one panel per test,
 * each grid cell's statistic as a plain raster over the two horizontal dimensions (x across,
 * y up; a cell reaches halfway to its neighbours' coordinates), on a diverging colour scale
 * of our own (deep teal below zero through pale stone to ochre and brick above), cells with
 * no value in grey, flagged cells framed in near-black. The rolling tests share one tau
 * scale, -1 to 1; recovery_trend has its own, symmetric in t. Each scale's bar is in the
 * right margin. */
typedef struct {
    const char *label;            /* "variance", "recovery_trend", ... */
    int rolling;                  /* a Kendall tau (else a t-value) */
    const double *statistic;      /* ny * nx, row-major [y][x]; NaN: no value */
    const unsigned char *flagged; /* ny * nx, non-zero: flagged */
} report_map_test;
typedef struct {
    const char *name;             /* the variable */
    const char *x_name, *y_name;  /* the dimensions */
    size_t nx, ny;
    const double *x, *y;          /* coordinate values (monotone, either way) */
    const report_map_test *tests;
    size_t ntests;
} report_map_data;
extern SLOWSCAN_API const report_figure_type slowscan_report_map_figure;

/* The relaxation modes of a step response (slowscan timescales): the data with the fitted
 * sum and each mode's own curve a_k (1 - exp(-t/tau_k)), and below, the residuals. */
typedef struct {
    const char *name, *time_name;
    size_t n;
    const double *time, *data, *fit, *residual; /* n each */
    size_t nmodes;
    const double *const *modes; /* nmodes curves of n */
    const double *taus;         /* nmodes e-folding times */
    double equilibrium;
    const char *flags;          /* "none", "unresolved", ... */
} report_timescales_data;
extern SLOWSCAN_API const report_figure_type slowscan_report_timescales_figure;

/* A linear-response emulation against the run (slowscan emulate): the emulated response
 * inside its noise band, the actual run, and the departure (when there is one) marked from
 * its first sample. actual may hold NaN (not compared). */
typedef struct {
    const char *name, *time_name;
    size_t n;
    const double *time, *emulated, *lower, *upper, *actual; /* n each; actual NULL: none */
    int departed;
    double departure_time, confirmed_time, size;
    double band_level;
} report_emulate_data;
extern SLOWSCAN_API const report_figure_type slowscan_report_emulate_figure;

#endif
