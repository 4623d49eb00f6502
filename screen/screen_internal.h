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
    size_t null_cap, null_stride, null_tests;
    double *sorted; /* surrogates: scratch for the quantiles */
    size_t sorted_cap;
    ar1_drift_workspace *drift;
    size_t drift_n;
    rolling_plan *rolling_plan; /* the per-window indicators' plan, kept while W and dt stay */
    /* slowscan_screen_series: the last series and its paths */
    screen_prepared prepared;
    double *paths;  /* nindicators x n */
    size_t paths_cap;
};

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
    size_t m;     /* replicates */
    double *null; /* nkinds x m */
    size_t unconverged; /* out: iaaft draws that hit the iteration limit */
} screen_null_task;
int screen_null_parallel(screen_null_task *task, null_trend_workspace *const *ws, size_t threads);

#endif
