"""slowscan.screen(surrogates="auto") against `slowscan screen --surrogates auto` on the same
data and options: the same rounds (the library's driver), so the same p, counts, intervals,
decisions and warnings to the last printed digit."""
import re
import warnings

import pandas as pd
import pytest
import statsmodels.api as sm

import slowscan
from slowscan import SlowscanError, SlowscanWarning
from conftest import DATA, assert_same_as_cli, run_cli


def _screen_warnings(frame_call):
    """The frame and the run-level warnings of surrogates="auto" it said."""
    with warnings.catch_warnings(record=True) as said:
        warnings.simplefilter("always")
        frame = frame_call()
    texts = [str(w.message) for w in said if issubclass(w.category, SlowscanWarning)]
    return frame, [t for t in texts if t.startswith("surrogates='auto'")]


def _as_keywords(stderr):
    """The command's run-level warnings of --surrogates auto, options as keywords."""
    out = []
    for line in stderr.splitlines():
        m = re.match(r"slowscan: warning: option --surrogates auto: (.*)", line)
        if m:
            text = m.group(1).replace("--max-per-series ", "max_per_series=")
            text = text.replace("--max-per-series", "max_per_series=")
            out.append("surrogates='auto': " + text.replace("--budget", "budget="))
    return out


def test_demo_stations_auto_equal_cli():
    # the demo data (data/stations.csv, invented for the demo): five rounds, tests rejected,
    # accepted and left undecided by the default budget
    df = pd.read_csv(DATA + "/stations.csv", index_col=0)
    got, said = _screen_warnings(lambda: slowscan.screen(df, surrogates="auto", deseason=364))
    cli = run_cli("screen", "--surrogates", "auto", "--deseason", 364, DATA + "/stations.csv",
                  check=False)
    assert cli.returncode == 0, cli.stderr
    assert_same_as_cli(got, cli.stdout)
    assert {"rising", "none", "undecided"} <= set(got["flag"])
    assert got.attrs["sequential"]["rounds"] > 2
    assert said == _as_keywords(cli.stderr) and len(said) == 1


def test_elnino_auto_options_equal_cli(tmpcsv):
    # statsmodels' bundled El Nino sea surface temperatures (one series per month,
    # 1950-2010): eight rounds; a budget, a cap and the joint risk given
    elnino = sm.datasets.elnino.load_pandas().data.set_index("YEAR")
    path = tmpcsv(elnino)
    for extra in ([], ["--budget", 5000, "--max-per-series", 1024, "--risk", 0.05],
                  ["--risk-joint", "--fdr", 0.1, "--seed", 9]):
        opts = dict(window="30%", indicators="variance,lag1,skewness")
        keys = dict(budget=5000, max_per_series=1024, risk=0.05) if "--budget" in extra else (
            dict(risk_joint=True, fdr=0.1, seed=9) if extra else {})
        got, said = _screen_warnings(
            lambda: slowscan.screen(elnino, surrogates="auto", **opts, **keys))
        cli = run_cli("screen", "--surrogates", "auto", "--window", "30%", "--indicators",
                      "variance,lag1,skewness", *extra, path, check=False)
        assert cli.returncode == 0, cli.stderr
        assert_same_as_cli(got, cli.stdout)
        assert said == _as_keywords(cli.stderr)


def test_auto_floor_warning_equal_cli(tmpcsv):
    # statsmodels' bundled yearly sunspot numbers (1700-2008), capped at 64 surrogates: no
    # p can reach BH's threshold, as the command says
    spots = sm.datasets.sunspots.load_pandas().data.set_index("YEAR")
    got, said = _screen_warnings(
        lambda: slowscan.screen(spots, surrogates="auto", max_per_series=64, fdr=0.01))
    cli = run_cli("screen", "--surrogates", "auto", "--max-per-series", 64, "--fdr", 0.01,
                  tmpcsv(spots), check=False)
    assert_same_as_cli(got, cli.stdout)
    assert said == _as_keywords(cli.stderr) and "no discovery is possible" in said[0]
    assert "max_per_series=64" in said[0]


def test_auto_any_thread_count():
    # the demo data: the rounds depend on the counts alone
    df = pd.read_csv(DATA + "/stations.csv", index_col=0).iloc[:, :4]
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", SlowscanWarning)
        one = slowscan.screen(df, surrogates="auto", deseason=364, threads=1)
        for threads in (2, 3):
            pd.testing.assert_frame_equal(one, slowscan.screen(df, surrogates="auto",
                                                               deseason=364, threads=threads))


@pytest.mark.parametrize("options, error, words", [
    (dict(surrogates=99, budget=1000), SlowscanError, "budget=: only with surrogates='auto'"),
    (dict(max_per_series=1000), SlowscanError,
     "max_per_series=: only with surrogates='auto'"),
    (dict(risk_joint=True), SlowscanError, "risk_joint=: only with surrogates='auto'"),
    (dict(risk=0.05), SlowscanError, "risk=: only with surrogates='auto'"),
    (dict(surrogates="auto", risk=0.7), SlowscanError, "risk=: 0.7 is outside (0, 0.5)"),
    (dict(surrogates="auto", risk=0), SlowscanError, "risk=: 0 is outside (0, 0.5)"),
    (dict(surrogates="auto", max_per_series=10), SlowscanError,
     "max_per_series=: 10 is not a whole number from 64 to 1000000"),
    (dict(surrogates="auto", budget=0), SlowscanError,
     "budget=: 0 is not a whole number >= 1"),
    (dict(surrogates="auto", budget=1.5), TypeError, "budget=: a whole number"),
    (dict(surrogates="many"), TypeError, "surrogates=: a whole number"),
])
def test_auto_refusals(options, error, words):
    # the command's refusals (tests/test_sequential.c), options named as keywords
    df = pd.read_csv(DATA + "/stations.csv", index_col=0).iloc[:, :2]
    with pytest.raises(error) as caught:
        slowscan.screen(df, **options)
    assert words in str(caught.value)


def test_auto_refusal_of_the_command_has_the_same_words():
    # the command refuses what Python refuses, in the same words with its own spellings
    cli = run_cli("screen", "--surrogates", "auto", "--max-per-series", 10,
                  DATA + "/stations.csv", check=False)
    assert cli.returncode == 1
    assert "option --max-per-series: '10' is not a whole number from 64 to 1000000" in cli.stderr
