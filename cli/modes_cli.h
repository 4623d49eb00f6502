/* slowscan timescales and emulate: setters of their options (modes_options.c, listed in
 * options.c's table) and the commands. */
#ifndef SLOWSCAN_CLI_MODES_CLI_H
#define SLOWSCAN_CLI_MODES_CLI_H

#include "cli.h"

void cli_modes_defaults(cli_options *o);
/* Checks between the options of timescales and emulate after the parse (exit code). */
int cli_modes_check(const cli_options *o);
int cli_set_joint(cli_options *o, const char *n, const char *v);
int cli_set_empirical(cli_options *o, const char *n, const char *v);
int cli_set_max_modes(cli_options *o, const char *n, const char *v);
int cli_set_persist(cli_options *o, const char *n, const char *v);
int cli_set_onset(cli_options *o, const char *n, const char *v);
int cli_set_step_forcing(cli_options *o, const char *n, const char *v);
int cli_set_band_level(cli_options *o, const char *n, const char *v);
int cli_set_step_run(cli_options *o, const char *n, const char *v);
int cli_set_forcing(cli_options *o, const char *n, const char *v);
int cli_set_compare(cli_options *o, const char *n, const char *v);
int cli_set_noise_run(cli_options *o, const char *n, const char *v);

/* help_modes.c */
void cli_help_timescales(FILE *out);
void cli_help_emulate(FILE *out);

int cmd_timescales(const cli_options *opts);
int cmd_emulate(const cli_options *opts);

#endif
