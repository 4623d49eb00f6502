#!/usr/bin/python3
"""Reads a screen --maps file with Debian's python3-netcdf4 (masked: _FillValue honoured) and
compares it with the CSV summary of the same run, row by row: a row's series VAR[lat=..,lon=..]
is the map cell whose coordinates are those values; its statistic, p_value and q_value must
equal the maps VAR_TEST_statistic/p_value/q_value (to float32: relative 1e-6; NA in the
summary is a masked cell), and its flag name the one flag_meanings gives for the map's
VAR_TEST_flag value (through flag_values). Every cell of a variable with no row must be
masked in all of that variable's maps.
usage: netcdf_maps.py MAPS SUMMARY
prints: rows compared, rows that differ, cells without rows, of those not masked in every
map, then the length of each dimension of the maps"""
import re
import sys

import netCDF4
import numpy as np
import pandas as pd


def same(got, want):
    if np.ma.is_masked(got):
        return bool(np.isnan(want))
    return not np.isnan(want) and bool(np.isclose(float(got), want, rtol=1e-6, atol=0.0))


def flag_name(var, value):
    if np.ma.is_masked(value):
        return None
    meanings = var.flag_meanings.split()
    return meanings[list(np.asarray(var.flag_values)).index(int(value))]


def main():
    ds = netCDF4.Dataset(sys.argv[1])
    rows = pd.read_csv(sys.argv[2], na_values=["NA"], keep_default_na=False)
    differ, seen = 0, {}
    for _, row in rows.iterrows():
        m = re.fullmatch(r"(\w+)\[(.*)\]", row["series"])
        var, coords = m.group(1), dict(kv.split("=") for kv in m.group(2).split(","))
        stem = "%s_%s_" % (var, row["indicator"])
        dims = ds[stem + "flag"].dimensions
        index = tuple(int(np.flatnonzero(np.isclose(ds[d][:], float(coords[d])))[0]) for d in dims)
        seen.setdefault(var, set()).add(index)
        ok = all(same(ds[stem + key][index], row[col]) for key, col in
                 (("statistic", "statistic"), ("p_value", "p_value"), ("q_value", "q_value")))
        ok &= flag_name(ds[stem + "flag"], ds[stem + "flag"][index]) == row["flag"]
        differ += not ok
    empty = unmasked = 0
    for var, cells in seen.items():
        maps = [v for name, v in ds.variables.items() if name.startswith(var + "_")]
        for index in np.ndindex(maps[0].shape):
            if index in cells:
                continue
            empty += 1
            unmasked += not all(np.ma.is_masked(v[index]) for v in maps)
    print(len(rows), differ, empty, unmasked, " ".join(str(len(d)) for d in ds.dimensions.values()))


if __name__ == "__main__":
    main()
