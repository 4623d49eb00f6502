/* Suite calendar: dates on the CF calendars (calendar.h), ISO 8601 text, CF time units
 * (time_units.h). Day numbers and dates are checked both ways against Debian's python3-cftime
 * (tests/reference/cftime_dates.py) on every calendar, including the Julian-Gregorian switch
 * of the standard calendar and the years around 0. */
#include "check.h"
#include "slowscan/calendar.h"
#include "slowscan/status.h"
#include "slowscan/time_units.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* CF conventions 1.9, section 4.4.1: the calendar names and their aliases. */
static void check_names(void)
{
    static const struct {
        const char *name;
        calendar_kind kind;
    } cf[] = {{"standard", CALENDAR_STANDARD},   {"gregorian", CALENDAR_STANDARD},
              {"proleptic_gregorian", CALENDAR_PROLEPTIC_GREGORIAN},
              {"noleap", CALENDAR_NOLEAP},       {"365_day", CALENDAR_NOLEAP},
              {"all_leap", CALENDAR_ALL_LEAP},   {"366_day", CALENDAR_ALL_LEAP},
              {"360_day", CALENDAR_360_DAY},     {"julian", CALENDAR_JULIAN},
              {"NoLeap", CALENDAR_NOLEAP}};
    for (size_t k = 0; k < sizeof cf / sizeof cf[0]; k++) {
        calendar_kind kind = CALENDAR_COUNT;
        CHECK(slowscan_calendar_lookup(cf[k].name, &kind) == SLOWSCAN_OK && kind == cf[k].kind,
              "calendar name %s", cf[k].name);
    }
    calendar_kind kind;
    CHECK(slowscan_calendar_lookup("none", &kind) == SLOWSCAN_EINVAL, "'none' refused (CF 1.9 "
          "deprecates it: a time axis without a calendar has no day arithmetic)");
    CHECK(strcmp(slowscan_calendar_name(CALENDAR_NOLEAP), "noleap") == 0 &&
              strcmp(slowscan_calendar_name(CALENDAR_STANDARD), "standard") == 0 &&
              strcmp(slowscan_calendar_name((calendar_kind)99), "unknown") == 0,
          "calendar names printed by their CF names");
}

/* Month lengths: the leap rules (Gregorian: 1900 common, 2000 leap; Julian: 1900 leap) and
 * the reform of October 1582 (common practice, no source; also CF 1.9 section 4.4.1). */
static void check_month_lengths(void)
{
    CHECK(slowscan_calendar_month_days(CALENDAR_STANDARD, 1900, 2) == 28 &&
              slowscan_calendar_month_days(CALENDAR_STANDARD, 2000, 2) == 29 &&
              slowscan_calendar_month_days(CALENDAR_STANDARD, 1500, 2) == 29 &&
              slowscan_calendar_month_days(CALENDAR_PROLEPTIC_GREGORIAN, 1500, 2) == 28 &&
              slowscan_calendar_month_days(CALENDAR_JULIAN, 1900, 2) == 29 &&
              slowscan_calendar_month_days(CALENDAR_NOLEAP, 2000, 2) == 28 &&
              slowscan_calendar_month_days(CALENDAR_ALL_LEAP, 2001, 2) == 29 &&
              slowscan_calendar_month_days(CALENDAR_360_DAY, 2001, 2) == 30 &&
              slowscan_calendar_month_days(CALENDAR_360_DAY, 2001, 12) == 30,
          "February and December lengths per calendar");
    CHECK(slowscan_calendar_month_days(CALENDAR_STANDARD, 0, 1) == 0 &&
              slowscan_calendar_month_days(CALENDAR_JULIAN, 0, 1) == 0 &&
              slowscan_calendar_month_days(CALENDAR_PROLEPTIC_GREGORIAN, 0, 1) == 31 &&
              slowscan_calendar_month_days(CALENDAR_NOLEAP, 2000, 13) == 0,
          "no year 0 in standard and julian, a year 0 in proleptic_gregorian; no month 13");
    calendar_date dropped = {1582, 10, 10, 0, 0, 0.0, 0}, before = {1582, 10, 4, 0, 0, 0.0, 0},
                  after = {1582, 10, 15, 0, 0, 0.0, 0}, feb30 = {2000, 2, 30, 0, 0, 0.0, 0};
    double d4 = 0, d15 = 0;
    CHECK(slowscan_calendar_check(CALENDAR_STANDARD, &dropped) == SLOWSCAN_EINVAL &&
              slowscan_calendar_check(CALENDAR_PROLEPTIC_GREGORIAN, &dropped) == SLOWSCAN_OK,
          "1582-10-10 does not exist in the standard calendar, does in proleptic_gregorian");
    CHECK(slowscan_calendar_day_number(CALENDAR_STANDARD, &before, &d4) == SLOWSCAN_OK &&
              slowscan_calendar_day_number(CALENDAR_STANDARD, &after, &d15) == SLOWSCAN_OK &&
              d15 - d4 == 1.0,
          "1582-10-15 follows 1582-10-04 in the standard calendar (%g days)", d15 - d4);
    CHECK(slowscan_calendar_check(CALENDAR_360_DAY, &feb30) == SLOWSCAN_OK &&
              slowscan_calendar_check(CALENDAR_STANDARD, &feb30) == SLOWSCAN_EINVAL,
          "2000-02-30 is a date in 360_day only");
}

