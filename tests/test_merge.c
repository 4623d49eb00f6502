/* Suite merge: a field screened in parts and merged (slowscan merge) gives the summary of one
 * run over all of it, byte for byte — Benjamini-Hochberg's q-values depend on every test of
 * the run (Benjamini & Hochberg 1995, J. R. Stat. Soc. B 57:289), so the parts' own q-values
 * are not the run's and must be recomputed. Bad parts are refused. */
#include "check.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static int run(const char *args, char **out, char **err)
{
    char cmd[3000];
    snprintf(cmd, sizeof cmd, "%s %s", check_binary(), args);
    return check_run(cmd, out, err);
}

void suite_merge(void)
{
    const char *common = "screen --deseason 364 --surrogates 99 --seed 5";
    const char *full = check_tmp_path("full.csv"), *a = check_tmp_path("part_a.csv"),
               *b = check_tmp_path("part_b.csv"), *merged = check_tmp_path("merged.csv");
    char args[2000];
    snprintf(args, sizeof args, "%s -o %s data/stations.csv", common, full);
    int r0 = run(args, NULL, NULL);
    snprintf(args, sizeof args, "%s --vars north_bay,reed_inlet,mill_pond -o %s "
             "data/stations.csv", common, a);
    int r1 = run(args, NULL, NULL);
    snprintf(args, sizeof args, "%s --vars east_shoal,deep_basin,outflow,west_cove,spring_head "
             "-o %s data/stations.csv", common, b);
    int r2 = run(args, NULL, NULL);
    snprintf(args, sizeof args, "merge %s %s -o %s", a, b, merged);
    int r3 = run(args, NULL, NULL);
    char *x = check_read_file(full), *y = check_read_file(merged), *pa = check_read_file(a);
    CHECK(r0 == 0 && r1 == 0 && r2 == 0 && r3 == 0 && x && y && strcmp(x, y) == 0,
          "two parts merged = one run over all the series, byte for byte");
    CHECK(x && pa && strncmp(x, pa, 200) != 0,
          "a part's own q-values differ from the run's (else the check above proves nothing)");
    free(x), free(y), free(pa);
    /* refusals: one line naming the file, exit 1, no output file */
    const char *detrended = check_tmp_path("detrended.csv"), *none = check_tmp_path("none.csv");
    snprintf(args, sizeof args, "detrend --vars north_bay -o %s data/stations.csv", detrended);
    run(args, NULL, NULL);
    const char *bad[][2] = {{detrended, "no column 'statistic': not a summary"},
                            {"tests/golden/batch.csv", "not a summary"},
                            {"no_such_file.csv", "cannot open the file"}};
    for (size_t k = 0; k < sizeof bad / sizeof bad[0]; k++) {
        char *err = NULL;
        snprintf(args, sizeof args, "merge %s %s -o %s", a, bad[k][0], none);
        int rc = run(args, NULL, &err);
        CHECK(rc == 1 && err && strstr(err, bad[k][1]) && !check_file_exists(none),
              "merge refuses %s: %s", bad[k][0], err ? err : "");
        free(err);
    }
}
