/* indicators.h, surrogates.h, tail.h */
typedef enum {
    INDICATOR_VARIANCE, INDICATOR_SD, INDICATOR_CV, INDICATOR_SKEWNESS, INDICATOR_KURTOSIS,
    INDICATOR_LAG1, INDICATOR_AR1, INDICATOR_RECOVERY, INDICATOR_REDNESS,
    INDICATOR_SPECTRAL_EXPONENT, INDICATOR_DFA, INDICATOR_COUNT
} indicator_kind;
typedef enum { RECOVERY_LOG_AR1, RECOVERY_INCREMENTS } recovery_method;

const char *slowscan_indicator_name(indicator_kind kind);
int slowscan_indicator_lookup(const char *name, indicator_kind *kind);

typedef struct rolling_plan rolling_plan;
typedef struct {
    size_t window;
    double min_coverage;
    double dt;
    recovery_method recovery;
    size_t step;
    double band_lo, band_hi;
    const rolling_plan *plan;
} rolling_spec;
size_t slowscan_rolling_step(const rolling_spec *spec, indicator_kind kind, size_t n);

typedef enum {
    SURROGATE_PHASE, SURROGATE_AAFT, SURROGATE_IAAFT, SURROGATE_AR1, SURROGATE_BLOCK,
    SURROGATE_COUNT
} surrogate_kind;
typedef struct {
    double iaaft_tolerance;
    int iaaft_max_iterations;
    size_t block_length;
} surrogate_options;
const char *slowscan_surrogate_name(surrogate_kind kind);
int slowscan_surrogate_lookup(const char *name, surrogate_kind *kind);

typedef enum { TAIL_OFF = 0, TAIL_GPD } tail_method;
typedef struct {
    tail_method method;
    size_t max_exceedances;
    size_t min_exceedances;
    size_t exceedance_step;
    double max_fraction;
    double gof_level;
    double confidence;
    double max_decades;
} tail_options;
typedef enum {
    TAIL_NOT_TESTED = 0, TAIL_USED, TAIL_NOT_NEEDED, TAIL_FEW_SURROGATES, TAIL_NO_FIT,
    TAIL_POOR_FIT, TAIL_BEYOND_END, TAIL_NOT_BELOW_FLOOR, TAIL_NO_BOUND
} tail_reason;
typedef struct {
    double p;
    double p_surrogates;
    int used;
    tail_reason reason;
    double xi, sigma;
    double threshold;
    size_t exceedances;
    size_t surrogates;
    double ad;
    double ad_critical;
    double ad_p;
    double p_point;
    double p_upper;
    double p_predictive;
    double p_exponential;
} tail_result;
tail_options slowscan_tail_options_default(void);
size_t slowscan_tail_min_surrogates(const tail_options *opt);
