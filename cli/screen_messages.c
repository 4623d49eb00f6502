/* Between the command line and the screening library (screen.h): the options as a
 * screen_config, and the library's refusals, warnings and reasons in the command's words. */
#include "cli.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

/* The display text of a default length ("10%"), kept for messages and --json. */
static const char *default_length_text(const screen_length *len, char buf[32])
{
    snprintf(buf, 32, len->percent ? "%g%%" : "%g", len->amount);
    return buf;
}

/* Appends ",NAME" (or NAME first) to the default --indicators text. */
static void append_name(char *text, size_t size, const char *name)
{
    size_t used = strlen(text);
    snprintf(text + used, size - used, "%s%s", used ? "," : "", name);
}

void cli_science_defaults(const char *command, cli_options *o)
{
    static char bandwidth_text[32], window_text[32], indicators_text[128];
    screen_config c = slowscan_screen_config_default();
    memset(o, 0, sizeof *o);
    o->command = command;
    o->from = o->until = o->resample = NAN;
    o->deseason = c.deseason;
    o->detrend = c.detrend;
    o->detrend_text = slowscan_detrend_method_name(c.detrend.method);
    o->bandwidth = (cli_length){c.bandwidth.amount, c.bandwidth.percent,
                                default_length_text(&c.bandwidth, bandwidth_text)};
    o->window = (cli_length){c.window.amount, c.window.percent,
                             default_length_text(&c.window, window_text)};
    indicators_text[0] = 0;
    for (size_t j = 0; j < c.nindicators; j++) {
        o->indicators[j] = c.indicators[j];
        append_name(indicators_text, sizeof indicators_text, slowscan_indicator_name(c.indicators[j]));
    }
    o->nindicators = c.nindicators;
    o->indicators_text = indicators_text;
    if (strcmp(command, "screen") == 0 && c.drift_test) { /* joins screen's default set only */
        o->drift_test = 1;
        append_name(indicators_text, sizeof indicators_text,
                    slowscan_screen_test_name(SCREEN_TEST_RECOVERY_TREND));
    }
    o->min_coverage = c.min_coverage;
    o->recovery = c.recovery;
    /* surrogates writes a few by default; robustness and recovery test only when asked */
    o->surrogates = strcmp(command, "surrogates") == 0 ? 10
                    : strcmp(command, "robustness") == 0 || strcmp(command, "recovery") == 0
                        ? 0
                        : (long)c.surrogates;
    o->null_model = c.null_kind;
    o->null_options = c.null_options;
    o->fdr = c.fdr;
    o->alternative = c.alternative;
    o->seed = c.seed;
}

void cli_screen_config(const cli_options *o, screen_config *cfg)
{
    *cfg = slowscan_screen_config_default();
    cfg->detrend = o->detrend;
    cfg->bandwidth = (screen_length){o->bandwidth.amount, o->bandwidth.percent};
    cfg->deseason = o->deseason;
    cfg->deseason_window = o->deseason_window.text
                               ? (screen_length){o->deseason_window.amount, o->deseason_window.percent}
                               : (screen_length){NAN, 0};
    cfg->harmonics = (int)o->harmonics;
    cfg->window = (screen_length){o->window.amount, o->window.percent};
    for (size_t j = 0; j < o->nindicators; j++)
        cfg->indicators[j] = o->indicators[j];
    cfg->nindicators = o->nindicators;
    cfg->min_coverage = o->min_coverage;
    cfg->recovery = o->recovery;
    cfg->step = (size_t)o->step;
    cfg->band_lo = o->band_lo;
    cfg->band_hi = o->band_hi;
    cfg->drift_test = o->drift_test;
    cfg->noise_trend = o->noise_trend;
    cfg->null_kind = (surrogate_kind)o->null_model;
    cfg->null_name = cli_null_name(o);
    cfg->null_options = o->null_options;
    cfg->surrogates = o->surrogates > 0 ? (size_t)o->surrogates : 0;
    cfg->seed = o->seed;
    cfg->fdr = o->fdr;
    cfg->alternative = o->alternative;
    cfg->threads = o->threads > 0 ? (size_t)o->threads : 1;
}

