/* The options of `slowscan feedback`: one setter for the command's own rows of the option
 * table (options.c), its defaults, and the checks that need several options at once. */
#include "cli.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

void cli_feedback_defaults(cli_options *o)
{
    cli_feedback_options *f = &o->feedback;
    memset(f, 0, sizeof *f);
    f->fit = FEEDBACK_OLS;
    f->noise_ratio = NAN;
    f->scale = 1;
    f->baseline_offset = NAN;
    f->baseline_mode = FEEDBACK_BASELINE_MEAN;
    /* feedback's default window (100 time units or 50%, the shorter) is its own: not given */
    o->window.text = NULL;
}

static int set_length(const char *n, const char *v, cli_feedback_length *len)
{
    cli_length l;
    int rc = cli_parse_length(n, v, &l);
    *len = (cli_feedback_length){l.amount, l.percent, (int)l.unit, v};
    return rc;
}

static int set_choice(const char *n, const char *v, const char *a, const char *b, int *out)
{
    if (strcmp(v, a) != 0 && strcmp(v, b) != 0) {
        cli_error("option %s: '%s' is neither '%s' nor '%s'", n, v, a, b);
        return EXIT_BAD_INPUT;
    }
    *out = strcmp(v, b) == 0;
    return EXIT_OK;
}

/* A:B, two times of the input's axis (numbers, or dates on a dated axis: read per input). */
static int set_span(cli_feedback_options *f, const char *n, const char *v)
{
    const char *colon = strchr(v, ':');
    size_t a = colon ? (size_t)(colon - v) : 0;
    if (!colon || a == 0 || a >= sizeof f->span_from || strlen(colon + 1) == 0 ||
        strlen(colon + 1) >= sizeof f->span_until) {
        cli_error("option %s: '%s' is not A:B (the first and last time of the fit)", n, v);
        return EXIT_BAD_INPUT;
    }
    memcpy(f->span_from, v, a);
    f->span_from[a] = '\0';
    strcpy(f->span_until, colon + 1);
    f->span_text = v;
    return EXIT_OK;
}

int cli_feedback_set(cli_options *o, const char *n, const char *v)
{
    cli_feedback_options *f = &o->feedback;
    int choice = 0, rc = EXIT_OK;
    if (!strcmp(n, "--flux"))
        f->flux = v;
    else if (!strcmp(n, "--response"))
        f->response = v;
    else if (!strcmp(n, "--stride"))
        rc = set_length(n, v, &f->stride);
    else if (!strcmp(n, "--skip"))
        rc = set_length(n, v, &f->skip);
    else if (!strcmp(n, "--fit")) {
        rc = set_choice(n, v, "ols", "tls", &choice);
        f->fit = choice ? FEEDBACK_TLS : FEEDBACK_OLS;
    } else if (!strcmp(n, "--noise-ratio"))
        rc = cli_parse_positive(n, v, &f->noise_ratio);
    else if (!strcmp(n, "--fit-span"))
        rc = set_span(f, n, v);
    else if (!strcmp(n, "--scale")) {
        rc = cli_parse_number(n, v, &f->scale);
        if (rc == EXIT_OK && !(f->scale != 0 && isfinite(f->scale))) {
            cli_error("option %s: %s is not a finite non-zero factor", n, v);
            rc = EXIT_BAD_INPUT;
        }
    } else if (!strcmp(n, "--baseline"))
        f->baseline = v;
    else if (!strcmp(n, "--baseline-mode")) {
        rc = set_choice(n, v, "mean", "drift", &choice);
        f->baseline_mode = choice ? FEEDBACK_BASELINE_DRIFT : FEEDBACK_BASELINE_MEAN;
        f->baseline_mode_given = 1;
    } else if (!strcmp(n, "--baseline-offset"))
        rc = cli_parse_number(n, v, &f->baseline_offset);
    else if (!strcmp(n, "--annual"))
        f->annual = 1;
    else if (!strcmp(n, "--area-mean"))
        f->area_mean = 1;
    return rc;
}

/* The checks between options, once all are read. */
int cli_feedback_check(const cli_options *o)
{
    const cli_feedback_options *f = &o->feedback;
    if (!f->flux || !f->response) {
        cli_error("feedback: option %s COLUMN is required (the %s)", f->flux ? "--response" : "--flux",
                  f->flux ? "response, e.g. surface temperature change" : "net flux, e.g. top-of-atmosphere imbalance");
        return EXIT_BAD_INPUT;
    }
    if (strcmp(f->flux, f->response) == 0) {
        cli_error("feedback: options --flux and --response name the same column '%s'", f->flux);
        return EXIT_BAD_INPUT;
    }
    if (f->fit == FEEDBACK_TLS && isnan(f->noise_ratio) && !f->baseline) {
        cli_error("option --fit tls needs --noise-ratio R (variance of the flux's noise over the "
                  "response's, in their units) or --baseline FILE to estimate it; a ratio of 1 "
                  "has no meaning between quantities in different units");
        return EXIT_BAD_INPUT;
    }
    if (!isnan(f->noise_ratio) && f->fit != FEEDBACK_TLS) {
        cli_error("option --noise-ratio applies to --fit tls only");
        return EXIT_BAD_INPUT;
    }
    const char *needs_baseline = f->baseline_mode_given ? "--baseline-mode"
                               : !isnan(f->baseline_offset) ? "--baseline-offset" : NULL;
    if (needs_baseline && !f->baseline) {
        cli_error("option %s needs --baseline FILE (the control run)", needs_baseline);
        return EXIT_BAD_INPUT;
    }
    if (f->span_text && (o->window.text || f->stride.text)) {
        cli_error("option --fit-span makes one fit over its span; it cannot be combined with %s",
                  o->window.text ? "--window" : "--stride");
        return EXIT_BAD_INPUT;
    }
    return EXIT_OK;
}
