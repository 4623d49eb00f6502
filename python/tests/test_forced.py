"""slowscan.feedback, slowscan.timescales and slowscan.emulate against the commands of the same
names on the same runs and options: the forced-run demo files in data/ (made by
data/demo_forced.c, invented for the demo; the Makefile's demo target runs the same commands)
and, where a check needs a real record, statsmodels' bundled data sets."""
import json

import numpy as np
import pandas as pd
import pytest
import statsmodels.api as sm

import slowscan
from conftest import DATA, assert_same_as_cli, run_cli

STEP4X, STEP2X = DATA + "/forced-step4x.csv", DATA + "/forced-step2x.csv"
CONTROL, RAMP = DATA + "/forced-control.csv", DATA + "/forced-ramp.csv"


def _read(path):
    return pd.read_csv(path, index_col=0)


def test_feedback_baseline_drift_equal_cli(tmp_path):
    out = tmp_path / "run.json"
    got = slowscan.feedback(_read(STEP4X), flux="net_flux", response="tas",
                            baseline=_read(CONTROL), baseline_mode="drift")
    cli = run_cli("feedback", "--flux", "net_flux", "--response", "tas", "--baseline", CONTROL,
                  "--baseline-mode", "drift", "--json", out, STEP4X)
    assert_same_as_cli(got, cli.stdout)
    entry = json.loads(out.read_text())["runs"][0]
    assert got.attrs["run"]["drift"] == entry["drift"]
    assert got.attrs["run"]["windows"] == entry["windows"] == len(got)


def test_feedback_tls_ratio_from_baseline_and_span_equal_cli():
    run, control = _read(STEP4X), _read(CONTROL)
    got = slowscan.feedback(run, flux="net_flux", response="tas", baseline=control, fit="tls",
                            window=40, stride="5%", skip=20, scale=0.5)
    cli = run_cli("feedback", "--flux", "net_flux", "--response", "tas", "--baseline", CONTROL,
                  "--fit", "tls", "--window", 40, "--stride", "5%", "--skip", 20, "--scale",
                  0.5, STEP4X)
    assert_same_as_cli(got, cli.stdout)
    assert got.attrs["run"]["noise_ratio_from_baseline"]
    got = slowscan.feedback(run, flux="net_flux", response="tas", fit_span=(1900, 1999))
    cli = run_cli("feedback", "--flux", "net_flux", "--response", "tas", "--fit-span",
                  "1900:1999", STEP4X)
    assert_same_as_cli(got, cli.stdout)


def test_feedback_no_restoring_feedback_is_na_with_reason(tmpcsv):
    # statsmodels' bundled yearly sunspot numbers (1700-2008): this year's count against last
    # year's rises with it, a positive "lambda", so no equilibrium exists (the command's NA
    # and note no_restoring_feedback)
    spots = sm.datasets.sunspots.load_pandas().data.set_index("YEAR")["SUNACTIVITY"]
    frame = pd.DataFrame({"now": spots, "before": spots.shift(1)}).iloc[1:]
    got = slowscan.feedback(frame, flux="now", response="before", window=60)
    cli = run_cli("feedback", "--flux", "now", "--response", "before", "--window", 60,
                  tmpcsv(frame))
    assert_same_as_cli(got, cli.stdout)
    restoring = got["lambda"] < 0
    assert (~restoring).any()
    assert (got.loc[~restoring, "equilibrium_note"] == "no_restoring_feedback").all()
    assert got.loc[~restoring, "equilibrium"].isna().all()


def test_feedback_annual_means_of_monthly_dates_equal_cli(tmpcsv):
    # statsmodels' bundled El Nino sea surface temperatures, 1950-2010, monthly: a regression
    # of each month's value on the previous month's, after annual means by month length
    table = sm.datasets.elnino.load_pandas().data.set_index("YEAR")
    sst = table.to_numpy().ravel()
    dates = pd.date_range("1950-01-01", periods=len(sst), freq="MS")
    frame = pd.DataFrame({"sst": sst, "previous": np.r_[np.nan, sst[:-1]]},
                         index=pd.Index(dates, name="date"))
    got = slowscan.feedback(frame, flux="sst", response="previous", annual=True, window="20y")
    cli = run_cli("feedback", "--flux", "sst", "--response", "previous", "--annual",
                  "--window", "20y", tmpcsv(frame))
    assert_same_as_cli(got, cli.stdout)
    with pytest.raises(slowscan.SlowscanError, match="not a monthly record"):
        slowscan.feedback(_read(STEP4X), flux="net_flux", response="tas", annual=True)


