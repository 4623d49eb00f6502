/* slowscan — the per-series screening pipeline (module prefix: screen_).
 *
 * One series (time, values, name) goes through: deseason -> detrend -> the window rule ->
 * the round-off (flat residual) check -> the trend-leakage test -> rolling indicators ->
 * trend statistics (Kendall tau of each indicator path; the drifting-AR(1) t-value) ->
 * surrogates of the residual through the same pipeline -> p-values. slowscan_screen_decide then turns
 * the p-values of a whole run into Benjamini-Hochberg q-values and flags.
 *
 * Nothing here prints. A refusal returns a status (status.h) and fills a screen_detail saying
 * which rule failed, with the numbers a message needs; warnings come back as data on the
 * result. Results are plain data: no pointers into library memory. */
#ifndef SLOWSCAN_SCREEN_H
#define SLOWSCAN_SCREEN_H

#include "slowscan/export.h"

#include "slowscan/calendar.h"
#include "slowscan/detrend.h"
#include "slowscan/indicators.h"
#include "slowscan/surrogates.h"
#include "slowscan/tail.h"

#include <stddef.h>

/* The unit of a length that is not a percentage: the time axis' own unit, or a calendar
 * unit converted on a dated axis (calendar.h) — a year is the calendar's mean year (365.2425
 * days standard and proleptic_gregorian, 365.25 julian, 365 noleap, 366 all_leap, 360
 * 360_day), a month a twelfth of it; on a month index a year is 12 months and a day has no
 * meaning, on a year index only whole years exist. */
typedef enum {
    LENGTH_AXIS = 0, /* the axis' own unit (time units of a numeric column) */
    LENGTH_DAYS,
    LENGTH_MONTHS,
    LENGTH_YEARS
} length_unit;

/* A length: `amount` percent of the span when `percent`, else `amount` in `unit`. */
typedef struct {
    double amount;
    int percent;
    length_unit unit;
} screen_length;

/* Everything that decides the numbers of a screening run. */
typedef struct {
    detrend_spec detrend;          /* method (its bandwidth is set per series from `bandwidth`) */
    screen_length bandwidth;       /* 10% */
    double deseason;               /* period in time units; NaN: no deseasoning */
    screen_length deseason_window; /* amount NaN: the whole record */
    int harmonics;                 /* 0: the mean cycle (or 3 for a non-whole period) */
    screen_length window;          /* 50% */
    indicator_kind indicators[INDICATOR_COUNT];
    size_t nindicators;            /* variance, lag1 */
    double min_coverage;           /* 0.8 */
    recovery_method recovery;      /* ln(ar1)/dt */
    size_t step;                   /* 0: each indicator's default step (slowscan_rolling_step) */
    double band_lo, band_hi;       /* spectral_exponent's band; both 0: every frequency */
    int drift_test;                /* the model-based recovery_trend test (ar1_drift.h): 1 */
    int noise_trend;               /* its innovation variance may drift too: 0 */
    surrogate_kind null_kind;      /* phase */
    const char *null_name;         /* part of the random streams; NULL: slowscan_surrogate_name(kind) */
    surrogate_options null_options;
    size_t surrogates;             /* M per test: 1000 */
    unsigned long seed;            /* 1 */
    double fdr;                    /* 0.05 */
    int alternative;               /* significance_alternative; -1: each test's direction */
    size_t threads;                /* surrogate threads of one series: 1 */
    tail_options tail;             /* method TAIL_OFF; TAIL_GPD: p beyond the surrogates
                                      estimated from their tail (tail.h), p_value takes it */
} screen_config;

SLOWSCAN_API
screen_config slowscan_screen_config_default(void);

/* What a test is: a rolling indicator's Kendall tau (the indicator_kind values), or a model
 * statistic of the residual. */
typedef enum {
    SCREEN_TEST_RECOVERY_TREND = INDICATOR_COUNT, /* t of a1 in the drifting-AR(1) fit, HC3 */
    SCREEN_TEST_KIND_COUNT
} screen_test_kind;

