/* A run stopped by SIGTERM (a scheduler's time limit), SIGINT (Ctrl-C) or SIGHUP (a closed
 * terminal) leaves nothing behind: the handler removes every temporary output and figure
 * (slowscan_atomic_remove_temporaries, async-signal-safe), says so in one line and exits with
 * 128 + the signal number (DESIGN §4). Only async-signal-safe calls are made here. */
#include "cli.h"
#include "slowscan/io.h"

#include <signal.h>
#include <string.h>
#include <unistd.h>

/* A process of a shared run other than process 0 stops without a word (share.h). */
static volatile sig_atomic_t quiet;

void cli_stops_quiet(void)
{
    quiet = 1;
}

static void say(const char *text)
{
    if (quiet)
        return;
    ssize_t ignored = write(STDERR_FILENO, text, strlen(text));
    (void)ignored;
}

static const char *volatile stop_note;

void cli_stop_note(const char *note)
{
    stop_note = note;
}

static void on_stop(int sig)
{
    slowscan_atomic_remove_temporaries();
    if (cli_progress_line_standing())
        say("\n"); /* below the progress line, not on it */
    say(sig == SIGTERM  ? "slowscan: stopped by SIGTERM"
        : sig == SIGINT ? "slowscan: stopped by SIGINT"
                        : "slowscan: stopped by SIGHUP");
    say("; no output was written and its temporary files are removed");
    const char *note = stop_note;
    say(note ? note : "\n");
    _exit(128 + sig);
}

void cli_handle_stops(void)
{
    struct sigaction sa;
    memset(&sa, 0, sizeof sa);
    sa.sa_handler = on_stop;
    sigfillset(&sa.sa_mask); /* one stop at a time */
    const int stops[] = {SIGTERM, SIGINT, SIGHUP};
    for (size_t k = 0; k < sizeof stops / sizeof stops[0]; k++)
        sigaction(stops[k], &sa, NULL);
}
