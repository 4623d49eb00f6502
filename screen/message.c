/* The screening library's refusals, warnings and reasons in words (message.h). The wording
 * is the command line's, moved here so that every front end says the same. */
#include "slowscan/message.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <string.h>

/* A text growing in the caller's buffer: `len` counts what the whole text needs, even past
 * the end of the buffer, as snprintf does. */
typedef struct {
    char *buf;
    size_t size, len;
    const message_context *ctx;
    screen_config config; /* ctx->config, or the defaults */
    const char *source;   /* the source named: the control run's for a control refusal */
} message_out;

static void put(message_out *m, const char *fmt, ...) __attribute__((format(printf, 2, 3)));
static void put(message_out *m, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    int room = m->len < m->size;
    int n = vsnprintf(room ? m->buf + m->len : NULL, room ? m->size - m->len : 0, fmt, ap);
    va_end(ap);
    if (n > 0)
        m->len += (size_t)n;
}

static message_out message_begin(char *buf, size_t size, const message_context *ctx)
{
    static const message_context none = {0};
    message_out m = {.buf = buf, .size = size, .ctx = ctx ? ctx : &none};
    m.config = m.ctx->config ? *m.ctx->config : slowscan_screen_config_default();
    m.source = m.ctx->source;
    if (!buf)
        m.size = 0;
    else if (size > 0)
        buf[0] = 0;
    return m;
}

static const char *const command_line_names[SCREEN_OPTION_COUNT] = {
    [SCREEN_OPTION_WINDOW] = "--window",
    [SCREEN_OPTION_BANDWIDTH] = "--bandwidth",
    [SCREEN_OPTION_DESEASON] = "--deseason",
    [SCREEN_OPTION_DESEASON_WINDOW] = "--deseason-window",
    [SCREEN_OPTION_HARMONICS] = "--harmonics",
    [SCREEN_OPTION_DETREND] = "--detrend",
    [SCREEN_OPTION_BAND] = "--band",
    [SCREEN_OPTION_NULL] = "--null",
    [SCREEN_OPTION_BLOCK_LENGTH] = "--block-length",
    [SCREEN_OPTION_IAAFT_ITERATIONS] = "--iaaft-iterations",
    [SCREEN_OPTION_IAAFT_TOL] = "--iaaft-tol",
    [SCREEN_OPTION_CONTROL] = "--control",
    [SCREEN_OPTION_RESAMPLE] = "--resample",
    [SCREEN_OPTION_JSON] = "--json",
};

static int option_known(screen_option option)
{
    return option > SCREEN_OPTION_NONE && option < SCREEN_OPTION_COUNT;
}

message_context slowscan_message_context_default(void)
{
    return (message_context){0};
}

const char *slowscan_message_option_name(screen_option option)
{
    return option_known(option) ? command_line_names[option] : "";
}

static const char *name_of(const message_out *m, screen_option option)
{
    const char *const *names = m->ctx->option_names;
    return option_known(option) && names && names[option] ? names[option]
                                                            : slowscan_message_option_name(option);
}

static const char *length_text(const screen_length *len, char buf[64])
{
    snprintf(buf, 64, "%g%s", len->amount, len->percent ? "%" : slowscan_screen_length_suffix(len->unit));
    return buf;
}


/* A setting's value as the user wrote it, else as the config holds it. */
static const char *value_of(const message_out *m, screen_option option, char buf[64])
{
    const char *const *values = m->ctx->option_values;
    if (option_known(option) && values && values[option])
        return values[option];
    const screen_config *c = &m->config;
    buf[0] = 0;
    switch (option) {
    case SCREEN_OPTION_WINDOW: return length_text(&c->window, buf);
    case SCREEN_OPTION_BANDWIDTH: return length_text(&c->bandwidth, buf);
    case SCREEN_OPTION_DESEASON_WINDOW: return length_text(&c->deseason_window, buf);
    case SCREEN_OPTION_DETREND:
        if (c->detrend.method == DETREND_POLY)
            snprintf(buf, 64, "poly:%d", c->detrend.degree);
        return c->detrend.method == DETREND_POLY ? buf
                                                 : slowscan_detrend_method_name(c->detrend.method);
    case SCREEN_OPTION_BAND: snprintf(buf, 64, "%g:%g", c->band_lo, c->band_hi); return buf;
    default: return buf;
    }
}

