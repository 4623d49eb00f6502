/* slowscan — linear-response emulation and where it stops holding (module prefix: emulate_).
 *
 * A system that responds linearly to its forcing answers any forcing history F(t) with the
 * superposition of step responses started by the forcing's increments (Good et al. 2011,
 * Geophys. Res. Lett. 38:L01703):
 *     y_i = sum_{j <= i} (F_j - F_{j-1}) R_{i-j},   F_{-1} = 0,
 * R_m the response per unit forcing m steps after a step, taken from a step-forced run: its
 * fitted relaxation modes (timescales.h) or its own values divided by the step's forcing. The
 * sum is a convolution: by direct summation for short records, by FFTW (r2c/c2r, plans made
 * once per workspace, new-array execution) for long ones.
 *
 * Comparing the emulation with the run actually forced so, a departure is declared when the
 * difference stays outside the noise band, +-z sd with z the band level's two-sided normal
 * quantile, on the same side for `persist` consecutive samples. The band is pointwise; the
 * noise's memory is met by the persistence: by default persist = ceil(3 (1 + r1) / (1 - r1))
 * (r1, the noise's lag-1 autocorrelation, within [0, 0.9]), three decorrelation times' worth
 * of consecutive samples, so red noise must stay out as long in independent-sample terms as
 * white noise. A departure marks where linear response stops describing the run (a threshold
 * crossed, a new state); its absence is no proof of linearity. */
#ifndef SLOWSCAN_EMULATE_H
#define SLOWSCAN_EMULATE_H

#include "slowscan/export.h"
#include "slowscan/timescales.h"

#include <stddef.h>

typedef struct {
    double band_level;  /* two-sided level of the noise band: 0.99 */
    size_t persist;     /* consecutive samples outside the band; 0: the rule above */
    size_t direct_max;  /* records up to this length are convolved by direct sums: 256 */
} emulate_config;

SLOWSCAN_API
emulate_config slowscan_emulate_config_default(void);

/* Where the actual run leaves the band (plain data). */
typedef struct {
    int departed;       /* 1: a departure; the fields below then describe it */
    size_t first;       /* index of the first sample of the persisting run outside the band */
    size_t confirmed;   /* index at which it had lasted `persist` samples */
    size_t last;        /* its last sample outside the band (on the same side) */
    double size;        /* mean difference (actual - emulated) over first..last */
    int sign;           /* +1: the run is above the emulation, -1 below */
    double half_width;  /* the band: +-half_width around the emulation */
    size_t persist;     /* the persistence used */
    size_t outside;     /* samples outside the band over the whole comparison */
} emulate_departure;

/* FFTW plans and buffers for records up to n samples (made once; their execution is
 * thread-safe). NULL on failure. */
typedef struct emulate_workspace emulate_workspace;
SLOWSCAN_API
emulate_workspace *slowscan_emulate_workspace_alloc(size_t n, const emulate_config *cfg);
SLOWSCAN_API
void slowscan_emulate_workspace_free(emulate_workspace *ws);

/* The response per unit forcing of fitted modes at lags lag0 + m dt, m = 0..n-1:
 * R_m = sum_k a_k (1 - exp(-(lag0 + m dt) / tau_k)) / step_forcing. EINVAL for a zero
 * forcing, dt <= 0 or lag0 < 0. */
SLOWSCAN_API
int slowscan_emulate_modes_response(const timescales_result *modes, double step_forcing,
                                    double dt, double lag0, size_t n, double *response);

/* The step run's own values as the response per unit forcing (emulate --empirical): sample i,
 * t[i] after the onset (t[0..m), increasing, whole multiples of dt), gives
 * response[round(t[i]/dt)] = y[i] / step_forcing for lags below n; lag 0 is 0 unless the run
 * has a sample there. EINVAL for a sample not within 1e-6 steps of a whole step (or dt <= 0,
 * a zero or non-finite forcing); ESHORT when a lag below n has no sample, its index in *gap. */
