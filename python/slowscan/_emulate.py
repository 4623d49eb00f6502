"""slowscan.emulate: the linear response of a step-forced run (its fitted modes, or with
empirical=True its own values) to another forcing history, compared with the run actually
forced so, as the `emulate` command makes it (cli/cmd_emulate.c over response/emulate.c)."""
import math

import numpy as np

from . import _forced
from ._config import _number, _whole
from ._errors import SlowscanError
from ._forced import ptr
from ._library import ffi, lib
from ._modes import EMULATE_COLUMNS, Series, _SHARED, _ready

OWN = _SHARED + ("band_level", "persist", "empirical")


def _ref(option, value, column, inputs, cut):
    """A series given as a Series, a one-column DataFrame, a 1-D DataArray, or a pair
    (DataFrame, column): (Table, column name). The table is read like an input, cut to
    start=/end= only when `cut` (the compared run)."""
    if isinstance(value, tuple):
        if len(value) != 2 or not isinstance(value[1], str):
            raise TypeError("%s=: a pair (DataFrame, column name) is needed" % option)
        value, column = value
    table = _forced.read(value, inputs, option, cut)
    if column is None:
        if len(table.names) != 1:
            raise SlowscanError("%s=: %d columns (%s); give (DataFrame, column)" % (
                option, len(table.names), ", ".join(table.names)))
        column = table.names[0]
    _forced.column(table, column, option, "option %s=" % option)
    return table, column


def _complete(option, run):
    bad = np.flatnonzero(np.isnan(run.values[0]))
    if len(bad):
        raise SlowscanError("%s=: sample %d, column '%s': missing value (emulate needs a "
                            "complete record)" % (option, bad[0] + 1, run.names[0]))


def emulate(step, forcing, step_forcing, compare=None, control=None, response=None,
            empirical=False, **options):
    """The linear-response emulation of a forcing history from a step-forced run (Good et al.
    2011), as `slowscan emulate` writes it: one row per time of the forcing.

    step: the step-forced run (a Series, a one-column DataFrame, a 1-D DataArray, or a pair
    (DataFrame, column); or a DataFrame with response= naming the column); step_forcing: its
    forcing; forcing: the forcing history (the same kinds); compare=: the run forced so (its
    times on the forcing's grid), for the departure test; control=: a control run for the
    noise band (default: the step run's residuals). Options, with the command's defaults:
    empirical=False (True: the step run's own values, not its fitted modes), max_modes=3,
    onset=None, skip=None, band_level=0.99, persist=None (the rule from the noise's lag-1
    autocorrelation), baseline=None (step and compared runs become anomalies against it),
    baseline_mode="mean", baseline_offset=0, annual=False; for the input: time=, calendar=,
    time_units=, missing=, start=, end= (these two cut the compared run only), resample=,
    max_gap=.

    Returns a DataFrame time, forcing, emulated, actual, difference, band_lower,
    band_upper, outside; attrs["departure"] holds what --json writes. Linear response is an
    assumption the emulation makes, not a finding.
    """
    inputs, opts = _forced.split("emulate", options, OWN)
    F = _number("step_forcing", step_forcing)
    if not F != 0 or math.isinf(F):
        raise SlowscanError("step_forcing=%r: a non-zero forcing is needed" % (step_forcing,))
    runs = {}
    for option, value, column, cut in (("step", step, response, False),
                                       ("forcing", forcing, None, False),
                                       ("compare", compare, None, True),
                                       ("control", control, None, False)):
        if value is None:
            continue
        table, name = _ref(option, value, column, inputs, cut)
        own = dict(opts) if option in ("step", "compare") else dict(opts, baseline=None)
        runs[option] = _ready(table, [name], own, inputs, option)
        if option != "compare":
            _complete(option, runs[option])
    _same_step(runs["forcing"], runs["step"])
    s = Series(runs["step"], 0, None, opts, "emulate")
    fit = s.fit(opts)
    sd, r1 = _fit_noise(s, fit, control)
    f = runs["forcing"]
    emulated = _convolve(_response(s, fit, F, f.n, empirical), f.values[0], f.n)
    actual = np.full(f.n, np.nan)
    if compare is not None:
        _align(runs["compare"], f, actual)
    if control is not None:
        sd, r1 = _control_noise(runs["control"])
    dep, level = _departure(opts, actual, emulated, sd, r1, s)
    out = _rows(f, emulated, actual, dep.half_width)
    out.attrs["departure"] = _summary(level, empirical, F, fit, control, sd, r1, dep,
                                      compare is not None, f)
    return out


def _response(s, fit, F, n, empirical):
    """The step response per unit forcing at lags 0, dt, ...: the modes', or the step run's
    own values (slowscan_emulate_empirical_response)."""
    out = np.empty(n)
    if not empirical:
        if lib.slowscan_emulate_modes_response(fit, F, s.dt, 0.0, n, ptr(out)) != 0:
            raise SlowscanError("step_forcing=%r: no response per unit forcing" % F)
        return out
    gap = ffi.new("size_t *")
    st = lib.slowscan_emulate_empirical_response(ptr(s.t), ptr(s.y), s.n, s.dt, F, n,
                                                 ptr(out), gap)
    if st == lib.SLOWSCAN_EINVAL:
        raise SlowscanError("empirical=True: the step run's samples are not whole steps after "
                            "the onset (%g); set onset=" % s.onset)
    if st != 0:
        raise SlowscanError("empirical=True: the step run has no sample %d steps after its "
                            "onset, and the forcing record needs %d (use the fitted modes: "
                            "empirical=False)" % (gap[0], n))
    return out


