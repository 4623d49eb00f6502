"""Reference dates for suite calendar, from Debian's python3-cftime.

Usage: cftime_dates.py days COUNT   -> per CF calendar (slowscan's calendar_kind order),
          COUNT day numbers (days since 1970-01-01 of that calendar, whole seconds) and the
          date cftime gives for each: "kind year month day hour minute second days"
       cftime_dates.py units        -> for several "UNIT since DATE" strings and calendars,
          values and their dates: "case value year month day hour minute second"
       cftime_dates.py csv FILE CALENDAR -> date2num (days since 1970-01-01) of the ISO dates
          (YYYY-MM-DD[Thh:mm:ss]) in the first column of FILE, header skipped
Dates before year 1 follow cftime's defaults (CF 1.9: no year 0 in standard and julian)."""
import sys
import numpy as np
import cftime

CALENDARS = ["standard", "proleptic_gregorian", "noleap", "all_leap", "360_day", "julian"]

def day_numbers(count, rng):
    whole = rng.integers(-900000, 900000, size=count)           # about year -500 to 4400
    near_reform = rng.integers(-141800, -141500, size=count // 10)  # around 1582-10-15
    near_zero = rng.integers(-720000, -718000, size=count // 10)    # around year 0 / 1
    days = np.concatenate([whole, near_reform, near_zero]).astype(float)
    # whole seconds, never midnight: the two sides round a time of day near 00:00:00 to
    # opposite days (cftime keeps microseconds of float error, 3.999997 s for 4 s)
    seconds = rng.integers(1, 86400, size=days.size)
    return days + seconds / 86400.0

def print_days(count):
    rng = np.random.default_rng(20261202)
    for kind, cal in enumerate(CALENDARS):
        for v in day_numbers(count, rng):
            d = cftime.num2date(v, "days since 1970-01-01", calendar=cal)
            second = d.second + d.microsecond / 1e6
            print(kind, d.year, d.month, d.day, d.hour, d.minute, repr(second), repr(v))

UNIT_CASES = [
    ("hours since 1850-01-01 06:00:00", "noleap"),
    ("days since 1850-1-1", "360_day"),
    ("months since 2000-01-01", "360_day"),
    ("seconds since 1970-01-01T00:00:00Z", "proleptic_gregorian"),
    ("days since 0001-01-01 00:00:00", "standard"),
    ("minutes since 1900-03-01", "julian"),
    ("days since 1600-02-29", "all_leap"),
]

def print_units():
    rng = np.random.default_rng(7)
    for case, (units, cal) in enumerate(UNIT_CASES):
        for v in np.round(rng.uniform(0, 2e5, size=40)):
            d = cftime.num2date(v, units, calendar=cal)
            second = d.second + d.microsecond / 1e6
            print(case, repr(float(v)), d.year, d.month, d.day, d.hour, d.minute, repr(second))

def print_csv(path, cal):
    with open(path) as f:
        next(f)
        for line in f:
            text = line.split(",")[0].strip()
            day, _, clock = text.partition("T")
            y, m, d = (int(p) for p in day.split("-"))
            hh, mm, ss = (int(p) for p in (clock or "0:0:0").split(":"))
            when = cftime.datetime(y, m, d, hh, mm, ss, calendar=cal)
            print(repr(cftime.date2num(when, "days since 1970-01-01", calendar=cal)))

if __name__ == "__main__":
    if sys.argv[1] == "csv":
        print_csv(sys.argv[2], sys.argv[3])
    elif sys.argv[1] == "days":
        print_days(int(sys.argv[2]))
    else:
        print_units()
