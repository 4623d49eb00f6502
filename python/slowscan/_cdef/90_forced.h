/* feedback.h, timescales.h, emulate.h (TIMESCALES_MAX_MODES 5), and the length of screen.h
 * a forced-run option is measured with */
int slowscan_screen_length_on_axis(const screen_length *len, const time_axis *axis,
                                   screen_length *out);

typedef enum { FEEDBACK_OLS = 0, FEEDBACK_TLS } feedback_fit_kind;

typedef struct {
    feedback_fit_kind fit;
    double noise_ratio;
    double window;
    double stride;
    double skip;
    double span_from, span_until;
    double scale;
    double level;
} feedback_config;
feedback_config slowscan_feedback_config_default(void);

typedef enum {
    FEEDBACK_TEQ_OK = 0, FEEDBACK_TEQ_NOT_RESTORING, FEEDBACK_TEQ_NO_FIT
} feedback_teq_reason;

typedef struct {
    double start, end;
    size_t n;
    int status;
    double lambda, se_lambda, se_lambda_adj;
    double forcing, se_forcing, se_forcing_adj;
    double cov;
    double r2;
    double r_response, r_residual;
    double n_eff;
    double lo, hi;
    double t_eq, se_t_eq;
    feedback_teq_reason teq_reason;
    unsigned flags;
} feedback_window;

typedef enum {
    FEEDBACK_DRIFT_UNTESTED = 0, FEEDBACK_DRIFT_STEADY, FEEDBACK_DRIFT_DRIFTING
} feedback_drift_verdict;
typedef enum { FEEDBACK_DRIFT_NONE = 0, FEEDBACK_DRIFT_ENDS, FEEDBACK_DRIFT_TREND } feedback_drift_method;

typedef struct {
    feedback_drift_verdict verdict;
    feedback_drift_method method;
    size_t windows;
    double slope;
    double se_slope;
    double z, p_value;
} feedback_drift;

int slowscan_feedback_window_count(const double *time, size_t n, const feedback_config *cfg,
                                   size_t *count);
int slowscan_feedback_run(const double *time, const double *flux, const double *response,
                          size_t n, const feedback_config *cfg, feedback_window *out,
                          size_t count, feedback_drift *drift);

typedef struct {
    screen_length skip;
    screen_length window;
    screen_length stride;
    int span;
    double span_from, span_until;
} feedback_request;
feedback_request slowscan_feedback_request_default(void);
typedef enum {
    FEEDBACK_LENGTH_SKIP = 0, FEEDBACK_LENGTH_WINDOW, FEEDBACK_LENGTH_STRIDE
} feedback_length;
typedef enum {
    FEEDBACK_REFUSAL_NONE = 0, FEEDBACK_REFUSAL_SAMPLES, FEEDBACK_REFUSAL_SPAN,
    FEEDBACK_REFUSAL_UNIT, FEEDBACK_REFUSAL_SKIP, FEEDBACK_REFUSAL_WINDOW_LONG,
    FEEDBACK_REFUSAL_WINDOW_SHORT, FEEDBACK_REFUSAL_STRIDE_SHORT
} feedback_refusal;
typedef struct {
    feedback_refusal refusal;
    feedback_length length;
    double step;
    double rest;
} feedback_windows_detail;
int slowscan_feedback_windows(const double *time, size_t n, const time_axis *axis,
                              const feedback_request *request, feedback_config *cfg,
                              feedback_windows_detail *detail);

typedef enum { FEEDBACK_BASELINE_MEAN = 0, FEEDBACK_BASELINE_DRIFT } feedback_baseline_mode;
int slowscan_feedback_baseline_covers(const double *time, size_t n, const double *btime,
                                      const double *bvalues, size_t nb, double offset,
                                      double *first, double *last);
int slowscan_feedback_anomalies(const double *time, double *values, size_t n,
                                const double *btime, const double *bvalues, size_t nb,
                                double offset, feedback_baseline_mode mode);
int slowscan_feedback_noise_ratio(const double *btime, const double *bflux,
                                  const double *bresponse, size_t nb, double from,
                                  double until, double *ratio);
int slowscan_feedback_annual_means(calendar_kind calendar, const double *month,
                                   const double *values, size_t n, double *years,
                                   double *means, size_t *nyears);

