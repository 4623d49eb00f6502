/* The library's messages (message.h): for every refusal rule and warning the binary can meet,
 * the library's text of what slowscan_screen_series reports on the same input and settings is
 * exactly what `slowscan` prints on standard error (the command being the reference: its
 * words are the ones users and the golden files know). Rules no input can reach (a failed
 * allocation or FFTW plan) are checked against the command's wording before the move into
 * the library (cli/screen_messages.c at commit eca1cf2). The run's trend-leakage warnings
 * follow, as the command ends them. Then the snprintf contract
 * (truncation, the returned length) and unknown enum values. */
#include "check.h"
#include "slowscan/io.h"
#include "slowscan/message.h"
#include "slowscan/screen.h"
#include "slowscan/status.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* ---- inputs: small CSV files made from one value function each ---- */

typedef struct {
    const char *header; /* "t,a,b" */
    size_t n;
    double step;
    double (*value)(size_t column, size_t i); /* NaN is written NA */
} input_spec;

static double v_full(size_t c, size_t i)
{
    return c == 0 ? (double)(i % 3) + 0.1 * (double)i + sin((double)i)
                  : (double)(i % 5) * 0.7 + cos(2.0 * (double)i);
}
static double v_gap(size_t c, size_t i) /* a: every other sample missing */
{
    return c == 0 ? (i % 2 ? NAN : (double)(i % 3) + 1) : 0.5 * (double)i + (double)(i % 3);
}
static double v_hole(size_t c, size_t i) /* h: a long gap; none: nothing */
{
    return c == 0 && (i < 5 || i >= 30) ? (double)(i % 4) + 0.1 * (double)i : NAN;
}
static double v_grow(size_t c, size_t i) /* g: explosive, line: straight, one: one sample */
{
    return c == 0 ? pow(1.1, (double)i) : c == 1 ? 2.0 * (double)i + 1 : i == 3 ? 5 : NAN;
}
static double v_long(size_t c, size_t i)
{
    return 5 + (0.2 + (double)i / 100.0) * sin(1.7 * (double)i + (double)c) + cos(0.37 * (double)i);
}
static double v_ramp(size_t c, size_t i) /* a control: b with every other sample missing */
{
    return c == 0 ? (double)(i % 3) + 0.1 * (double)i : i % 2 ? NAN : 0.3 * (double)i;
}
static double v_steep(size_t c, size_t i) /* s0..s5 rise steeply: a lagging fit leaks */
{
    return (c < 6 ? 0.05 * (double)i : 0.0) + sin(1.3 * (double)i + (double)c);
}
static double v_flat(size_t c, size_t i)
{
    (void)i;
    return 3.0 + (double)c;
}

enum { IN_NONE, IN_FULL, IN_GAP, IN_HOLE, IN_GROW, IN_LONG, IN_SMALL, IN_STEEP,
       CTL_GAP, CTL_ONLY_A, CTL_SHORT, CTL_STEP, CTL_FLAT };
static const input_spec inputs[] = {
    [IN_FULL] = {"t,a,b", 20, 1, v_full},
    [IN_GAP] = {"t,a,b", 20, 1, v_gap},
    [IN_HOLE] = {"t,h,none", 40, 1, v_hole},
    [IN_GROW] = {"t,g,line,one", 40, 1, v_grow},
    [IN_LONG] = {"t,rising,steady", 200, 1, v_long},
    [IN_SMALL] = {"t,a,b", 10, 1, v_full},
    [IN_STEEP] = {"t,s0,s1,s2,s3,s4,s5,s6,s7", 400, 1, v_steep},
    [CTL_GAP] = {"t,a,b", 20, 1, v_ramp},
    [CTL_ONLY_A] = {"t,a", 20, 1, v_ramp},
    [CTL_SHORT] = {"t,a,b", 12, 1, v_full},
    [CTL_STEP] = {"t,a,b", 30, 2, v_full},
    [CTL_FLAT] = {"t,a,b", 30, 1, v_flat},
};