/* Tests of a run: one per indicator, then recovery_trend when cfg->drift_test. */
enum { SCREEN_MAX_TESTS = INDICATOR_COUNT + 1 };
SLOWSCAN_API
size_t slowscan_screen_test_count(const screen_config *cfg);
/* Test j of cfg; its name ("variance", ..., "recovery_trend"); whether it is a rolling tau. */
SLOWSCAN_API
int slowscan_screen_test_of(const screen_config *cfg, size_t j);
SLOWSCAN_API
const char *slowscan_screen_test_name(int kind);
SLOWSCAN_API
int slowscan_screen_test_rolling(int kind);
/* The alternative (significance_alternative) test j of cfg is tested against: the setting,
 * else the indicator's direction (one-sided rising; skewness two-sided). */
SLOWSCAN_API
int slowscan_screen_test_alternative(const screen_config *cfg, size_t j);

/* Quantiles of each test's null distribution: the five of the JSON summary, and the two
 * outer ones the figures draw as the null's wider interval (kept apart so that the JSON,
 * which lists screen_quantile_levels, stays as it was). */
enum { SCREEN_QUANTILES = 5, SCREEN_TAIL_QUANTILES = 2 };
extern const double screen_quantile_levels[SCREEN_QUANTILES]; /* .05 .25 .5 .75 .95 */
extern const double screen_tail_levels[SCREEN_TAIL_QUANTILES]; /* .01 .99 */

/* Why a test has no statistic or no p-value. */
typedef enum {
    SCREEN_REASON_NONE = 0,
    SCREEN_REASON_NO_VARIATION,  /* the series (or its residual) does not vary */
    SCREEN_REASON_FEW_VALUES,    /* fewer than 8 finite indicator values */
    SCREEN_REASON_CONSTANT_PATH, /* the indicator does not vary */
    SCREEN_REASON_FEW_PAIRS,     /* fewer than 8 adjacent pairs (recovery_trend) */
    SCREEN_REASON_NO_FIT,        /* no AR(1) drift fit */
    SCREEN_REASON_NO_SURROGATES, /* no surrogates can be made */
    SCREEN_REASON_NO_MEMORY
} screen_reason;

typedef struct {
    int kind;               /* screen_test_kind or indicator_kind */
    double tau;             /* Kendall tau of the path (NaN for model statistics) */
    double statistic;       /* the tested statistic: tau, or the t-value */
    double statistic_model; /* recovery_trend: t with the model-based standard error */
    double p_value;         /* NaN: not tested */
    size_t surrogates;      /* surrogates drawn for this test (0: none) */
    size_t null_used;       /* finite null values behind p */
    double quantile[SCREEN_QUANTILES];
    double quantile_tail[SCREEN_TAIL_QUANTILES];
    screen_reason reason;   /* why statistic (or p) is NaN */
    tail_result tail;       /* cfg->tail: the tail estimate, and whether p_value is it
                               (tail.used); reason TAIL_NOT_TESTED otherwise */
} screen_test;

/* How much a series varies. */
typedef enum {
    SCREEN_VARIES = 0,
    SCREEN_CONSTANT = 1,     /* constant input */
    SCREEN_FLAT_RESIDUAL = 2 /* residual at round-off level */
} screen_variation;

/* Warnings, in the order they arose. */
typedef enum {
    SCREEN_WARN_NO_PATHS,          /* indicators NA: count = finite samples, variation below */
    SCREEN_WARN_IAAFT_UNCONVERGED, /* count of `total` iaaft draws hit the iteration limit */
    SCREEN_WARN_NO_SURROGATES      /* status: why no surrogate could be made */
} screen_warning_kind;

typedef struct {
    screen_warning_kind kind;
    size_t count, total;
    int status;
} screen_warning;
enum { SCREEN_MAX_WARNINGS = 4 };

/* A series to screen (arrays borrowed; NaN = missing). */
typedef struct screen_input screen_input;
struct screen_input {
    const char *name;       /* part of the random streams */
    const char *source;     /* where it came from (the caller's messages) */
    const char *time_name;  /* the time axis's name (figures) */
    const double *time;     /* n, regular grid */
    const double *values;   /* n */
    size_t n;
    const screen_input *control; /* NULL, or the same series of a control run (values NULL
                                    when the run has none of that name): surrogates are made
                                    from its first n samples' residual (slowscan_screen_attach_control) */
    time_axis axis;         /* what the times are (calendar.h); zero: plain numbers */
    /* With null_range: the surrogates of this series are replicates [null_first, null_first +
       null_count) instead of [0, cfg->surrogates) — a round of --surrogates auto
       (sequential.h). null_first is a multiple of NULL_TREND_BLOCK; replicate j is the same
       draw either way. */
    int null_range;
    size_t null_first, null_count;
};

