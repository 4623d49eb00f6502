#!/usr/bin/python3
"""Writes a small gridded forced run (python3-netCDF4) and prints the OLS line of the
area-weighted global means computed with numpy: F and lambda of N = F + lambda T.
Usage: feedback_grid.py OUT.nc MODE  (MODE: coslat: weights cos(latitude) on a regular
grid; measures: random cell areas in an areacella variable named by cell_measures;
gaussian: unequally spaced latitudes without areas)."""
import sys
import numpy as np
import netCDF4

path, mode = sys.argv[1], sys.argv[2]
rng = np.random.default_rng(7)
nt, nlat, nlon = 40, 6, 5
lat = np.array([-75., -45., -15., 15., 45., 75.])
if mode == "gaussian":
    lat = np.array([-80., -50., -12., 20., 41., 77.])
lon = np.arange(nlon) * 72.0
years = np.arange(nt)
T = (2 + np.linspace(0, 3, nt)[:, None, None] * (1 + np.sin(np.radians(lat))[None, :, None])
     + rng.normal(0, 0.3, (nt, nlat, nlon)))
N = 6 - 1.1 * T + rng.normal(0, 0.5, (nt, nlat, nlon))
N[3, 2, 1] = np.nan  # a missing cell
with netCDF4.Dataset(path, "w") as d:
    d.createDimension("time", nt)
    d.createDimension("lat", nlat)
    d.createDimension("lon", nlon)
    t = d.createVariable("time", "f8", ("time",))
    t.units, t.calendar, t.axis = "days since 1850-01-01", "365_day", "T"
    t[:] = years * 365.0
    la = d.createVariable("lat", "f8", ("lat",))
    la.units = "degrees_north"
    la[:] = lat
    lo = d.createVariable("lon", "f8", ("lon",))
    lo.units = "degrees_east"
    lo[:] = lon
    for name, v in (("rtnt", N), ("tas", T)):
        x = d.createVariable(name, "f8", ("time", "lat", "lon"), fill_value=1e20)
        if mode == "measures":
            x.cell_measures = "area: areacella"
        x[:] = np.ma.masked_invalid(v)
    if mode == "measures":
        a = d.createVariable("areacella", "f8", ("lat", "lon"))
        area = rng.uniform(0.5, 2.0, (nlat, nlon))
        a[:] = area
w = area if mode == "measures" else np.cos(np.radians(lat))[:, None] * np.ones((1, nlon))


def mean(v):
    m = np.isfinite(v)
    return np.array([(np.where(m[i], v[i], 0) * w).sum() / (w * m[i]).sum() for i in range(nt)])


lam, F = np.polyfit(mean(T), mean(N), 1)
print("%.17g %.17g" % (F, lam))