static int write_input(const char *path, int which)
{
    const input_spec *s = &inputs[which];
    size_t count = 0;
    for (const char *p = s->header; *p; p++)
        count += *p == ',';
    double *x = malloc(count * s->n * sizeof *x);
    if (!x)
        return -1;
    for (size_t c = 0; c < count; c++)
        for (size_t i = 0; i < s->n; i++)
            x[c * s->n + i] = s->value(c, i);
    int st = check_write_table_csv(path, s->header, count, s->n, s->step, x);
    free(x);
    return st;
}

/* ---- cases: the options once, as the command line and as a screen_config ---- */

typedef struct {
    const char *label;
    int input, control;
    const char *command; /* NULL: screen */
    const char *vars, *window, *bandwidth, *detrend, *detrends, *indicators, *band, *null_name;
    double deseason; /* 0: not given */
    const char *deseason_window;
    int harmonics, iaaft_iterations;
    size_t block_length;
    long surrogates;
} message_case;

static const message_case cases[] = {
    {.label = "window longer than the span", .input = IN_SMALL, .window = "20"},
    {.label = "window of too few samples", .input = IN_FULL, .window = "1"},
    {.label = "bandwidth longer than the span", .input = IN_SMALL, .bandwidth = "30"},
    {.label = "deseason window longer than the span", .input = IN_SMALL, .deseason = 2,
     .deseason_window = "10"},
    {.label = "deseason window under two periods", .input = IN_SMALL, .deseason = 2,
     .deseason_window = "3"},
    {.label = "period of one step", .input = IN_SMALL, .deseason = 1},
    {.label = "default harmonics above Nyquist", .input = IN_SMALL, .deseason = 2.5},
    {.label = "harmonics at Nyquist", .input = IN_SMALL, .deseason = 4, .harmonics = 2},
    {.label = "a phase without samples", .input = IN_GAP, .deseason = 2},
    {.label = "a window too thin for the harmonics", .input = IN_HOLE, .vars = "h", .deseason = 4,
     .harmonics = 1, .deseason_window = "20"},
    {.label = "polynomial degree too high", .input = IN_SMALL, .detrend = "poly:12"},
    {.label = "robustness spells its --detrends", .input = IN_SMALL, .command = "robustness",
     .detrends = "poly:12"},
    {.label = "window too short for dfa", .input = IN_LONG, .indicators = "lag1,dfa",
     .window = "10%"},
    {.label = "band above Nyquist", .input = IN_LONG, .indicators = "spectral_exponent",
     .band = "0.1:0.7"},
    {.label = "band of one frequency", .input = IN_LONG, .indicators = "spectral_exponent",
     .band = "0.2:0.21"},
    {.label = "blocks longer than half", .input = IN_FULL, .null_name = "block",
     .block_length = 15, .surrogates = 19},
    {.label = "explosive AR(1) null", .input = IN_GROW, .vars = "g", .detrend = "none",
     .null_name = "ar1", .surrogates = 19},
    {.label = "control without the series", .input = IN_FULL, .control = CTL_ONLY_A,
     .surrogates = 19},
    {.label = "control too short", .input = IN_FULL, .control = CTL_SHORT, .surrogates = 19},
    {.label = "control on another step", .input = IN_FULL, .control = CTL_STEP, .surrogates = 19},
    {.label = "control without variation", .input = IN_FULL, .control = CTL_FLAT,
     .surrogates = 19},
    {.label = "control refused by its own deseasoning", .input = IN_FULL, .control = CTL_GAP,
     .deseason = 2, .surrogates = 19},
    {.label = "constant, flat residual", .input = IN_GROW, .vars = "line,one",
     .detrend = "linear"},
    {.label = "no finite samples; insufficient tests", .input = IN_HOLE, .vars = "none"},
    {.label = "leaking residuals one by one", .input = IN_STEEP, .vars = "s0,s1,s7",
     .detrend = "gaussian", .surrogates = 19},
    {.label = "leaking residuals summed up", .input = IN_STEEP, .detrend = "gaussian",
     .surrogates = 19},
    {.label = "iaaft not converged", .input = IN_GROW, .vars = "g", .null_name = "iaaft",
     .iaaft_iterations = 1, .surrogates = 19},
};

