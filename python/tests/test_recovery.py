"""slowscan.recovery and slowscan.robustness against `slowscan recovery` and
`slowscan robustness` on the same data and options (numbers as the commands print them; the
--json fits compared exactly, since %.17g gives the double back)."""
import json

import numpy as np
import pandas as pd
import pytest
import statsmodels.api as sm
import xarray as xr

import slowscan
from conftest import assert_same_as_cli, run_cli


def _nile():
    # statsmodels' bundled Nile river flow at Aswan, 1871-1970 (Cobb 1978)
    return sm.datasets.nile.load_pandas().data.set_index("year")


def _sunspots():
    # statsmodels' bundled yearly sunspot numbers (1700-2008)
    return sm.datasets.sunspots.load_pandas().data.set_index("YEAR")


def _elnino_monthly():
    # statsmodels' bundled El Nino sea surface temperatures, 1950-2010, as one monthly series
    table = sm.datasets.elnino.load_pandas().data.set_index("YEAR")
    values = table.to_numpy().ravel()
    dates = pd.date_range("1950-01-01", periods=len(values), freq="MS")
    return pd.Series(values, index=pd.Index(dates, name="date"), name="sst")


def test_recovery_path_fits_projection_equal_cli(tmpcsv, tmp_path):
    nile = _nile()
    path = tmpcsv(nile)
    proj, fits = tmp_path / "project.csv", tmp_path / "fits.json"
    with pytest.warns(slowscan.SlowscanWarning, match="not forecasts"):
        got = slowscan.recovery(nile, surrogates=19, seed=5, project=True, project_draws=600)
    cli = run_cli("recovery", "--surrogates", 19, "--seed", 5, "--project", proj,
                  "--project-draws", 600, "--json", fits, path, check=False)
    assert cli.returncode == 0, cli.stderr
    assert_same_as_cli(got, cli.stdout)
    assert_same_as_cli(got.attrs["projection"], proj.read_text())
    entry = json.loads(fits.read_text())["series"][0]
    row = got.attrs["fits"].iloc[0]
    for key in got.attrs["fits"].columns[1:]:
        assert row[key] == entry[key], key


def test_recovery_options_dated_equal_cli(tmpcsv):
    sst = _elnino_monthly()
    path = tmpcsv(sst.to_frame())
    got = slowscan.recovery(xr.DataArray.from_series(sst), noise_trend=True,
                            detrend="gaussian", bandwidth="5y", deseason=12)
    cli = run_cli("recovery", "--noise-trend", "--detrend", "gaussian", "--bandwidth", "5y",
                  "--deseason", 12, path)
    assert_same_as_cli(got, cli.stdout)
    assert got["time"].iloc[0].startswith("1950-01")


def test_recovery_same_seed_any_thread_count():
    spots = _sunspots()
    opts = dict(surrogates=39, seed=9, project=True, project_draws=500)
    with pytest.warns(slowscan.SlowscanWarning, match="not forecasts"):
        one = slowscan.recovery(spots, threads=1, **opts)
        for threads in (2, 3):
            two = slowscan.recovery(spots, threads=threads, **opts)
            pd.testing.assert_frame_equal(one, two)
            for part in ("fits", "projection"):
                pd.testing.assert_frame_equal(one.attrs[part], two.attrs[part])


def test_robustness_grid_fractions_equal_cli(tmpcsv, tmp_path):
    spots = _sunspots()
    path = tmpcsv(spots)
    fractions = tmp_path / "fractions.csv"
    got = slowscan.robustness(spots, windows="30%:60%:15%", bandwidths=[20, "10%"],
                              detrends="gaussian,linear,poly:2",
                              indicators="variance,lag1,recovery_trend", surrogates=19,
                              seed=2)
    cli = run_cli("robustness", "--windows", "30%:60%:15%", "--bandwidths", "20,10%",
                  "--detrends", "gaussian,linear,poly:2", "--indicators",
                  "variance,lag1,recovery_trend", "--surrogates", 19, "--seed", 2,
                  "--fractions", fractions, path)
    assert_same_as_cli(got, cli.stdout)
    assert_same_as_cli(got.attrs["fractions"], fractions.read_text())


def test_robustness_defaults_equal_cli(tmpcsv):
    nile = _nile()
    got = slowscan.robustness(nile)
    assert_same_as_cli(got, run_cli("robustness", tmpcsv(nile)).stdout)
    assert set(got["indicator"]) == {"variance", "lag1"} and got["p_value"].isna().all()


def test_robustness_same_seed_any_thread_count():
    nile = _nile()
    opts = dict(windows="40%,60%", bandwidths="10%", surrogates=29, seed=4)
    one = slowscan.robustness(nile, threads=1, **opts)
    pd.testing.assert_frame_equal(one, slowscan.robustness(nile, threads=2, **opts))


def test_refusals():
    nile = _nile()
    with pytest.raises(TypeError, match="unexpected keyword argument 'windows'"):
        slowscan.recovery(nile, windows="30%")
    with pytest.raises(TypeError, match="unexpected keyword argument 'project'"):
        slowscan.robustness(nile, project=True)
    with pytest.raises(slowscan.SlowscanError, match="project_draws"):
        slowscan.recovery(nile, project=True, project_draws=100)
    with pytest.raises(slowscan.SlowscanError, match="runs backwards"):
        slowscan.robustness(nile, windows="60%:30%:10%")
    with pytest.raises(slowscan.SlowscanError, match="listed twice"):
        slowscan.robustness(nile, detrends="linear,linear")
    with pytest.raises(ValueError, match="times for"):
        slowscan.recovery(nile["volume"].to_numpy(), time=np.arange(99))
    with pytest.raises(slowscan.SlowscanError, match="at least"):
        slowscan.recovery(nile.iloc[:5])


def test_refusal_of_a_grid_cell_names_its_window(tmpcsv):
    # the cell of window 5 (6 samples) is too short for dfa: the command refuses it naming
    # --window 5, Python names window= (the library's words for both)
    nile = _nile()
    cli = run_cli("robustness", "--windows", "50,5", "--indicators", "variance,dfa",
                  tmpcsv(nile), check=False)
    assert cli.returncode == 1 and "--window 5 gives 6 samples" in cli.stderr
    with pytest.raises(slowscan.SlowscanError, match="window= 5 gives 6 samples per window; "
                                                     "dfa needs at least 32"):
        slowscan.robustness(nile, windows="50,5", indicators="variance,dfa")
