/* Between the command line and the screening library (screen.h): the options as a
 * screen_config, and the library's refusals, warnings and reasons printed in the words of
 * its message module (message.h), with the options as this command spells them. */
#include "cli.h"
#include "slowscan/message.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
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
    o->from = o->until = o->resample = o->max_gap = NAN;
    o->deseason = c.deseason;
    o->detrend = c.detrend;
    o->detrend_text = slowscan_detrend_method_name(c.detrend.method);
    o->bandwidth = (cli_length){c.bandwidth.amount, c.bandwidth.percent,
                                default_length_text(&c.bandwidth, bandwidth_text),
                                c.bandwidth.unit};
    o->window = (cli_length){c.window.amount, c.window.percent,
                             default_length_text(&c.window, window_text), c.window.unit};
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
    o->max_per_series = 100000; /* --surrogates auto (sequential.h) */
    o->risk = 1e-2;
    o->alternative = c.alternative;
    o->seed = c.seed;
}

void cli_screen_config(const cli_options *o, screen_config *cfg)
{
    *cfg = slowscan_screen_config_default();
    cfg->detrend = o->detrend;
    cfg->bandwidth = (screen_length){.amount = o->bandwidth.amount, .percent = o->bandwidth.percent,
                                     .unit = o->bandwidth.unit};
    cfg->deseason = o->deseason;
    cfg->deseason_window = o->deseason_window.text
                               ? (screen_length){.amount = o->deseason_window.amount,
                                                 .percent = o->deseason_window.percent,
                                                 .unit = o->deseason_window.unit}
                               : (screen_length){.amount = NAN, .percent = 0};
    cfg->harmonics = (int)o->harmonics;
    cfg->window = (screen_length){.amount = o->window.amount, .percent = o->window.percent,
                                  .unit = o->window.unit};
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
    cfg->tail.method = (tail_method)o->tail.method;
}

/* The library's message context for this command: the series, and the options as its user
 * spelled and wrote them (the library words the rest). */
typedef struct {
    const char *names[SCREEN_OPTION_COUNT], *values[SCREEN_OPTION_COUNT];
    screen_config cfg;
    message_context ctx;
} cli_message_context;

static void context_of(const cli_options *o, const char *source, const char *series,
                       const char *control_source, cli_message_context *c)
{
    memset(c, 0, sizeof *c);
    cli_screen_config(o, &c->cfg);
    /* robustness detrends with each method of its --detrends list in turn */
    c->names[SCREEN_OPTION_DETREND] = o->ndetrends > 0 ? "--detrends" : NULL;
    c->values[SCREEN_OPTION_WINDOW] = o->window.text;
    c->values[SCREEN_OPTION_BANDWIDTH] = o->bandwidth.text;
    c->values[SCREEN_OPTION_DESEASON_WINDOW] = o->deseason_window.text;
    c->values[SCREEN_OPTION_DETREND] = o->detrend_text;
    c->values[SCREEN_OPTION_BAND] = o->band_text;
    c->ctx = (message_context){source, series, control_source, &c->cfg, c->names, c->values};
}

/* One message to print: what the library words, and the words' own arguments. */
typedef enum {
    SAY_REFUSAL,
    SAY_NOTICE, /* a refusal that only skips one series: worded alike, printed as a warning */
    SAY_WARNING,
    SAY_INSUFFICIENT,
    SAY_DETRENDED,
    SAY_LEAKAGE,
    SAY_LEAKAGE_SUMMARY
} say_kind;
typedef struct {
    say_kind kind;
    const void *what; /* screen_detail, screen_warning, screen_test, screen_prepared,
                         detrend_leakage */
    const message_context *ctx;
    size_t count, tested; /* the leakage summary's */
    const char *const *first;
    size_t nfirst;
} cli_message;

