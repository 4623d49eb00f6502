/* slowscan timescales and emulate: their option values (a sub-struct of cli_options), the
 * setters options.c's table points at, and the commands. */
#ifndef SLOWSCAN_CLI_MODES_H
#define SLOWSCAN_CLI_MODES_H

struct cli_options_s;

/* A series in another file: FILE:COL as given (split at the last colon). */
typedef struct {
    const char *text; /* NULL: not given */
    char file[4096];
    char column[256];
} cli_series_ref;

typedef struct {
    /* --response, --flux, --skip, --baseline*: cli_options.forced (forced.h) */
    long max_modes;              /* --max-modes K: 3 */
    int joint;                   /* --joint */
    double onset;                /* --onset T: time of the step; NaN: one step before the first sample */
    /* emulate */
    cli_series_ref step, forcing, compare, control;
    double step_forcing;         /* --step-forcing F; NaN: not given */
    double band_level;           /* --band-level: 0.99 */
    long persist;                /* --persist K; 0: the default rule */
    int empirical;               /* --empirical: the step run's own values, not its modes */
} cli_modes_options;

#endif