/* Seconds since midnight of a date (the two sides may round a whole second to +-1e-6). */
static double second_of_day(const calendar_date *t)
{
    return 3600.0 * t->hour + 60.0 * t->minute + t->second;
}

enum { DAY_COUNT = 2000, DAY_FIELDS = 8 };

/* Both directions against cftime.num2date on every calendar (python3-cftime). */
static void check_day_numbers(void)
{
    size_t rows = 6 * (DAY_COUNT + 2 * (DAY_COUNT / 10)), max = rows * DAY_FIELDS;
    double *ref = malloc(max * sizeof *ref);
    char args[64];
    snprintf(args, sizeof args, "cftime_dates.py days %d", DAY_COUNT);
    int got = ref ? check_python(args, ref, max) : -1;
    CHECK(got == (int)max, "cftime reference: %d of %zu numbers", got, max);
    size_t to_days_bad = 0, to_date_bad = 0, checked[CALENDAR_COUNT] = {0};
    for (size_t r = 0; got == (int)max && r < rows; r++) {
        const double *f = ref + r * DAY_FIELDS;
        calendar_kind kind = (calendar_kind)f[0];
        calendar_date want = {(long)f[1], (int)f[2], (int)f[3], (int)f[4], (int)f[5], f[6], 0};
        double days = NAN;
        calendar_date mine;
        if (slowscan_calendar_day_number(kind, &want, &days) != SLOWSCAN_OK ||
            fabs(days - f[7]) > 1e-8) /* 1 ms */
            to_days_bad++;
        if (slowscan_calendar_from_day_number(kind, f[7], &mine) != SLOWSCAN_OK ||
            mine.year != want.year || mine.month != want.month || mine.day != want.day ||
            fabs(second_of_day(&mine) - second_of_day(&want)) > 1e-3)
            to_date_bad++;
        if (to_days_bad + to_date_bad > 0 && to_days_bad + to_date_bad < 4)
            fprintf(stderr, "    %s %ld-%d-%d %d:%d:%g: days %.9f vs cftime %.9f\n",
                    slowscan_calendar_name(kind), want.year, want.month, want.day, want.hour,
                    want.minute, want.second, days, f[7]);
        checked[kind]++;
    }
    for (int k = 0; k < CALENDAR_COUNT; k++)
        CHECK(checked[k] == rows / 6, "%s: %zu dates compared with cftime",
              slowscan_calendar_name((calendar_kind)k), checked[k]);
    CHECK(to_days_bad == 0, "date -> day number equals cftime.date2num (%zu of %zu differ)",
          to_days_bad, rows);
    CHECK(to_date_bad == 0, "day number -> date equals cftime.num2date (%zu of %zu differ)",
          to_date_bad, rows);
    free(ref);
}

