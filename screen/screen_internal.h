/* The screening workspace, shared by the files of screen/. */
#ifndef SLOWSCAN_SCREEN_INTERNAL_H
#define SLOWSCAN_SCREEN_INTERNAL_H

#include "slowscan/ar1_drift.h"
#include "slowscan/kendall.h"
#include "slowscan/null_trend.h"
#include "slowscan/screen.h"

enum { SCREEN_MAX_THREADS = 256 };

struct screen_workspace {
    size_t threads;
    kendall_workspace *kendall;
    size_t kendall_n;
    surrogate_plan *plan;                                 /* plan once, draw many */
    null_trend_workspace *null_ws[SCREEN_MAX_THREADS];    /* one per thread */
    size_t null_n, null_kinds;
    double *null;   /* tests x surrogates */
    size_t null_cap, null_stride, null_tests, null_first;
    double *sorted; /* surrogates: scratch for the quantiles */
    size_t sorted_cap;
    ar1_drift_workspace *drift;
    size_t drift_n;
    rolling_plan *rolling_plan; /* the per-window indicators' plan, kept while W and dt stay */
    /* The detrend plans, kept while the spec (method, bandwidth, degree), dt and n stay:
     * slowscan_detrend_apply_with gives slowscan_detrend_apply's bits only at the length it
     * was made for, so any other length remakes it (screen_detrend). */
    detrend_workspace *detrend;
    detrend_spec detrend_spec;
    double detrend_dt;
    size_t detrend_n;
    /* slowscan_screen_series: the last series and its paths */
    screen_prepared prepared;
    double *paths;  /* nindicators x n */
    size_t paths_cap;
    screen_progress_fn progress; /* slowscan_screen_workspace_set_progress */
    void *progress_context;
};

/* slowscan_detrend_apply through ws's detrend workspace (remade when spec, dt or n change);
 * ws NULL: the one-shot call. Same doubles and statuses as slowscan_detrend_apply. */
int screen_detrend(screen_workspace *ws, const detrend_spec *spec, double dt, const double *x,
                   size_t n, double *trend, double *residual);

/* slowscan_screen_attach_control with the control detrended through ws (NULL: none). */
int screen_attach_control_with(screen_workspace *ws, const screen_config *cfg,
                               screen_prepared *ps, const screen_input *control,
                               screen_detail *d);

/* The flag of test t whose q-value is q, among `tested` tests with a p-value in the run
 * (slowscan_screen_decide's rule; q is NaN when t has no p). */
screen_flag screen_flag_of(const screen_test *t, double q, size_t tested, double fdr);

/* The rolling spec of a prepared series (window, coverage, step, band) and, with per-window
 * indicators, the plan kept in the workspace (made here, before any thread starts). */
int screen_rolling_ready(screen_workspace *ws, const screen_config *cfg,
                         const screen_prepared *ps, rolling_spec *spec, screen_detail *d);

/* cfg with recovery_trend as its only test: the test of a whole residual, which robustness
 * and recovery run apart from the rolling indicators (same surrogates, streams and p). */
screen_config screen_drift_only(const screen_config *cfg);

/* The series' own record on the result: what the rows of every test share. */
void screen_describe(const screen_config *cfg, const screen_prepared *ps, screen_result *out);

/* One series' null distribution, drawn in whole blocks of NULL_TREND_BLOCK over threads. */
typedef struct {
    const surrogate_plan *plan;
    surrogate_kind kind;
    const surrogate_options *options;
    const double *residual;
    const null_trend_job *job;
    size_t first;  /* the first replicate (a multiple of NULL_TREND_BLOCK) */
    size_t m;      /* replicates: first .. first + m - 1 */
    size_t stride; /* of null's rows; replicate j at column j */
    double *null;  /* nkinds x stride */
    size_t unconverged; /* out: iaaft draws that hit the iteration limit */
    screen_progress_fn progress; /* NULL, or told after each block (under the blocks' lock) */
    void *progress_context;
    const char *series;          /* the name progress reports */
} screen_null_task;
int screen_null_parallel(screen_null_task *task, null_trend_workspace *const *ws, size_t threads);

/* A length of option `option` in the axis' own unit, in place (lengths.c); a refusal
 * (SCREEN_RULE_LENGTH_UNIT) in *d when the axis cannot measure it. */
int screen_length_to_axis(screen_length *len, screen_option option, const time_axis *axis,
                          screen_detail *d);

#endif