/* "SOURCE: " when the series has a source. */
static void put_source(message_out *m)
{
    if (m->source)
        put(m, "%s: ", m->source);
}

/* "SOURCE: column 'NAME'", the start of most messages. */
static void put_column(message_out *m)
{
    put_source(m);
    put(m, "column '%s'", m->ctx->series ? m->ctx->series : "");
}

/* "SOURCE: option NAME VALUE", the start of the messages about one setting. */
static void put_option(message_out *m, screen_option option)
{
    char buf[64];
    put_source(m);
    put(m, "option %s %s", name_of(m, option), value_of(m, option, buf));
}

/* Deseasoning and detrending refusals. */
static void refuse_preparation(message_out *m, const screen_detail *d)
{
    const screen_config *c = &m->config;
    char buf[64];
    put_column(m);
    switch (d->rule) {
    case SCREEN_RULE_DESEASON_HARMONICS:
        put(m, ": option %s %ld%s: twice the number of harmonics must be below the period in time "
               "steps (%.12g; the Nyquist limit)", name_of(m, SCREEN_OPTION_HARMONICS),
            c->harmonics ? (long)c->harmonics : (long)DETREND_DESEASON_HARMONICS,
            c->harmonics ? "" : " (the default, as the period is not a whole number of steps)",
            d->value);
        break;
    case SCREEN_RULE_DESEASON_WINDOW:
        put(m, ": option %s %s must hold at least two periods (2 x %.12g) and at most the record "
               "(%.12g)", name_of(m, SCREEN_OPTION_DESEASON_WINDOW),
            value_of(m, SCREEN_OPTION_DESEASON_WINDOW, buf), c->deseason, d->limit);
        break;
    case SCREEN_RULE_DESEASON_PERIOD:
        put(m, ": option %s %.12g must be at least 2 time steps (%.12g) and at most half the record",
            name_of(m, SCREEN_OPTION_DESEASON), c->deseason, d->limit);
        break;
    case SCREEN_RULE_DESEASON_SHORT:
        put(m, ": option %s %.12g: %s", name_of(m, SCREEN_OPTION_DESEASON), c->deseason,
            d->count ? "a window has too few finite samples to fit the harmonics"
                     : "a phase of the cycle has no finite sample in some window");
        break;
    case SCREEN_RULE_DESEASON_FAILED:
        put(m, ": deseasoning failed: %s", slowscan_strerror(d->status));
        break;
    case SCREEN_RULE_DETREND_DEGREE:
        put(m, ": option %s %s: the degree is too high for %zu finite samples",
            name_of(m, SCREEN_OPTION_DETREND), value_of(m, SCREEN_OPTION_DETREND, buf), d->count);
        break;
    default: /* SCREEN_RULE_DETREND_FAILED */
        put(m, ": detrending (%s %s) failed: %s", name_of(m, SCREEN_OPTION_DETREND),
            value_of(m, SCREEN_OPTION_DETREND, buf), slowscan_strerror(d->status));
        break;
    }
}

/* The window and band refusals: about one setting, not one column. */
/* A length in a unit the time axis cannot measure. */
static void refuse_length_unit(message_out *m, const screen_detail *d)
{
    static const char *const unit_names[] = {"time units", "days", "months", "years"};
    const char *unit = d->count < 4 ? unit_names[d->count] : "an unknown unit";
    put_option(m, d->option);
    if (d->need == TIME_AXIS_NUMBER)
        put(m, " is in %s, but the time column holds plain numbers, not dates; give the "
               "length in its own units or as N%%", unit);
    else
        put(m, " is in %s, which the time axis (%s) cannot measure; give it in %s or as N%%",
            unit, d->need == TIME_AXIS_MONTHS ? "one row per month, counted in months"
                                              : "one row per year, counted in years",
            d->need == TIME_AXIS_MONTHS ? "mon or y" : "y");
}

