/* screen.h (array sizes written out: INDICATOR_COUNT 11, SCREEN_MAX_TESTS 12,
 * SCREEN_QUANTILES 5, SCREEN_TAIL_QUANTILES 2, SCREEN_MAX_WARNINGS 4) */
#define SCREEN_MAX_TESTS 12
#define SCREEN_MAX_WARNINGS 4

typedef enum { LENGTH_AXIS = 0, LENGTH_DAYS, LENGTH_MONTHS, LENGTH_YEARS } length_unit;

typedef struct {
    double amount;
    int percent;
    length_unit unit;
} screen_length;

typedef struct {
    detrend_spec detrend;
    screen_length bandwidth;
    double deseason;
    screen_length deseason_window;
    int harmonics;
    screen_length window;
    indicator_kind indicators[11];
    size_t nindicators;
    double min_coverage;
    recovery_method recovery;
    size_t step;
    double band_lo, band_hi;
    int drift_test;
    int noise_trend;
    surrogate_kind null_kind;
    const char *null_name;
    surrogate_options null_options;
    size_t surrogates;
    unsigned long seed;
    double fdr;
    int alternative;
    size_t threads;
    tail_options tail;
} screen_config;

screen_config slowscan_screen_config_default(void);
void slowscan_screen_config_control(screen_config *cfg);

typedef enum { SCREEN_TEST_RECOVERY_TREND = 11, SCREEN_TEST_KIND_COUNT } screen_test_kind;

size_t slowscan_screen_test_count(const screen_config *cfg);
int slowscan_screen_test_of(const screen_config *cfg, size_t j);
const char *slowscan_screen_test_name(int kind);
int slowscan_screen_test_rolling(int kind);

typedef enum {
    SCREEN_REASON_NONE = 0, SCREEN_REASON_NO_VARIATION, SCREEN_REASON_FEW_VALUES,
    SCREEN_REASON_CONSTANT_PATH, SCREEN_REASON_FEW_PAIRS, SCREEN_REASON_NO_FIT,
    SCREEN_REASON_NO_SURROGATES, SCREEN_REASON_NO_MEMORY
} screen_reason;

typedef struct {
    int kind;
    double tau;
    double statistic;
    double statistic_model;
    double p_value;
    size_t surrogates;
    size_t null_used;
    double quantile[5];
    double quantile_tail[2];
    screen_reason reason;
    tail_result tail;
} screen_test;

typedef enum { SCREEN_VARIES = 0, SCREEN_CONSTANT = 1, SCREEN_FLAT_RESIDUAL = 2 } screen_variation;

typedef enum {
    SCREEN_WARN_NO_PATHS, SCREEN_WARN_IAAFT_UNCONVERGED, SCREEN_WARN_NO_SURROGATES
} screen_warning_kind;

typedef struct {
    screen_warning_kind kind;
    size_t count, total;
    int status;
} screen_warning;

typedef struct screen_input screen_input;
struct screen_input {
    const char *name;
    const char *source;
    const char *time_name;
    const double *time;
    const double *values;
    size_t n;
    const screen_input *control;
    time_axis axis;
    int null_range;
    size_t null_first, null_count;
};

typedef struct {
    const char *name, *source, *time_name;
    size_t n;
    const double *time;
    time_axis axis;
    double dt, span;
    double *value, *trend, *residual;
    size_t finite;
    detrend_leakage leakage;
    int leakage_tested;
    size_t window;
    int harmonics;
    double bandwidth;
    screen_variation constant;
    const double *null_source;
    double *owned;
    int null_range;
    size_t null_first, null_count;
    int scale_exp;
} screen_prepared;

typedef struct {
    size_t n;
    double window;
    double bandwidth;
    int harmonics;
    screen_variation variation;
    detrend_leakage leakage;
    int leakage_tested;
    size_t ntests;
    screen_test tests[12];
    size_t nwarnings;
    screen_warning warnings[4];
} screen_result;

