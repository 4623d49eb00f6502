/* ar1_drift.h (the fit and projection structs), recovery.h, robustness.h (array sizes
 * written out: SCREEN_MAX_TESTS 12, SCREEN_MAX_WARNINGS 4, ROBUSTNESS_MAX_LENGTHS 64,
 * ROBUSTNESS_MAX_METHODS 8) */
typedef struct {
    double a0, a1, c;
    double se_a0, se_a1, se_c;
    double cov_a0_a1;
    double t_a1;
    double se_a1_model;
    double t_a1_model;
    double sigma2;
    size_t pairs;
} ar1_drift_fit;

typedef enum { PROJECTION_AHEAD, PROJECTION_WITHIN_RECORD, PROJECTION_NONE } ar1_projection_kind;

typedef struct {
    ar1_projection_kind kind;
    double index;
    double index_lo;
    double index_hi;
    double share_crossing;
    size_t draws;
} ar1_projection;

typedef struct {
    size_t projection_draws;
    double horizon;
} recovery_config;
recovery_config slowscan_recovery_config_default(void);

typedef struct {
    int fit_status;
    ar1_drift_fit fit;
    double p_value;
    size_t nwarnings;
    screen_warning warnings[4];
    int projected;
    int projection_status;
    ar1_projection projection;
    double crossing_time, crossing_lo, crossing_hi;
} recovery_result;

typedef struct recovery_workspace recovery_workspace;
recovery_workspace *slowscan_recovery_workspace_alloc(size_t threads);
void slowscan_recovery_workspace_free(recovery_workspace *ws);
int slowscan_recovery_series(recovery_workspace *ws, const screen_config *cfg,
                             const recovery_config *rcfg, const screen_prepared *ps,
                             double *lambda, double *lo, double *hi, recovery_result *out,
                             screen_detail *detail);

typedef struct {
    screen_length windows[64];
    size_t nwindows;
    screen_length bandwidths[64];
    size_t nbandwidths;
    detrend_spec methods[8];
    size_t nmethods;
} robustness_grid;
robustness_grid slowscan_robustness_grid_default(void);

typedef struct {
    int kind;
    size_t test;
    size_t method;
    size_t window_index;
    size_t bandwidth_index;
    double window;
    double bandwidth;
    double tau, statistic, p_value;
    screen_reason reason;
} robustness_record;

typedef struct {
    size_t method, window_index, bandwidth_index;
    size_t nrecords;
    robustness_record records[12];
    size_t nwarnings;
    screen_warning warnings[4];
} robustness_cell;

typedef struct {
    size_t method, window_index, bandwidth_index;
} robustness_position;

typedef int (*robustness_cell_sink)(void *context, const robustness_cell *cell);
typedef struct robustness_workspace robustness_workspace;
robustness_workspace *slowscan_robustness_workspace_alloc(size_t threads);
void slowscan_robustness_workspace_free(robustness_workspace *ws);
int slowscan_robustness_series(robustness_workspace *ws, const robustness_grid *grid,
                               const screen_config *cfg, const screen_input *in,
                               robustness_cell_sink sink, void *context, screen_detail *detail,
                               robustness_position *where);
const screen_prepared *slowscan_robustness_workspace_prepared(const robustness_workspace *ws,
                                                              size_t b);

typedef struct {
    size_t cells, with_statistic, positive, with_p, significant;
} robustness_counts;
robustness_counts slowscan_robustness_counts_default(void);
void slowscan_robustness_tally(robustness_counts *counts, size_t ntests,
                               const robustness_record *records, size_t n);
robustness_counts slowscan_robustness_total(const robustness_counts *counts, size_t nmethods,
                                            size_t ntests, size_t test);
void slowscan_robustness_shares(const robustness_counts *counts, double *positive,
                                double *significant);