def test_xarray_dataset_run_as_dataframe():
    # a run as an xarray Dataset (one variable per column) gives the DataFrame's numbers
    run, control = _read(STEP4X), _read(CONTROL)
    opts = dict(flux="net_flux", response="tas", baseline=control.to_xarray())
    pd.testing.assert_frame_equal(slowscan.feedback(run.to_xarray(), **opts),
                                  slowscan.feedback(run, **opts))


def test_feedback_refusals():
    run = _read(STEP4X)
    with pytest.raises(TypeError, match=r"feedback\(\) got an unexpected keyword argument 'windows'"):
        slowscan.feedback(run, flux="net_flux", response="tas", windows=40)
    with pytest.raises(slowscan.SlowscanError, match="no column 'flux'"):
        slowscan.feedback(run, flux="flux", response="tas")
    with pytest.raises(slowscan.SlowscanError, match="noise_ratio="):
        slowscan.feedback(run, flux="net_flux", response="tas", fit="tls")
    with pytest.raises(slowscan.SlowscanError, match="longer than the record"):
        slowscan.feedback(run, flux="net_flux", response="tas", window=400)
    with pytest.raises(slowscan.SlowscanError, match="needs baseline="):
        slowscan.feedback(run, flux="net_flux", response="tas", baseline_mode="drift")
    with pytest.raises(slowscan.SlowscanError, match="does not cover"):
        slowscan.feedback(run, flux="net_flux", response="tas", baseline=_read(CONTROL).iloc[:50])
    with pytest.raises(ValueError, match="times for"):
        slowscan.feedback(run.to_numpy()[:, 1:], time=run.index[:-1], names=["N", "T"],
                          flux="N", response="T")


# Each refusal of slowscan_feedback_windows in the package's words, beside the command's in
# its own (the same rule and numbers; the rule is ours: common practice, no source).
_WINDOW_REFUSALS = [
    (dict(skip=297), ["--skip", 297], r"skip=297: leaves less than 4 samples of",
     "option --skip 297: leaves less than 4 samples of"),
    (dict(window=400), ["--window", 400],
     r"window=400: 400 time units is longer than the record of .* \(299 after skip=\)",
     "option --window 400: 400 time units is longer than the record of"),
    (dict(window=2), ["--window", 2], r"window=2: fewer than 4 samples per window in",
     "option --window 2: fewer than 4 samples per window in"),
    (dict(stride=0.5), ["--stride", 0.5], r"stride=0.5: shorter than the time step \(1\) of",
     "option --stride 0.5: shorter than the time step (1) of"),
    (dict(window="10y"), ["--window", "10y"],
     r"window='10y' cannot be measured on this time axis \(plain numbers",
     "option --window: 10y cannot be measured on this time axis (plain numbers"),
    (dict(fit_span=(1900, 1800)), ["--fit-span", "1900:1800"],
     r"fit_span=\(1900, 1800\): not an increasing span inside the record of",
     "option --fit-span: 1900:1800 is not an increasing span inside the record of"),
    (dict(fit_span=(1900, 2200)), ["--fit-span", "1900:2200"],
     r"fit_span=\(1900, 2200\): not an increasing span", "is not an increasing span"),
]


@pytest.mark.parametrize("options,args,python,command", _WINDOW_REFUSALS)
def test_feedback_window_refusals_as_the_command(options, args, python, command):
    with pytest.raises(slowscan.SlowscanError, match=python):
        slowscan.feedback(_read(STEP4X), flux="net_flux", response="tas", **options)
    cli = run_cli("feedback", "--flux", "net_flux", "--response", "tas", *args, STEP4X,
                  check=False)
    assert cli.returncode == 1 and command in cli.stderr, cli.stderr


def test_feedback_span_not_read():
    run = _read(STEP4X)
    with pytest.raises(TypeError, match=r"fit_span=: a pair \(A, B\)"):
        slowscan.feedback(run, flux="net_flux", response="tas", fit_span=5)
    with pytest.raises(slowscan.SlowscanError, match="fit_span='x': not a time of the run"):
        slowscan.feedback(run, flux="net_flux", response="tas", fit_span=("x", 1900))