static const char *length_text(const cli_options *o, screen_option option)
{
    return option == SCREEN_OPTION_WINDOW      ? o->window.text
           : option == SCREEN_OPTION_BANDWIDTH ? o->bandwidth.text
                                               : o->deseason_window.text;
}

static const char *option_name(screen_option option)
{
    return option == SCREEN_OPTION_WINDOW      ? "--window"
           : option == SCREEN_OPTION_BANDWIDTH ? "--bandwidth"
                                               : "--deseason-window";
}

/* Deseasoning and detrending refusals. */
static int refuse_preparation(const cli_options *o, const prepared_series *ps,
                              const screen_detail *d)
{
    const char *where = ps->source, *col = ps->name;
    /* robustness detrends with each method of its --detrends list in turn */
    const char *detrend = o->ndetrends > 0 ? "--detrends" : "--detrend";
    switch (d->rule) {
    case SCREEN_RULE_DESEASON_HARMONICS:
        cli_error("%s: column '%s': option --harmonics %ld%s: twice the number of harmonics must "
                  "be below the period in time steps (%.12g; the Nyquist limit)", where, col,
                  o->harmonics ? o->harmonics : (long)DETREND_DESEASON_HARMONICS,
                  o->harmonics ? "" : " (the default, as the period is not a whole number of "
                                      "steps)", d->value);
        break;
    case SCREEN_RULE_DESEASON_WINDOW:
        cli_error("%s: column '%s': option --deseason-window %s must hold at least two periods "
                  "(2 x %.12g) and at most the record (%.12g)", where, col,
                  o->deseason_window.text, o->deseason, d->limit);
        break;
    case SCREEN_RULE_DESEASON_PERIOD:
        cli_error("%s: column '%s': option --deseason %.12g must be at least 2 time steps (%.12g) "
                  "and at most half the record", where, col, o->deseason, d->limit);
        break;
    case SCREEN_RULE_DESEASON_SHORT:
        cli_error("%s: column '%s': option --deseason %.12g: %s", where, col, o->deseason,
                  ps->harmonics ? "a window has too few finite samples to fit the harmonics"
                                : "a phase of the cycle has no finite sample in some window");
        break;
    case SCREEN_RULE_DESEASON_FAILED:
        cli_error("%s: column '%s': deseasoning failed: %s", where, col,
                  slowscan_strerror(d->status));
        break;
    case SCREEN_RULE_DETREND_DEGREE:
        cli_error("%s: column '%s': option %s %s: the degree is too high for %zu finite "
                  "samples", where, col, detrend, o->detrend_text, d->count);
        break;
    default:
        cli_error("%s: column '%s': detrending (%s %s) failed: %s", where, col, detrend,
                  o->detrend_text, slowscan_strerror(d->status));
        break;
    }
    return d->status == SLOWSCAN_ENOMEM ? EXIT_INTERNAL : EXIT_BAD_INPUT;
}

/* Window and band refusals of the rolling indicators. */
static int refuse_rolling(const cli_options *o, const prepared_series *ps, const screen_detail *d)
{
    switch (d->rule) {
    case SCREEN_RULE_WINDOW_LONGER:
        cli_error("%s: option --window %s: the window (%zu samples) is longer than the series "
                  "(%zu samples)", ps->source, o->window.text, d->count, d->need);
        break;
    case SCREEN_RULE_WINDOW_INDICATOR:
        cli_error("%s: option --window %s gives %zu samples per window; %s needs at least %zu",
                  ps->source, o->window.text, d->count,
                  slowscan_indicator_name((indicator_kind)d->indicator), d->need);
        break;
    case SCREEN_RULE_BAND_NYQUIST:
        cli_error("%s: option --band %s is outside (0, %.12g]: the Nyquist frequency of time "
                  "step %.12g is %.12g cycles per time unit", ps->source, o->band_text, d->limit,
                  d->value, d->limit);
        break;
    case SCREEN_RULE_BAND_TOO_FEW:
        cli_error("%s: option --band %s holds %zu of the window's frequencies k/(W dt) "
                  "(W = %zu); spectral_exponent needs at least %zu", ps->source, o->band_text,
                  d->count, ps->window, d->need);
        break;
    case SCREEN_RULE_PLAN_FAILED:
        cli_error("%s: column '%s': spectral plan failed: %s", ps->source, ps->name,
                  slowscan_strerror(d->status));
        break;
    default:
        cli_error("%s: column '%s': rolling indicators failed: %s", ps->source, ps->name,
                  slowscan_strerror(d->status));
        break;
    }
    return d->status == SLOWSCAN_ENOMEM ? EXIT_INTERNAL : EXIT_BAD_INPUT;
}

