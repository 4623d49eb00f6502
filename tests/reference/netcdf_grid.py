"""A small CF grid for suite netcdf, written with Debian's python3-netcdf4, and what
python3-netcdf4 itself reads back from it (masked and unpacked), as the reference.

usage: netcdf_grid.py PATH FORMAT LAYOUT [CSV]
  FORMAT: NETCDF3_64BIT_OFFSET or NETCDF4; LAYOUT (NetCDF-4 only; classic files are
  contiguous): map_chunks (one time step x the whole map per chunk, as models write them) or
  series_chunks (all time steps of two cells per chunk)
The file: tas(time, lat, lon), 30 mid-month steps on the noleap calendar in "days since
1850-01-01", lat -10, 0, 10, lon 0, 5, 10, 15; stored as short with scale_factor 0.01 and
add_offset 280, _FillValue -32767, valid_range [-30000, 30000]; cell (lat 0, lon 15) all
fill (land), a few scattered fills and one value beyond valid_range. Also pr(time, lat, lon)
as plain float with missing_value 1e20, and time_bnds (no data variable).
Prints, per variable (tas then pr) and cell (row-major lat, lon), the 30 values ("nan" for
missing). With CSV, also writes those values as a CSV: a date column (the noleap dates of the
time axis, YYYY-MM-DD) and a column per cell named as slowscan names it (VAR[lat=..,lon=..]),
cells with no value at all left out."""
import sys

import numpy as np
import netCDF4

NT, LAT, LON = 30, [-10.0, 0.0, 10.0], [0.0, 5.0, 10.0, 15.0]


def main():
    path, fmt, layout = sys.argv[1:4]
    rng = np.random.default_rng(5)
    with netCDF4.Dataset(path, "w", format=fmt) as ds:
        ds.createDimension("time", None)
        ds.createDimension("lat", len(LAT))
        ds.createDimension("lon", len(LON))
        ds.createDimension("bnds", 2)
        t = ds.createVariable("time", "f8", ("time",))
        t.units, t.calendar, t.axis, t.bounds = "days since 1850-01-01", "noleap", "T", "time_bnds"
        starts = np.array([0, 31, 59, 90, 120, 151, 181, 212, 243, 273, 304, 334])
        ends = np.append(starts[1:], 365)
        mids = [(365 * (k // 12) + (starts[k % 12] + ends[k % 12]) / 2.0) for k in range(NT)]
        t[:] = mids
        tb = ds.createVariable("time_bnds", "f8", ("time", "bnds"))
        tb[:] = np.array([[m - 15, m + 15] for m in mids])
        la = ds.createVariable("lat", "f8", ("lat",))
        la[:], la.units = LAT, "degrees_north"
        lo = ds.createVariable("lon", "f8", ("lon",))
        lo[:], lo.units = LON, "degrees_east"
        chunk = {}
        if fmt == "NETCDF4":
            maps = (1, len(LAT), len(LON))  # one time step x the whole map per chunk
            series = (NT, 1, 2)             # every time step of two cells per chunk
            chunk = {"chunksizes": maps if layout == "map_chunks" else series}
        tas = ds.createVariable("tas", "i2", ("time", "lat", "lon"), fill_value=-32767, **chunk)
        tas.set_auto_maskandscale(False)
        tas.scale_factor, tas.add_offset = np.float64(0.01), np.float64(280.0)
        tas.valid_range = np.array([-30000, 30000], dtype="i2")
        raw = np.round(rng.normal(0, 800, size=(NT, len(LAT), len(LON)))).astype("i2")
        raw[:, 1, 3] = -32767
        raw[4, 0, 0] = raw[17, 2, 1] = -32767
        raw[9, 2, 2] = 31000
        tas[:] = raw
        pr = ds.createVariable("pr", "f4", ("time", "lat", "lon"), **chunk)
        pr.missing_value = np.float32(1e20)
        vals = rng.gamma(2.0, 1.5, size=(NT, len(LAT), len(LON))).astype("f4")
        vals[3, 1, 1] = 1e20
        pr[:] = vals
    columns = []
    with netCDF4.Dataset(path) as ds:
        dates = netCDF4.num2date(ds["time"][:], ds["time"].units, calendar="noleap")
        for name in ("tas", "pr"):
            data = ds[name][:]
            arr = np.ma.filled(data.astype("f8"), np.nan)
            for i in range(len(LAT)):
                for j in range(len(LON)):
                    print(" ".join(repr(float(v)) for v in arr[:, i, j]))
                    if not np.all(np.isnan(arr[:, i, j])):
                        columns.append(("%s[lat=%g,lon=%g]" % (name, LAT[i], LON[j]), arr[:, i, j]))
    if len(sys.argv) > 4:
        with open(sys.argv[4], "w") as f:
            f.write("date," + ",".join('"%s"' % c for c, _ in columns) + "\n")
            for k, d in enumerate(dates):
                cells = ["" if np.isnan(v[k]) else repr(float(v[k])) for _, v in columns]
                f.write("%04d-%02d-%02d," % (d.year, d.month, d.day) + ",".join(cells) + "\n")


if __name__ == "__main__":
    main()
