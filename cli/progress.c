/* The progress line on stderr: series done of the run's total, their rate, the time left, and
 * inside a series still running the surrogates drawn (the library's progress callback). On a
 * terminal one line is rewritten in place a few times a second; elsewhere (a log file, a
 * pipe) each update is a line of its own, at most one every PROGRESS_LOG_EVERY seconds, so a
 * log stays readable. The clock is the monotonic one: a wall clock set back must not make a
 * rate negative. */
#include "cli.h"

#include <pthread.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/ioctl.h>
#include <time.h>
#include <unistd.h>

/* Seconds between updates: on a terminal (in place) and in a log (a line each). */
#define PROGRESS_TERMINAL_EVERY 0.2
#define PROGRESS_LOG_EVERY 2.0

/* Characters of the line now standing on the terminal without its newline (0: none): the
 * next message must clear it first. One stderr per process, so one value, and one lock: a
 * message may come from the thread reading the inputs while a worker shows the line. */
static size_t standing_width;
static pthread_mutex_t stderr_lock = PTHREAD_MUTEX_INITIALIZER;
/* standing_width != 0, as a stop's signal handler may read it */
static volatile sig_atomic_t line_standing;

static void set_standing(size_t width)
{
    standing_width = width;
    line_standing = width != 0;
}

int cli_progress_line_standing(void)
{
    return line_standing;
}

static double monotonic_seconds(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

void cli_progress_message_begin(void)
{
    pthread_mutex_lock(&stderr_lock);
    if (standing_width)
        fprintf(stderr, "\r%*s\r", (int)standing_width, "");
    set_standing(0);
}

void cli_progress_message_end(void)
{
    pthread_mutex_unlock(&stderr_lock);
}

void cli_progress_start(cli_progress *p, const cli_options *opts, size_t total)
{
    memset(p, 0, sizeof *p);
    p->enabled = opts->progress > 0;
    p->terminal = isatty(STDERR_FILENO);
    p->what = opts->command;
    p->total = total;
    p->start = p->last_shown = monotonic_seconds();
    p->every = p->terminal ? PROGRESS_TERMINAL_EVERY : PROGRESS_LOG_EVERY;
    /* A line wider than the terminal wraps, and a carriage return then goes back to the
     * start of its last row only: the line is cut to the width instead. */
    struct winsize size;
    p->columns = p->terminal && ioctl(STDERR_FILENO, TIOCGWINSZ, &size) == 0 && size.ws_col > 1
                     ? (size_t)size.ws_col - 1
                     : 0;
    /* The suites set SLOWSCAN_PROGRESS_EVERY (seconds) to see every update of a short run
     * (a test hook, not a user setting). */
    const char *every = getenv("SLOWSCAN_PROGRESS_EVERY");
    char *end;
    double v = every ? strtod(every, &end) : 0;
    if (every && *every && !*end && v >= 0)
        p->every = v;
}

/* "ETA 3 s", "ETA 4 min 10 s", "ETA 2 h 05 min". */
static void put_duration(char *buf, size_t size, const char *label, double seconds)
{
    long s = (long)(seconds + 0.5);
    if (s < 60)
        snprintf(buf, size, "%s %ld s", label, s);
    else if (s < 3600)
        snprintf(buf, size, "%s %ld min %ld s", label, s / 60, s % 60);
    else
        snprintf(buf, size, "%s %ld h %02ld min", label, s / 3600, s / 60 % 60);
}

/* Share of the run done: whole series, and the surrogates of the one still running. */
static double share_done(const cli_progress *p)
{
    double done = (double)p->done;
    if (p->surrogates_total > 0 && p->surrogates_index >= p->done)
        done += (double)p->surrogates_done / (double)p->surrogates_total;
    return p->total > 0 ? done / (double)p->total : 0;
}

static void show(cli_progress *p, double now)
{
    char line[256], rate[48] = "", eta[48] = "", inside[160] = "";
    double elapsed = now - p->start, share = share_done(p);
    int finished = p->done >= p->total;
    if (p->surrogates_total > 0 && p->surrogates_index >= p->done && !finished)
        snprintf(inside, sizeof inside, ", surrogates %zu/%zu of %s", p->surrogates_done,
                 p->surrogates_total, p->series);
    if (p->done > 0 && elapsed > 0)
        snprintf(rate, sizeof rate, ", %.3g series/s", (double)p->done / elapsed);
    if (finished)
        put_duration(eta, sizeof eta, ", took", elapsed);
    else if (share > 0)
        put_duration(eta, sizeof eta, ", ETA", elapsed * (1 - share) / share);
    /* the surrogates last: a line cut to the terminal keeps the rate and the time left */
    int width = snprintf(line, sizeof line, "%s: series %zu/%zu%s%s%s", p->what, p->done,
                         p->total, rate, eta, inside);
    size_t w = width < 0 ? 0 : (size_t)width < sizeof line ? (size_t)width : sizeof line - 1;
    if (p->columns && w > p->columns)
        line[w = p->columns] = 0;
    if (!p->terminal) {
        fprintf(stderr, "%s\n", line);
    } else {
        /* pad over what is left of a longer line before */
        fprintf(stderr, "\r%s%*s", line, standing_width > w ? (int)(standing_width - w) : 0, "");
        set_standing(w);
        if (finished) {
            fputc('\n', stderr);
            set_standing(0);
        }
    }
    fflush(stderr);
    p->last_shown = now;
}

/* Shows the line when its interval has passed since the last one (or the run is done). */
static void maybe_show(cli_progress *p)
{
    if (!p->enabled)
        return;
    double now = monotonic_seconds();
    if (p->done < p->total && now - p->last_shown < p->every)
        return;
    pthread_mutex_lock(&stderr_lock);
    show(p, now);
    pthread_mutex_unlock(&stderr_lock);
}

void cli_progress_series_done(cli_progress *p)
{
    p->done++;
    maybe_show(p);
}

void cli_progress_surrogates(cli_progress *p, const screen_progress *s)
{
    snprintf(p->series, sizeof p->series, "%s", s->series ? s->series : "");
    p->surrogates_index = s->index;
    p->surrogates_done = s->done;
    p->surrogates_total = s->total;
    maybe_show(p);
}
