/* Suite dated_cli: the command on dated, aged and coded records, end to end (the options
 * --calendar, --time-format, --time-units, --age, --missing and dates in --from/--until).
 * What a right answer is: the same numbers as the same series on a plain numeric time axis
 * (the dates only name the samples), and the direction of time (common practice, no source:
 * an age axis runs backward). */
#include "check.h"
#include "slowscan/screen.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static char *out, *err;

static int run(const char *args)
{
    free(out), free(err);
    out = err = NULL;
    char cmd[2048];
    snprintf(cmd, sizeof cmd, "%s %s", check_binary(), args);
    return check_run(cmd, &out, &err);
}

enum { N = 240 };

/* An AR(1) whose noise grows along the record (variance rises in forward time). */
static void draw(double *x)
{
    check_rng *rng = check_rng_alloc(3);
    double v = 0;
    for (size_t i = 0; i < N; i++) {
        v = 0.5 * v + (1.0 + 2.0 * (double)i / N) * check_rng_gaussian(rng);
        x[i] = v;
    }
    check_rng_free(rng);
}

/* The summary row of `test` from screen's output: its tau. */
static double tau_of(const char *text, const char *test)
{
    char key[64];
    snprintf(key, sizeof key, "\n%s,", test);
    const char *at = text ? strstr(text, key) : NULL;
    double tau = NAN;
    if (at)
        sscanf(at + strlen(key), "%*[^,],%*[^,],%*[^,],%*[^,],%lf", &tau);
    return tau;
}

/* Monthly dates (noleap, mid-month), CF units and plain month numbers give the same taus. */
static void check_same_numbers(void)
{
    double x[N];
    draw(x);
    static char plain[N * 40], dated[N * 40], units[N * 40];
    size_t a = (size_t)snprintf(plain, sizeof plain, "t,x\n");
    size_t b = (size_t)snprintf(dated, sizeof dated, "date,x\n");
    size_t c = (size_t)snprintf(units, sizeof units, "days,x\n");
    static const int mid[12] = {16, 15, 16, 16, 16, 16, 16, 16, 16, 16, 16, 16};
    static const int before[12] = {0, 31, 59, 90, 120, 151, 181, 212, 243, 273, 304, 334};
    for (size_t i = 0; i < N; i++) {
        a += (size_t)snprintf(plain + a, sizeof plain - a, "%zu,%.6f\n", i, x[i]);
        b += (size_t)snprintf(dated + b, sizeof dated - b, "%zu-%02zu-%02d,%.6f\n", 1850 + i / 12,
                              i % 12 + 1, mid[i % 12], x[i]);
        c += (size_t)snprintf(units + c, sizeof units - c, "%zu,%.6f\n",
                              365 * (i / 12) + (size_t)before[i % 12] + (size_t)mid[i % 12] - 1,
                              x[i]);
    }
    const char *pp = check_tmp_path("plain.csv"), *dp = check_tmp_path("dated.csv"),
               *up = check_tmp_path("units.csv");
    check_write_file(pp, plain), check_write_file(dp, dated), check_write_file(up, units);
    char args[1200];
    snprintf(args, sizeof args, "screen --surrogates 0 --window 60 --bandwidth 24 %s", pp);
    int rc = run(args);
    double want = tau_of(out, "x");
    snprintf(args, sizeof args, "screen --surrogates 0 --window 60 --bandwidth 24 --calendar "
             "noleap %s", dp);
    int rd = run(args);
    double got_dated = tau_of(out, "x");
    snprintf(args, sizeof args, "screen --surrogates 0 --window 60 --bandwidth 24 --calendar "
             "noleap --time-units 'days since 1850-01-01' %s", up);
    int ru = run(args);
    double got_units = tau_of(out, "x");
    CHECK(rc == 0 && rd == 0 && ru == 0 && isfinite(want) && got_dated == want &&
              got_units == want,
          "variance tau: month numbers %g, noleap dates %g, CF units %g", want, got_dated,
          got_units);
    snprintf(args, sizeof args, "detrend --calendar noleap --from 1860-01 --until 1861-12-31 %s",
             dp);
    CHECK(run(args) == 0 && out && strstr(out, "\nx,1860-01,") && strstr(out, "\nx,1861-12,") &&
              !strstr(out, "1862-01"),
          "--from/--until as dates, outputs stamped by month: %.80s", out ? out : "");
    snprintf(args, sizeof args, "detrend --from 1860-13-01 %s", dp);
    CHECK(run(args) == 1 && err && strstr(err, "option --from: '1860-13-01' is not a date"),
          "a bad date in --from refused: %s", err ? err : "");
    snprintf(args, sizeof args, "detrend --select lat=1 %s", dp);
    CHECK(run(args) == 1 && err && strstr(err, "option --select lat=1: it chooses cells of a "
          "NetCDF grid"), "--select on CSV inputs refused: %s", err ? err : "");
    snprintf(args, sizeof args, "detrend --calendar lunar %s", dp);
    CHECK(run(args) == 1 && err && strstr(err, "option --calendar: 'lunar' is not a CF calendar"),
          "an unknown calendar refused: %s", err ? err : "");
    snprintf(args, sizeof args, "detrend --time-units 'months since 1850-01-01' %s", up);
    CHECK(run(args) == 1 && err && strstr(err, "option --time-units") &&
              strstr(err, "360_day"),
          "months on the standard calendar refused: %s", err ? err : "");
}