def _convolve(response, forcing, n):
    cfg = ffi.new("emulate_config *", lib.slowscan_emulate_config_default())
    ws = ffi.gc(lib.slowscan_emulate_workspace_alloc(n, cfg),
                lib.slowscan_emulate_workspace_free)
    out = np.empty(n)
    if ws == ffi.NULL or lib.slowscan_emulate_convolve(ws, ptr(response), ptr(forcing), n,
                                                       ptr(out)) != 0:
        raise MemoryError("slowscan: out of memory")
    return out


def _same_step(f, step):
    """The forcing's time step against the step run's (slowscan_emulate_same_step)."""
    fdt, sdt = ffi.new("double *"), ffi.new("double *")
    if lib.slowscan_emulate_same_step(ptr(f.time), f.n, ptr(step.time), step.n, fdt, sdt) != 0:
        raise SlowscanError("forcing=: time step %g differs from the step run's %g (resample "
                            "one of them)" % (fdt[0], sdt[0]))


def _fit_noise(s, fit, control):
    """The step run's residual noise (slowscan_emulate_fit_noise); refused at round-off
    unless a control run gives the band."""
    sd, r1 = ffi.new("double *"), ffi.new("double *")
    if lib.slowscan_emulate_fit_noise(fit, ptr(s.y), s.n, sd, r1) != 0 and control is None:
        raise SlowscanError("%s: column '%s': the fitted modes leave no residual noise (sd "
                            "%.3g) to set the band; give a control run with control="
                            % (s.source, s.name, sd[0]))
    return sd[0], r1[0]


def _align(c, f, actual):
    """The compared run on the forcing's grid (NaN where it has no sample;
    slowscan_emulate_align)."""
    dt, bad = ffi.new("double *"), ffi.new("size_t *")
    if lib.slowscan_emulate_align(ptr(f.time), f.n, ptr(c.time), ptr(c.values[0]), c.n,
                                  ptr(actual), dt, bad) != 0:
        i = bad[0]
        raise SlowscanError("compare=: time %g (sample %d) is not on the forcing's grid (from "
                            "%g in steps of %g)" % (c.time[i], i + 1, f.time[0], dt[0]))


def _control_noise(c):
    sd, r1 = ffi.new("double *"), ffi.new("double *")
    if lib.slowscan_emulate_control_noise(ptr(c.values[0]), c.n, sd, r1) != 0:
        raise SlowscanError("control=: no noise estimate (fewer than 4 samples, or constant "
                            "after its drift is removed)")
    return sd[0], r1[0]


def _departure(opts, actual, emulated, sd, r1, s):
    cfg = ffi.new("emulate_config *", lib.slowscan_emulate_config_default())
    level = opts.get("band_level")
    if level is not None:
        cfg.band_level = _number("band_level", level)
        if not 0.5 < cfg.band_level < 1:
            raise SlowscanError("band_level=%r: a level in (0.5, 1) is needed" % (level,))
    if opts.get("persist") is not None:
        cfg.persist = _whole("persist", opts["persist"], 1)
    dep = ffi.new("emulate_departure *")
    if lib.slowscan_emulate_departure(cfg, ptr(actual), ptr(emulated), len(actual), sd, r1,
                                      dep) != 0:
        raise SlowscanError("%s: column '%s': the noise band has no width (the step run's fit "
                            "leaves no residual; give control=)" % (s.source, s.name))
    return dep, float(cfg.band_level)


_SIDES = ("NA", "no", "above", "below")


def _rows(f, emulated, actual, h):
    """The rows, the band's columns by slowscan_emulate_band."""
    n = f.n
    d, lower, upper = np.empty(n), np.empty(n), np.empty(n)
    side = ffi.new("emulate_side[]", n)
    lib.slowscan_emulate_band(ptr(actual), ptr(emulated), n, h, ptr(d), ptr(lower), ptr(upper),
                              side)
    outside = np.array([_SIDES[side[i]] for i in range(n)], dtype=object)
    return _forced.frame({"time": _forced.times(f.axis, f.time), "forcing": f.values[0],
                          "emulated": emulated, "actual": actual, "difference": d,
                          "band_lower": lower, "band_upper": upper, "outside": outside},
                         EMULATE_COLUMNS)


def _summary(level, empirical, F, fit, control, sd, r1, dep, compared, f):
    out = {"step_response": "step run values" if empirical else "fitted modes",
           "step_forcing": F, "modes": int(fit.nmodes),
           "noise_source": "control run (linear drift removed)" if control is not None
           else "step run residuals", "noise_sd": sd, "noise_lag1": r1,
           "band_level": level,
           "band_half_width": dep.half_width, "persist": int(dep.persist),
           "compared": compared, "departed": bool(dep.departed)}
    if dep.departed:
        out.update({"departure_time": f.time[dep.first], "confirmed_time": f.time[dep.confirmed],
                    "last_outside_time": f.time[dep.last], "size": dep.size,
                    "sign": int(dep.sign)})
    out["samples_outside"] = int(dep.outside)
    return out