int cli_screen_refuse(const cli_options *o, const prepared_series *ps, const screen_detail *d)
{
    switch (d->rule) {
    case SCREEN_RULE_LONGER_THAN_SPAN:
        cli_error("%s: option %s %s is longer than the span %.12g of the analysed series",
                  ps->source, option_name(d->option), length_text(o, d->option), d->limit);
        return EXIT_BAD_INPUT;
    case SCREEN_RULE_WINDOW_TOO_FEW:
        cli_error("%s: option --window %s gives %zu samples per window; at least 3 are needed",
                  ps->source, o->window.text, d->count);
        return EXIT_BAD_INPUT;
    case SCREEN_RULE_BLOCK_LENGTH:
        cli_error("%s: column '%s': option --block-length %zu is more than half the %zu samples",
                  ps->source, ps->name, d->count, d->need);
        return EXIT_BAD_INPUT;
    case SCREEN_RULE_AR1_NONSTATIONARY:
        cli_error("%s: column '%s': option --null ar1: the fitted AR(1) coefficient is not below 1 "
                  "(the residual is not stationary); detrend differently or choose another null",
                  ps->source, ps->name);
        return EXIT_BAD_INPUT;
    case SCREEN_RULE_NULL_FAILED:
        cli_error("%s: column '%s': surrogate null failed: %s", ps->source, ps->name,
                  slowscan_strerror(d->status));
        return d->status == SLOWSCAN_ENOMEM ? EXIT_INTERNAL : EXIT_BAD_INPUT;
    case SCREEN_RULE_CONTROL_FLAT:
        cli_error("option --control: series '%s' has no usable variation", ps->name);
        return EXIT_BAD_INPUT;
    case SCREEN_RULE_NO_MEMORY:
    case SCREEN_RULE_NONE:
        cli_error("out of memory");
        return EXIT_INTERNAL;
    default:
        break;
    }
    if (d->rule >= SCREEN_RULE_DESEASON_PERIOD && d->rule <= SCREEN_RULE_DETREND_FAILED)
        return refuse_preparation(o, ps, d);
    return refuse_rolling(o, ps, d);
}

void cli_screen_warn(const cli_options *o, const prepared_series *ps, const screen_warning *w)
{
    if (w->kind == SCREEN_WARN_NO_PATHS)
        cli_warning("%s: column '%s' %s; its indicators are NA", ps->source, ps->name,
                    w->status == SCREEN_CONSTANT        ? "is constant"
                    : w->status == SCREEN_FLAT_RESIDUAL ? "has no variation left after detrending"
                                                        : "has fewer than 2 finite samples");
    else if (w->kind == SCREEN_WARN_IAAFT_UNCONVERGED)
        cli_warning("%s: column '%s': %zu of %zu iaaft surrogates did not converge within %d "
                    "iterations (--iaaft-iterations, --iaaft-tol)", ps->source, ps->name,
                    w->count, w->total, o->null_options.iaaft_max_iterations);
    else
        cli_warning("%s: column '%s': no surrogates can be made (%s); its p-values are NA",
                    ps->source, ps->name, slowscan_strerror(w->status));
}

const char *cli_screen_reason(screen_reason reason)
{
    switch (reason) {
    case SCREEN_REASON_FEW_VALUES: return "fewer than 8 finite indicator values";
    case SCREEN_REASON_CONSTANT_PATH: return "the indicator does not vary";
    case SCREEN_REASON_FEW_PAIRS: return "fewer than 8 adjacent pairs";
    case SCREEN_REASON_NO_FIT: return "no AR(1) drift fit";
    case SCREEN_REASON_NO_SURROGATES: return "no surrogates can be made";
    case SCREEN_REASON_NO_MEMORY: return "out of memory";
    default: return "the series has no variation";
    }
}
