/* screen --resume: every finished series is journaled beside the summary (FILE.journal, the
 * library's journal.h) with what the outputs need of it — its record for the summary, JSON
 * and maps, and its --rolling rows; figures are drawn again, deterministically. Run again
 * with the same command after a kill, the journaled series are given back to the outputs
 * and skipped, the rest computed: the outputs are those of an uninterrupted run. The journal
 * names its run by a hash of the version, the options that decide the numbers and the
 * inputs' bytes, so another run's journal is refused. */
#include "cli.h"
#include "slowscan/journal.h"
#include "slowscan/status.h"
#include "slowscan/version.h"

#include <glob.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <unistd.h>

/* Options that change how a run looks, not what it computes: left out of its identity. */
static int cosmetic(const char *arg, int *skip_value)
{
    static const char *const with_value[] = {"--threads"};
    static const char *const alone[] = {"--progress", "--no-progress", "--quiet", "--resume"};
    *skip_value = 0;
    for (size_t k = 0; k < sizeof alone / sizeof alone[0]; k++)
        if (strcmp(arg, alone[k]) == 0)
            return 1;
    for (size_t k = 0; k < sizeof with_value / sizeof with_value[0]; k++) {
        size_t n = strlen(with_value[k]);
        if (strncmp(arg, with_value[k], n) == 0 && (arg[n] == '\0' || arg[n] == '=')) {
            *skip_value = arg[n] == '\0';
            return 1;
        }
    }
    return 0;
}

static uint64_t hash_file(uint64_t h, const char *path, int *ok)
{
    FILE *fp = fopen(path, "rb");
    *ok = fp != NULL;
    char buf[1 << 16];
    for (size_t got; fp && (got = fread(buf, 1, sizeof buf, fp)) > 0;)
        h = slowscan_journal_hash(h, buf, got);
    if (fp)
        fclose(fp);
    return h;
}

/* The run's identity: version, arguments (but the cosmetic ones) and every input's bytes. */
static int run_identity(const cli_options *o, uint64_t *identity)
{
    uint64_t h = slowscan_journal_hash(SLOWSCAN_JOURNAL_HASH_START, SLOWSCAN_VERSION_STRING,
                                       sizeof SLOWSCAN_VERSION_STRING);
    for (int i = 1; i < o->argc; i++) {
        int skip_value;
        if (cosmetic(o->argv[i], &skip_value)) {
            i += skip_value;
            continue;
        }
        h = slowscan_journal_hash(h, o->argv[i], strlen(o->argv[i]) + 1);
    }
    int ok = 1;
    for (size_t f = 0; ok && f < o->nfiles; f++)
        h = hash_file(h, o->files[f], &ok);
    if (ok && o->control_file)
        h = hash_file(h, o->control_file, &ok);
    *identity = h;
    return ok;
}

/* Removes the files matching `pattern` (glob(3)). */
static void remove_matching(const char *pattern)
{
    glob_t g;
    if (glob(pattern, 0, NULL, &g) == 0)
        for (size_t k = 0; k < g.gl_pathc; k++)
            unlink(g.gl_pathv[k]);
    globfree(&g);
}

/* Temporaries a killed run left beside an output (PATH.tmp.XXXXXX, io/atomic_output.c) or,
 * for the figures' folder, in it. */
static void remove_stale(const char *path, int folder)
{
    if (!path || strcmp(path, "-") == 0)
        return;
    char pattern[4200];
    snprintf(pattern, sizeof pattern, folder ? "%s/*.tmp.??????" : "%s.tmp.??????", path);
    remove_matching(pattern);
}

void cli_resume_clean(const cli_options *o)
{
    if (!o->resume)
        return;
    const char *outputs[] = {o->output, o->rolling_output, o->json_output, o->maps_output};
    for (size_t k = 0; k < sizeof outputs / sizeof outputs[0]; k++)
        remove_stale(outputs[k], 0);
    remove_stale(o->figures_dir, 1);
}

int cli_resume_open(const cli_options *o, journal_replay replay, void *context,
                    cli_resume *r)
{
    memset(r, 0, sizeof *r);
    if (!o->resume)
        return EXIT_OK;
    if (!o->output || strcmp(o->output, "-") == 0) {
        cli_error("option --resume needs -o FILE: the journal is kept beside the summary");
        return EXIT_BAD_INPUT;
    }
    uint64_t identity;
    if (!run_identity(o, &identity)) {
        cli_error("option --resume: an input cannot be read again to name the run (standard "
                  "input cannot be resumed)");
        return EXIT_BAD_INPUT;
    }
    snprintf(r->path, sizeof r->path, "%s.journal", o->output);
    io_error err = {{0}};
    journal_state state;
    int st = slowscan_journal_open(r->path, identity, replay, context, &r->journal, &state,
                                   &r->replayed, &err);
    if (st != SLOWSCAN_OK) {
        cli_error("option --resume: %s", err.message);
        return st == SLOWSCAN_ENOMEM ? EXIT_INTERNAL : EXIT_BAD_INPUT;
    }
    r->replayed -= r->rounds; /* the records that are rounds of --surrogates auto */
    if (r->rounds > 0)
        cli_warning("%s: %zu finished rounds of --surrogates auto and %zu finished series "
                    "taken from the journal%s", r->path, r->rounds, r->replayed,
                    state == JOURNAL_TORN ? " (its torn last record is computed again)" : "");
    else if (r->replayed > 0 || state == JOURNAL_TORN)
        cli_warning("%s: %zu finished series taken from the journal%s", r->path, r->replayed,
                    state == JOURNAL_TORN ? " (its torn last record is computed again)" : "");
    cli_stop_note(o->surrogates_auto
                      ? "; the journal keeps the finished rounds and series: run the same "
                        "command with --resume to go on\n"
                      : "; the journal keeps the finished series: run the same command with "
                        "--resume to go on\n");
    return EXIT_OK;
}

int cli_resume_record(cli_resume *r, const void *record, size_t size)
{
    if (!r->journal)
        return EXIT_OK;
    io_error err = {{0}};
    if (slowscan_journal_append(r->journal, record, size, &err) != SLOWSCAN_OK) {
        cli_error("option --resume: %s", err.message);
        return EXIT_BAD_INPUT;
    }
    /* A testing hook, not a setting: SLOWSCAN_JOURNAL_PAUSE_US holds each record for that
     * many microseconds, so suite resume can kill a run at a chosen journal size even where
     * records follow each other within microseconds (--surrogates auto's ordinary pass draws
     * nothing, and finished faster than the suite could look at the journal). */
    const char *pause = getenv("SLOWSCAN_JOURNAL_PAUSE_US");
    if (pause && *pause) {
        unsigned long us = strtoul(pause, NULL, 10);
        struct timespec hold = {(time_t)(us / 1000000), (long)(us % 1000000) * 1000};
        nanosleep(&hold, NULL);
    }
    return EXIT_OK;
}

void cli_resume_close(cli_resume *r, int finished)
{
    cli_stop_note(NULL);
    slowscan_journal_close(r->journal, finished);
    r->journal = NULL;
}