static screen_length parse_length(const char *text)
{
    char *end;
    double v = strtod(text, &end);
    return (screen_length){.amount = v, .percent = *end == '%'};
}

static void configure_indicators(screen_config *cfg, const char *list)
{
    char copy[128];
    snprintf(copy, sizeof copy, "%s", list);
    cfg->nindicators = 0;
    cfg->drift_test = 0;
    for (char *name = strtok(copy, ","); name; name = strtok(NULL, ",")) {
        indicator_kind kind;
        if (strcmp(name, "recovery_trend") == 0)
            cfg->drift_test = 1;
        else if (slowscan_indicator_lookup(name, &kind) == SLOWSCAN_OK)
            cfg->indicators[cfg->nindicators++] = kind;
    }
}

/* The case's settings as a config, and as the message context's option values. */
static void configure(const message_case *c, screen_config *cfg, const char **names,
                      const char **values)
{
    *cfg = slowscan_screen_config_default();
    cfg->surrogates = (size_t)c->surrogates;
    if (c->window)
        cfg->window = parse_length(values[SCREEN_OPTION_WINDOW] = c->window);
    if (c->bandwidth)
        cfg->bandwidth = parse_length(values[SCREEN_OPTION_BANDWIDTH] = c->bandwidth);
    if (c->deseason_window)
        cfg->deseason_window =
            parse_length(values[SCREEN_OPTION_DESEASON_WINDOW] = c->deseason_window);
    if (c->deseason > 0)
        cfg->deseason = c->deseason;
    cfg->harmonics = c->harmonics;
    const char *detrend = c->detrends ? c->detrends : c->detrend;
    if (detrend)
        slowscan_detrend_parse_method(values[SCREEN_OPTION_DETREND] = detrend, &cfg->detrend);
    if (c->detrends)
        names[SCREEN_OPTION_DETREND] = "--detrends";
    if (c->indicators)
        configure_indicators(cfg, c->indicators);
    if (c->band && sscanf(values[SCREEN_OPTION_BAND] = c->band, "%lf:%lf", &cfg->band_lo,
                          &cfg->band_hi) != 2)
        cfg->band_lo = cfg->band_hi = 0;
    if (c->null_name)
        slowscan_surrogate_lookup(c->null_name, &cfg->null_kind);
    if (c->control)
        cfg->null_name = "control";
    if (c->iaaft_iterations)
        cfg->null_options.iaaft_max_iterations = c->iaaft_iterations;
    if (c->block_length)
        cfg->null_options.block_length = c->block_length;
}

static void append(char *buf, size_t size, const char *fmt, const char *text)
{
    size_t used = strlen(buf);
    snprintf(buf + used, size - used, fmt, text);
}

