"""slowscan.screen against `slowscan screen` on the same data and options."""
import pandas as pd
import pytest
import statsmodels.api as sm

import slowscan
from conftest import DATA, assert_same_as_cli, run_cli


def test_demo_stations_equal_cli():
    # the demo data (data/stations.csv, invented for the demo), the README's example
    df = pd.read_csv(DATA + "/stations.csv", index_col=0)
    got = slowscan.screen(df, surrogates=99, seed=4, deseason=364)
    cli = run_cli("screen", "--surrogates", 99, "--seed", 4, "--deseason", 364,
                  DATA + "/stations.csv")
    assert_same_as_cli(got, cli.stdout)


def test_sunspots_options_equal_cli(tmpcsv):
    # statsmodels' bundled yearly sunspot numbers (1700-2008)
    spots = sm.datasets.sunspots.load_pandas().data.set_index("YEAR")
    path = tmpcsv(spots)
    opts = dict(surrogates=49, seed=7, window="40%", bandwidth=30, detrend="gaussian",
                indicators="variance,ar1,skewness", null="aaft", fdr=0.1)
    got = slowscan.screen(spots, **opts)
    cli = run_cli("screen", "--surrogates", 49, "--seed", 7, "--window", "40%", "--bandwidth",
                  30, "--detrend", "gaussian", "--indicators", "variance,ar1,skewness",
                  "--null", "aaft", "--fdr", 0.1, path)
    assert_same_as_cli(got, cli.stdout)


def test_no_surrogates_untested(tmpcsv):
    # statsmodels' bundled Nile river flow (Cobb 1978): statistics only
    nile = sm.datasets.nile.load_pandas().data.set_index("year")
    got = slowscan.screen(nile, surrogates=0)
    assert_same_as_cli(got, run_cli("screen", "--surrogates", 0, tmpcsv(nile)).stdout)
    assert set(got["flag"]) == {"untested"} and set(got["null"]) == {"none"}


def test_same_seed_any_thread_count():
    # statsmodels' bundled El Nino sea surface temperatures (monthly, 1950-2010)
    elnino = sm.datasets.elnino.load_pandas().data.set_index("YEAR")
    one = slowscan.screen(elnino, surrogates=49, seed=3, threads=1)
    for threads in (2, 3):
        pd.testing.assert_frame_equal(one, slowscan.screen(elnino, surrogates=49, seed=3,
                                                           threads=threads))


def test_progress_callback():
    df = pd.read_csv(DATA + "/stations.csv", index_col=0).iloc[:, :3]
    seen = []
    slowscan.screen(df, surrogates=128, threads=2, progress=seen.append)
    finished = [p for p in seen if p.surrogates_total == 0]
    assert [p.series_done for p in finished] == [1, 2, 3]
    assert all(p.series_total == 3 for p in seen)
    assert any(p.surrogates_total == 128 for p in seen)


def test_progress_callback_error_raised():
    df = pd.read_csv(DATA + "/stations.csv", index_col=0).iloc[:, :2]

    def fail(p):
        raise RuntimeError("stop here")
    with pytest.raises(RuntimeError, match="stop here"):
        slowscan.screen(df, surrogates=19, progress=fail)
