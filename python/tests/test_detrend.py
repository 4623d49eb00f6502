"""slowscan.detrend against `slowscan detrend` on the same data and options."""
import numpy as np
import pandas as pd
import pytest
import statsmodels.api as sm

import slowscan
from conftest import DATA, assert_same_as_cli, run_cli


def test_demo_stations_equal_cli():
    # the demo data (data/stations.csv, invented for the demo)
    df = pd.read_csv(DATA + "/stations.csv", index_col=0)
    got = slowscan.detrend(df[["north_bay", "reed_inlet"]], bandwidth="15%")
    cli = run_cli("detrend", "--vars", "north_bay,reed_inlet", "--bandwidth", "15%",
                  DATA + "/stations.csv")
    assert_same_as_cli(got, cli.stdout)


@pytest.mark.parametrize("method", ["gaussian", "linear", "poly:3", "difference"])
def test_nile_methods_equal_cli(tmpcsv, method):
    # statsmodels' bundled Nile river flow (Cobb 1978), annual 1871-1970
    nile = sm.datasets.nile.load_pandas().data.set_index("year")
    path = tmpcsv(nile)
    got = slowscan.detrend(nile, detrend=method)
    assert_same_as_cli(got, run_cli("detrend", "--detrend", method, path).stdout)


def test_numpy_arrays():
    # statsmodels' bundled Nile data as plain arrays: one series, times as numbers
    nile = sm.datasets.nile.load_pandas().data
    got = slowscan.detrend(nile["volume"].to_numpy(), time=nile["year"].to_numpy(),
                           names="volume")
    assert list(got.columns) == ["series", "time", "value", "trend", "residual"]
    assert np.allclose(got["value"], got["trend"] + got["residual"])
