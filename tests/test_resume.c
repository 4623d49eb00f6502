/* Suite resume: screen --resume after SIGKILL at several moments gives the outputs of an
 * uninterrupted run byte for byte; a torn last record is recomputed; another run's journal
 * and a journal without -o FILE are refused; SIGTERM keeps the journal and says so. The
 * moments are chosen by the journal's size (it grows a record per finished series), so the
 * test does not depend on the machine's speed. */
#include "check.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

static double ar1_sample(check_rng *rng, size_t k, size_t i, size_t n, double *state)
{
    (void)k, (void)i, (void)n;
    *state = 0.7 * *state + check_rng_gaussian(rng);
    return *state;
}

static char binary[1200], dir[600], input[700];
/* the surrogates of the runs (fixed, or --surrogates auto), and the uninterrupted run's name */
static const char *surrogates = "--surrogates 199", *reference = "ref";

/* The run's shell command (in dir), outputs prefixed `name`. */
static void screen_cmd(char *cmd, size_t size, const char *name, const char *extra)
{
    snprintf(cmd, size, "cd '%s' && '%s' screen %s --threads 2 --rolling %s.roll "
             "--json %s.json -o %s.csv %s '%s'", dir, binary, surrogates, name, name, name, extra,
             input);
}

static int same(const char *a, const char *b)
{
    char pa[800], pb[800];
    snprintf(pa, sizeof pa, "%s/%s", dir, a);
    snprintf(pb, sizeof pb, "%s/%s", dir, b);
    char *x = check_read_file(pa), *y = check_read_file(pb);
    int ok = x && y && strcmp(x, y) == 0;
    free(x), free(y);
    return ok;
}

/* Kill -9 once the journal holds `bytes`, then run again to the end; `said`: what the
 * restart must say it took back (NULL: that it took something; "": nothing required),
 * `unsaid`: what it must not say. */
static void kill_and_resume(long bytes, const char *name, const char *said, const char *unsaid)
{
    char run[3000], cmd[8000];
    screen_cmd(run, sizeof run, name, "--resume");
    /* up to 5 minutes for the journal to grow: the sanitized build under a loaded machine
     * spends more than a minute in the rounds of --surrogates auto */
    snprintf(cmd, sizeof cmd, "{ export SLOWSCAN_JOURNAL_PAUSE_US=20000; %s 2>/dev/null & pid=$!; j='%s/%s.csv.journal'; "
             "for i in $(seq 6000); do [ -f \"$j\" ] && [ $(stat -c %%s \"$j\") -ge %ld ] && "
             "break; sleep 0.05; done; kill -9 $pid; wait $pid; } ; %s 2>&1; echo \"rc=$?\"; "
             "ls -A '%s'", run, dir, name, bytes, run, dir);
    char *out = NULL;
    check_run(cmd, &out, NULL);
    char csv[64], json[64], roll[64], journal[64], rcsv[64], rjson[64], rroll[64];
    snprintf(csv, sizeof csv, "%s.csv", name);
    snprintf(json, sizeof json, "%s.json", name);
    snprintf(roll, sizeof roll, "%s.roll", name);
    snprintf(rcsv, sizeof rcsv, "%s.csv", reference);
    snprintf(rjson, sizeof rjson, "%s.json", reference);
    snprintf(rroll, sizeof rroll, "%s.roll", reference);
    snprintf(journal, sizeof journal, "\n%s.csv.journal\n", name); /* in the listing */
    CHECK(out && strstr(out, "rc=0") && strstr(out, said ? said : "taken from the journal") &&
              (!unsaid || !strstr(out, unsaid)) && same(rcsv, csv) && same(rjson, json) &&
              same(rroll, roll) && !strstr(out, journal) && !strstr(out, ".tmp."),
          "%s: killed at %ld journal bytes, resumed: outputs = uninterrupted run, no journal "
          "or temporary left: %s", surrogates, bytes, out ? out : "");
    free(out);
}

/* --surrogates auto: each finished round's counts are journaled (a round of 24 series x 3
 * tests is 16 + 24 x 11 x 8 = 2128 bytes, framing aside; 12 rounds at most); killed inside
 * round 1 (nothing but the header), inside a later round, between rounds, and in the ordinary
 * pass (past every round's record), the restart takes back the finished rounds and series and
 * ends as the uninterrupted run (project against itself; common practice, no source). */