static void refuse_setting(message_out *m, const screen_detail *d)
{
    const char *indicator = slowscan_indicator_name((indicator_kind)d->indicator);
    put_option(m, d->rule == SCREEN_RULE_LONGER_THAN_SPAN ? d->option
                  : d->rule == SCREEN_RULE_BAND_NYQUIST || d->rule == SCREEN_RULE_BAND_TOO_FEW
                      ? SCREEN_OPTION_BAND
                      : SCREEN_OPTION_WINDOW);
    switch (d->rule) {
    case SCREEN_RULE_LONGER_THAN_SPAN:
        put(m, " is longer than the span %.12g of the analysed series", d->limit);
        break;
    case SCREEN_RULE_WINDOW_TOO_FEW:
        put(m, " gives %zu samples per window; at least 3 are needed", d->count);
        break;
    case SCREEN_RULE_WINDOW_LONGER:
        put(m, ": the window (%zu samples) is longer than the series (%zu samples)", d->count,
            d->need);
        break;
    case SCREEN_RULE_WINDOW_INDICATOR:
        put(m, " gives %zu samples per window; %s needs at least %zu", d->count,
            indicator ? indicator : "its indicator", d->need);
        break;
    case SCREEN_RULE_BAND_NYQUIST:
        put(m, " is outside (0, %.12g]: the Nyquist frequency of time step %.12g is %.12g cycles "
               "per time unit", d->limit, d->value, d->limit);
        break;
    default: /* SCREEN_RULE_BAND_TOO_FEW */
        put(m, " holds %zu of the window's frequencies k/(W dt) (W = %zu); spectral_exponent needs "
               "at least %zu", d->count, (size_t)d->value, d->need);
        break;
    }
}

/* Refusals of the null model and of the computations behind the indicators. */
static void refuse_null(message_out *m, const screen_detail *d)
{
    put_column(m);
    switch (d->rule) {
    case SCREEN_RULE_BLOCK_LENGTH:
        put(m, ": option %s %zu is more than half the %zu samples",
            name_of(m, SCREEN_OPTION_BLOCK_LENGTH), d->count, d->need);
        break;
    case SCREEN_RULE_AR1_NONSTATIONARY:
        put(m, ": option %s ar1: the fitted AR(1) coefficient is not below 1 (the residual is not "
               "stationary); detrend differently or choose another null",
            name_of(m, SCREEN_OPTION_NULL));
        break;
    case SCREEN_RULE_NULL_FAILED:
        put(m, ": surrogate null failed: %s", slowscan_strerror(d->status));
        break;
    case SCREEN_RULE_PLAN_FAILED:
        put(m, ": spectral plan failed: %s", slowscan_strerror(d->status));
        break;
    case SCREEN_RULE_ROLLING_FAILED:
        put(m, ": rolling indicators failed: %s", slowscan_strerror(d->status));
        break;
    default:
        put(m, ": the series was refused (rule %d): %s", (int)d->rule,
            slowscan_strerror(d->status));
        break;
    }
}

/* The control run lacks the series, is shorter, on another step, or does not vary. */
static void refuse_control(message_out *m, const screen_detail *d)
{
    const char *control = m->ctx->control_source, *series = m->ctx->series ? m->ctx->series : "";
    const char *run = control ? control : "the control run";
    put(m, "option %s: ", name_of(m, SCREEN_OPTION_CONTROL));
    switch (d->rule) {
    case SCREEN_RULE_CONTROL_MISSING:
        put(m, "%s has no series '%s'", run, series);
        break;
    case SCREEN_RULE_CONTROL_SHORT:
        put(m, "series '%s' of %s has %zu samples, fewer than the %zu analysed", series, run,
            d->count, d->need);
        break;
    case SCREEN_RULE_CONTROL_STEP:
        put(m, "%s has time step %.12g, the analysed series %.12g (use %s)", run, d->value,
            d->limit, name_of(m, SCREEN_OPTION_RESAMPLE));
        break;
    default: /* SCREEN_RULE_CONTROL_FLAT */
        put(m, "series '%s'%s%s has no usable variation", series, control ? " of " : "",
            control ? control : "");
        break;
    }
}

