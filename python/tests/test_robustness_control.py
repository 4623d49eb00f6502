"""slowscan.robustness and slowscan.recovery with control=..., null="control" against
`slowscan robustness|recovery --null control --control FILE` on the same data: the demo's
ramp run beside its control run (data/forced-control.csv, invented for the demo by
data/demo_forced.c), the refusals in the package's words beside the command's."""
import json

import numpy as np
import pandas as pd
import pytest

import slowscan
from conftest import DATA, assert_same_as_cli, run_cli
from test_screen_control import _read, _refusals

RAMP, CONTROL = DATA + "/forced-ramp.csv", DATA + "/forced-control.csv"
VARS = ["net_flux", "tas"]
OPTS = dict(surrogates=99, seed=5)
ARGS = ["--surrogates", 99, "--seed", 5, "--null", "control"]
# a small grid, so that the run takes a second: two windows, two bandwidths, two methods
GRID = dict(windows="30%,50%", bandwidths="10%,20%", detrends="gaussian-linear,linear",
            indicators="variance,lag1,recovery_trend")
GRID_ARGS = ["--windows", "30%,50%", "--bandwidths", "10%,20%", "--detrends",
             "gaussian-linear,linear", "--indicators", "variance,lag1,recovery_trend"]


def test_robustness_control_grid_fractions_equal_cli(tmp_path):
    fractions = tmp_path / "fractions.csv"
    got = slowscan.robustness(_read(RAMP)[VARS], control=_read(CONTROL), null="control",
                              **GRID, **OPTS)
    cli = run_cli("robustness", *ARGS, *GRID_ARGS, "--fractions", fractions, "--control",
                  CONTROL, "--vars", ",".join(VARS), RAMP)
    assert_same_as_cli(got, cli.stdout)
    assert_same_as_cli(got.attrs["fractions"], fractions.read_text())
    # the control run's residual on streams of its own, not the phase null's draws
    phase = slowscan.robustness(_read(RAMP)[VARS], **GRID, **OPTS)
    assert not np.array_equal(got["p_value"], phase["p_value"], equal_nan=True)


def test_robustness_control_arrays_equal_cli():
    run, ctl = _read(RAMP), _read(CONTROL)
    got = slowscan.robustness(run["tas"].to_numpy(), time=run.index.to_numpy(), names=["tas"],
                              control=ctl["tas"].to_numpy(), control_time=ctl.index.to_numpy(),
                              null="control", windows="40%", bandwidths="10%", **OPTS)
    cli = run_cli("robustness", *ARGS, "--windows", "40%", "--bandwidths", "10%", "--control",
                  CONTROL, "--vars", "tas", RAMP)
    assert_same_as_cli(got, cli.stdout)


def test_recovery_control_path_and_fits_equal_cli(tmp_path):
    fits = tmp_path / "fits.json"
    got = slowscan.recovery(_read(RAMP)[VARS], control=_read(CONTROL), null="control", **OPTS)
    cli = run_cli("recovery", *ARGS, "--json", fits, "--control", CONTROL, "--vars",
                  ",".join(VARS), RAMP)
    assert_same_as_cli(got, cli.stdout)
    written = json.loads(fits.read_text())
    assert written["null"] == "control"
    for row, entry in zip(got.attrs["fits"].itertuples(index=False), written["series"]):
        for key in got.attrs["fits"].columns[1:]:
            assert getattr(row, key) == entry[key], key  # %.17g gives the double back
    phase = slowscan.recovery(_read(RAMP)[VARS], **OPTS)
    assert not np.array_equal(got.attrs["fits"]["p_value"], phase.attrs["fits"]["p_value"])


def test_recovery_control_arrays_and_span_equal_cli():
    run, ctl = _read(RAMP), _read(CONTROL)
    # cut by start=: the control run is read whole, as --from leaves it
    got = slowscan.recovery(run["tas"].to_numpy(), time=run.index.to_numpy(), names=["tas"],
                            control=ctl["tas"].to_numpy(), control_time=ctl.index.to_numpy(),
                            null="control", start=1900, **OPTS)
    cli = run_cli("recovery", *ARGS, "--control", CONTROL, "--vars", "tas", "--from", 1900, RAMP)
    assert_same_as_cli(got, cli.stdout)


def test_recovery_constant_series_needs_no_control(tmpcsv):
    # a series that does not vary keeps no control (slowscan_screen_attach_control): the
    # control run lacking it is not refused, the series only warned about, as the command
    run = _read(RAMP)[["tas"]].assign(still=1.5)
    with pytest.warns(slowscan.SlowscanWarning, match="column 'still': no drifting AR"):
        got = slowscan.recovery(run, control=_read(CONTROL), null="control", **OPTS)
    cli = run_cli("recovery", *ARGS, "--control", CONTROL, tmpcsv(run), check=False)
    assert cli.returncode == 0 and "column 'still': no drifting AR" in cli.stderr, cli.stderr
    assert_same_as_cli(got, cli.stdout)


def test_threads_give_the_same_result():
    run, ctl = _read(RAMP)[VARS], _read(CONTROL)
    opts = dict(control=ctl, null="control", **OPTS)
    one = slowscan.robustness(run, threads=1, **GRID, **opts)
    pd.testing.assert_frame_equal(one, slowscan.robustness(run, threads=2, **GRID, **opts))
    one = slowscan.recovery(run, threads=1, **opts)
    two = slowscan.recovery(run, threads=2, **opts)
    pd.testing.assert_frame_equal(one, two)
    pd.testing.assert_frame_equal(one.attrs["fits"], two.attrs["fits"])


@pytest.mark.parametrize("command", ["robustness", "recovery"])
@pytest.mark.parametrize("case", ["missing", "short", "step", "flat"])
def test_control_refusals_as_the_command(command, case, tmp_path, tmpcsv):
    ctl, python, words = _refusals(tmp_path)[case]
    with pytest.raises(slowscan.SlowscanError, match=python):
        getattr(slowscan, command)(_read(RAMP), control=ctl, null="control", **OPTS)
    cli = run_cli(command, *ARGS, "--control", tmpcsv(ctl, case + ".csv"), RAMP, check=False)
    assert cli.returncode == 1 and "option --control: " in cli.stderr and words in cli.stderr, \
        cli.stderr


@pytest.mark.parametrize("command", ["robustness", "recovery"])
def test_control_options_refused_as_the_command(command):
    function, run = getattr(slowscan, command), _read(RAMP)[VARS]
    with pytest.raises(slowscan.SlowscanError, match=r"^null='control' needs control= \(the "
                       r"control run\)$"):
        function(run, null="control", **OPTS)
    cli = run_cli(command, *ARGS, RAMP, check=False)
    assert cli.returncode == 1 and "option --null control needs --control FILE (the control " \
        "run)" in cli.stderr
    with pytest.raises(slowscan.SlowscanError, match=r"^control= needs null='control'$"):
        function(run, control=_read(CONTROL), **OPTS)
    cli = run_cli(command, "--control", CONTROL, RAMP, check=False)
    assert cli.returncode == 1 and "option --control needs --null control" in cli.stderr
