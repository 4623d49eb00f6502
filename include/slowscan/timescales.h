/* slowscan — relaxation timescales of a step response (module prefix: timescales_).
 *
 * A response y(t) to a forcing switched on at t = 0 (an abrupt-forcing experiment) is
 * described as a sum of exponential relaxation modes,
 *     y(t) = sum_k a_k (1 - exp(-t / tau_k)),  k = 1..K,
 * fitted by nonlinear least squares (GSL gsl_multifit_nlinear, trust region with the analytic
 * Jacobian; tau is fitted as log tau so it stays positive) for K = 1..max_modes, each K
 * started from a log-spaced grid of timescales (amplitudes by linear least squares given the
 * timescales), the best of several starts kept. K is chosen by a BIC that counts the
 * residuals' effective sample size, since red residuals otherwise buy spurious modes.
 *
 * The joint fit (slowscan_timescales_fit_joint) takes a flux N beside the response T and
 * fits both with shared timescales (the eigenmode view of Proistosescu & Huybers 2017,
 * Sci. Adv. 3:e1602821):
 *     T(t) = sum_k a_k (1 - exp(-t / tau_k)),   N(t) = sum_k c_k exp(-t / tau_k),
 * i.e. N = N0 + sum_k b_k (1 - exp(-t/tau_k)) with b_k = -c_k and the constraint
 * N0 + sum b_k = 0: each mode's flux decays as its temperature settles, so the equilibrium
 * sum a_k is where N reaches 0, N0 = sum c_k is the effective forcing, and -c_k / a_k each
 * mode's feedback. An extrapolated equilibrium is a property of the fitted model, not a
 * forecast of the system.
 *
 * Missing values (NaN) in y (or N) are refused (SLOWSCAN_EINVAL): cut or fill them first. */
#ifndef SLOWSCAN_TIMESCALES_H
#define SLOWSCAN_TIMESCALES_H

#include "slowscan/export.h"
#include "slowscan/screen.h"

#include <stddef.h>

enum { TIMESCALES_MAX_MODES = 5 };

/* Flags of a fit (bits of timescales_result.flags). */
typedef enum {
    TIMESCALES_FLAG_UNRESOLVED = 1, /* the longest tau exceeds unresolved_fraction of the record */
    TIMESCALES_FLAG_MULTISCALE = 2  /* two modes' taus differ by more than multiscale_ratio */
} timescales_flag;

typedef struct {
    size_t max_modes;           /* fit K = 1..max_modes (1..TIMESCALES_MAX_MODES): 3 */
    size_t grid_points;         /* log-spaced starting timescales from dt to 3 x span: 12 */
    size_t starts;              /* best grid combinations refined by the nonlinear fit: 4 */
    size_t max_iterations;      /* of each nonlinear fit: 500 */
    double unresolved_fraction; /* 1/3 */
    double multiscale_ratio;    /* 10 */
} timescales_config;

SLOWSCAN_API
timescales_config slowscan_timescales_config_default(void);

typedef struct {
    double a, se_a;     /* amplitude of the mode in the response */
    double tau, se_tau; /* e-folding time, in the time unit of t */
    double c, se_c;     /* joint fit only: the mode's flux at t = 0 (NaN otherwise) */
} timescales_mode;

/* One K of the model-choice table. */
typedef struct {
    int status;   /* SLOWSCAN_OK, or why this K has no fit (ENUMERIC) */
    double rss;   /* residual sum of squares (joint: of the weighted residuals) */
    double bic;   /* n_eff ln(rss / n) + p ln(n_eff); NaN without a fit */
} timescales_choice;

/* The result: plain data. */
typedef struct {
    size_t n;           /* samples fitted */
    size_t nmodes;      /* K chosen by BIC */
    timescales_mode modes[TIMESCALES_MAX_MODES]; /* by increasing tau */
    double equilibrium, se_equilibrium; /* sum a_k and its standard error */
    double forcing, se_forcing;         /* joint fit: N0 = sum c_k (NaN otherwise) */
    double sigma, r1;   /* residual sd (of the response) and lag-1 autocorrelation */
    double n_eff;       /* n (1 - r1) / (1 + r1), within [2, n] */
    double se_inflation; /* the factor sqrt(n / n_eff) applied to every standard error */
    timescales_choice choice[TIMESCALES_MAX_MODES]; /* K = 1..max_modes at [K-1] */
    unsigned flags;     /* timescales_flag bits */
    int joint;
    /* joint fit: the weights of the response and flux residuals in the final pass (each the
     * inverse of its series' noise scale); 1 and 0 otherwise */
    double weight_response, weight_flux;
} timescales_result;