SLOWSCAN_API
int slowscan_emulate_empirical_response(const double *t, const double *y, size_t m, double dt,
                                        double step_forcing, size_t n, double *response,
                                        size_t *gap);

/* out[i] = sum_{j <= i} (F_j - F_{j-1}) R_{i-j} for i < n, F_{-1} = 0 (the forcing as an
 * anomaly from the state the step run started in). EINVAL for NaN in either input or n larger
 * than the workspace's. */
SLOWSCAN_API
int slowscan_emulate_convolve(emulate_workspace *ws, const double *response,
                              const double *forcing, size_t n, double *out);

/* The persistence the rule gives for noise of lag-1 autocorrelation r1. */
SLOWSCAN_API
size_t slowscan_emulate_default_persist(double r1);

/* The departure of actual from emulated (n samples; NaN in actual: not compared, and it
 * breaks a run) for noise of standard deviation sd and lag-1 autocorrelation r1. EINVAL for
 * sd <= 0 or a band level outside (0.5, 1). */
SLOWSCAN_API
int slowscan_emulate_departure(const emulate_config *cfg, const double *actual,
                               const double *emulated, size_t n, double sd, double r1,
                               emulate_departure *out);

/* Whether the forcing record (ftime: nf samples) and the step run (stime: ns) share their time
 * step, within a millionth (DESIGN's grid tolerance, relative to the step run's): the
 * emulation advances the step response one forcing step at a time. *fstep and *sstep: the
 * two mean steps (NaN for fewer than 2 samples). SLOWSCAN_OK, or SLOWSCAN_EINVAL. */
SLOWSCAN_API
int slowscan_emulate_same_step(const double *ftime, size_t nf, const double *stime, size_t ns,
                               double *fstep, double *sstep);

/* The compared run (time, values: m samples) placed on the forcing's grid (grid: n samples,
 * regular): actual[j] = values[i] where time[i] lies within a millionth of a step of
 * grid[0] + j step, j < n; NaN at grid times without a sample. *step: the grid's mean step.
 * SLOWSCAN_EINVAL when a sample lies off the grid or outside it (*bad: the first such) or the
 * grid has fewer than 2 samples (*bad 0); actual is then unspecified. */
SLOWSCAN_API
int slowscan_emulate_align(const double *grid, size_t n, const double *time,
                           const double *values, size_t m, double *actual, double *step,
                           size_t *bad);

/* The noise band's estimate from the step run's own fit: *sd and *r1, the sd and lag-1
 * autocorrelation of its residuals (fit->sigma, fit->r1). SLOWSCAN_ECONST when the residuals
 * are at round-off, sd <= 1e-8 max |y| over the fitted values y[n] (a noise-free model run
 * gives no noise estimate; *sd and *r1 are still set). */
SLOWSCAN_API
int slowscan_emulate_fit_noise(const timescales_result *fit, const double *y, size_t n,
                               double *sd, double *r1);

/* Where a sample of the compared run lies against the noise band. */
typedef enum {
    EMULATE_NOT_COMPARED = 0, /* the difference is not finite (no compared sample) */
    EMULATE_INSIDE,
    EMULATE_ABOVE,            /* difference > half_width */
    EMULATE_BELOW             /* difference < -half_width */
} emulate_side;

/* The comparison sample by sample, by the rule slowscan_emulate_departure counts with:
 * difference[i] = actual[i] - emulated[i], lower[i] and upper[i] = emulated[i] -+ half_width,
 * side[i] the sample's side of the band. */
SLOWSCAN_API
void slowscan_emulate_band(const double *actual, const double *emulated, size_t n,
                           double half_width, double *difference, double *lower, double *upper,
                           emulate_side *side);

/* The noise of a control run x[n]: the sd and lag-1 autocorrelation of its residual from a
 * least-squares line in the sample index (control runs drift). ESHORT for n < 4, EINVAL for
 * NaN. */
SLOWSCAN_API
int slowscan_emulate_control_noise(const double *x, size_t n, double *sd, double *r1);

#endif