/* A series prepared for the indicators: deseasoned and detrended. */
typedef struct {
    const char *name, *source, *time_name; /* borrowed from the input */
    size_t n;
    const double *time;
    time_axis axis;                   /* the input's: outputs print times with it */
    double dt, span;
    double *value, *trend, *residual; /* n each, owned; value = what was detrended */
    size_t finite;                    /* finite samples of value */
    detrend_leakage leakage;          /* the residual's edge-mean test */
    int leakage_tested;               /* 0: the residual could not be tested */
    size_t window;                    /* W, samples */
    int harmonics;                    /* harmonics of the cycle removed (0: mean cycle) */
    double bandwidth;                 /* time units (NaN when the method has none) */
    screen_variation constant;        /* non-zero: indicators are NA */
    const double *null_source;        /* what surrogates are made from */
    double *owned;                    /* storage behind null_source when it is not residual */
    int null_range;                   /* the input's replicate range (screen_input) */
    size_t null_first, null_count;
    /* value, trend, residual, null_source, the replicates and the variance and sd paths are
       in units of 2^scale_exp of the input's: 0 unless the input's largest magnitude lies
       outside 2^-100 .. 2^100, where sums of squares and fourth powers would overflow (1e300)
       or lose their digits to underflow (1e-300). A power of two changes no digit, so taus
       and p-values are the same as at scale_exp 0. slowscan_screen_unscale gives the input's
       units back. */
    int scale_exp;
} screen_prepared;

/* The result of one series: plain data. */
typedef struct {
    size_t n;            /* finite samples */
    double window;       /* the window in time units ((W-1) dt) */
    double bandwidth;    /* time units, NaN when the method has none */
    int harmonics;       /* -1 no deseasoning, 0 the mean cycle, K harmonics */
    screen_variation variation;
    detrend_leakage leakage;
    int leakage_tested;
    size_t ntests;
    screen_test tests[SCREEN_MAX_TESTS];
    size_t nwarnings;
    screen_warning warnings[SCREEN_MAX_WARNINGS];
} screen_result;

/* Which rule refused a series or an option. */
typedef enum {
    SCREEN_RULE_NONE = 0,
    SCREEN_RULE_LONGER_THAN_SPAN,   /* option: the length exceeds the span (limit) */
    SCREEN_RULE_WINDOW_TOO_FEW,     /* --window gives count < 3 samples */
    SCREEN_RULE_DESEASON_PERIOD,    /* --deseason outside [2 dt, n/2 dt] (limit = dt) */
    SCREEN_RULE_DESEASON_HARMONICS, /* 2K >= period in steps (value = steps) */
    SCREEN_RULE_DESEASON_WINDOW,    /* window outside [2 periods, record] (limit = span) */
    SCREEN_RULE_DESEASON_SHORT,     /* a phase/window without enough finite samples (count =
                                       the harmonics fitted, 0: the mean cycle) */
    SCREEN_RULE_DESEASON_FAILED,    /* status */
    SCREEN_RULE_DETREND_DEGREE,     /* poly degree too high for count finite samples */
    SCREEN_RULE_DETREND_FAILED,     /* status */
    SCREEN_RULE_WINDOW_INDICATOR,   /* window (count) below what `indicator` needs (need) */
    SCREEN_RULE_BAND_NYQUIST,       /* band above Nyquist (limit), dt in value */
    SCREEN_RULE_BAND_TOO_FEW,       /* band holds count frequencies, need needed (value = W) */
    SCREEN_RULE_PLAN_FAILED,        /* status */
    SCREEN_RULE_WINDOW_LONGER,      /* the window (count) longer than the series (need) */
    SCREEN_RULE_ROLLING_FAILED,     /* status */
    SCREEN_RULE_BLOCK_LENGTH,       /* block length (count) above half the samples (need) */
    SCREEN_RULE_AR1_NONSTATIONARY,  /* --null ar1 fit not below 1 */
    SCREEN_RULE_NULL_FAILED,        /* status */
    SCREEN_RULE_CONTROL_MISSING,    /* the control run has no such series (values NULL) */
    SCREEN_RULE_CONTROL_SHORT,      /* the control has count samples, fewer than need */
    SCREEN_RULE_CONTROL_STEP,       /* the control's step (value) is not the series' (limit) */
    SCREEN_RULE_CONTROL_FLAT,       /* the control run has no usable variation */
    SCREEN_RULE_NO_MEMORY,
    SCREEN_RULE_NULL_TOO_LITTLE,    /* no replicates: the series does not vary (status ECONST)
                                       or has count finite samples, fewer than need */
    SCREEN_RULE_LENGTH_UNIT         /* a length in a calendar unit (count: length_unit) the
                                       time axis (need: time_axis_unit) cannot measure */
} screen_rule;