typedef enum { TIMESCALES_FLAG_UNRESOLVED = 1, TIMESCALES_FLAG_MULTISCALE = 2 } timescales_flag;

typedef struct {
    size_t max_modes;
    size_t grid_points;
    size_t starts;
    size_t max_iterations;
    double unresolved_fraction;
    double multiscale_ratio;
} timescales_config;
timescales_config slowscan_timescales_config_default(void);

typedef struct {
    double a, se_a;
    double tau, se_tau;
    double c, se_c;
} timescales_mode;

typedef struct {
    int status;
    double rss;
    double bic;
} timescales_choice;

typedef struct {
    size_t n;
    size_t nmodes;
    timescales_mode modes[5];
    double equilibrium, se_equilibrium;
    double forcing, se_forcing;
    double sigma, r1;
    double n_eff;
    double se_inflation;
    timescales_choice choice[5];
    unsigned flags;
    int joint;
    double weight_response, weight_flux;
} timescales_result;

typedef struct timescales_workspace timescales_workspace;
timescales_workspace *slowscan_timescales_workspace_alloc(size_t n);
void slowscan_timescales_workspace_free(timescales_workspace *ws);
int slowscan_timescales_fit(timescales_workspace *ws, const timescales_config *cfg,
                            const double *t, const double *y, size_t n, timescales_result *out);
int slowscan_timescales_fit_joint(timescales_workspace *ws, const timescales_config *cfg,
                                  const double *t, const double *y, const double *f, size_t n,
                                  timescales_result *out);

typedef enum {
    TIMESCALES_REFUSAL_NONE = 0, TIMESCALES_REFUSAL_UNIT, TIMESCALES_REFUSAL_MISSING,
    TIMESCALES_REFUSAL_SAMPLES
} timescales_refusal;
typedef struct {
    double onset;
    double dt;
    double skip;
    size_t first;
    size_t count;
    size_t need;
    timescales_refusal refusal;
    size_t sample;
    int column;
} timescales_selection;
int slowscan_timescales_select(const double *time, const double *y, const double *f, size_t n,
                               const time_axis *axis, double onset, const screen_length *skip,
                               size_t max_modes, double *since, timescales_selection *out);

typedef struct {
    double band_level;
    size_t persist;
    size_t direct_max;
} emulate_config;
emulate_config slowscan_emulate_config_default(void);

typedef struct {
    int departed;
    size_t first;
    size_t confirmed;
    size_t last;
    double size;
    int sign;
    double half_width;
    size_t persist;
    size_t outside;
} emulate_departure;

typedef struct emulate_workspace emulate_workspace;
emulate_workspace *slowscan_emulate_workspace_alloc(size_t n, const emulate_config *cfg);
void slowscan_emulate_workspace_free(emulate_workspace *ws);
int slowscan_emulate_modes_response(const timescales_result *modes, double step_forcing,
                                    double dt, double lag0, size_t n, double *response);
int slowscan_emulate_empirical_response(const double *t, const double *y, size_t m, double dt,
                                        double step_forcing, size_t n, double *response,
                                        size_t *gap);
int slowscan_emulate_convolve(emulate_workspace *ws, const double *response,
                              const double *forcing, size_t n, double *out);
int slowscan_emulate_departure(const emulate_config *cfg, const double *actual,
                               const double *emulated, size_t n, double sd, double r1,
                               emulate_departure *out);
int slowscan_emulate_control_noise(const double *x, size_t n, double *sd, double *r1);
int slowscan_emulate_same_step(const double *ftime, size_t nf, const double *stime, size_t ns,
                               double *fstep, double *sstep);
int slowscan_emulate_align(const double *grid, size_t n, const double *time,
                           const double *values, size_t m, double *actual, double *step,
                           size_t *bad);
int slowscan_emulate_fit_noise(const timescales_result *fit, const double *y, size_t n,
                               double *sd, double *r1);
typedef enum {
    EMULATE_NOT_COMPARED = 0, EMULATE_INSIDE, EMULATE_ABOVE, EMULATE_BELOW
} emulate_side;
void slowscan_emulate_band(const double *actual, const double *emulated, size_t n,
                           double half_width, double *difference, double *lower, double *upper,
                           emulate_side *side);
