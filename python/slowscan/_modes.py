"""slowscan.timescales and slowscan.emulate: relaxation modes of a step-forced run
(slowscan_timescales_fit, _fit_joint) and the linear-response emulation of another forcing
with the departure of the run actually forced so (slowscan_emulate_*), as the `timescales`
and `emulate` commands make them (cli/modes_run.c, cli/cmd_timescales.c, cli/cmd_emulate.c).
"""

import numpy as np

from . import _ensemble, _forced
from ._config import _number, _whole
from ._errors import SlowscanError, warn
from ._forced import ptr
from ._library import ffi, lib

TIMESCALES_COLUMNS = ["series", "modes_chosen", "mode", "amplitude", "amplitude_se",
                      "efold_time", "efold_time_se", "flux_at_onset", "flux_at_onset_se",
                      "equilibrium", "equilibrium_se", "n_eff", "flags"]
EMULATE_COLUMNS = ["time", "forcing", "emulated", "actual", "difference", "band_lower",
                   "band_upper", "outside"]
_SHARED = ("max_modes", "onset", "skip", "baseline", "baseline_mode", "baseline_offset",
           "annual")
_REFUSALS = {lib.SLOWSCAN_ECONST: "the response does not vary",
             lib.SLOWSCAN_ENUMERIC: "no number of modes could be fitted",
             lib.SLOWSCAN_ESHORT: "too few samples"}


class Series:
    """A response (and a flux) from the onset on, as cli_modes_series makes it: the samples
    slowscan_timescales_select chooses."""

    def __init__(self, run, k, f, opts, command):
        self.source, self.name = run.source, run.names[k]
        onset = opts.get("onset")
        onset = float("nan") if onset is None else _number("onset", onset)
        skip, kmax = _forced.request("skip", opts.get("skip")), max_modes(opts)
        since, sel = np.empty(max(run.n, 1)), ffi.new("timescales_selection *")
        flux = ffi.NULL if f is None else ptr(run.values[f])
        if lib.slowscan_timescales_select(ptr(run.time), ptr(run.values[k]), flux, run.n,
                                          ffi.addressof(run.axis), onset, skip, kmax,
                                          ptr(since), sel) != 0:
            raise _refused(run, k, f, sel[0], opts, command)
        self.onset, self.dt, first = sel.onset, sel.dt, sel.first
        self.t, self.time, self.y = since[:sel.count], run.time[first:], run.values[k][first:]
        self.flux = None if f is None else run.values[f][first:]
        self.n = int(sel.count)

    def fit(self, opts):
        """The library's fit of the modes (joint with the flux when there is one)."""
        ws = ffi.gc(lib.slowscan_timescales_workspace_alloc(self.n),
                    lib.slowscan_timescales_workspace_free)
        if ws == ffi.NULL:
            raise MemoryError("slowscan: out of memory")
        cfg = ffi.new("timescales_config *", lib.slowscan_timescales_config_default())
        cfg.max_modes = max_modes(opts)
        r = ffi.new("timescales_result *")
        if self.flux is None:
            st = lib.slowscan_timescales_fit(ws, cfg, ptr(self.t), ptr(self.y), self.n, r)
        else:
            st = lib.slowscan_timescales_fit_joint(ws, cfg, ptr(self.t), ptr(self.y),
                                                   ptr(self.flux), self.n, r)
        if st == lib.SLOWSCAN_ENOMEM:
            raise MemoryError("slowscan: out of memory")
        if st != 0:
            raise SlowscanError("%s: column '%s': %s" % (self.source, self.name, _REFUSALS.get(
                st, "the times or values cannot be fitted (a time before the onset?)")), st)
        return r


def _refused(run, k, f, sel, opts, command):
    """The library's refusal of a run's samples (slowscan_timescales_select) in keywords."""
    if sel.refusal == lib.TIMESCALES_REFUSAL_UNIT:
        return _forced.unmeasurable("skip", opts.get("skip"), run.axis)
    if sel.refusal == lib.TIMESCALES_REFUSAL_MISSING:
        return SlowscanError("%s: sample %d, column '%s': missing value; %s needs a complete "
                             "record (cut the span with start=/end=)" % (
                                 run.source, sel.sample + 1, run.names[f if sel.column else k],
                                 command))
    return SlowscanError("%s: column '%s': %d samples after the onset (%g)%s; %s with "
                         "max_modes=%d needs at least %d" % (
                             run.source, run.names[k], sel.count, sel.onset,
                             " and skip=" if sel.skip > 0 else "", command, max_modes(opts),
                             sel.need))


# the library's default and most modes (TIMESCALES_MAX_MODES: the length of the result's table)
_DEFAULT_MODES = lib.slowscan_timescales_config_default().max_modes
_MOST_MODES = len(ffi.new("timescales_result *").modes)


def max_modes(opts):
    return _whole("max_modes", opts.get("max_modes", _DEFAULT_MODES), 1, _MOST_MODES)


def _ready(table, names, opts, inputs, what):
    """Columns of a table as a Run: annual means, anomalies against baseline= (cli_modes_ready)."""
    return _anomalies(_forced.Run.of(table, names, what, bool(opts.get("annual"))), opts,
                      inputs)