/* Which setting a rule is about. */
typedef enum {
    SCREEN_OPTION_NONE = 0,
    SCREEN_OPTION_WINDOW,
    SCREEN_OPTION_BANDWIDTH,
    SCREEN_OPTION_DESEASON,
    SCREEN_OPTION_DESEASON_WINDOW,
    SCREEN_OPTION_HARMONICS,
    SCREEN_OPTION_DETREND,
    SCREEN_OPTION_BAND,
    SCREEN_OPTION_NULL,
    /* named by messages (message.h), never by a screen_detail's `option` */
    SCREEN_OPTION_BLOCK_LENGTH,
    SCREEN_OPTION_IAAFT_ITERATIONS,
    SCREEN_OPTION_IAAFT_TOL,
    SCREEN_OPTION_CONTROL,  /* the control run's file */
    SCREEN_OPTION_RESAMPLE, /* the advice of a control on another step */
    SCREEN_OPTION_JSON,     /* the output listing every series' leakage test */
    SCREEN_OPTION_COUNT
} screen_option;

typedef struct {
    screen_rule rule;
    screen_option option;
    int status;            /* the underlying status (the *_FAILED rules) */
    int indicator;         /* WINDOW_INDICATOR: the indicator_kind */
    size_t count, need;    /* samples, frequencies, degrees as the rule says */
    double value, limit;
    int control;           /* 1: the rule refused the control run's series (--null control) */
} screen_detail;

/* Everything sized by series length and thread count: the detrend plans, the rolling plan,
 * Kendall workspace, surrogate plan, one null workspace per thread, the drift fit, the paths
 * of the last series. Remade when the length changes, reused while it stays. NULL on failure. */
typedef struct screen_workspace screen_workspace;
SLOWSCAN_API
screen_workspace *slowscan_screen_workspace_alloc(size_t threads);
SLOWSCAN_API
void slowscan_screen_workspace_free(screen_workspace *ws);

/* How far one series' surrogate null has got: `done` of `total` replicates drawn. */
typedef struct {
    const char *series; /* the series' name (borrowed for the call) */
    size_t index;       /* the batch driver's series index (screen_batch.h); 0 otherwise */
    size_t done, total; /* done rises in whole blocks of NULL_TREND_BLOCK to total */
} screen_progress;
/* Told of surrogates drawn, for a caller's progress display; it must not call back into the
 * library with the same workspace. It only watches: the numbers are the same with or without. */
typedef void (*screen_progress_fn)(void *context, const screen_progress *progress);
/* Every later slowscan_screen_series / slowscan_screen_test_series with ws calls fn after
 * each block of surrogates. With ws made for several threads the call may come from any of
 * them, but never from two at once (the blocks' own lock is held), and done only rises.
 * fn NULL: no calls. */
SLOWSCAN_API
void slowscan_screen_workspace_set_progress(screen_workspace *ws, screen_progress_fn fn,
                                            void *context);

/* Deseasons and detrends one series into *out (free with slowscan_screen_prepared_free, also after a
 * failure). Refusals: SLOWSCAN_EINVAL / ESHORT with *detail filled; SLOWSCAN_ENOMEM. */
SLOWSCAN_API
int slowscan_screen_prepare(const screen_config *cfg, const screen_input *in, screen_prepared *out,
                   screen_detail *detail);
/* The same, detrending through ws's detrend workspace, which is kept while the method,
 * bandwidth, time step and length stay (a batch on one grid plans once, not per series); the
 * numbers are slowscan_screen_prepare's, bit for bit. ws NULL: slowscan_screen_prepare. */