static void command_line(const message_case *c, const char *in, const char *ctl, const char *out,
                         char *cmd, size_t size)
{
    snprintf(cmd, size, "%s %s --surrogates %ld", check_binary(),
             c->command ? c->command : "screen", c->surrogates);
    const struct {
        const char *option, *value;
    } given[] = {{"--vars", c->vars}, {"--window", c->window}, {"--bandwidth", c->bandwidth},
                 {"--detrend", c->detrend}, {"--detrends", c->detrends},
                 {"--indicators", c->indicators}, {"--band", c->band}, {"--null", c->null_name},
                 {"--deseason-window", c->deseason_window}};
    for (size_t j = 0; j < sizeof given / sizeof given[0]; j++)
        if (given[j].value) {
            append(cmd, size, " %s", given[j].option);
            append(cmd, size, " %s", given[j].value);
        }
    char number[64];
    if (c->deseason > 0 && snprintf(number, sizeof number, "%g", c->deseason) > 0)
        append(cmd, size, " --deseason %s", number);
    if (c->harmonics && snprintf(number, sizeof number, "%d", c->harmonics) > 0)
        append(cmd, size, " --harmonics %s", number);
    if (c->iaaft_iterations && snprintf(number, sizeof number, "%d", c->iaaft_iterations) > 0)
        append(cmd, size, " --iaaft-iterations %s", number);
    if (c->block_length && snprintf(number, sizeof number, "%zu", c->block_length) > 0)
        append(cmd, size, " --block-length %s", number);
    if (ctl)
        append(cmd, size, " --null control --control %s", ctl);
    append(cmd, size, " -o %s", out);
    append(cmd, size, " %s", in);
}

/* Appends "slowscan: [warning: ]TEXT\n" to the expected standard error. */
static void expect_line(char *expected, size_t size, int warning, const char *text)
{
    append(expected, size, "slowscan: %s", warning ? "warning: " : "");
    append(expected, size, "%s\n", text);
}

static const double *control_values(const series_table *ctl, const char *name)
{
    for (size_t k = 0; ctl && k < ctl->nseries; k++)
        if (strcmp(ctl->names[k], name) == 0)
            return ctl->values[k];
    return NULL;
}

/* What the command prints for the case, from the library: each series' warnings, then its
 * refusal (the run ends) or its insufficient tests, in input order. Returns 1 if refused. */
static int library_messages(const series_table *t, const series_table *ctl, const char *in_path,
                            const char *ctl_path, const screen_config *cfg,
                            const char *const *names, const char *const *values,
                            char *expected, size_t size)
{
    screen_workspace *ws = slowscan_screen_workspace_alloc(1);
    int refused = 0;
    char text[2048];
    for (size_t k = 0; ws && k < t->nseries && !refused; k++) {
        screen_input control = {.name = t->names[k], .source = ctl_path, .time_name = ctl ? ctl->time_name : NULL, .time = ctl ? ctl->time : NULL, .values = control_values(ctl, t->names[k]), .n = ctl ? ctl->n : 0, .control = NULL};
        screen_input in = {.name = t->names[k], .source = in_path, .time_name = t->time_name, .time = t->time, .values = t->values[k], .n = t->n, .control = ctl ? &control : NULL};
        screen_result r;
        screen_detail d;
        int st = slowscan_screen_series(ws, cfg, &in, &r, &d);
        message_context ctx = {in_path, t->names[k], ctl_path, cfg, names, values};
        for (size_t w = 0; w < r.nwarnings; w++) {
            slowscan_message_warning(text, sizeof text, &r.warnings[w], &ctx);
            expect_line(expected, size, 1, text);
        }
        if ((refused = st != SLOWSCAN_OK)) {
            slowscan_message_refusal(text, sizeof text, &d, &ctx);
            expect_line(expected, size, 0, text);
        }
        for (size_t j = 0; !refused && j < r.ntests; j++)
            if (isnan(r.tests[j].statistic) && !r.variation) {
                slowscan_message_insufficient(text, sizeof text, &r.tests[j], &ctx);
                expect_line(expected, size, 1, text);
            }
    }
    slowscan_screen_workspace_free(ws);
    return refused;
}

enum { NAMED_LEAKS = 3 }; /* the command names this many leaking series, then sums up */

