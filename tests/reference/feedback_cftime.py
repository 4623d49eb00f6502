#!/usr/bin/python3
"""Annual means of monthly values weighted by month length from python3-cftime: the days
between the first of each month and the first of the next on CALENDAR.
Usage: feedback_cftime.py FILE CALENDAR YEAR0 (FILE: 12 k values, January YEAR0 onward)."""
import sys
import numpy as np
import cftime

v = np.loadtxt(sys.argv[1])
cal, y0 = sys.argv[2], int(sys.argv[3])
out = []
for k in range(len(v) // 12):
    y = y0 + k
    days = []
    for m in range(1, 13):
        a = cftime.datetime(y, m, 1, calendar=cal)
        b = cftime.datetime(y + (m == 12), m % 12 + 1, 1, calendar=cal)
        days.append((b - a).days)
    out.append(np.dot(days, v[12 * k:12 * k + 12]) / sum(days))
print(" ".join("%.17g" % x for x in out))
