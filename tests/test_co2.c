/* Real data: statsmodels' co2 data set (Mauna Loa weekly CO2 1958-2001 with 59 missing weeks;
 * Debian python3-statsmodels, statsmodels.api.datasets.co2). An accelerating rise with an
 * annual cycle and no threshold in sight: nothing may be flagged rising, whatever the
 * deseasoning, with the default detrend. The lagging local-constant fit leaves part of the
 * rise at the record's end, which the trend-leakage diagnostic must report. */
#include "check.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

void suite_co2(void);

static void screen_co2(const char *csv, const char *options, int want_leak_warning)
{
    char cmd[1024], *out = NULL, *err = NULL;
    snprintf(cmd, sizeof cmd, "%s screen %s --indicators variance,lag1,recovery_trend "
             "--surrogates 499 --no-progress %s", check_binary(), options, csv);
    int rc = check_run(cmd, &out, &err);
    size_t rows = 0;
    for (const char *c = out; c && *c; c++)
        rows += *c == '\n';
    CHECK(rc == 0 && rows == 4, "co2 %s: exit %d, %zu lines", options, rc, rows);
    CHECK(out && !strstr(out, ",rising"), "co2 %s: no rising flag:\n%s", options, out ? out : "");
    int warned = err && strstr(err, "keeps part of the trend") != NULL;
    CHECK(warned == want_leak_warning, "co2 %s: leakage warning %s: %s", options,
          want_leak_warning ? "expected" : "not expected", err ? err : "");
    free(out);
    free(err);
}

void suite_co2(void)
{
    const char *csv = check_tmp_path("co2.csv");
    char cmd[512];
    snprintf(cmd, sizeof cmd, "co2_csv.py %s", csv);
    double counts[2];
    CHECK(check_python(cmd, counts, 2) == 2 && counts[0] == 2284 && counts[1] == 59,
          "co2 written: 2284 weeks, 59 missing");
    screen_co2(csv, "", 0);
    screen_co2(csv, "--deseason 364", 0);       /* 52 weeks: the mean cycle */
    screen_co2(csv, "--deseason 365.25", 0);    /* not a whole number of weeks: harmonics */
    screen_co2(csv, "--deseason 364 --deseason-window 20%", 0);
    screen_co2(csv, "--deseason 364 --detrend gaussian", 1);
}