/* The run's closing trend-leakage warnings (a command that finished only). */
static void library_leakage(const series_table *t, const screen_config *cfg, const char *in_path,
                            const char *const *values, char *expected, size_t size)
{
    screen_workspace *ws = slowscan_screen_workspace_alloc(1);
    const char *first[NAMED_LEAKS];
    detrend_leakage leaks[NAMED_LEAKS];
    size_t count = 0, tested = 0;
    for (size_t k = 0; ws && k < t->nseries; k++) {
        screen_input in = {.name = t->names[k], .source = in_path, .time_name = t->time_name, .time = t->time, .values = t->values[k], .n = t->n, .control = NULL};
        screen_result r;
        screen_detail d;
        if (slowscan_screen_series(ws, cfg, &in, &r, &d) != SLOWSCAN_OK)
            continue;
        tested += r.leakage_tested != 0;
        if (r.leakage_tested && r.leakage.leaking && count++ < NAMED_LEAKS) {
            first[count - 1] = t->names[k];
            leaks[count - 1] = r.leakage;
        }
    }
    slowscan_screen_workspace_free(ws);
    char text[2048];
    message_context ctx = {in_path, NULL, NULL, cfg, NULL, values};
    if (count > NAMED_LEAKS) {
        slowscan_message_leakage_summary(text, sizeof text, count, tested, first, NAMED_LEAKS,
                                         &ctx);
        expect_line(expected, size, 1, text);
    }
    for (size_t k = 0; count <= NAMED_LEAKS && k < count; k++) {
        ctx.series = first[k];
        slowscan_message_leakage(text, sizeof text, &leaks[k], &ctx);
        expect_line(expected, size, 1, text);
    }
}

static void run_case(const message_case *c)
{
    const char *in_path = check_tmp_path("messages-in.csv");
    const char *ctl_path = c->control ? check_tmp_path("messages-control.csv") : NULL;
    const char *out_path = check_tmp_path("messages-out.csv");
    if (write_input(in_path, c->input) != 0 || (ctl_path && write_input(ctl_path, c->control))) {
        CHECK(0, "%s: cannot write the input", c->label);
        return;
    }
    char cmd[2048], *err = NULL;
    command_line(c, in_path, ctl_path, out_path, cmd, sizeof cmd);
    int rc = check_run(cmd, NULL, &err);

    const char *names[SCREEN_OPTION_COUNT] = {0}, *values[SCREEN_OPTION_COUNT] = {0};
    screen_config cfg;
    configure(c, &cfg, names, values);
    csv_read_options ro = slowscan_csv_read_options_default();
    ro.vars = c->vars;
    series_table t, ctl;
    io_error io;
    int have_ctl = ctl_path && slowscan_csv_read_table(ctl_path, &ro, &ctl, &io) == SLOWSCAN_OK;
    if (slowscan_csv_read_table(in_path, &ro, &t, &io) != SLOWSCAN_OK) {
        CHECK(0, "%s: library cannot read the input: %s", c->label, io.message);
        free(err);
        return;
    }
    char expected[8192] = "";
    int refused = library_messages(&t, have_ctl ? &ctl : NULL, in_path, ctl_path, &cfg, names,
                                   values, expected, sizeof expected);
    if (!refused)
        library_leakage(&t, &cfg, in_path, values, expected, sizeof expected);
    /* the command's wording is the reference (module comment) */
    CHECK(rc == (refused ? 1 : 0), "%s: exit %d, library %s", c->label, rc,
          refused ? "refuses" : "accepts");
    CHECK(err && expected[0] && strcmp(err, expected) == 0,
          "%s:\n  command: %s  library: %s", c->label, err ? err : "(none)\n", expected);
    slowscan_series_table_free(&t);
    if (have_ctl)
        slowscan_series_table_free(&ctl);
    free(err);
}

/* `detrend` warns of series left without a trend in the library's words: the binary's
 * standard error equals the texts of what slowscan_screen_prepare reports. */