def test_modes_selection_refusals():
    run = _read(STEP2X)
    with pytest.raises(slowscan.SlowscanError, match=r"12 samples after the onset \(1849\); "
                       r"timescales with max_modes=5 needs at least 18"):
        slowscan.timescales(run.iloc[:12], response="tas", max_modes=5)
    with pytest.raises(slowscan.SlowscanError, match=r"samples after the onset \(1849\) and "
                       r"skip=; timescales with max_modes=3 needs at least 12"):
        slowscan.timescales(run, response="tas", skip="97%")
    with pytest.raises(slowscan.SlowscanError, match=r"skip='2y' cannot be measured"):
        slowscan.timescales(run, response="tas", skip="2y")
    gap = run.copy()
    gap.iloc[5, gap.columns.get_loc("net_flux")] = np.nan
    gap.iloc[7, gap.columns.get_loc("tas")] = np.nan
    with pytest.raises(slowscan.SlowscanError, match="sample 6, column 'net_flux': missing"):
        slowscan.timescales(gap, response="tas", flux="net_flux", joint=True)
    slowscan.timescales(gap, response="tas", onset=1860, max_modes=1)  # the gaps precede it


def test_emulate_compare_off_the_grid():
    step, ramp = _read(STEP2X), _read(RAMP)
    shifted = ramp["tas"].copy()
    shifted.index = shifted.index + 0.5
    with pytest.raises(slowscan.SlowscanError, match=r"compare=: time 1850.5 \(sample 1\) is "
                       r"not on the forcing's grid \(from 1850 in steps of 1\)"):
        slowscan.emulate(step["tas"], ramp["forcing"], 3.7, compare=shifted,
                         control=_read(CONTROL)["tas"])


def test_timescales_equal_cli(tmp_path):
    out = tmp_path / "fits.json"
    with pytest.warns(slowscan.SlowscanWarning, match="multiscale"):
        got = slowscan.timescales(_read(STEP2X), response="tas", baseline=_read(CONTROL),
                                  baseline_mode="drift")
    cli = run_cli("timescales", "--response", "tas", "--baseline", CONTROL, "--baseline-mode",
                  "drift", "--json", out, STEP2X)
    assert_same_as_cli(got, cli.stdout)
    entry = json.loads(out.read_text())["series"][0]
    assert got.attrs["fits"]["tas"]["choice"] == entry["choice"]
    with pytest.warns(slowscan.SlowscanWarning, match="multiscale"):
        got = slowscan.timescales(_read(STEP2X), response="tas", flux="net_flux", joint=True,
                                  baseline=_read(CONTROL), max_modes=2, skip=5)
    cli = run_cli("timescales", "--response", "tas", "--flux", "net_flux", "--joint",
                  "--max-modes", 2, "--skip", 5, "--baseline", CONTROL, STEP2X)
    assert_same_as_cli(got, cli.stdout)


def test_timescales_refusals():
    run = _read(STEP2X)
    with pytest.raises(slowscan.SlowscanError, match="needs at least 18"):
        slowscan.timescales(run.iloc[:12], response="tas", max_modes=5)
    with pytest.raises(slowscan.SlowscanError, match="max_modes=6"):
        slowscan.timescales(run, response="tas", max_modes=6)
    with pytest.raises(slowscan.SlowscanError, match="does not vary"):
        slowscan.timescales(run, response="forcing")
    with pytest.raises(slowscan.SlowscanError, match="joint=True needs flux="):
        slowscan.timescales(run, response="tas", joint=True)


def test_emulate_equal_cli(tmp_path):
    step, ramp, control = _read(STEP2X), _read(RAMP), _read(CONTROL)
    out = tmp_path / "departure.json"
    got = slowscan.emulate(step["tas"], ramp["forcing"], 3.7, compare=ramp["tas"],
                           control=control["tas"], baseline=control, baseline_mode="drift")
    cli = run_cli("emulate", "--response", "tas", "--baseline", CONTROL, "--baseline-mode",
                  "drift", "--step-forcing", 3.7, "--forcing", RAMP + ":forcing", "--compare",
                  RAMP + ":tas", "--control", CONTROL + ":tas", "--json", out, STEP2X)
    assert_same_as_cli(got, cli.stdout)
    entry = json.loads(out.read_text())
    assert {k: got.attrs["departure"][k] for k in entry if k not in ("program", "command")} \
        == {k: v for k, v in entry.items() if k not in ("program", "command")}