size_t slowscan_message_refusal(char *buf, size_t size, const screen_detail *d,
                                const message_context *ctx)
{
    message_out m = message_begin(buf, size, ctx);
    if (d->control && m.ctx->control_source) /* the control run's own preparation refused */
        m.source = m.ctx->control_source;
    switch (d->rule) {
    case SCREEN_RULE_NONE:
        put(&m, "%s", slowscan_strerror(d->status == SLOWSCAN_OK ? SLOWSCAN_ENOMEM : d->status));
        break;
    case SCREEN_RULE_NO_MEMORY:
        put(&m, "out of memory");
        break;
    case SCREEN_RULE_LONGER_THAN_SPAN:
    case SCREEN_RULE_WINDOW_TOO_FEW:
    case SCREEN_RULE_WINDOW_LONGER:
    case SCREEN_RULE_WINDOW_INDICATOR:
    case SCREEN_RULE_BAND_NYQUIST:
    case SCREEN_RULE_BAND_TOO_FEW:
        refuse_setting(&m, d);
        break;
    case SCREEN_RULE_DESEASON_PERIOD:
    case SCREEN_RULE_DESEASON_HARMONICS:
    case SCREEN_RULE_DESEASON_WINDOW:
    case SCREEN_RULE_DESEASON_SHORT:
    case SCREEN_RULE_DESEASON_FAILED:
    case SCREEN_RULE_DETREND_DEGREE:
    case SCREEN_RULE_DETREND_FAILED:
        refuse_preparation(&m, d);
        break;
    case SCREEN_RULE_CONTROL_MISSING:
    case SCREEN_RULE_CONTROL_SHORT:
    case SCREEN_RULE_CONTROL_STEP:
    case SCREEN_RULE_CONTROL_FLAT:
        refuse_control(&m, d);
        break;
    case SCREEN_RULE_LENGTH_UNIT:
        refuse_length_unit(&m, d);
        break;
    case SCREEN_RULE_NULL_TOO_LITTLE: /* said as a warning: the run goes on without it */
        put_column(&m);
        put(&m, " %s; no surrogates written for it",
            d->status == SLOWSCAN_ECONST ? "has no variation" : "has fewer than 8 finite samples");
        break;
    default: /* the null model's and the indicators' computations, and unknown rules */
        refuse_null(&m, d);
        break;
    }
    return m.len;
}

size_t slowscan_message_warning(char *buf, size_t size, const screen_warning *w,
                                const message_context *ctx)
{
    message_out m = message_begin(buf, size, ctx);
    put_column(&m);
    switch (w->kind) {
    case SCREEN_WARN_NO_PATHS:
        put(&m, " %s; its indicators are NA",
            w->status == SCREEN_CONSTANT        ? "is constant"
            : w->status == SCREEN_FLAT_RESIDUAL ? "has no variation left after detrending"
                                                : "has fewer than 2 finite samples");
        break;
    case SCREEN_WARN_IAAFT_UNCONVERGED:
        put(&m, ": %zu of %zu iaaft surrogates did not converge within %d iterations (%s, %s)",
            w->count, w->total, m.config.null_options.iaaft_max_iterations,
            name_of(&m, SCREEN_OPTION_IAAFT_ITERATIONS), name_of(&m, SCREEN_OPTION_IAAFT_TOL));
        break;
    case SCREEN_WARN_NO_SURROGATES:
        put(&m, ": no surrogates can be made (%s); its p-values are NA",
            slowscan_strerror(w->status));
        break;
    default:
        put(&m, ": warning of unknown kind %d", (int)w->kind);
        break;
    }
    return m.len;
}