/* Scratch for records up to n samples (both series for the joint fit). NULL on failure. */
typedef struct timescales_workspace timescales_workspace;
SLOWSCAN_API
timescales_workspace *slowscan_timescales_workspace_alloc(size_t n);
SLOWSCAN_API
void slowscan_timescales_workspace_free(timescales_workspace *ws);

/* Fits y[i] at times t[i] (measured from the step, increasing, t[0] >= 0). Standard errors
 * come from the Jacobian's covariance at the optimum scaled by the residual variance
 * rss/(n - p), then multiplied by sqrt(n / n_eff) for the residuals' autocorrelation.
 * SLOWSCAN_ESHORT when n < 3 max_modes + 3 (the BIC needs each K's residual degrees of
 * freedom), EINVAL for a non-increasing time, a negative t[0] or NaN, ECONST for a constant y,
 * ENUMERIC when no K could be fitted, ENOMEM. */
SLOWSCAN_API
int slowscan_timescales_fit(timescales_workspace *ws, const timescales_config *cfg,
                            const double *t, const double *y, size_t n, timescales_result *out);

/* The joint fit of the response y and the flux f (see above); refusals as above. */
SLOWSCAN_API
int slowscan_timescales_fit_joint(timescales_workspace *ws, const timescales_config *cfg,
                                  const double *t, const double *y, const double *f, size_t n,
                                  timescales_result *out);

/* --- the samples a fit uses, from what the user asked --- */

/* Why slowscan_timescales_select refused a run (the caller words it). */
typedef enum {
    TIMESCALES_REFUSAL_NONE = 0,
    TIMESCALES_REFUSAL_UNIT,    /* skip cannot be measured on the run's axis */
    TIMESCALES_REFUSAL_MISSING, /* a chosen sample is missing: `sample`, `column` */
    TIMESCALES_REFUSAL_SAMPLES  /* fewer than `need` samples chosen */
} timescales_refusal;

/* The samples of a step-forced run a fit uses: first .. n-1 (times increase, so those at or
 * after both the onset and onset + skip are the record's end). */
typedef struct {
    double onset;  /* the onset used: as given, or one mean step before the first sample */
    double dt;     /* the record's mean step (1 for a single sample) */
    double skip;   /* skip in time units (0: none) */
    size_t first;  /* the first sample chosen */
    size_t count;  /* samples chosen, n - first */
    size_t need;   /* samples a fit of max_modes needs: 3 max_modes + 3 */
    timescales_refusal refusal;
    size_t sample; /* TIMESCALES_REFUSAL_MISSING: the missing sample's index in time[] */
    int column;    /* TIMESCALES_REFUSAL_MISSING: 0 the response, 1 the flux */
} timescales_selection;

/* Chooses the samples of a run (time[0..n), increasing, on `axis`; response y, flux f or
 * NULL) that a fit of up to max_modes modes uses: onset NaN means one mean step before the
 * first sample (the step came just before the first sample); skip (amount NaN: none; a
 * percentage of the record's span time[n-1] - time[0]) is measured from the onset. A chosen
 * sample has time - onset >= 0 and >= skip. since[0..count) receives time[first + j] - onset,
 * the times the fit takes (since: n entries, or NULL). Refusals in this order: skip without
 * a meaning on the axis (EINVAL), the first chosen sample missing in y or f (y first at the
 * same sample; EINVAL), fewer than 3 max_modes + 3 samples chosen (ESHORT); *out says
 * which. */
SLOWSCAN_API
int slowscan_timescales_select(const double *time, const double *y, const double *f, size_t n,
                               const time_axis *axis, double onset, const screen_length *skip,
                               size_t max_modes, double *since, timescales_selection *out);

/* The fitted response sum_k a_k (1 - exp(-t/tau_k)) at t[0..n) into out (and the flux
 * sum_k c_k exp(-t/tau_k) into flux, when flux is not NULL and the fit is joint). */
SLOWSCAN_API
void slowscan_timescales_evaluate(const timescales_result *r, const double *t, size_t n,
                                  double *out, double *flux);

#endif