/* Ages, youngest first: the variance that rises in forward time still rises (tau > 0). */
static void check_ages(void)
{
    double x[N];
    draw(x);
    static char text[N * 40];
    size_t len = (size_t)snprintf(text, sizeof text, "age_ka,x\n");
    for (size_t i = 0; i < N; i++) /* youngest first: sample i is the (N-1-i)-th in time */
        len += (size_t)snprintf(text + len, sizeof text - len, "%zu,%.6f\n", 1000 + 10 * i,
                                x[N - 1 - i]);
    const char *path = check_tmp_path("ages.csv");
    check_write_file(path, text);
    char args[800];
    snprintf(args, sizeof args, "screen --surrogates 0 --window 600 --bandwidth 240 --age %s",
             path);
    int rc = run(args);
    double tau = tau_of(out, "x");
    CHECK(rc == 0 && tau > 0.3, "ages youngest first: variance tau %g > 0.3 (forward time)",
          tau);
    snprintf(args, sizeof args, "detrend --age --from 1200 --until 1050 %s", path);
    CHECK(run(args) == 0 && out && strstr(out, "\nx,1200,") && strstr(out, "\nx,1050,") &&
              strstr(out, "\nx,1200,") < strstr(out, "\nx,1050,") &&
              !strstr(out, "\nx,1040,") && !strstr(out, "\nx,1210,"),
          "--from/--until ages in either order; rows oldest first, ages as written: %s",
          err ? err : "");
}

/* -999 codes: warned about; with --missing they are missing and the warning goes. */
static void check_codes(void)
{
    double x[N];
    draw(x);
    static char text[N * 40];
    size_t len = (size_t)snprintf(text, sizeof text, "t,x\n");
    for (size_t i = 0; i < N; i++)
        len += (size_t)snprintf(text + len, sizeof text - len, "%zu,%.6f\n", i,
                                i % 37 == 5 ? -999.0 : x[i]);
    const char *path = check_tmp_path("codes.csv");
    check_write_file(path, text);
    char args[800];
    snprintf(args, sizeof args, "screen --surrogates 0 %s", path);
    CHECK(run(args) == 0 && err && strstr(err, "column 'x': the value -999 occurs 7 times, "
          "first in row 7") && strstr(err, "give --missing -999"),
          "an unflagged -999 warned about: %s", err ? err : "");
    snprintf(args, sizeof args, "screen --surrogates 0 --missing -999 %s", path);
    CHECK(run(args) == 0 && err && !strstr(err, "occurs") &&
              strstr(err, "7 values given by --missing were read as missing"),
          "--missing -999: read as missing: %s", err ? err : "");
}

/* Lengths with calendar units: the year of each calendar (Gregorian 365.2425 days: 97 leap
 * years in 400, common practice, no source; the others by their definitions, CF 1.9 4.4.1). */