static void detrended(int input, const char *vars, const char *method)
{
    const char *in_path = check_tmp_path("messages-detrend.csv");
    char cmd[1024], *err = NULL, expected[2048] = "", text[512];
    if (write_input(in_path, input) != 0)
        return;
    snprintf(cmd, sizeof cmd, "%s detrend --vars %s --detrend %s %s", check_binary(), vars,
             method, in_path);
    int rc = check_run(cmd, NULL, &err);
    screen_config cfg = slowscan_screen_config_default();
    slowscan_detrend_parse_method(method, &cfg.detrend);
    csv_read_options ro = slowscan_csv_read_options_default();
    ro.vars = vars;
    series_table t;
    io_error io;
    if (slowscan_csv_read_table(in_path, &ro, &t, &io) != SLOWSCAN_OK) {
        CHECK(0, "detrend %s: %s", vars, io.message);
        free(err);
        return;
    }
    for (size_t k = 0; k < t.nseries; k++) {
        screen_input in = {.name = t.names[k], .source = in_path, .time_name = t.time_name, .time = t.time, .values = t.values[k], .n = t.n, .control = NULL};
        screen_prepared ps;
        screen_detail d;
        message_context ctx = {in_path, t.names[k], NULL, &cfg, NULL, NULL};
        if (slowscan_screen_prepare(&cfg, &in, &ps, &d) == SLOWSCAN_OK &&
            slowscan_message_detrended(text, sizeof text, &ps, &ctx) > 0)
            expect_line(expected, sizeof expected, 1, text);
        slowscan_screen_prepared_free(&ps);
    }
    /* the command's wording is the reference (module comment) */
    CHECK(rc == 0 && err && expected[0] && strcmp(err, expected) == 0,
          "detrend --vars %s:\n  command: %s  library: %s", vars, err ? err : "(none)\n", expected);
    slowscan_series_table_free(&t);
    free(err);
}

/* ---- rules the binary cannot reach, and the writers' contract ---- */

static void check_refusal(const screen_detail *d, const message_context *ctx, const char *want)
{
    char got[512];
    size_t len = slowscan_message_refusal(got, sizeof got, d, ctx);
    CHECK(strcmp(got, want) == 0 && len == strlen(want), "rule %d: got '%s', want '%s'",
          (int)d->rule, got, want);
}

/* The command's words before the move (cli/screen_messages.c at eca1cf2) for rules that only a
 * failed allocation, plan or numerical routine reaches. */
static void unreachable_rules(void)
{
    message_context ctx = slowscan_message_context_default();
    ctx.source = "f.csv";
    ctx.series = "a";
    const struct {
        screen_detail detail;
        const char *want;
    } rules[] = {
        {{.rule = SCREEN_RULE_DESEASON_FAILED, .status = SLOWSCAN_ENUMERIC},
         "f.csv: column 'a': deseasoning failed: numerical failure"},
        {{.rule = SCREEN_RULE_DETREND_FAILED, .status = SLOWSCAN_ENUMERIC},
         "f.csv: column 'a': detrending (--detrend gaussian-linear) failed: numerical failure"},
        {{.rule = SCREEN_RULE_PLAN_FAILED, .status = SLOWSCAN_ENOMEM},
         "f.csv: column 'a': spectral plan failed: out of memory"},
        {{.rule = SCREEN_RULE_ROLLING_FAILED, .status = SLOWSCAN_ENUMERIC},
         "f.csv: column 'a': rolling indicators failed: numerical failure"},
        {{.rule = SCREEN_RULE_NULL_FAILED, .status = SLOWSCAN_ENUMERIC},
         "f.csv: column 'a': surrogate null failed: numerical failure"},
        {{.rule = SCREEN_RULE_WINDOW_LONGER, .status = SLOWSCAN_EINVAL, .count = 30, .need = 20},
         "f.csv: option --window 50%: the window (30 samples) is longer than the series (20 "
         "samples)"},
        {{.rule = SCREEN_RULE_NO_MEMORY, .status = SLOWSCAN_ENOMEM}, "out of memory"},
        {{.rule = SCREEN_RULE_NONE}, "out of memory"},
        {{.rule = SCREEN_RULE_CONTROL_FLAT, .status = SLOWSCAN_ECONST},
         "option --control: series 'a' has no usable variation"},
    };
    for (size_t j = 0; j < sizeof rules / sizeof rules[0]; j++)
        check_refusal(&rules[j].detail, &ctx, rules[j].want);
    /* a batch stopped by a status and no rule says the status */
    check_refusal(&(screen_detail){.rule = SCREEN_RULE_NONE, .status = SLOWSCAN_EIO}, &ctx,
                  "input/output failure");

    char got[256];
    screen_warning none = {SCREEN_WARN_NO_SURROGATES, 0, 99, SLOWSCAN_ESHORT};
    slowscan_message_warning(got, sizeof got, &none, &ctx);
    CHECK(strcmp(got, "f.csv: column 'a': no surrogates can be made (too few finite samples); "
                      "its p-values are NA") == 0, "no-surrogates warning: %s", got);
    /* cli_screen_reason at eca1cf2 */
    const char *reasons[] = {"the series has no variation", "the series has no variation",
                             "fewer than 8 finite indicator values", "the indicator does not vary",
                             "fewer than 8 adjacent pairs", "no AR(1) drift fit",
                             "no surrogates can be made", "out of memory"};
    for (int r = SCREEN_REASON_NONE; r <= SCREEN_REASON_NO_MEMORY; r++)
        CHECK(strcmp(slowscan_message_reason((screen_reason)r), reasons[r]) == 0, "reason %d: %s",
              r, slowscan_message_reason((screen_reason)r));
}

