"""slowscan.screen(tail="gpd") against `slowscan screen --tail gpd`: the library's tail
estimate (surrogates/tail.c, tail_bound.c) used by both, so the same p, q, flags and
p_source to the last printed digit; refusals in the command's words with keyword names."""
import pandas as pd
import pytest
import statsmodels.api as sm

import slowscan
from slowscan import SlowscanError
from conftest import DATA, assert_same_as_cli, run_cli


def test_demo_stations_tail_equal_cli():
    # the demo data (data/stations.csv, invented for the demo): two tests beyond every one
    # of 1000 surrogates take the tail estimate
    df = pd.read_csv(DATA + "/stations.csv", index_col=0)
    got = slowscan.screen(df, surrogates=1000, tail="gpd", deseason=364)
    cli = run_cli("screen", "--surrogates", 1000, "--tail", "gpd", "--deseason", 364,
                  DATA + "/stations.csv")
    assert_same_as_cli(got, cli.stdout)
    assert "tail_estimate" in set(got["p_source"])


def test_sunspots_tail_equal_cli(tmpcsv):
    # statsmodels' bundled yearly sunspot numbers (1700-2008): no test beyond the surrogates,
    # every p the surrogates' own
    spots = sm.datasets.sunspots.load_pandas().data.set_index("YEAR")
    got = slowscan.screen(spots, surrogates=1000, tail="gpd", seed=5)
    cli = run_cli("screen", "--surrogates", 1000, "--tail", "gpd", "--seed", 5, tmpcsv(spots))
    assert_same_as_cli(got, cli.stdout)
    assert set(got["p_source"]) == {"surrogates"}
    plain = slowscan.screen(spots, surrogates=1000, seed=5)
    assert "p_source" not in plain.columns and (plain["p_value"] == got["p_value"]).all()


@pytest.mark.parametrize("options, words", [
    (dict(surrogates=99, tail="gpd"), "tail='gpd' needs surrogates=1000 or more (the fit takes "
     "at least 100 exceedances, at most 10% of the surrogates); got surrogates=99"),
    (dict(surrogates="auto", tail="gpd"), "tail='gpd' needs a fixed number of surrogates"),
    (dict(tail="pareto"), "tail='pareto': unknown method (gpd, or none)"),
])
def test_tail_refusals(options, words):
    # the command's refusals (suite tail), options named as keywords
    df = pd.read_csv(DATA + "/stations.csv", index_col=0).iloc[:, :2]
    with pytest.raises(SlowscanError) as caught:
        slowscan.screen(df, **options)
    assert words in str(caught.value)
    cli = run_cli("screen", "--surrogates", 99, "--tail", "gpd", DATA + "/stations.csv",
                  check=False)
    assert cli.returncode == 1 and "needs --surrogates 1000 or more" in cli.stderr