typedef enum {
    SCREEN_RULE_NONE = 0, SCREEN_RULE_LONGER_THAN_SPAN, SCREEN_RULE_WINDOW_TOO_FEW,
    SCREEN_RULE_DESEASON_PERIOD, SCREEN_RULE_DESEASON_HARMONICS, SCREEN_RULE_DESEASON_WINDOW,
    SCREEN_RULE_DESEASON_SHORT, SCREEN_RULE_DESEASON_FAILED, SCREEN_RULE_DETREND_DEGREE,
    SCREEN_RULE_DETREND_FAILED, SCREEN_RULE_WINDOW_INDICATOR, SCREEN_RULE_BAND_NYQUIST,
    SCREEN_RULE_BAND_TOO_FEW, SCREEN_RULE_PLAN_FAILED, SCREEN_RULE_WINDOW_LONGER,
    SCREEN_RULE_ROLLING_FAILED, SCREEN_RULE_BLOCK_LENGTH, SCREEN_RULE_AR1_NONSTATIONARY,
    SCREEN_RULE_NULL_FAILED, SCREEN_RULE_CONTROL_MISSING, SCREEN_RULE_CONTROL_SHORT,
    SCREEN_RULE_CONTROL_STEP, SCREEN_RULE_CONTROL_FLAT, SCREEN_RULE_NO_MEMORY,
    SCREEN_RULE_NULL_TOO_LITTLE, SCREEN_RULE_LENGTH_UNIT
} screen_rule;

typedef enum {
    SCREEN_OPTION_NONE = 0, SCREEN_OPTION_WINDOW, SCREEN_OPTION_BANDWIDTH,
    SCREEN_OPTION_DESEASON, SCREEN_OPTION_DESEASON_WINDOW, SCREEN_OPTION_HARMONICS,
    SCREEN_OPTION_DETREND, SCREEN_OPTION_BAND, SCREEN_OPTION_NULL, SCREEN_OPTION_BLOCK_LENGTH,
    SCREEN_OPTION_IAAFT_ITERATIONS, SCREEN_OPTION_IAAFT_TOL, SCREEN_OPTION_CONTROL,
    SCREEN_OPTION_RESAMPLE, SCREEN_OPTION_JSON, SCREEN_OPTION_COUNT
} screen_option;

typedef struct {
    screen_rule rule;
    screen_option option;
    int status;
    int indicator;
    size_t count, need;
    double value, limit;
    int control;
} screen_detail;

typedef struct screen_workspace screen_workspace;
screen_workspace *slowscan_screen_workspace_alloc(size_t threads);
void slowscan_screen_workspace_free(screen_workspace *ws);

typedef struct {
    const char *series;
    size_t index;
    size_t done, total;
} screen_progress;
typedef void (*screen_progress_fn)(void *context, const screen_progress *progress);

int slowscan_screen_prepare(const screen_config *cfg, const screen_input *in,
                            screen_prepared *out, screen_detail *detail);
void slowscan_screen_prepared_free(screen_prepared *ps);
int slowscan_screen_attach_control(const screen_config *cfg, screen_prepared *ps,
                                   const screen_input *control, screen_detail *detail);
int slowscan_screen_config_on_axis(screen_config *cfg, const time_axis *axis,
                                   screen_detail *detail);
int slowscan_screen_window(const screen_config *cfg, size_t n, double span, size_t *window,
                           screen_detail *detail);
const char *slowscan_screen_length_suffix(length_unit unit);
rolling_spec slowscan_screen_rolling_spec(const screen_config *cfg, const screen_prepared *ps);
int slowscan_screen_indicators(screen_workspace *ws, const screen_config *cfg,
                               const screen_prepared *ps, double *const *paths,
                               screen_warning *warning, int *warned, screen_detail *detail);

typedef struct screen_replicates screen_replicates;
int slowscan_screen_replicates_alloc(const screen_config *cfg, const screen_prepared *ps,
                                     screen_replicates **out, screen_detail *detail);
int slowscan_screen_replicate(screen_replicates *reps, size_t j, double *out);
void slowscan_screen_replicates_free(screen_replicates *reps);

typedef enum {
    SCREEN_FLAG_UNTESTED = 0, SCREEN_FLAG_NONE, SCREEN_FLAG_RISING, SCREEN_FLAG_FALLING,
    SCREEN_FLAG_INSUFFICIENT, SCREEN_FLAG_UNDECIDED
} screen_flag;
const char *slowscan_screen_flag_name(screen_flag flag);
