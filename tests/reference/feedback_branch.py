#!/usr/bin/python3
"""Writes a small gridded forced run that branched from its control in the year 1950 (CF
global attributes branch_time_in_parent, parent_time_units, branch_time_in_child; written
with python3-netCDF4) and the control run (years 1850-2049, drifting), for the alignment
test of slowscan feedback --baseline.  Usage: feedback_branch.py RUN.nc CONTROL.nc"""
import sys
import numpy as np
import netCDF4

rng = np.random.default_rng(3)


def write(path, first, years, fields, attrs):
    with netCDF4.Dataset(path, "w") as d:
        d.createDimension("time", years)
        d.createDimension("lat", 2)
        d.createDimension("lon", 2)
        t = d.createVariable("time", "f8", ("time",))
        t.units, t.calendar, t.axis = "days since %04d-01-01" % first, "noleap", "T"
        t[:] = np.arange(years) * 365.0
        la = d.createVariable("lat", "f8", ("lat",))
        la.units = "degrees_north"
        la[:] = [-30.0, 30.0]
        lo = d.createVariable("lon", "f8", ("lon",))
        lo[:] = [0.0, 180.0]
        for name, v in fields.items():
            d.createVariable(name, "f8", ("time", "lat", "lon"))[:] = v
        for k, v in attrs.items():
            d.setncattr(k, v)


cyears = 200
drift = np.arange(cyears)[:, None, None] * np.ones((1, 2, 2))
write(sys.argv[2], 1850, cyears,
      {"rtnt": 0.5 + 0.01 * drift + rng.normal(0, 0.3, (cyears, 2, 2)),
       "tas": 287 + 0.005 * drift + rng.normal(0, 0.1, (cyears, 2, 2))}, {})
years = 60
T = 287 + 0.5 + 4 * (1 - np.exp(-np.arange(1, years + 1) / 10))[:, None, None] + rng.normal(0, 0.1, (years, 2, 2))
N = 7 - 1.5 * (T - 287) + rng.normal(0, 0.3, (years, 2, 2))
write(sys.argv[1], 1, years, {"rtnt": N, "tas": T},
      {"branch_time_in_parent": 365.0 * 100, "parent_time_units": "days since 1850-01-01",
       "branch_time_in_child": 0.0})
print("0")