static void check_length_units(void)
{
    static const struct {
        length_unit unit;
        time_axis_unit axis;
        calendar_kind calendar;
        double want; /* axis units per unit, NaN: refused */
    } cases[] = {{LENGTH_YEARS, TIME_AXIS_DAYS, CALENDAR_STANDARD, 365.2425},
                 {LENGTH_YEARS, TIME_AXIS_DAYS, CALENDAR_JULIAN, 365.25},
                 {LENGTH_YEARS, TIME_AXIS_DAYS, CALENDAR_NOLEAP, 365},
                 {LENGTH_YEARS, TIME_AXIS_DAYS, CALENDAR_ALL_LEAP, 366},
                 {LENGTH_MONTHS, TIME_AXIS_DAYS, CALENDAR_360_DAY, 30},
                 {LENGTH_DAYS, TIME_AXIS_DAYS, CALENDAR_NOLEAP, 1},
                 {LENGTH_YEARS, TIME_AXIS_MONTHS, CALENDAR_NOLEAP, 12},
                 {LENGTH_MONTHS, TIME_AXIS_MONTHS, CALENDAR_NOLEAP, 1},
                 {LENGTH_DAYS, TIME_AXIS_MONTHS, CALENDAR_NOLEAP, NAN},
                 {LENGTH_MONTHS, TIME_AXIS_YEARS, CALENDAR_STANDARD, 1.0 / 12},
                 {LENGTH_DAYS, TIME_AXIS_YEARS, CALENDAR_STANDARD, NAN},
                 {LENGTH_YEARS, TIME_AXIS_NUMBER, CALENDAR_STANDARD, NAN}};
    for (size_t k = 0; k < sizeof cases / sizeof cases[0]; k++) {
        screen_length len = {.amount = 2, .percent = 0, .unit = cases[k].unit}, out;
        time_axis axis = {cases[k].axis, cases[k].calendar, DATE_DAY, -1, 0};
        int st = slowscan_screen_length_on_axis(&len, &axis, &out);
        int ok = isnan(cases[k].want) ? st != 0
                                      : st == 0 && out.unit == LENGTH_AXIS &&
                                            fabs(out.amount - 2 * cases[k].want) < 1e-12;
        CHECK(ok, "2 of unit %d on axis %d (%s): status %d, %g", (int)cases[k].unit,
              (int)cases[k].axis, slowscan_calendar_name(cases[k].calendar), st, out.amount);
    }
    /* the command: 5y and 60 months are the same window on a monthly record */
    const char *path = check_tmp_path("dated.csv");
    char args[800];
    snprintf(args, sizeof args, "screen --surrogates 0 --window 5y --bandwidth 2y --calendar "
             "noleap %s", path);
    int a = run(args);
    char *years = out ? strdup(out) : NULL;
    snprintf(args, sizeof args, "screen --surrogates 0 --window 60 --bandwidth 24 --calendar "
             "noleap %s", path);
    int b = run(args);
    CHECK(a == 0 && b == 0 && years && out && strcmp(years, out) == 0,
          "--window 5y --bandwidth 2y = --window 60 --bandwidth 24 on months");
    free(years);
    snprintf(args, sizeof args, "screen --surrogates 0 --window 30d --calendar noleap %s", path);
    CHECK(run(args) == 1 && err && strstr(err, "option --window 30d is in days, which the time "
          "axis (one row per month, counted in months) cannot measure"),
          "days on a monthly record refused: %s", err ? err : "");
}

/* Two inputs with the same column names stay apart: a leading file column in every CSV
 * (DESIGN §4), "file" in the JSON rows; the JSON says the unit of window and bandwidth. */
static void check_several_inputs(void)
{
    const char *a = check_tmp_path("dated.csv"), *b = check_tmp_path("dated_copy.csv");
    char *text = check_read_file(a);
    if (!text || check_write_file(b, text) != 0) {
        CHECK(0, "copy of the dated input");
        free(text);
        return;
    }
    free(text);
    const char *json = check_tmp_path("two.json"), *rolling = check_tmp_path("two_rolling.csv");
    char args[1500];
    snprintf(args, sizeof args, "screen --surrogates 0 --calendar noleap --json %s --rolling %s "
             "%s %s", json, rolling, a, b);
    int rc = run(args);
    char *j = check_read_file(json), *r = check_read_file(rolling);
    char want_a[600], want_b[600];
    snprintf(want_a, sizeof want_a, "\n%s,x,variance,", a);
    snprintf(want_b, sizeof want_b, "\n%s,x,variance,", b);
    CHECK(rc == 0 && out && strncmp(out, "file,series,indicator,", 22) == 0 &&
              strstr(out, want_a) && strstr(out, want_b),
          "summary: a leading file column names both inputs: %.200s", out ? out : "");
    CHECK(r && strncmp(r, "file,series,time,indicator,value\n", 33) == 0,
          "--rolling: a leading file column");
    CHECK(j && strstr(j, "{\"file\": ") && strstr(j, "\"time_unit\": \"months\""),
          "JSON rows name their file and the unit of window and bandwidth (months)");
    free(j), free(r);
    snprintf(args, sizeof args, "detrend --calendar noleap %s", a);
    CHECK(run(args) == 0 && out && strncmp(out, "series,time,", 12) == 0,
          "one input: no file column");
}

void suite_dated_cli(void)
{
    check_same_numbers();
    check_ages();
    check_codes();
    check_length_units();
    check_several_inputs();
    free(out), free(err);
}