SLOWSCAN_API
int slowscan_screen_prepare_with(screen_workspace *ws, const screen_config *cfg,
                                 const screen_input *in, screen_prepared *out,
                                 screen_detail *detail);
SLOWSCAN_API
void slowscan_screen_prepared_free(screen_prepared *ps);
/* v, a number of ps's arrays raised to `power` (1 for values and sd, 2 for variance: see
 * slowscan_indicator_scale_power), in the input's units; NaN when that passes the range of
 * normal doubles (the variance of a 1e300 series, 1e600, or of a 1e-300 one, 1e-600). */
SLOWSCAN_API
double slowscan_screen_unscale(const screen_prepared *ps, double v, int power);
/* Makes ps->null_source the residual of the control run's first ps->n samples, deseasoned
 * and detrended with ps's bandwidth and window in time units. Refused (SCREEN_RULE_CONTROL_*)
 * when the control has no such series (values NULL), fewer samples, another time step
 * (relative 1e-6), or fewer than 8 finite samples or no variation; else its own refusals.
 * A series that does not vary (ps->constant) keeps no control: SLOWSCAN_OK, nothing checked
 * (its tests are insufficient whatever the null), so a caller need not test that first. */
SLOWSCAN_API
int slowscan_screen_attach_control(const screen_config *cfg, screen_prepared *ps,
                          const screen_input *control, screen_detail *detail);
/* The null of a control run (the command's --null control): phase surrogates made from each
 * series' control (screen_input.control, attached by slowscan_screen_attach_control), on
 * random streams named "control", the name the outputs give this null (cfg->null_name). */
SLOWSCAN_API
void slowscan_screen_config_control(screen_config *cfg);
/* W of cfg->window for a series of n samples spanning `span`, or a refusal in *detail. */
/* A length in a calendar unit as a length in the axis' own unit (percentages and axis units
 * unchanged). SLOWSCAN_EINVAL when the axis cannot measure it: any calendar unit on a plain
 * number axis, days on a month or year index. */
SLOWSCAN_API
int slowscan_screen_length_on_axis(const screen_length *len, const time_axis *axis,
                                   screen_length *out);
/* Every length of cfg (window, bandwidth, deseason window) in the axis' own unit; a refusal
 * (SCREEN_RULE_LENGTH_UNIT) names the first that cannot be. slowscan_screen_prepare does
 * this with the input's axis itself; callers resolving windows beforehand call it first. */
/* How a calendar unit is written after a length: "d", "mon", "y"; "" for the axis' own. */
SLOWSCAN_API
const char *slowscan_screen_length_suffix(length_unit unit);
SLOWSCAN_API
int slowscan_screen_config_on_axis(screen_config *cfg, const time_axis *axis,
                                   screen_detail *detail);

SLOWSCAN_API
int slowscan_screen_window(const screen_config *cfg, size_t n, double span, size_t *window,
                  screen_detail *detail);

/* Bytes a screening run holds at once for series of at most n samples, `workers` series at a
 * time (each with cfg->threads surrogate threads): its workspaces and the surrogate
 * statistics of cfg->surrogates per test, and with keep_series (the batch driver's sink
 * keeps each series: screen_batch.h) the reorder buffer's copies; screen/memory_estimate.c says what
 * is counted and how it compares with a measured peak. Not the inputs, which the caller
 * holds. An estimate from above, for refusing a run that cannot fit before it starts;
 * SIZE_MAX when the count passes the address range. */
SLOWSCAN_API
size_t slowscan_screen_memory_estimate(const screen_config *cfg, size_t n, size_t workers,
                                       int keep_series);

/* The rolling spec (window, coverage, dt, step, band; no plan) of a prepared series, as
 * slowscan_screen_indicators uses it: with slowscan_rolling_step it says which windows carry a value. */
SLOWSCAN_API
rolling_spec slowscan_screen_rolling_spec(const screen_config *cfg, const screen_prepared *ps);

/* Rolling indicators of a prepared series into paths[j][ps->n] (caller's storage, j <
 * cfg->nindicators); NaN everywhere when the series does not vary (a SCREEN_WARN_NO_PATHS in
 * *warning->kind, else warning->kind is left alone). */
