/* slowscan: command dispatch (cli_main), called by the program's main: cli/entry.c for the
 * plain binary, cli/mpi_main.c for slowscan-mpi. */
#include "cli.h"
#include "modes_cli.h"
#include "slowscan/version.h"

#include <fftw3.h>
#include <gsl/gsl_errno.h>
#include <stdlib.h>
#include <string.h>

static const struct {
    const char *name;
    int (*run)(const cli_options *opts);
} commands[] = {
    {"detrend", cmd_detrend},
    {"indicators", cmd_indicators},
    {"screen", cmd_screen},
    {"robustness", cmd_robustness},
    {"recovery", cmd_recovery},
    {"surrogates", cmd_surrogates},
    {"demo", cmd_demo},
    {"merge", cmd_merge},
    {"feedback", cmd_feedback},
    {"timescales", cmd_timescales},
    {"emulate", cmd_emulate},
};

int cli_main(int argc, char **argv)
{
    if (argc < 2) {
        cli_help(NULL, stderr);
        return EXIT_BAD_INPUT;
    }
    const char *name = argv[1];
    if (!strcmp(name, "--version") || !strcmp(name, "version")) {
        printf("slowscan %s\n", slowscan_version());
        return EXIT_OK;
    }
    if (!strcmp(name, "help") || !strcmp(name, "--help") || !strcmp(name, "-h"))
        return cli_help(argc > 2 ? argv[2] : NULL, stdout);
    /* Plans may later be made from several threads; FFTW's planner must be told once. */
    fftw_make_planner_thread_safe();
    /* GSL must report errors as status codes, not abort the process. */
    gsl_set_error_handler_off();
    cli_handle_stops();
    for (size_t c = 0; c < sizeof commands / sizeof commands[0]; c++) {
        if (strcmp(name, commands[c].name) != 0)
            continue;
        cli_options opts;
        int rc = cli_parse(name, argc, argv, 2, &opts);
        if (rc == EXIT_OK)
            rc = commands[c].run(&opts);
        /* The command has ended: its outputs are in place or removed and its message said.
         * A stop from now on (a launcher ending the processes of a run one of whose other
         * processes failed, after process 0 has said so) must not add a second line that
         * claims nothing was written. */
        cli_stops_quiet();
        cli_options_free(&opts);
        fftw_cleanup();
        return rc < 0 ? EXIT_OK : rc;
    }
    fprintf(stderr, "slowscan: unknown command '%s' (see 'slowscan help')\n", name);
    return EXIT_BAD_INPUT;
}
