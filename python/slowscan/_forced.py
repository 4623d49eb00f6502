"""What feedback, timescales and emulate share, as the commands share it (cli/forced_inputs.c):
a run's chosen columns as a table of their own (annual means by month length with
annual=True, slowscan_feedback_annual_means), anomalies against a baseline (control) run
(baseline=, baseline_mode=, baseline_offset=; slowscan_feedback_anomalies), and lengths such
as skip= as the library's requests take them (slowscan_feedback_windows and
slowscan_timescales_select measure them on a run's axis). Inputs go through the
package's one normalisation (_inputs.Table)."""
import math

import numpy as np
import pandas as pd

from . import _config
from ._errors import SlowscanError
from ._inputs import Table, time_cells, is_number
from ._library import ffi, lib

INPUT_OPTIONS = ("time", "names", "calendar", "time_units", "missing", "start", "end",
                 "resample", "max_gap")
_MODES = {"mean": 0, "drift": 1}


def read(data, inputs, source, cut=True):
    """A Table of data, readied as the command reads an input (cut=False: not cut to
    start=/end=, as a baseline, step or control run is read whole). An xarray Dataset of
    one-dimensional variables is taken as the table of its variables."""
    if hasattr(data, "data_vars") and hasattr(data, "to_dataframe"):
        if len(data.dims) != 1:
            raise TypeError("a Dataset with dimensions %s: a run needs one time dimension"
                            % (tuple(data.dims),))
        data = data.to_dataframe()
    table = Table(data, inputs.get("time"), inputs.get("names"), inputs.get("calendar"),
                  inputs.get("time_units"), inputs.get("missing"), source=source)
    keys = ("start", "end", "resample", "max_gap") if cut else ("resample", "max_gap")
    table.ready(**{k: inputs[k] for k in keys if k in inputs})
    return table


def table_time(table):
    return np.frombuffer(ffi.buffer(table.c.time, table.c.n * 8), np.float64).copy()


def time_text(axis, v):
    """A time as the command prints it (cli_put_time): NaN, a number, or a date's text."""
    if not math.isfinite(v) or axis.unit == lib.TIME_AXIS_NUMBER:
        return float("nan") if not math.isfinite(v) else float(-v if axis.backward else v)
    buf = ffi.new("char[]", 64)
    lib.slowscan_time_axis_format(ffi.addressof(axis), v, buf, 64)
    return ffi.string(buf).decode()


def times(axis, values):
    """Times for a DataFrame column: numbers on a number axis, else the dates' text."""
    if axis.unit == lib.TIME_AXIS_NUMBER:
        return np.asarray(values, dtype=np.float64) * (-1 if axis.backward else 1)
    return np.array([time_text(axis, v) for v in values], dtype=object)


class Run:
    """Some columns of a table, owned here (numpy), on the table's axis: what a forced-run
    command works on (cli_forced_table)."""

    def __init__(self, source, axis, time, names, values, what, annual=False):
        self.source, self.axis, self.time = source, axis, time
        self.names, self.values = list(names), list(values)
        if annual:
            self._annual(what)

    @classmethod
    def of(cls, table, names, what, annual=False, labels=None):
        """Columns `names` of a Table (named `labels` in the run, default the same)."""
        n = table.c.n
        values = [np.frombuffer(ffi.buffer(table.c.values[column(table, name, what)], n * 8),
                                np.float64).copy() for name in names]
        return cls(table.source, ffi.new("time_axis *", table.c.axis)[0], table_time(table),
                   labels or names, values, what, annual)

    @property
    def n(self):
        return len(self.time)

    def _annual(self, what):
        if self.axis.unit != lib.TIME_AXIS_MONTHS:
            raise SlowscanError("annual=True: %s is not a monthly record (its time column is "
                                "not on months)" % what)
        cap = self.n // 12 + 2
        years, ny = np.empty(cap), ffi.new("size_t *")
        for k, v in enumerate(self.values):
            means = np.empty(cap)
            st = lib.slowscan_feedback_annual_means(
                self.axis.calendar, ptr(self.time), ptr(v), self.n, ptr(years),
                ptr(means), ny)
            if st == lib.SLOWSCAN_ENOMEM:
                raise MemoryError("slowscan: out of memory")
            if st != 0:
                raise SlowscanError("annual=True: %s holds no whole calendar year (January to "
                                    "December)" % what)
            self.values[k] = means[:ny[0]].copy()
        self.time = years[:ny[0]].copy()
        self.axis.unit, self.axis.precision = lib.TIME_AXIS_YEARS, lib.DATE_YEAR

    def anomalies(self, baseline, options):
        """Every column minus the baseline's column of the same name over this run's period
        (cli_forced_anomalies); refusals name baseline=."""
        offset = options.get("baseline_offset")
        offset = 0.0 if offset is None else _config._number("baseline_offset", offset)
        mode = options.get("baseline_mode") or "mean"
        if mode not in _MODES:
            raise SlowscanError("baseline_mode=%r: neither 'mean' nor 'drift'" % (mode,))
        what = "the baseline run"
        b = Run.of(baseline, self.names, what, bool(options.get("annual")))
        for k, name in enumerate(self.names):
            _anomaly(self, k, b, b.values[k], offset, _MODES[mode])
        return b, offset


