/* Dates as text: ISO 8601 calendar dates and strftime-like formats in, ISO 8601 out
 * (include/slowscan/calendar.h). The parser only reads fields; whether the date exists is the
 * calendar's question (slowscan_calendar_check), since 2000-02-30 is a date in 360_day. */
#include "slowscan/calendar.h"
#include "slowscan/status.h"

#include <ctype.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

/* A cursor over the text being parsed. */
typedef struct {
    const char *at;
    int ok;
} cursor;

/* Reads 1..max digits (at least min) into *value. */
static long read_digits(cursor *c, int min, int max)
{
    long value = 0;
    int n = 0;
    while (n < max && isdigit((unsigned char)c->at[n]))
        value = 10 * value + (c->at[n++] - '0');
    if (n < min)
        c->ok = 0;
    c->at += n;
    return value;
}

static int accept(cursor *c, char ch)
{
    if (*c->at != ch)
        return 0;
    c->at++;
    return 1;
}

static void expect(cursor *c, char ch)
{
    if (!accept(c, ch))
        c->ok = 0;
}

/* A year: four digits, or a sign and four or more (ISO 8601 expanded years). With `compact`
 * (a format's %Y) exactly up to four digits, so that %Y%m%d can split 19580329. */
static long read_year(cursor *c, int compact)
{
    int sign = 1;
    if (*c->at == '+' || *c->at == '-') {
        sign = *c->at == '-' ? -1 : 1;
        c->at++;
        return sign * read_digits(c, 4, 7);
    }
    return read_digits(c, compact ? 1 : 4, 4);
}

/* Seconds with an optional fraction (".5", ",5" as ISO allows). */
static double read_seconds(cursor *c)
{
    double s = (double)read_digits(c, 1, 2);
    if (*c->at == '.' || *c->at == ',') {
        c->at++;
        double scale = 0.1;
        if (!isdigit((unsigned char)*c->at))
            c->ok = 0;
        while (isdigit((unsigned char)*c->at)) {
            s += scale * (*c->at++ - '0');
            scale /= 10.0;
        }
    }
    return s;
}

/* Z, or +hh[:mm] / +hhmm / -..., into minutes east of UTC. */
static int read_offset(cursor *c)
{
    if (accept(c, 'Z'))
        return 0;
    if (*c->at != '+' && *c->at != '-')
        return 0;
    int sign = *c->at++ == '-' ? -1 : 1;
    long hours = read_digits(c, 2, 2), minutes = 0;
    if (accept(c, ':') || isdigit((unsigned char)*c->at))
        minutes = read_digits(c, 2, 2);
    return sign * (int)(60 * hours + minutes);
}

/* hh[:mm[:ss[.fff]]] after the date, and a UTC offset. */
static void read_time_of_day(cursor *c, calendar_date *t, date_precision *p)
{
    t->hour = (int)read_digits(c, 1, 2);
    *p = DATE_HOUR;
    if (accept(c, ':')) {
        t->minute = (int)read_digits(c, 1, 2);
        *p = DATE_MINUTE;
        if (accept(c, ':')) {
            t->second = read_seconds(c);
            *p = DATE_SECOND;
        }
    }
    t->offset_minutes = read_offset(c);
}

static void parse_iso(cursor *c, calendar_date *t, date_precision *p)
{
    t->year = read_year(c, 0);
    expect(c, '-');
    t->month = (int)read_digits(c, 1, 2);
    *p = DATE_MONTH;
    t->day = 1;
    if (!accept(c, '-'))
        return;
    t->day = (int)read_digits(c, 1, 2);
    *p = DATE_DAY;
    if (accept(c, 'T') || (*c->at == ' ' && isdigit((unsigned char)c->at[1]) && accept(c, ' ')))
        read_time_of_day(c, t, p);
    else
        t->offset_minutes = read_offset(c);
}