size_t slowscan_message_detrended(char *buf, size_t size, const screen_prepared *ps,
                                  const message_context *ctx)
{
    message_out m = message_begin(buf, size, ctx);
    if (ps->constant == SCREEN_FLAT_RESIDUAL) {
        put_column(&m);
        put(&m, " has no variation left after detrending (the residual is round-off)");
    } else if (ps->constant || ps->finite < 2) {
        put_column(&m);
        put(&m, " has %s; trend and residual are NA",
            ps->constant ? "a constant value" : "fewer than 2 finite samples");
    }
    return m.len;
}

const char *slowscan_message_reason(screen_reason reason)
{
    switch (reason) {
    case SCREEN_REASON_NONE: /* a NaN statistic with no reason recorded: the series' variation */
    case SCREEN_REASON_NO_VARIATION: return "the series has no variation";
    case SCREEN_REASON_FEW_VALUES: return "fewer than 8 finite indicator values";
    case SCREEN_REASON_CONSTANT_PATH: return "the indicator does not vary";
    case SCREEN_REASON_FEW_PAIRS: return "fewer than 8 adjacent pairs";
    case SCREEN_REASON_NO_FIT: return "no AR(1) drift fit";
    case SCREEN_REASON_NO_SURROGATES: return "no surrogates can be made";
    case SCREEN_REASON_NO_MEMORY: return "out of memory";
    default: return "no statistic for an unknown reason";
    }
}

size_t slowscan_message_insufficient(char *buf, size_t size, const screen_test *test,
                                     const message_context *ctx)
{
    message_out m = message_begin(buf, size, ctx);
    int known = test->kind >= 0 && test->kind < SCREEN_TEST_KIND_COUNT;
    put_column(&m);
    put(&m, ", indicator %s: %s; flagged insufficient",
        known ? slowscan_screen_test_name(test->kind) : "of unknown kind",
        slowscan_message_reason(test->reason));
    return m.len;
}

/* What to do about a leaking residual, in the caller's option names. */
static void put_leakage_advice(message_out *m)
{
    put(m, "a narrower %s or another %s may follow the trend better; until then a rise near the "
           "ends may be the trend's", name_of(m, SCREEN_OPTION_BANDWIDTH),
        name_of(m, SCREEN_OPTION_DETREND));
}

size_t slowscan_message_leakage(char *buf, size_t size, const detrend_leakage *l,
                                const message_context *ctx)
{
    message_out m = message_begin(buf, size, ctx);
    int last = l->last.p < l->first.p;
    put_column(&m);
    put(&m, ": the residual keeps part of the trend at the record's %s (mean %.3g over one "
            "bandwidth, p = %.2g); ", last ? "end" : "start", last ? l->last.mean : l->first.mean,
        last ? l->last.p : l->first.p);
    put_leakage_advice(&m);
    return m.len;
}

size_t slowscan_message_leakage_summary(char *buf, size_t size, size_t count, size_t tested,
                                        const char *const *first, size_t nfirst,
                                        const message_context *ctx)
{
    message_out m = message_begin(buf, size, ctx);
    char value[64];
    put(&m, "%zu of %zu series keep part of their trend at the record's start or end (%s residual "
            "mean over one bandwidth away from zero at level 0.01), the first ", count, tested,
        value_of(&m, SCREEN_OPTION_DETREND, value));
    for (size_t k = 0; k < nfirst; k++)
        put(&m, "%s'%s'", k ? ", " : "", first[k] ? first[k] : "");
    put(&m, " (%s lists each); ", name_of(&m, SCREEN_OPTION_JSON));
    put_leakage_advice(&m);
    return m.len;
}

