"""slowscan.screen(control=..., null="control") against `slowscan screen --null control
--control FILE` on the same data: the demo's forced runs beside their control run
(data/forced-control.csv, invented for the demo by data/demo_forced.c), the refusals in the
package's words beside the command's."""
import numpy as np
import pandas as pd
import pytest

import slowscan
from conftest import DATA, assert_same_as_cli, run_cli

RAMP, CONTROL = DATA + "/forced-ramp.csv", DATA + "/forced-control.csv"
VARS = ["net_flux", "tas"]
OPTS = dict(surrogates=99, seed=5)
ARGS = ["--surrogates", 99, "--seed", 5, "--null", "control"]


def _read(path):
    return pd.read_csv(path, index_col=0)


def test_demo_control_dataframe_equals_cli():
    # the demo's ramp run (180 years) with phase surrogates of its 300-year control run
    got = slowscan.screen(_read(RAMP)[VARS], control=_read(CONTROL), null="control", **OPTS)
    cli = run_cli("screen", *ARGS, "--control", CONTROL, "--vars", ",".join(VARS), RAMP)
    assert_same_as_cli(got, cli.stdout)
    assert set(got["null"]) == {"control"}
    # not the phase null's draws: the control run's residual, on streams of its own
    phase = slowscan.screen(_read(RAMP)[VARS], **OPTS)
    assert not np.array_equal(got["p_value"], phase["p_value"])


def test_demo_control_arrays_series_and_span_equal_cli():
    run, ctl = _read(RAMP), _read(CONTROL)
    # values with time= and names=, the control's own times in control_time=
    got = slowscan.screen(run[VARS].to_numpy(), time=run.index.to_numpy(), names=VARS,
                          control=ctl[VARS].to_numpy(), control_time=ctl.index.to_numpy(),
                          null="control", **OPTS)
    cli = run_cli("screen", *ARGS, "--control", CONTROL, "--vars", ",".join(VARS), RAMP)
    assert_same_as_cli(got, cli.stdout)
    # a Series, cut by start=: the control run is read whole, as --from leaves it
    got = slowscan.screen(run["tas"], control=ctl["tas"], null="control", start=1900,
                          window=40, **OPTS)
    cli = run_cli("screen", *ARGS, "--control", CONTROL, "--vars", "tas", "--from", 1900,
                  "--window", 40, RAMP)
    assert_same_as_cli(got, cli.stdout)


def test_control_with_auto_surrogates_equals_cli():
    # surrogates="auto": every round draws from the control run, as the command's rounds do
    with pytest.warns(slowscan.SlowscanWarning, match="1 of 6 tests undecided"):
        got = slowscan.screen(_read(RAMP)[VARS], control=_read(CONTROL), null="control",
                              surrogates="auto", budget=2000, seed=2)
    cli = run_cli("screen", "--null", "control", "--control", CONTROL, "--vars", ",".join(VARS),
                  "--surrogates", "auto", "--budget", 2000, "--seed", 2, RAMP, check=False)
    assert cli.returncode == 0, cli.stderr
    assert_same_as_cli(got, cli.stdout)
    assert "1 of 6 tests undecided" in cli.stderr


def test_threads_give_the_same_result():
    run, ctl = _read(RAMP)[VARS], _read(CONTROL)
    one = slowscan.screen(run, control=ctl, null="control", threads=1, **OPTS)
    pd.testing.assert_frame_equal(one, slowscan.screen(run, control=ctl, null="control",
                                                       threads=2, **OPTS))


def _refusals(tmp_path):
    """(control frame, the Python message, the command's) of each refusal of the control run's
    series 'forcing', the ramp run's first (the rules are ours: common practice, no source)."""
    ctl = _read(CONTROL)
    full = ctl.assign(forcing=ctl["tas"] - ctl["tas"].mean())  # a column of every name
    return {
        "missing": (ctl, r"^option control=: control has no series 'forcing'$",
                    "has no series 'forcing'"),
        "short": (full.iloc[:100], r"^option control=: series 'forcing' of control has 100 "
                  r"samples, fewer than the 180 analysed$",
                  "has 100 samples, fewer than the 180 analysed"),
        "step": (full.set_index(1850 + 2 * (full.index - 1850)),
                 r"^option control=: control has time step 2, the analysed series 1 \(use "
                 r"resample=\)$", "has time step 2, the analysed series 1 (use --resample)"),
        "flat": (full.assign(forcing=0.5), r"^option control=: series 'forcing' of control has "
                 r"no usable variation$",
                 "series 'forcing' of %s has no usable variation" % (tmp_path / "flat.csv")),
    }


@pytest.mark.parametrize("case", ["missing", "short", "step", "flat"])
def test_control_refusals_as_the_command(case, tmp_path, tmpcsv):
    ctl, python, command = _refusals(tmp_path)[case]
    with pytest.raises(slowscan.SlowscanError, match=python):
        slowscan.screen(_read(RAMP), control=ctl, null="control", **OPTS)
    cli = run_cli("screen", *ARGS, "--control", tmpcsv(ctl, case + ".csv"), RAMP, check=False)
    assert cli.returncode == 1 and "option --control: " in cli.stderr and command in cli.stderr, \
        cli.stderr


def test_control_options_refused_as_the_command(tmp_path):
    run, ctl = _read(RAMP)[VARS], _read(CONTROL)
    with pytest.raises(slowscan.SlowscanError, match=r"^null='control' needs control= \(the "
                       r"control run\)$"):
        slowscan.screen(run, null="control", **OPTS)
    cli = run_cli("screen", *ARGS, RAMP, check=False)
    assert cli.returncode == 1 and "option --null control needs --control FILE (the control " \
        "run)" in cli.stderr
    with pytest.raises(slowscan.SlowscanError, match=r"^control= needs null='control'$"):
        slowscan.screen(run, control=ctl, **OPTS)
    cli = run_cli("screen", "--control", CONTROL, RAMP, check=False)
    assert cli.returncode == 1 and "option --control needs --null control" in cli.stderr


def test_control_refused_for_a_grid():
    # the command reads a control run for CSV inputs only; a grid here is refused likewise
    xr = pytest.importorskip("xarray")
    grid = xr.DataArray(np.random.default_rng(1).normal(size=(40, 3)), dims=("time", "x"),
                        coords={"time": np.arange(40.0)}, name="v")
    with pytest.raises(slowscan.SlowscanError, match=r"control=: the data is a grid; a control "
                       r"run is given for tables"):
        slowscan.screen(grid, control=_read(CONTROL), null="control", surrogates=19)
    cli = run_cli("screen", *ARGS, "--control", CONTROL, DATA + "/shelf.nc", check=False)
    assert cli.returncode == 1 and "a control run is read for CSV inputs only" in cli.stderr