/* A date parsed from text, with the fields and precision wanted. */
static void check_parse(const char *text, const char *format, long y, int m, int d, int hh,
                        int mm, double ss, int offset, date_precision precision)
{
    calendar_date t;
    date_precision p = DATE_YEAR;
    int st = slowscan_date_parse(text, format, &t, &p);
    CHECK(st == SLOWSCAN_OK && t.year == y && t.month == m && t.day == d && t.hour == hh &&
              t.minute == mm && fabs(t.second - ss) < 1e-9 && t.offset_minutes == offset &&
              p == precision,
          "parse '%s' (%s): status %d, %ld-%d-%d %d:%d:%g %+d, precision %d", text,
          format ? format : "ISO 8601", st, t.year, t.month, t.day, t.hour, t.minute, t.second,
          t.offset_minutes, (int)p);
}

/* ISO 8601-1:2019 calendar dates and times, extended format, and strftime-like formats. */
static void check_text(void)
{
    check_parse("1958-03-29", NULL, 1958, 3, 29, 0, 0, 0, 0, DATE_DAY);
    check_parse(" 1958-03 ", NULL, 1958, 3, 1, 0, 0, 0, 0, DATE_MONTH);
    check_parse("1958-03-29T12:30:15.25Z", NULL, 1958, 3, 29, 12, 30, 15.25, 0, DATE_SECOND);
    check_parse("1958-03-29 06:00", NULL, 1958, 3, 29, 6, 0, 0, 0, DATE_MINUTE);
    check_parse("2000-01-01T00:00+01:00", NULL, 2000, 1, 1, 0, 0, 0, 60, DATE_MINUTE);
    check_parse("2000-01-01T05-0230", NULL, 2000, 1, 1, 5, 0, 0, -150, DATE_HOUR);
    check_parse("1850-1-1 0:0:0", NULL, 1850, 1, 1, 0, 0, 0, 0, DATE_SECOND);
    check_parse("-0044-03-15", NULL, -44, 3, 15, 0, 0, 0, 0, DATE_DAY);
    check_parse("+12000-06-01", NULL, 12000, 6, 1, 0, 0, 0, 0, DATE_DAY);
    check_parse("19580329", "%Y%m%d", 1958, 3, 29, 0, 0, 0, 0, DATE_DAY);
    check_parse("29/3/1958 7h", "%d/%m/%Y %Hh", 1958, 3, 29, 7, 0, 0, 0, DATE_HOUR);
    check_parse("195803", "%Y%m", 1958, 3, 1, 0, 0, 0, 0, DATE_MONTH);
    const char *bad[][2] = {{"1958", NULL},        {"1958-03-29x", NULL}, {"19580329", NULL},
                            {"1958/03/29", NULL},  {"", NULL},            {"1958-03-29T", NULL},
                            {"1958-3-29", "%Y%m%d"}, {"1958", "%Y"},     {"1958-03", "%Y-%m-%q"},
                            {"12:00", "%H:%M"},     {"1958-03-29T1:2:3.", NULL}};
    for (size_t k = 0; k < sizeof bad / sizeof bad[0]; k++) {
        calendar_date t;
        CHECK(slowscan_date_parse(bad[k][0], bad[k][1], &t, NULL) == SLOWSCAN_EINVAL,
              "'%s' (%s) refused", bad[k][0], bad[k][1] ? bad[k][1] : "ISO 8601");
    }
    calendar_date t = {-44, 3, 15, 9, 5, 7.125, 0}, big = {12000, 1, 2, 0, 0, 0.0, 0};
    char text[64], small[8];
    slowscan_date_format(&t, DATE_SECOND, text, sizeof text);
    CHECK(strcmp(text, "-0044-03-15T09:05:07.125") == 0, "format: %s", text);
    slowscan_date_format(&big, DATE_DAY, text, sizeof text);
    CHECK(strcmp(text, "+12000-01-02") == 0, "format: %s", text);
    slowscan_date_format(&t, DATE_MONTH, text, sizeof text);
    CHECK(strcmp(text, "-0044-03") == 0, "format: %s", text);
    int need = slowscan_date_format(&t, DATE_DAY, small, sizeof small);
    CHECK(need == 11 && strcmp(small, "-0044-0") == 0, "truncated format: %d '%s'", need, small);
}