SLOWSCAN_API
int slowscan_screen_indicators(screen_workspace *ws, const screen_config *cfg, const screen_prepared *ps,
                      double *const *paths, screen_warning *warning, int *warned,
                      screen_detail *detail);

/* The trend statistics of a prepared series and its paths, and with cfg->surrogates > 0
 * their surrogate null and p-values. Fills the series' record (n, window, ...), out->ntests
 * and out->tests; appends to
 * out->warnings (out->nwarnings counts those already there). */
SLOWSCAN_API
int slowscan_screen_test_series(screen_workspace *ws, const screen_config *cfg, const screen_prepared *ps,
                       double *const *paths, screen_result *out, screen_detail *detail);

/* The whole pipeline for one series. The prepared series and its paths stay readable in the
 * workspace until the next call (slowscan_screen_workspace_prepared, slowscan_screen_workspace_path). */
SLOWSCAN_API
int slowscan_screen_series(screen_workspace *ws, const screen_config *cfg, const screen_input *in,
                  screen_result *out, screen_detail *detail);
SLOWSCAN_API
const screen_prepared *slowscan_screen_workspace_prepared(const screen_workspace *ws);
SLOWSCAN_API
const double *slowscan_screen_workspace_path(const screen_workspace *ws, size_t j);
/* The null distribution of test j of the last series (surrogates values, NaN where
 * undefined), or NULL when none was drawn. */
SLOWSCAN_API
const double *slowscan_screen_workspace_null(const screen_workspace *ws, size_t j);

/* Replicates of a prepared series' null source (its residual, or the control run's), one at a
 * time: replicate j (from 0) is the series screen's surrogate null is drawn from as its j-th,
 * on the random stream slowscan_null_trend_stream(cfg->seed, ps->name, cfg->null_name, j),
 * so a caller sees what screen tests against. Asked in increasing order they cost one draw
 * each; another order replays from the start of j's block of NULL_TREND_BLOCK.
 * Refused (SCREEN_RULE_NULL_TOO_LITTLE) when the series does not vary (ECONST) or has fewer
 * than 8 finite samples (ESHORT); SCREEN_RULE_NULL_FAILED when the null model cannot be fitted (status). */
typedef struct screen_replicates screen_replicates;
SLOWSCAN_API
int slowscan_screen_replicates_alloc(const screen_config *cfg, const screen_prepared *ps,
                                     screen_replicates **out, screen_detail *detail);
/* Replicate j into out[ps->n]. A status of the null model's draw. */
SLOWSCAN_API
int slowscan_screen_replicate(screen_replicates *reps, size_t j, double *out);
SLOWSCAN_API
void slowscan_screen_replicates_free(screen_replicates *reps);

/* How a test ends. */
typedef enum {
    SCREEN_FLAG_UNTESTED = 0, /* a statistic but no surrogates asked for */
    SCREEN_FLAG_NONE,
    SCREEN_FLAG_RISING,
    SCREEN_FLAG_FALLING,
    SCREEN_FLAG_INSUFFICIENT,
    SCREEN_FLAG_UNDECIDED     /* --surrogates auto: the budget did not settle its side of the
                                 BH threshold (sequential.h) */
} screen_flag;
SLOWSCAN_API
const char *slowscan_screen_flag_name(screen_flag flag);

/* t's null_used and quantiles (screen_quantile_levels, screen_tail_levels) of the finite
 * values among null[m]; sorted is scratch of m values. */
SLOWSCAN_API
void slowscan_screen_null_quantiles(const double *null, size_t m, double *sorted,
                                    screen_test *t);
/* The surrogate statistics at least as extreme as t's own behind its p-value (p =
 * (1 + hits) / (null_used + 1)); 0 when t has no p-value. */
SLOWSCAN_API
size_t slowscan_screen_test_hits(const screen_test *t);
/* q-values (Benjamini-Hochberg over every test with a p-value) and flags of `count` tests:
 * with a single tested p it decides itself, else q <= fdr. q[] and flags[] have count
 * entries. SLOWSCAN_ENOMEM. */
SLOWSCAN_API
int slowscan_screen_decide(const screen_test *const *tests, size_t count, double fdr, double *q,
                  screen_flag *flags);

#endif
