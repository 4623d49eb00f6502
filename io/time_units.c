/* CF time units with UDUNITS-2 for the unit word (include/slowscan/time_units.h). */
#include "slowscan/time_units.h"
#include "slowscan/status.h"

#include <ctype.h>
#include <math.h>
#include <pthread.h>
#include <stdio.h>
#include <string.h>
#include <strings.h>
#include <udunits2.h>

/* The unit system is read once per process (the database is a few hundred kB of XML) and
 * kept: UDUNITS-2 units made from it are only read afterwards, which its documentation allows
 * from several threads. */
static ut_system *unit_system;
static ut_unit *second_unit;
static pthread_once_t unit_system_once = PTHREAD_ONCE_INIT;

static void load_unit_system(void)
{
    ut_set_error_message_handler(ut_ignore);
    unit_system = ut_read_xml(NULL);
    if (unit_system)
        second_unit = ut_get_unit_by_name(unit_system, "second");
}

/* UDUNITS-2's month and year are a twelfth of a tropical year and a tropical year
 * (udunits2-common.xml: year = 3.15569259747e7 s); a unit within 1e-9 of either is one. */
static int near(double a, double b)
{
    return fabs(a - b) <= 1e-9 * b;
}

static const double TROPICAL_YEAR_SECONDS = 3.15569259747e7;

/* A unit word UDUNITS-2 is asked about: letters and underscores only (days, hr, s,
 * common_year). Found by fuzzing (tests/fuzz/regressions/dates/): ut_parse leaks the name its
 * scanner copied when the grammar then fails ("01--0s"), so words with digits, signs or
 * operators, which no CF time unit needs, are refused before it sees them. */
static int plain_word(const char *word)
{
    for (const char *c = word; *c; c++)
        if (!isalpha((unsigned char)*c) && *c != '_')
            return 0;
    return *word != '\0';
}

/* Seconds in one `word`, or NaN when UDUNITS-2 does not know it as a time. */
static double unit_seconds(const char *word, int *no_database)
{
    pthread_once(&unit_system_once, load_unit_system);
    *no_database = !unit_system || !second_unit;
    if (*no_database || !plain_word(word))
        return NAN;
    ut_unit *unit = ut_parse(unit_system, word, UT_ASCII);
    double seconds = NAN;
    if (unit && ut_are_convertible(unit, second_unit)) {
        cv_converter *to_seconds = ut_get_converter(unit, second_unit);
        if (to_seconds)
            seconds = cv_convert_double(to_seconds, 1.0);
        cv_free(to_seconds);
    }
    ut_free(unit);
    return seconds > 0.0 ? seconds : NAN;
}

/* Splits "UNIT since DATE" (any case, any blanks) into the unit word and the date text. */
static int split_since(const char *text, char *word, size_t size, const char **date)
{
    while (isspace((unsigned char)*text))
        text++;
    size_t n = 0;
    while (text[n] && !isspace((unsigned char)text[n]))
        n++;
    const char *rest = text + n;
    while (isspace((unsigned char)*rest))
        rest++;
    if (n == 0 || n >= size || strncasecmp(rest, "since", 5) != 0 ||
        !isspace((unsigned char)rest[5]))
        return 0;
    memcpy(word, text, n);
    word[n] = '\0';
    *date = rest + 5;
    return 1;
}

/* One unit in days of the calendar: fixed-length units as they are; a month only in 360_day,
 * a year nowhere. NaN with *problem set otherwise. */
static double unit_in_days(double seconds, calendar_kind calendar, time_units_problem *problem)
{
    int month = near(seconds, TROPICAL_YEAR_SECONDS / 12.0);
    int year = near(seconds, TROPICAL_YEAR_SECONDS);
    if (!month && !year)
        return seconds / 86400.0;
    /* cftime refuses years even there, and so do we: a file written with them would not be
     * read the same way by the other tools of the trade */
    if (calendar == CALENDAR_360_DAY && month)
        return 30.0;
    *problem = TIME_UNITS_VARIABLE_LENGTH;
    return NAN;
}

static int refuse(time_units_problem why, time_units_problem *problem)
{
    if (problem)
        *problem = why;
    return why == TIME_UNITS_NO_DATABASE ? SLOWSCAN_EIO : SLOWSCAN_EINVAL;
}

int slowscan_time_units_parse(const char *text, calendar_kind calendar, time_units *units,
                              time_units_problem *problem)
{
    char word[32];
    const char *date_text;
    if (!text || !split_since(text, word, sizeof word, &date_text))
        return refuse(TIME_UNITS_NO_SINCE, problem);
    int no_database;
    double seconds = unit_seconds(word, &no_database);
    if (no_database)
        return refuse(TIME_UNITS_NO_DATABASE, problem);
    if (isnan(seconds))
        return refuse(TIME_UNITS_UNKNOWN_UNIT, problem);
    time_units_problem why = TIME_UNITS_OK;
    double unit_days = unit_in_days(seconds, calendar, &why);
    if (why != TIME_UNITS_OK)
        return refuse(why, problem);
    time_units u = {calendar, unit_days, {0}, 0.0, DATE_DAY, ""};
    /* CF allows a bare year-month-day; a time of day and a UTC offset are optional */
    if (slowscan_date_parse(date_text, NULL, &u.origin, &u.origin_precision) != SLOWSCAN_OK ||
        slowscan_calendar_day_number(calendar, &u.origin, &u.origin_days) != SLOWSCAN_OK)
        return refuse(TIME_UNITS_BAD_DATE, problem);
    snprintf(u.unit, sizeof u.unit, "%s", word);
    *units = u;
    if (problem)
        *problem = TIME_UNITS_OK;
    return SLOWSCAN_OK;
}

const char *slowscan_time_units_problem_text(time_units_problem problem)
{
    switch (problem) {
    case TIME_UNITS_OK: return "no problem";
    case TIME_UNITS_NO_SINCE: return "not of the form 'UNIT since DATE'";
    case TIME_UNITS_UNKNOWN_UNIT: return "the unit is not a time unit UDUNITS-2 knows";
    case TIME_UNITS_VARIABLE_LENGTH:
        return "months have a fixed length only in the 360_day calendar, years in none; use days";
    case TIME_UNITS_BAD_DATE: return "the reference date is not a date of the calendar";
    case TIME_UNITS_NO_DATABASE: return "the UDUNITS-2 unit database could not be read";
    }
    return "unknown problem";
}

double slowscan_time_units_day_number(const time_units *units, double value)
{
    return isfinite(value) ? units->origin_days + value * units->unit_days : NAN;
}

int slowscan_time_units_date(const time_units *units, double value, calendar_date *date)
{
    return slowscan_calendar_from_day_number(units->calendar,
                                             slowscan_time_units_day_number(units, value), date);
}
