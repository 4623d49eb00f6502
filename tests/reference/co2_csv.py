#!/usr/bin/python3
"""Writes statsmodels' co2 data set (Mauna Loa weekly CO2, 1958-2001, with its missing weeks;
Debian python3-statsmodels, statsmodels.api.datasets.co2) as a CSV: time in days since the
first week, the concentration in ppm, missing weeks as empty cells.

usage: co2_csv.py OUT.csv           (prints the number of rows and of missing weeks)
       co2_csv.py OUT.csv --dates   the same with ISO 8601 dates in the time column and the
                                    missing weeks left out as rows, as archives often do"""
import sys

import numpy as np
import statsmodels.api as sm


def main():
    data = sm.datasets.co2.load_pandas().data
    days = (data.index - data.index[0]).days.to_numpy()
    if "--dates" in sys.argv[2:]:
        with open(sys.argv[1], "w") as f:
            f.write("date,co2\n")
            for when, v in zip(data.index, data["co2"].to_numpy()):
                if not np.isnan(v):
                    f.write("%s,%.10g\n" % (when.strftime("%Y-%m-%d"), v))
        print(len(days), int(data["co2"].isna().sum()))
        return
    with open(sys.argv[1], "w") as f:
        f.write("day,co2\n")
        for t, v in zip(days, data["co2"].to_numpy()):
            f.write("%d,%s\n" % (t, "" if np.isnan(v) else "%.10g" % v))
    print(len(days), int(data["co2"].isna().sum()))


if __name__ == "__main__":
    main()
