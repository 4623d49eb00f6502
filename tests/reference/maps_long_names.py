#!/usr/bin/python3
"""Reads a screen --maps file with Debian's python3-netcdf4 and prints: the number of
VAR_TEST_p_value variables, and how many of them have a long_name that mentions WORDS.
usage: maps_long_names.py MAPS WORDS"""
import sys

import netCDF4

with netCDF4.Dataset(sys.argv[1]) as d:
    names = [v for v in d.variables if v.endswith("_p_value")]
    told = [v for v in names if sys.argv[2] in getattr(d.variables[v], "long_name", "")]
print(len(names), len(told))