def test_emulate_empirical_and_band_equal_cli():
    step, ramp, control = _read(STEP2X), _read(RAMP), _read(CONTROL)
    got = slowscan.emulate((step, "tas"), (ramp, "forcing"), 3.7, compare=(ramp, "tas"),
                           empirical=True, baseline=control, band_level=0.95, persist=5)
    cli = run_cli("emulate", "--step", STEP2X + ":tas", "--baseline", CONTROL, "--empirical",
                  "--step-forcing", 3.7, "--forcing", RAMP + ":forcing", "--compare",
                  RAMP + ":tas", "--band-level", 0.95, "--persist", 5)
    assert_same_as_cli(got, cli.stdout)


def test_emulate_refusals():
    step, ramp = _read(STEP2X), _read(RAMP)
    every_other = ramp["forcing"].iloc[::2]
    with pytest.raises(slowscan.SlowscanError, match="time step 2 differs"):
        slowscan.emulate(step["tas"], every_other, 3.7)
    with pytest.raises(slowscan.SlowscanError, match="no sample 101 steps after its onset, "
                                                     "and the forcing record needs 180"):
        slowscan.emulate(step["tas"].iloc[:100], ramp["forcing"], 3.7, empirical=True)
    with pytest.raises(slowscan.SlowscanError, match="give \\(DataFrame, column\\)"):
        slowscan.emulate(step, ramp["forcing"], 3.7)
    with pytest.raises(slowscan.SlowscanError, match="non-zero forcing"):
        slowscan.emulate(step["tas"], ramp["forcing"], 0)


OVERSHOOT = DATA + "/forced-overshoot-high.csv"


def test_feedback_ensemble_equal_cli():
    runs, control = _read(OVERSHOOT), _read(CONTROL)
    with pytest.warns(slowscan.SlowscanWarning, match="ensemble 'tas' splits"):
        got = slowscan.feedback(runs, flux="net_flux", response="tas", ensemble=True,
                                baseline=control)
    cli = run_cli("feedback", "--flux", "net_flux", "--response", "tas", "--ensemble",
                  "--baseline", CONTROL, OVERSHOOT)
    assert_same_as_cli(got, cli.stdout)
    assert list(got.attrs["runs"]) == ["m%02d" % m for m in range(1, 9)] + ["mean"]
    got = slowscan.feedback(runs, flux="net_flux", response="tas", window=50,
                            members=["m01", "m02", "m03", "m05"])
    cli = run_cli("feedback", "--flux", "net_flux", "--response", "tas", "--members",
                  "m01,m02,m03,m05", "--window", 50, OVERSHOOT)
    assert_same_as_cli(got, cli.stdout)
    with pytest.raises(slowscan.SlowscanError, match="2 members listed, at least 4 needed"):
        slowscan.feedback(runs, flux="net_flux", response="tas", members="m01,m02")


def test_timescales_ensemble_equal_cli(tmpcsv):
    runs = _read(OVERSHOOT).iloc[:150]
    with pytest.warns(slowscan.SlowscanWarning):
        got = slowscan.timescales(runs, response="tas", ensemble=True, baseline=_read(CONTROL),
                                  max_modes=2)
    cli = run_cli("timescales", "--response", "tas", "--ensemble", "--baseline", CONTROL,
                  "--max-modes", 2, tmpcsv(runs))
    assert_same_as_cli(got, cli.stdout)
    assert got["series"].iloc[-1] == "tas[mean]" and got["member"].iloc[-1] == "mean"


def test_nothing_on_stderr(capfd):
    # the library prints nothing: warnings are Python's, refusals exceptions
    step, ramp, control = _read(STEP2X), _read(RAMP), _read(CONTROL)
    with pytest.warns(slowscan.SlowscanWarning):
        slowscan.feedback(step, flux="net_flux", response="tas", baseline=control)
        slowscan.timescales(step, response="tas")
        slowscan.emulate(step["tas"], ramp["forcing"], 3.7, compare=ramp["tas"])
        slowscan.recovery(ramp[["tas"]], surrogates=9, project=True)
        slowscan.robustness(ramp[["tas"]], windows="40%", bandwidths="10%")
        with pytest.raises(slowscan.SlowscanError):
            slowscan.timescales(step, response="forcing")
    out, err = capfd.readouterr()
    assert out == "" and err == ""