/* snprintf's contract: at most size bytes, NUL-terminated, the whole length returned. */
static void truncation(void)
{
    message_context ctx = slowscan_message_context_default();
    ctx.source = "some/long/path/input.csv";
    ctx.series = "temperature";
    screen_detail d = {.rule = SCREEN_RULE_BLOCK_LENGTH, .status = SLOWSCAN_EINVAL, .count = 80,
                       .need = 100};
    char full[512], small[16];
    size_t len = slowscan_message_refusal(full, sizeof full, &d, &ctx);
    CHECK(len == strlen(full) && len > sizeof small, "full text of %zu characters", len);
    memset(small, 'x', sizeof small);
    size_t cut = slowscan_message_refusal(small, sizeof small, &d, &ctx);
    CHECK(cut == len && small[sizeof small - 1] == 0 && strlen(small) == sizeof small - 1 &&
          strncmp(small, full, sizeof small - 1) == 0, "cut to %zu bytes: '%s', length %zu",
          sizeof small, small, cut);
    CHECK(slowscan_message_refusal(NULL, 0, &d, &ctx) == len, "length query with no buffer");
    char one[1] = {'x'};
    CHECK(slowscan_message_refusal(one, 1, &d, &ctx) == len && one[0] == 0, "one byte: empty");
    char warn[8];
    screen_warning w = {SCREEN_WARN_NO_PATHS, 0, 10, SCREEN_CONSTANT};
    size_t wlen = slowscan_message_warning(warn, sizeof warn, &w, &ctx);
    CHECK(wlen == strlen("some/long/path/input.csv: column 'temperature' is constant; its "
                         "indicators are NA") && strcmp(warn, "some/lo") == 0,
          "warning cut: '%s', length %zu", warn, wlen);
}