def _anomalies(run, opts, inputs):
    if opts.get("baseline") is not None:
        run.anomalies(_forced.read(opts["baseline"], inputs, "baseline", cut=False), opts)
    return run


def flag_names(flags):
    names = [n for bit, n in ((1, "unresolved"), (2, "multiscale")) if flags & bit]
    return ";".join(names) or "none"


def timescales(data, response=None, flux=None, joint=False, ensemble=False, members=None,
               **options):
    """Relaxation modes of a step-forced run, y(t) = sum_k a_k (1 - exp(-t/tau_k)), as
    `slowscan timescales` writes them: one row per mode of the fit BIC chose.

    data: the run (a DataFrame, index = time; an xarray Dataset; or values with time= and
    names=). response=:
    the column to fit (default: every column, each alone); joint=True fits it together with
    the net flux column flux= (shared timescales). Options, with the command's defaults:
    max_modes=3 (1 to 5), onset=None (one step before the first sample), skip=None,
    baseline=None (a control run: anomalies against it), baseline_mode="mean" (or "drift"),
    baseline_offset=0, annual=False; for the input: time=, names=, calendar=, time_units=,
    missing=, start=, end=, resample=, max_gap=.

    ensemble=True: the columns RESPONSE.MEMBER (at least 4; with joint=True the flux's members
    paired by suffix) are fitted member by member, then their mean; the rows gain a leading
    column member (the suffix, or "mean"; series is the member's column, or RESPONSE[mean]);
    members= takes only those suffixes. A split of the members is warned of.

    Returns a DataFrame series, modes_chosen, mode, amplitude, amplitude_se, efold_time,
    efold_time_se, flux_at_onset, flux_at_onset_se, equilibrium, equilibrium_se, n_eff,
    flags; attrs["fits"] holds per series what --json writes (the BIC and RSS of every K,
    lag-1 of the residuals, n_eff, residual sd, equilibrium and forcing). An equilibrium
    extrapolated from fitted modes is a property of the fit, not a forecast.
    """
    inputs, opts = _forced.split("timescales", options, _SHARED)
    if joint and flux is None:
        raise SlowscanError("joint=True needs flux= (the net flux column)")
    table = _forced.read(data, inputs, "input")
    f = 1 if joint else None
    if ensemble or members is not None:
        if response is None:
            raise SlowscanError("ensemble=True needs response= (the ensemble NAME of the "
                                "columns NAME.MEMBER)")
        runs = ((m, column, _anomalies(run, opts, inputs)) for m, column, run in
                _ensemble.member_runs(table, response, flux if joint else None, members,
                                      bool(opts.get("annual")), "input"))
    else:
        names = [response] if response is not None else list(table.names)
        runs = ((None, name, _ready(table, [name] if not joint else [name, flux], opts,
                                    inputs, "input")) for name in names)
    rows, fits = [], {}
    for member, column, run in runs:
        s = Series(run, 0, f, opts, "timescales")
        s.name = column
        r = s.fit(opts)
        rows.extend(([member] if member else []) + row for row in _mode_rows(column, r))
        fits[column] = _fit_summary(s, r, max_modes(opts))
        _say_flags(s, r)
    columns = (["member"] if ensemble or members is not None else []) + TIMESCALES_COLUMNS
    out = _forced.frame(rows, columns).astype({"modes_chosen": np.int64, "mode": np.int64})
    out.attrs["fits"] = fits
    return out


def _mode_rows(name, r):
    flags = flag_names(r.flags)
    return [[name, int(r.nmodes), k + 1, m.a, m.se_a, m.tau, m.se_tau, m.c, m.se_c,
             r.equilibrium, r.se_equilibrium, r.n_eff, flags]
            for k, m in enumerate(r.modes[0:r.nmodes])]


def _fit_summary(s, r, kmax):
    return {"joint": bool(r.joint), "samples": int(r.n), "onset": s.onset,
            "lag1_residuals": r.r1, "n_eff": r.n_eff, "se_inflation": r.se_inflation,
            "residual_sd": r.sigma, "equilibrium": r.equilibrium,
            "equilibrium_se": r.se_equilibrium, "forcing": r.forcing,
            "forcing_se": r.se_forcing, "flags": flag_names(r.flags),
            "modes_chosen": int(r.nmodes),
            "choice": [{"modes": K, "fitted": r.choice[K - 1].status == 0,
                        "rss": r.choice[K - 1].rss, "bic": r.choice[K - 1].bic}
                       for K in range(1, kmax + 1)]}


def _say_flags(s, r):
    if r.flags & lib.TIMESCALES_FLAG_UNRESOLVED:
        warn("%s: column '%s': unresolved: the longest e-folding time (%.4g) exceeds a third "
             "of the record; the run cannot pin it or the equilibrium down"
             % (s.source, s.name, r.modes[r.nmodes - 1].tau))
    if r.flags & lib.TIMESCALES_FLAG_MULTISCALE:
        warn("%s: column '%s': multiscale: e-folding times %.4g and %.4g differ by more than "
             "10x" % (s.source, s.name, r.modes[0].tau, r.modes[r.nmodes - 1].tau))
