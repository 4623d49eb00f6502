"""An ensemble on a NetCDF grid for suite ensemble, written with Debian's python3-netcdf4, and
the same numbers as a CSV whose columns are named NAME.MEMBER.

usage: netcdf_ensemble.py NC CSV
The file: tas(time, run, lat), 120 daily steps ("days since 2000-01-01"), lat 0 and 30,
and a dimension "run" of 5 members whose coordinate variable has standard_name "realization"
(CF), values 1..5. Each member: a forced relaxation plus its own AR(1) noise. The CSV: a
column t (ISO dates), then per cell and member a column tas[lat=L].M with the same values (%.17g).
Prints the number of members."""
import datetime
import sys

import numpy as np
import netCDF4

NT, RUNS, LAT = 120, 5, [0.0, 30.0]


def main():
    rng = np.random.default_rng(17)
    t = np.arange(NT, dtype=float)
    x = np.empty((NT, RUNS, len(LAT)))
    for r in range(RUNS):
        for j in range(len(LAT)):
            e = np.zeros(NT)
            for i in range(1, NT):
                e[i] = 0.7 * e[i - 1] + 0.3 * rng.standard_normal()
            x[:, r, j] = 2 * (1 - np.exp(-t / 30)) + e
    with netCDF4.Dataset(sys.argv[1], "w", format="NETCDF4") as ds:
        ds.createDimension("time", NT)
        ds.createDimension("run", RUNS)
        ds.createDimension("lat", len(LAT))
        tv = ds.createVariable("time", "f8", ("time",))
        tv.axis, tv.units, tv.calendar = "T", "days since 2000-01-01", "standard"
        tv[:] = t
        rv = ds.createVariable("run", "i4", ("run",))
        rv.standard_name = "realization"
        rv[:] = np.arange(1, RUNS + 1)
        lv = ds.createVariable("lat", "f8", ("lat",))
        lv.units = "degrees_north"
        lv[:] = LAT
        v = ds.createVariable("tas", "f8", ("time", "run", "lat"))
        v[:] = x
    with open(sys.argv[2], "w") as f:
        cols = [(j, r) for j in range(len(LAT)) for r in range(RUNS)]
        f.write("t," + ",".join("tas[lat=%g].%d" % (LAT[j], r + 1) for j, r in cols) + "\n")
        for i in range(NT):
            day = datetime.date(2000, 1, 1) + datetime.timedelta(days=i)
            f.write(day.isoformat() + "," + ",".join("%.17g" % x[i, r, j] for j, r in cols) + "\n")
    print(RUNS)


if __name__ == "__main__":
    main()