/* Out-of-range enum values give a sentence, not a crash or an empty text. */
static void unknown_values(void)
{
    message_context ctx = {.source = "f.csv", .series = "a"};
    char got[256];
    slowscan_message_refusal(got, sizeof got, &(screen_detail){.rule = (screen_rule)999,
                                                               .status = SLOWSCAN_EINVAL}, &ctx);
    CHECK(strstr(got, "f.csv: column 'a'") && strstr(got, "999") && strstr(got, "invalid argument"),
          "unknown rule: %s", got);
    slowscan_message_refusal(got, sizeof got, &(screen_detail){.rule = SCREEN_RULE_NONE,
                                                               .status = 77}, &ctx);
    CHECK(strcmp(got, "unknown status") == 0, "unknown status: %s", got);
    slowscan_message_warning(got, sizeof got, &(screen_warning){(screen_warning_kind)42, 0, 0, 0},
                             &ctx);
    CHECK(strstr(got, "f.csv: column 'a'") && strstr(got, "42"), "unknown warning: %s", got);
    CHECK(strcmp(slowscan_message_reason((screen_reason)-3), "no statistic for an unknown reason") == 0,
          "unknown reason");
    slowscan_message_insufficient(got, sizeof got, &(screen_test){.kind = 1000}, &ctx);
    CHECK(strstr(got, "unknown kind") && strstr(got, "flagged insufficient"), "unknown test: %s",
          got);
    CHECK(strcmp(slowscan_message_option_name((screen_option)-1), "") == 0 &&
          strcmp(slowscan_message_option_name(SCREEN_OPTION_COUNT), "") == 0 &&
          strcmp(slowscan_message_option_name(SCREEN_OPTION_BLOCK_LENGTH), "--block-length") == 0,
          "option names in and out of range");
    screen_detail window = {.rule = SCREEN_RULE_WINDOW_INDICATOR, .indicator = -5, .count = 4,
                            .need = 9};
    slowscan_message_refusal(got, sizeof got, &window, &ctx);
    CHECK(strcmp(got, "f.csv: option --window 50% gives 4 samples per window; its indicator needs "
                      "at least 9") == 0, "unknown indicator: %s", got);
}

/* No context at all, and another front end's spellings: the values come from the config. */
static void other_callers(void)
{
    char got[256];
    screen_detail few = {.rule = SCREEN_RULE_WINDOW_TOO_FEW, .status = SLOWSCAN_EINVAL, .count = 2};
    slowscan_message_refusal(got, sizeof got, &few, NULL);
    CHECK(strcmp(got, "option --window 50% gives 2 samples per window; at least 3 are needed") == 0,
          "no context: %s", got);
    screen_config cfg = slowscan_screen_config_default();
    cfg.window = (screen_length){.amount = 12.5, .percent = 0};
    cfg.detrend = (detrend_spec){DETREND_POLY, 0, 4};
    const char *names[SCREEN_OPTION_COUNT] = {[SCREEN_OPTION_WINDOW] = "window=",
                                              [SCREEN_OPTION_DETREND] = "detrend="};
    message_context ctx = {"frame", "x", NULL, &cfg, names, NULL};
    slowscan_message_refusal(got, sizeof got, &few, &ctx);
    CHECK(strcmp(got, "frame: option window= 12.5 gives 2 samples per window; at least 3 are "
                      "needed") == 0, "a binding's spelling: %s", got);
    screen_detail degree = {.rule = SCREEN_RULE_DETREND_DEGREE, .status = SLOWSCAN_EINVAL,
                            .count = 3};
    slowscan_message_refusal(got, sizeof got, &degree, &ctx);
    CHECK(strcmp(got, "frame: column 'x': option detrend= poly:4: the degree is too high for 3 "
                      "finite samples") == 0, "degree from the config: %s", got);
    const char *first[] = {"x", "y"};
    slowscan_message_leakage_summary(got, sizeof got, 2, 5, first, 2, &ctx);
    CHECK(strstr(got, "2 of 5 series keep part of their trend") && strstr(got, "(poly:4 residual") &&
              strstr(got, "the first 'x', 'y' (--json lists each)") &&
              strstr(got, "another detrend= may follow"), "leakage summary: %s", got);
}

void suite_messages(void)
{
    for (size_t j = 0; j < sizeof cases / sizeof cases[0]; j++)
        run_case(&cases[j]);
    detrended(IN_GROW, "line,one", "linear"); /* a round-off residual; one sample: constant */
    detrended(IN_HOLE, "none", "gaussian-linear");
    unreachable_rules();
    truncation();
    unknown_values();
    other_callers();
}