size_t slowscan_message_ensemble_refusal(char *buf, size_t size, const ensemble_detail *d,
                                         const char *const *names, const char *option,
                                         const message_context *ctx)
{
    message_out m = message_begin(buf, size, ctx);
    put_source(&m);
    put(&m, "option %s: ", option);
    const char *series = d->rule == ENSEMBLE_RULE_NO_MEMBERS || d->rule == ENSEMBLE_RULE_FEW_LISTED
                             ? "" : names[d->series];
    switch (d->rule) {
    case ENSEMBLE_RULE_NO_MEMBERS:
        put(&m, "no column is named NAME.MEMBER%s",
            strcmp(option, "--members") == 0 ? " with one of the listed members" : "");
        break;
    case ENSEMBLE_RULE_FEW_MEMBERS:
        put(&m, "ensemble of column '%s' has %zu members, at least %zu needed", series, d->count,
            d->need);
        break;
    case ENSEMBLE_RULE_MISSING_MEMBER:
        put(&m, "ensemble of column '%s' has no member '%s'", series, d->member);
        break;
    case ENSEMBLE_RULE_MIXED_LENGTHS:
        put(&m, "member '%s' ends after %zu samples, member '%s' after %zu (the members of an "
            "ensemble must cover the same times)", series, d->count, names[d->other], d->need);
        break;
    case ENSEMBLE_RULE_FEW_LISTED:
        put(&m, "%zu members listed, at least %zu needed", d->count, d->need);
        break;
    default:
        put(&m, "refused by a rule of unknown kind %d", (int)d->rule);
        break;
    }
    return m.len;
}

size_t slowscan_message_ensemble_split(char *buf, size_t size, const char *ensemble,
                                       const ensemble_split *s, const ensemble_split_options *o,
                                       const message_context *ctx)
{
    message_out m = message_begin(buf, size, ctx);
    put_source(&m);
    put(&m, "ensemble '%s' splits by the end of the record:", ensemble);
    if (s->flags & ENSEMBLE_SPLIT_BIMODAL)
        put(&m, " the bimodality coefficient of its %zu members' final values is %.3f, above "
            "%.3f;", s->members, s->bimodality, o->bimodality_limit);
    if (s->flags & ENSEMBLE_SPLIT_GAP)
        put(&m, " a gap of %g parts its members %zu below %g from %zu above, %.1f times "
            "their spread within groups;", s->gap, s->lower, s->cut, s->upper,
            s->spread > 0 ? s->gap / s->spread : INFINITY);
    put(&m, " final values are means over the last %g%% of the record; the ensemble mean may "
        "follow a path that no member follows", 100 * o->final_share);
    return m.len;
}

/* --surrogates auto: BH rejects the k smallest p when the k-th is at or below q k / m; with
 * every p at or above the floor 1/(K+1), a discovery needs at least floor m / q tests tied
 * there. The options are named as the command line spells them (a binding rewrites them). */
size_t slowscan_message_sequential_floor(char *buf, size_t size,
                                         const screen_sequential_summary *s)
{
    message_out m = message_begin(buf, size, NULL);
    double tests = (double)s->tested, fdr = s->config.fdr;
    double floor_p = 1.0 / ((double)s->config.max_per_series + 1.0);
    double ties = ceil(floor_p * tests / fdr - 1e-9);
    if (s->tested == 0 || !(floor_p > fdr / tests))
        return m.len;
    put(&m, "option --surrogates auto: ");
    if (ties > tests)
        put(&m, "no discovery is possible: the smallest p, 1/(K+1) = %.3g with "
                "--max-per-series %zu, is above q = %g; raise --max-per-series", floor_p,
            s->config.max_per_series, fdr);
    else
        put(&m, "no test can be a discovery alone: the smallest p, 1/(K+1) = %.3g with "
                "--max-per-series %zu, is above q/m = %.3g for %zu tests, so discoveries need "
                "at least %.0f tests tied at that floor; raise --max-per-series", floor_p,
            s->config.max_per_series, fdr / tests, s->tested, ties);
    return m.len;
}

size_t slowscan_message_sequential_undecided(char *buf, size_t size,
                                             const screen_sequential_summary *s)
{
    message_out m = message_begin(buf, size, NULL);
    if (s->undecided > 0)
        put(&m, "option --surrogates auto: %zu of %zu tests undecided: the budget (%zu "
                "surrogates, --budget) ran out before their side of the FDR threshold was "
                "settled", s->undecided, s->tested, s->budget);
    return m.len;
}
