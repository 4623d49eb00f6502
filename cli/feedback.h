/* slowscan feedback: its option values (cli_options.feedback) and the pieces of the command
 * shared between cli/cmd_feedback.c, cli/feedback_options.c and cli/feedback_inputs.c. */
#ifndef SLOWSCAN_CLI_FEEDBACK_H
#define SLOWSCAN_CLI_FEEDBACK_H

#include "forced.h"
#include "slowscan/feedback.h"
#include "slowscan/io.h"

typedef cli_forced_length cli_feedback_length;

typedef struct {
    /* --flux, --response, --skip, --baseline*, --annual: cli_options.forced (forced.h) */
    cli_feedback_length stride;    /* --stride LEN (default: a tenth of the window) */
    feedback_fit_kind fit;         /* --fit ols|tls */
    double noise_ratio;            /* --noise-ratio R; NaN: not given */
    const char *span_text;         /* --fit-span A:B as written; NULL: windows */
    char span_from[64], span_until[64];
    double scale;                  /* --scale S (1) */
    int area_mean;                 /* --area-mean */
} cli_feedback_options;

#endif
