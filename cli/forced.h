/* The options feedback, timescales and emulate share, where they mean the same (one row each
 * in options.c's table, one field each here): the columns, the initial period left out, and
 * the baseline (control) run the anomalies are taken against (forced_inputs.c). */
#ifndef SLOWSCAN_CLI_FORCED_H
#define SLOWSCAN_CLI_FORCED_H

#include "slowscan/feedback.h"

/* A length option as parsed by cli_parse_length: N% of the span, time units, or N with a
 * calendar unit; handed to the library's requests (cli_forced_request), which measure it on
 * a run's axis. */
typedef struct {
    double amount;
    int percent;
    int unit;         /* length_unit */
    const char *text; /* as written; NULL: not given */
} cli_forced_length;

typedef struct {
    const char *flux, *response; /* --flux COL, --response COL */
    cli_forced_length skip;      /* --skip LEN: the initial period left out of the fit */
    const char *baseline;        /* --baseline FILE */
    feedback_baseline_mode baseline_mode; /* --baseline-mode mean|drift */
    int baseline_mode_given;
    double baseline_offset;      /* --baseline-offset T; NaN: not given */
    int annual;                  /* --annual */
} cli_forced_options;

#endif
