/* slowscan — the recovery-rate analysis of one series (module prefix: recovery_).
 *
 * The drifting AR(1) x_{t+1} = (a0 + a1 s_t) x_t + c + e_t (ar1_drift.h) fitted to a prepared
 * series' residual, its recovery-rate path lambda(t) = ln(a0 + a1 s_t)/dt with a pointwise 95%
 * band, the surrogate p-value of t(a1) — screen's recovery_trend test run alone, so the same
 * surrogates and streams give the same p — and, when asked, the projected crossing of
 * lambda = 0 with its residual-bootstrap interval (an extrapolation, not a forecast), drawn
 * from the random stream (seed, series name, "projection", 0). Nothing here prints. */
#ifndef SLOWSCAN_RECOVERY_H
#define SLOWSCAN_RECOVERY_H

#include "slowscan/export.h"
#include "slowscan/ar1_drift.h"
#include "slowscan/screen.h"

#include <stddef.h>

typedef struct {
    size_t projection_draws; /* bootstrap draws of the crossing; 0: no projection */
    double horizon;          /* the projection's reach in record lengths from the first sample: 2 */
} recovery_config;

SLOWSCAN_API
recovery_config slowscan_recovery_config_default(void);

/* The result of one series: plain data. */
typedef struct {
    int fit_status;   /* SLOWSCAN_OK, or why there is no fit (ECONST: the series does not vary;
                         ESHORT, ENUMERIC); the path is then not written, p and the
                         projection are NaN */
    ar1_drift_fit fit;
    double p_value;   /* surrogate p of t(a1), one-sided (a1 > 0); NaN without surrogates */
    size_t nwarnings; /* of the surrogate test, in the order they arose */
    screen_warning warnings[SCREEN_MAX_WARNINGS];
    int projected;         /* 1: a projection was asked for and the series has a fit */
    int projection_status; /* SLOWSCAN_OK, or why no crossing could be projected (then kind
                              PROJECTION_NONE, positions NaN, draws 0) */
    ar1_projection projection;
    double crossing_time, crossing_lo, crossing_hi; /* the projection's positions as times
                                                       (hi +INFINITY: open above) */
} recovery_result;

/* The drift fit (sized by series length) with the random stream of the projection, and a
 * screening workspace for the surrogate test. NULL on failure. */
typedef struct recovery_workspace recovery_workspace;
SLOWSCAN_API
recovery_workspace *slowscan_recovery_workspace_alloc(size_t threads);
SLOWSCAN_API
void slowscan_recovery_workspace_free(recovery_workspace *ws);

/* Fits ps->residual (cfg->noise_trend decides whether the innovation variance drifts), writes
 * the path into lambda, lo, hi (ps->n each, the caller's; all NULL: not wanted) when the fit
 * exists, with cfg->surrogates > 0 tests t(a1) against cfg's null, and with
 * rcfg->projection_draws > 0 projects the crossing. A series without a fit is not a refusal
 * (out->fit_status says why). Refusals of the surrogate test return their status with
 * *detail filled (warnings met before stay on out); SLOWSCAN_ENOMEM. */
SLOWSCAN_API
int slowscan_recovery_series(recovery_workspace *ws, const screen_config *cfg,
                             const recovery_config *rcfg, const screen_prepared *ps,
                             double *lambda, double *lo, double *hi, recovery_result *out,
                             screen_detail *detail);

#endif
