"""slowscan.indicators and slowscan.surrogates against the commands of the same names."""
import pandas as pd
import statsmodels.api as sm

import slowscan
from conftest import DATA, assert_same_as_cli, run_cli


def test_indicators_demo_equal_cli():
    # the demo data (data/stations.csv, invented for the demo); per-window indicators too
    df = pd.read_csv(DATA + "/stations.csv", index_col=0)[["north_bay", "reed_inlet"]]
    got = slowscan.indicators(df, indicators="variance,lag1,redness,dfa,skewness",
                              deseason=364)
    cli = run_cli("indicators", "--vars", "north_bay,reed_inlet", "--indicators",
                  "variance,lag1,redness,dfa,skewness", "--deseason", 364,
                  DATA + "/stations.csv")
    assert_same_as_cli(got, cli.stdout)


def test_indicators_co2_equal_cli(tmpcsv):
    # statsmodels' bundled Mauna Loa CO2 (weekly, 1958-2001), gaps left as they are
    co2 = sm.datasets.co2.load_pandas().data
    co2.index.name = "date"
    co2 = co2.iloc[:600]
    path = tmpcsv(co2)
    got = slowscan.indicators(co2, window="30%", indicators="ar1,recovery,sd", step=3)
    cli = run_cli("indicators", "--window", "30%", "--indicators", "ar1,recovery,sd",
                  "--step", 3, path)
    assert_same_as_cli(got, cli.stdout)


def test_surrogates_equal_cli(tmpcsv):
    # statsmodels' bundled yearly sunspot numbers (1700-2008)
    spots = sm.datasets.sunspots.load_pandas().data.set_index("YEAR")
    path = tmpcsv(spots)
    for null in ("phase", "iaaft", "ar1", "block"):
        got = slowscan.surrogates(spots, surrogates=3, seed=11, null=null)
        cli = run_cli("surrogates", "--surrogates", 3, "--seed", 11, "--null", null, path)
        assert_same_as_cli(got, cli.stdout)