static void auto_rounds(void)
{
    surrogates = "--surrogates auto --budget 15000", reference = "aref";
    char cmd[3000];
    screen_cmd(cmd, sizeof cmd, "aref", "");
    CHECK(check_run(cmd, NULL, NULL) == 0, "the uninterrupted --surrogates auto run");
    const char *rounds = "finished rounds of --surrogates auto";
    kill_and_resume(16, "ainside", "", NULL);
    kill_and_resume(2200, "around", rounds, NULL);
    kill_and_resume(3000, "abetween", rounds, NULL);
    kill_and_resume(40000, "apass", rounds, "and 0 finished series");
    surrogates = "--surrogates 199", reference = "ref";
}

void suite_resume(void)
{
    const char *bin = check_binary();
    char here[600];
    snprintf(binary, sizeof binary, "%s%s%s", bin[0] == '/' ? "" : getcwd(here, sizeof here),
             bin[0] == '/' ? "" : "/", bin);
    snprintf(dir, sizeof dir, "%s", check_tmp_path("resume"));
    snprintf(input, sizeof input, "%s", check_tmp_path("resume.csv"));
    check_write_series_csv(input, 24, 1500, ar1_sample, 8);
    char cmd[3000];
    snprintf(cmd, sizeof cmd, "mkdir -p '%s'", dir);
    check_run(cmd, NULL, NULL);
    screen_cmd(cmd, sizeof cmd, "ref", "");
    CHECK(check_run(cmd, NULL, NULL) == 0, "the uninterrupted run");
    kill_and_resume(40, "early", NULL, NULL);   /* the header and at most a record */
    kill_and_resume(60000, "later", NULL, NULL); /* several records */
    auto_rounds();
    /* a torn last record: cut a journal short, the run takes back the whole ones */
    screen_cmd(cmd, sizeof cmd, "torn", "--resume");
    char torn[8000];
    snprintf(torn, sizeof torn, "{ %s 2>/dev/null & pid=$!; j='%s/torn.csv.journal'; "
             "for i in $(seq 1200); do [ -f \"$j\" ] && [ $(stat -c %%s \"$j\") -ge 30000 ] && "
             "break; sleep 0.05; done; kill -9 $pid; wait $pid; truncate -s -7 \"$j\"; } ; "
             "%s 2>&1; echo \"rc=$?\"", cmd, dir, cmd);
    char *out = NULL;
    check_run(torn, &out, NULL);
    CHECK(out && strstr(out, "rc=0") && strstr(out, "torn last record") &&
              same("ref.csv", "torn.csv") && same("ref.json", "torn.json"),
          "a torn last record is computed again: %s", out ? out : "");
    free(out);
    /* another run's journal: refused, naming it */
    snprintf(cmd, sizeof cmd, "cd '%s' && printf 'slowscan-journal 1\\nXXXXXXXX' > other.csv.journal"
             " && '%s' screen --surrogates 19 --resume -o other.csv '%s'", dir, binary, input);
    char *err = NULL;
    int rc = check_run(cmd, NULL, &err);
    CHECK(rc == 1 && err && strstr(err, "the journal of another run"),
          "another run's journal refused: %s", err ? err : "");
    free(err);
    snprintf(cmd, sizeof cmd, "'%s' screen --surrogates 19 --resume '%s'", binary, input);
    err = NULL;
    rc = check_run(cmd, NULL, &err);
    CHECK(rc == 1 && err && strstr(err, "option --resume needs -o FILE"),
          "--resume without -o refused: %s", err ? err : "");
    free(err);
    /* SIGTERM keeps the journal and says how to go on */
    screen_cmd(cmd, sizeof cmd, "term", "--resume");
    snprintf(torn, sizeof torn, "{ %s 2>'%s/term.err' & pid=$!; j='%s/term.csv.journal'; "
             "for i in $(seq 1200); do [ -f \"$j\" ] && [ $(stat -c %%s \"$j\") -ge 20000 ] && "
             "break; sleep 0.05; done; kill -TERM $pid; wait $pid; echo \"rc=$?\"; "
             "cat '%s/term.err'; ls -A '%s'; }", cmd, dir, dir, dir, dir);
    out = NULL;
    check_run(torn, &out, NULL);
    CHECK(out && strstr(out, "rc=143") && strstr(out, "term.csv.journal") &&
              strstr(out, "run the same command with --resume") && !strstr(out, "term.csv.tmp"),
          "SIGTERM keeps the journal only, and says so: %s", out ? out : "");
    free(out);
}
