/* slowscan feedback: its option values (cli_options.feedback) and the pieces of the command
 * shared between cli/cmd_feedback.c, cli/feedback_options.c and cli/feedback_inputs.c. */
#ifndef SLOWSCAN_CLI_FEEDBACK_H
#define SLOWSCAN_CLI_FEEDBACK_H

#include "slowscan/feedback.h"
#include "slowscan/io.h"


typedef struct {
    double amount;
    int percent;
    int unit;         /* length_unit */
    const char *text; /* as written; NULL: not given */
} cli_feedback_length;

typedef struct {
    const char *flux, *response;   /* --flux COL, --response COL */
    cli_feedback_length stride;    /* --stride LEN (default: a tenth of the window) */
    cli_feedback_length skip;      /* --skip LEN */
    feedback_fit_kind fit;         /* --fit ols|tls */
    double noise_ratio;            /* --noise-ratio R; NaN: not given */
    const char *span_text;         /* --fit-span A:B as written; NULL: windows */
    char span_from[64], span_until[64];
    double scale;                  /* --scale S (1) */
    const char *baseline;          /* --baseline FILE */
    feedback_baseline_mode baseline_mode; /* --baseline-mode mean|drift */
    int baseline_mode_given;
    double baseline_offset;        /* --baseline-offset T; NaN: not given */
    int annual;                    /* --annual */
    int area_mean;                 /* --area-mean */
} cli_feedback_options;

#endif
