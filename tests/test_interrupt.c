/* Suite interrupt: a run stopped by SIGTERM, SIGINT or SIGHUP leaves no temporary output or
 * figure, says so in one line and exits with 128 + the signal number (DESIGN §4; the exit
 * status convention of POSIX shells for a signal, common practice, no source). The run is
 * stopped while its temporary outputs exist, found by polling the output folder. */
#include "check.h"

#include <signal.h>
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

static void stop_with(int sig, const char *name, const char *input)
{
    char dir[600], cmd[6000], binary[1200], here[1024];
    /* the run works in its own folder: the binary by an absolute path */
    const char *bin = check_binary();
    if (bin[0] == '/')
        snprintf(binary, sizeof binary, "%s", bin);
    else if (getcwd(here, sizeof here))
        snprintf(binary, sizeof binary, "%s/%s", here, bin);
    else
        snprintf(binary, sizeof binary, "%s", bin);
    snprintf(dir, sizeof dir, "%s", check_tmp_path(name));
    /* the run in the background; wait (at most 60 s) until its temporary outputs exist, then
     * send the signal, wait for it and list what is left in the folder and its figures */
    snprintf(cmd, sizeof cmd,
             "mkdir -p '%s/figs' && cd '%s' && "
             "{ '%s' screen --surrogates 999 --rolling roll.csv --json out.json --figures figs "
             "-o out.csv '%s' 2> err.txt & pid=$!; "
             "for i in $(seq 600); do ls *.tmp.* >/dev/null 2>&1 && break; sleep 0.1; done; "
             "kill -%d $pid; wait $pid; echo \"rc=$?\"; ls -A . figs; cat err.txt; }",
             dir, dir, binary, input, sig);
    char *out = NULL;
    check_run(cmd, &out, NULL);
    char want_rc[16], want_line[64];
    snprintf(want_rc, sizeof want_rc, "rc=%d\n", 128 + sig);
    snprintf(want_line, sizeof want_line, "slowscan: stopped by SIG%s; no output", name);
    CHECK(out && strstr(out, want_rc) && !strstr(out, ".tmp.") && !strstr(out, "out.csv") &&
              !strstr(out, "roll.csv") && strstr(out, want_line),
          "SIG%s: exit %d, no temporary or partial output left, one line said: %s", name,
          128 + sig, out ? out : "");
    free(out);
}

void suite_interrupt(void)
{
    const char *input = check_tmp_path("long.csv");
    check_write_series_csv(input, 40, 2000, ar1_sample, 5);
    stop_with(SIGTERM, "TERM", input);
    stop_with(SIGINT, "INT", input);
    stop_with(SIGHUP, "HUP", input);
}