def _anomaly(run, k, b, bv, offset, mode):
    start, until = run.time[0] + offset, run.time[-1] + offset
    reach = ffi.new("double[2]")
    if lib.slowscan_feedback_baseline_covers(ptr(run.time), run.n, ptr(b.time), ptr(bv), b.n,
                                             offset, reach, reach + 1) != 0:
        first, last = reach[0], reach[1]
        raise SlowscanError(
            "baseline=: the baseline run does not cover the period of %s for column '%s' (it "
            "has values from %.12g to %.12g; the run needs %.12g to %.12g after "
            "baseline_offset=%.12g)" % (run.source, run.names[k], first, last, start, until,
                                        offset))
    st = lib.slowscan_feedback_anomalies(ptr(run.time), ptr(run.values[k]), run.n,
                                         ptr(b.time), ptr(bv), b.n, offset, mode)
    if st == lib.SLOWSCAN_ENOMEM:
        raise MemoryError("slowscan: out of memory")
    if st != 0:
        raise SlowscanError(
            "baseline=: the baseline run has too few values of '%s' over the period of %s "
            "(times %.12g to %.12g after baseline_offset=%.12g)"
            % (run.names[k], run.source, start, until, offset))


def column(table, name, what, option=None):
    """The index of column `name` of a Table, or a refusal naming the option and its columns."""
    if name in table.names:
        return table.names.index(name)
    raise SlowscanError("%s%s has no column '%s' (columns: %s)" % (
        option + ": " if option else "", what, name, ", ".join(table.names)))


def request(option, value):
    """A length option (time units, 'N%' of a span, or with y/mon/d on a dated axis) as the
    library's requests hold it, a screen_length * (amount NaN: not given); the library measures
    it on the run's axis (cli_forced_request)."""
    if value is None:
        amount, percent, unit = float("nan"), 0, lib.LENGTH_AXIS
    else:
        amount, percent, unit = _config._length(option, value)
    return ffi.new("screen_length *", {"amount": amount, "percent": percent, "unit": unit})


def unmeasurable(option, value, axis):
    """The refusal of a length with no meaning on the run's axis (cli_forced_unmeasurable)."""
    return SlowscanError("%s=%r cannot be measured on this time axis (%s)" % (
        option, value, "plain numbers: give time units" if axis.unit ==
        lib.TIME_AXIS_NUMBER else "use its own unit"))


def axis_value(axis, option, value):
    """A time given as a number, a date's text, datetime64 or cftime, on `axis`."""
    if axis.unit == lib.TIME_AXIS_NUMBER and is_number(value):
        return float(value)
    text = value if isinstance(value, str) else time_cells(np.array([value]))[0][0]
    out = ffi.new("double *")
    if lib.slowscan_time_axis_value(ffi.addressof(axis), text.encode(), ffi.NULL, out) != 0:
        raise SlowscanError("%s=%r: not a time of the run" % (option, value))
    return out[0]


def split(command, options, own):
    """(input options, forced-run options) of a call; anything else is refused."""
    unknown = sorted(set(options) - set(own) - set(INPUT_OPTIONS))
    if unknown:
        raise TypeError("%s() got an unexpected keyword argument %r (its options: %s)"
                        % (command, unknown[0], ", ".join(own + INPUT_OPTIONS)))
    inputs = {k: v for k, v in options.items() if k in INPUT_OPTIONS and v is not None}
    rest = {k: v for k, v in options.items() if k in own}
    if rest.get("baseline") is None:
        for needs in ("baseline_mode", "baseline_offset"):
            if rest.get(needs) is not None:
                raise SlowscanError("%s= needs baseline= (the control run)" % needs)
    return inputs, rest


def frame(rows, columns):
    return pd.DataFrame(rows, columns=columns)


def ptr(a):
    return ffi.cast("double *", a.ctypes.data)