static size_t render(const cli_message *m, char *buf, size_t size)
{
    switch (m->kind) {
    case SAY_REFUSAL:
    case SAY_NOTICE: return slowscan_message_refusal(buf, size, m->what, m->ctx);
    case SAY_WARNING: return slowscan_message_warning(buf, size, m->what, m->ctx);
    case SAY_INSUFFICIENT: return slowscan_message_insufficient(buf, size, m->what, m->ctx);
    case SAY_DETRENDED: return slowscan_message_detrended(buf, size, m->what, m->ctx);
    case SAY_LEAKAGE: return slowscan_message_leakage(buf, size, m->what, m->ctx);
    default:
        return slowscan_message_leakage_summary(buf, size, m->count, m->tested, m->first,
                                                m->nfirst, m->ctx);
    }
}

/* Prints one library message (none when its text is empty), from the heap when it outgrows
 * the stack buffer. */
static void say(const cli_message *m)
{
    char stack[1024], *text = stack;
    size_t len = render(m, stack, sizeof stack);
    if (len == 0)
        return;
    if (len >= sizeof stack && (text = malloc(len + 1)) != NULL)
        render(m, text, len + 1);
    if (!text)
        text = stack; /* out of memory: the message cut short rather than lost */
    if (m->kind == SAY_REFUSAL)
        cli_error("%s", text);
    else
        cli_warning("%s", text);
    if (text != stack)
        free(text);
}

static int refuse(const cli_options *o, const prepared_series *ps, const char *control_source,
                  const screen_detail *d)
{
    cli_message_context c;
    context_of(o, ps->source, ps->name, control_source, &c);
    say(&(cli_message){SAY_REFUSAL, d, &c.ctx, 0, 0, NULL, 0});
    int internal = d->rule == SCREEN_RULE_NO_MEMORY || d->rule == SCREEN_RULE_NONE ||
                   d->status == SLOWSCAN_ENOMEM;
    return internal ? EXIT_INTERNAL : EXIT_BAD_INPUT;
}

int cli_screen_refuse(const cli_options *o, const prepared_series *ps, const screen_detail *d)
{
    return refuse(o, ps, NULL, d);
}

int cli_control_refuse(const cli_options *o, const screen_input *control,
                       const prepared_series *ps, const screen_detail *d)
{
    return refuse(o, ps, control->source, d);
}

void cli_screen_notice(const cli_options *o, const prepared_series *ps, const screen_detail *d)
{
    cli_message_context c;
    context_of(o, ps->source, ps->name, NULL, &c);
    say(&(cli_message){SAY_NOTICE, d, &c.ctx, 0, 0, NULL, 0});
}

void cli_screen_warn(const cli_options *o, const prepared_series *ps, const screen_warning *w)
{
    cli_message_context c;
    context_of(o, ps->source, ps->name, NULL, &c);
    say(&(cli_message){SAY_WARNING, w, &c.ctx, 0, 0, NULL, 0});
}

void cli_screen_insufficient(const prepared_series *ps, const screen_test *test)
{
    message_context ctx = slowscan_message_context_default();
    ctx.source = ps->source;
    ctx.series = ps->name;
    say(&(cli_message){SAY_INSUFFICIENT, test, &ctx, 0, 0, NULL, 0});
}

void cli_screen_detrended(const prepared_series *ps)
{
    message_context ctx = slowscan_message_context_default();
    ctx.source = ps->source;
    ctx.series = ps->name;
    say(&(cli_message){SAY_DETRENDED, ps, &ctx, 0, 0, NULL, 0});
}

void cli_report_leakage(const cli_options *opts, const cli_leakage_tally *tally)
{
    cli_message_context c;
    for (size_t k = 0; tally->count <= CLI_LEAKAGE_NAMED && k < tally->count; k++) {
        context_of(opts, tally->source[k], tally->name[k], NULL, &c);
        c.names[SCREEN_OPTION_DETREND] = NULL; /* the advice names --detrend in every command */
        say(&(cli_message){SAY_LEAKAGE, &tally->first[k], &c.ctx, 0, 0, NULL, 0});
    }
    if (tally->count <= CLI_LEAKAGE_NAMED)
        return;
    context_of(opts, NULL, NULL, NULL, &c);
    c.names[SCREEN_OPTION_DETREND] = NULL;
    say(&(cli_message){SAY_LEAKAGE_SUMMARY, NULL, &c.ctx, tally->count, tally->tested,
                       tally->name, CLI_LEAKAGE_NAMED});
}