/* One %-directive of a format; its precision raises *p. */
static void parse_directive(cursor *c, char directive, calendar_date *t, date_precision *p)
{
    date_precision level = DATE_YEAR;
    switch (directive) {
    case 'Y': t->year = read_year(c, 1); break;
    case 'm': t->month = (int)read_digits(c, 1, 2), level = DATE_MONTH; break;
    case 'd': t->day = (int)read_digits(c, 1, 2), level = DATE_DAY; break;
    case 'H': t->hour = (int)read_digits(c, 1, 2), level = DATE_HOUR; break;
    case 'M': t->minute = (int)read_digits(c, 1, 2), level = DATE_MINUTE; break;
    case 'S': t->second = read_seconds(c), level = DATE_SECOND; break;
    case '%': expect(c, '%'); break;
    default: c->ok = 0; /* an unknown directive makes the format bad */
    }
    if (level > *p)
        *p = level;
}

static void parse_format(cursor *c, const char *format, calendar_date *t, date_precision *p)
{
    int seen_year = 0, seen_month = 0;
    for (const char *f = format; *f && c->ok; f++) {
        if (*f != '%') {
            expect(c, *f);
            continue;
        }
        if (!*++f) {
            c->ok = 0;
            break;
        }
        seen_year |= *f == 'Y';
        seen_month |= *f == 'm';
        parse_directive(c, *f, t, p);
    }
    /* a date needs a year and a month; a missing day is the first */
    if (!seen_year || !seen_month)
        c->ok = 0;
}

int slowscan_date_parse(const char *text, const char *format, calendar_date *date,
                        date_precision *precision)
{
    if (!text || !date)
        return SLOWSCAN_EINVAL;
    calendar_date t = {0, 1, 1, 0, 0, 0.0, 0};
    date_precision p = DATE_YEAR;
    cursor c = {text, 1};
    while (isspace((unsigned char)*c.at))
        c.at++;
    if (format)
        parse_format(&c, format, &t, &p);
    else
        parse_iso(&c, &t, &p);
    while (c.ok && isspace((unsigned char)*c.at))
        c.at++;
    if (!c.ok || *c.at)
        return SLOWSCAN_EINVAL;
    *date = t;
    if (precision)
        *precision = p;
    return SLOWSCAN_OK;
}

/* The year as ISO 8601 writes it: four digits, or a sign beyond 0..9999. */
static int format_year(long year, char *buffer, size_t size)
{
    if (year >= 0 && year <= 9999)
        return snprintf(buffer, size, "%04ld", year);
    return snprintf(buffer, size, "%c%04ld", year < 0 ? '-' : '+', year < 0 ? -year : year);
}

/* Seconds to the microsecond, trailing zeros of the fraction dropped. */
static int format_seconds(double second, char *buffer, size_t size)
{
    long micro = lround(second * 1e6);
    long whole = micro / 1000000, fraction = micro % 1000000;
    if (fraction == 0)
        return snprintf(buffer, size, "%02ld", whole);
    char digits[8];
    snprintf(digits, sizeof digits, "%06ld", fraction);
    size_t len = strlen(digits);
    while (len > 1 && digits[len - 1] == '0')
        digits[--len] = '\0';
    return snprintf(buffer, size, "%02ld.%s", whole, digits);
}

int slowscan_date_format(const calendar_date *t, date_precision precision, char *buffer,
                         size_t size)
{
    char year[24], second[24], text[96];
    format_year(t->year, year, sizeof year);
    format_seconds(t->second, second, sizeof second);
    switch (precision) {
    case DATE_YEAR: snprintf(text, sizeof text, "%s", year); break;
    case DATE_MONTH: snprintf(text, sizeof text, "%s-%02d", year, t->month); break;
    case DATE_DAY: snprintf(text, sizeof text, "%s-%02d-%02d", year, t->month, t->day); break;
    case DATE_HOUR:
        snprintf(text, sizeof text, "%s-%02d-%02dT%02d", year, t->month, t->day, t->hour);
        break;
    case DATE_MINUTE:
        snprintf(text, sizeof text, "%s-%02d-%02dT%02d:%02d", year, t->month, t->day, t->hour,
                 t->minute);
        break;
    default:
        snprintf(text, sizeof text, "%s-%02d-%02dT%02d:%02d:%s", year, t->month, t->day,
                 t->hour, t->minute, second);
    }
    return snprintf(buffer, size, "%s", text);
}
