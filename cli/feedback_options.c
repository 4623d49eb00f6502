/* The options of `slowscan feedback`: one setter for the command's own rows of the option
 * table (options.c), its defaults, and the checks that need several options at once. */
#include "forced_inputs.h"

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
    if (!strcmp(n, "--stride"))
        rc = set_length(n, v, &f->stride);
    else if (!strcmp(n, "--fit")) {
        rc = cli_forced_choice(n, v, "ols", "tls", &choice);
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
    } else if (!strcmp(n, "--area-mean"))
        f->area_mean = 1;
    return rc;
}

/* The checks between options, once all are read. */
int cli_feedback_check(const cli_options *o)
{
    const cli_feedback_options *f = &o->feedback;
    const cli_forced_options *c = &o->forced;
    if (!c->flux || !c->response) {
        cli_error("feedback: option %s COLUMN is required (the %s)", c->flux ? "--response" : "--flux",
                  c->flux ? "response, e.g. surface temperature change" : "net flux, e.g. top-of-atmosphere imbalance");
        return EXIT_BAD_INPUT;
    }
    if (strcmp(c->flux, c->response) == 0) {
        cli_error("feedback: options --flux and --response name the same column '%s'", c->flux);
        return EXIT_BAD_INPUT;
    }
    if (f->fit == FEEDBACK_TLS && isnan(f->noise_ratio) && !c->baseline) {
        cli_error("option --fit tls needs --noise-ratio R (variance of the flux's noise over the "
                  "response's, in their units) or --baseline FILE to estimate it; a ratio of 1 "
                  "has no meaning between quantities in different units");
        return EXIT_BAD_INPUT;
    }
    if (!isnan(f->noise_ratio) && f->fit != FEEDBACK_TLS) {
        cli_error("option --noise-ratio applies to --fit tls only");
        return EXIT_BAD_INPUT;
    }
    if (f->span_text && (o->window.text || f->stride.text)) {
        cli_error("option --fit-span makes one fit over its span; it cannot be combined with %s",
                  o->window.text ? "--window" : "--stride");
        return EXIT_BAD_INPUT;
    }
    return EXIT_OK;
}