/* "UNIT since DATE" against cftime.num2date, and the refusals. */
static void check_units(void)
{
    static const char *const cases[][2] = {
        {"hours since 1850-01-01 06:00:00", "noleap"},
        {"days since 1850-1-1", "360_day"},
        {"months since 2000-01-01", "360_day"},
        {"seconds since 1970-01-01T00:00:00Z", "proleptic_gregorian"},
        {"days since 0001-01-01 00:00:00", "standard"},
        {"minutes since 1900-03-01", "julian"},
        {"days since 1600-02-29", "all_leap"}};
    enum { PER_CASE = 40, FIELDS = 8 };
    size_t ncases = sizeof cases / sizeof cases[0], max = ncases * PER_CASE * FIELDS;
    double ref[7 * 40 * 8];
    int got = check_python("cftime_dates.py units", ref, max);
    CHECK(got == (int)max, "cftime units reference: %d of %zu numbers", got, max);
    size_t bad = 0;
    for (size_t r = 0; got == (int)max && r < ncases * PER_CASE; r++) {
        const double *f = ref + r * FIELDS;
        calendar_kind kind;
        time_units u;
        calendar_date t;
        size_t c = (size_t)f[0];
        if (slowscan_calendar_lookup(cases[c][1], &kind) != SLOWSCAN_OK ||
            slowscan_time_units_parse(cases[c][0], kind, &u, NULL) != SLOWSCAN_OK ||
            slowscan_time_units_date(&u, f[1], &t) != SLOWSCAN_OK || t.year != (long)f[2] ||
            t.month != (int)f[3] || t.day != (int)f[4] || t.hour != (int)f[5] ||
            t.minute != (int)f[6] || fabs(t.second - f[7]) > 1e-3)
            bad++;
    }
    CHECK(bad == 0, "values in CF units -> dates equal cftime.num2date (%zu differ)", bad);
    static const struct {
        const char *units, *calendar;
        time_units_problem why;
    } refused[] = {{"months since 2000-01-01", "noleap", TIME_UNITS_VARIABLE_LENGTH},
                   {"years since 2000-01-01", "standard", TIME_UNITS_VARIABLE_LENGTH},
                   /* python3-cftime 1.6 refuses years on 360_day too */
                   {"years since 2000-01-01", "360_day", TIME_UNITS_VARIABLE_LENGTH},
                   {"parsecs since 2000-01-01", "standard", TIME_UNITS_UNKNOWN_UNIT},
                   {"metres since 2000-01-01", "standard", TIME_UNITS_UNKNOWN_UNIT},
                   {"days after 2000-01-01", "standard", TIME_UNITS_NO_SINCE},
                   {"days", "standard", TIME_UNITS_NO_SINCE},
                   {"days since 2000-02-30", "standard", TIME_UNITS_BAD_DATE},
                   {"days since yesterday", "standard", TIME_UNITS_BAD_DATE}};
    for (size_t k = 0; k < sizeof refused / sizeof refused[0]; k++) {
        calendar_kind kind;
        time_units u;
        time_units_problem why = TIME_UNITS_OK;
        slowscan_calendar_lookup(refused[k].calendar, &kind);
        int st = slowscan_time_units_parse(refused[k].units, kind, &u, &why);
        CHECK(st == SLOWSCAN_EINVAL && why == refused[k].why,
              "'%s' on %s refused: %s", refused[k].units, refused[k].calendar,
              slowscan_time_units_problem_text(why));
    }
    time_units u;
    CHECK(slowscan_time_units_parse("days since 2000-02-30", CALENDAR_360_DAY, &u, NULL) ==
                  SLOWSCAN_OK && u.unit_days == 1.0 && strcmp(u.unit, "days") == 0,
          "'days since 2000-02-30' accepted on 360_day");
}

void suite_calendar(void)
{
    check_names();
    check_month_lengths();
    check_day_numbers();
    check_text();
    check_units();
}
