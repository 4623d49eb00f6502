"""One normalisation of every input kind into the library's series table.

numpy arrays (values plus a time array), a pandas DataFrame (index = time, columns =
series), a pandas Series, or a one-dimensional xarray DataArray become a time column and
named series. The time column is handed to the library as text cells, exactly as a CSV's
time column would be written, so that the library's own reader (slowscan_table_from_memory)
decides what it is — numbers, dates on a calendar, monthly or yearly records — and applies
the command's checks (missing or non-increasing time, infinite values, missing-value codes);
then the grid is made regular (slowscan_table_regularize: gaps filled with missing rows) and
values that look like unflagged missing-value codes are reported (slowscan_table_suspect_code).
Times may be numbers, numpy datetime64 values or cftime objects (their calendar goes with
them: noleap, 360_day, all_leap, julian, proleptic_gregorian, standard).
"""
import numbers

import numpy as np

from ._errors import SlowscanError, io_refusal, warn
from ._library import ffi, lib

MIN_ROWS = 8  # as the command: fewer samples in the analysed span say nothing


def _is_cftime(values):
    return values.dtype == object and len(values) > 0 and hasattr(values[0], "calendar") \
        and hasattr(values[0], "year")


def calendar_kind(name):
    kind = ffi.new("calendar_kind *")
    if not isinstance(name, str) or lib.slowscan_calendar_lookup(name.encode(), kind) != 0:
        raise SlowscanError("calendar=%r: not a calendar of the CF conventions (standard, "
                            "gregorian, proleptic_gregorian, noleap, 365_day, all_leap, "
                            "366_day, 360_day, julian)" % (name,))
    return kind[0]


def _date_text(year, month, day, hour, minute, second, microsecond, with_time):
    sign = "-" if year < 0 else "+" if year > 9999 else ""
    text = "%s%04d-%02d-%02d" % (sign, abs(year), month, day)
    if with_time:
        text += "T%02d:%02d:%02d" % (hour, minute, second)
        if microsecond:
            text += (".%06d" % microsecond).rstrip("0")
    return text


def _cftime_cells(values):
    calendars = {v.calendar for v in values if v is not None}
    if len(calendars) != 1:
        raise SlowscanError("time: cftime dates on %d calendars (%s); one is needed"
                            % (len(calendars), ", ".join(sorted(map(str, calendars)))))
    calendar = calendars.pop() or "standard"
    with_time = any(v is not None and (v.hour or v.minute or v.second or v.microsecond)
                    for v in values)
    cells = ["NA" if v is None else
             _date_text(v.year, v.month, v.day, v.hour, v.minute, v.second, v.microsecond,
                        with_time) for v in values]
    return cells, calendar


def _datetime64_cells(values):
    values = values.astype("datetime64[us]")
    finite = values[~np.isnat(values)]
    micro = finite.astype(np.int64)
    day = 86400 * 10**6
    unit = "D" if np.all(micro % day == 0) else "m" if np.all(micro % (60 * 10**6) == 0) \
        else "s" if np.all(micro % 10**6 == 0) else "us"
    cells = np.datetime_as_string(values, unit=unit)
    return ["NA" if np.isnat(v) else c for v, c in zip(values, cells)]


def _number_cells(values):
    if values.dtype.kind in "iu":
        return [str(int(v)) for v in values]
    return [repr(float(v)) for v in values]


def time_cells(time, calendar=None):
    """The time column as text cells and the calendar they are on."""
    t = np.asarray(time)
    if t.ndim != 1:
        raise TypeError("time: a one-dimensional array of times is needed, not %d dimensions"
                        % t.ndim)
    if t.dtype.kind == "M":
        return _datetime64_cells(t), calendar or "standard"
    if t.dtype.kind in "iuf":
        return _number_cells(t), calendar or "standard"
    if _is_cftime(t):
        cells, own = _cftime_cells(t)
        if calendar is not None and calendar_kind(calendar) != calendar_kind(own):
            raise SlowscanError("calendar=%r: the cftime dates are on the %s calendar"
                                % (calendar, own))
        return cells, own
    if t.dtype == object and len(t) and all(hasattr(v, "year") for v in t):
        return _datetime64_cells(t.astype("datetime64[us]")), calendar or "standard"
    raise TypeError("time: numbers, numpy datetime64 values or cftime dates are needed, not "
                    "%s" % (t.dtype,))


def _series_values(values, name):
    v = np.asarray(values)
    if v.dtype.kind not in "iufb":
        raise TypeError("series %r: numbers are needed, not %s" % (name, v.dtype))
    return np.ascontiguousarray(v, dtype=np.float64)


def columns(data, time=None, names=None):
    """(time, names, [value arrays], time name) of any accepted input."""
    try:
        import pandas as pd
    except ImportError:  # pragma: no cover - pandas is a dependency of the package
        pd = None
    if pd is not None and isinstance(data, pd.DataFrame):
        if time is not None:
            raise TypeError("time=: a DataFrame carries its times in its index")
        index = data.index
        t = index.to_numpy() if not hasattr(index, "to_datetimeindex") else np.asarray(index)
        cols = [str(c) for c in data.columns]
        return t, cols, [_series_values(data[c].to_numpy(), str(c)) for c in data.columns], \
            str(index.name) if index.name is not None else "time"
    if pd is not None and isinstance(data, pd.Series):
        if time is not None:
            raise TypeError("time=: a Series carries its times in its index")
        name = str(data.name) if data.name is not None else (names or ["series"])[0]
        return np.asarray(data.index), [name], [_series_values(data.to_numpy(), name)], \
            str(data.index.name) if data.index.name is not None else "time"
    if hasattr(data, "dims") and hasattr(data, "coords"):  # a one-dimensional DataArray
        if len(data.dims) != 1:
            raise TypeError("a DataArray with dimensions %s: screen() takes grids; here one "
                            "time dimension is needed" % (data.dims,))
        dim = data.dims[0]
        name = str(data.name) if data.name is not None else (names or ["series"])[0]
        return np.asarray(data[dim].values), [name], [_series_values(data.values, name)], \
            str(dim)
    v = np.asarray(data)
    if v.ndim == 0 or v.ndim > 2:
        raise TypeError("values: a one- or two-dimensional array is needed (time first), not "
                        "%d dimensions" % v.ndim)
    if v.ndim == 1:
        v = v[:, None]
    if time is None:
        time = np.arange(v.shape[0])
    if names is None:
        names = ["series"] if v.shape[1] == 1 else ["series%d" % k for k in range(v.shape[1])]
    if isinstance(names, str):
        names = [names]
    names = [str(n) for n in names]
    if len(names) != v.shape[1]:
        raise ValueError("names: %d names for %d series" % (len(names), v.shape[1]))
    if len(np.asarray(time)) != v.shape[0]:
        raise ValueError("time: %d times for %d samples" % (len(np.asarray(time)), v.shape[0]))
    return np.asarray(time), names, [_series_values(v[:, k], names[k])
                                     for k in range(v.shape[1])], "time"


class Table:
    """A series_table owned by Python (freed with it)."""

    def __init__(self, data, time=None, names=None, calendar=None, time_units=None,
                 missing=None, source="input", notices=True):
        t, self.names, values, time_name = columns(data, time, names)
        cells, cal = time_cells(t, calendar)
        for v in values:
            if len(v) != len(cells):
                raise ValueError("time: %d times for %d samples" % (len(cells), len(v)))
        keep = []

        def text(s):
            b = ffi.new("char[]", s.encode())
            keep.append(b)
            return b

        options = ffi.new("csv_read_options *", lib.slowscan_csv_read_options_default())
        options.calendar = calendar_kind(cal)
        if time_units is not None:
            units = ffi.new("time_units *")
            problem = ffi.new("time_units_problem *")
            if lib.slowscan_time_units_parse(text(time_units), options.calendar, units,
                                             problem) != 0:
                raise SlowscanError("time_units=%r: %s" % (time_units, ffi.string(
                    lib.slowscan_time_units_problem_text(problem[0])).decode()))
            keep.append(units)
            options.units = units
        if missing is not None:
            codes = np.atleast_1d(np.asarray(missing, dtype=np.float64))
            keep.append(codes)
            options.missing = ffi.cast("const double *", codes.ctypes.data)
            options.nmissing = len(codes)
        cell_ptrs = ffi.new("const char *[]", [text(c) for c in cells] or [ffi.NULL])
        name_ptrs = ffi.new("const char *[]", [text(n) for n in self.names] or [ffi.NULL])
        value_ptrs = ffi.new("const double *[]", [ffi.cast("const double *", v.ctypes.data)
                                                  for v in values] or [ffi.NULL])
        self.c = ffi.gc(ffi.new("series_table *"), lib.slowscan_series_table_free)
        err = ffi.new("io_error *")
        st = lib.slowscan_table_from_memory(text(source), text(time_name), cell_ptrs,
                                            len(cells), name_ptrs, value_ptrs,
                                            len(self.names), options, self.c, err)
        if st != 0:
            raise io_refusal(st, err)
        self.source = source
        self.notices = notices

    def _grid(self, resample, max_gap, err):
        """A regular grid: resample= onto one (with its guard against long gaps), or the
        rows as they are with gaps filled (slowscan_table_regularize)."""
        gaps = ffi.new("size_t *")
        if resample is not None:
            if not is_number(resample):
                raise TypeError("resample=: a time step (a number) is needed")
            st = lib.slowscan_table_resample_within(
                self.c, float(resample), 2.0 if max_gap is None else float(max_gap), err)
        else:
            st = lib.slowscan_table_regularize(self.c, gaps, err)
        if st != 0:
            raise io_refusal(st, err)
        if self.notices and gaps[0]:
            unit = lib.slowscan_time_axis_unit_name(self.c.axis.unit)
            unit = " " + ffi.string(unit).decode() if unit != ffi.NULL else ""
            warn("%s: %d row%s missing from the regular grid (step %.15g%s) were read as "
                 "missing values" % (self.source, gaps[0], "" if gaps[0] == 1 else "s",
                                     self.c.time[1] - self.c.time[0], unit))
        if self.notices and self.c.coded_missing:
            warn("%s: %d value%s given by missing= read as missing" % (
                self.source, self.c.coded_missing, "" if self.c.coded_missing == 1 else "s"))
        code = ffi.new("suspect_code *")
        for k in range(self.c.nseries):
            if self.notices and lib.slowscan_table_suspect_code(self.c, k, code):
                warn("%s: series '%s': the value %.15g occurs %d time%s, each time far outside "
                     "its neighbours; if it stands for missing data, give missing=%.15g"
                     % (self.source, self.names[k], code.value, code.count,
                        "" if code.count == 1 else "s", code.value))

    def bound(self, option, value):
        """start=/end= on the table's axis: a number on a number axis, a date (text,
        datetime64, cftime) on a dated one; NaN when not given."""
        if value is None:
            return float("nan")
        axis = self.c.axis
        if axis.unit == lib.TIME_AXIS_NUMBER and is_number(value):
            return float(value)
        text = value if isinstance(value, str) else time_cells(np.array([value]))[0][0]
        out = ffi.new("double *")
        if lib.slowscan_time_axis_value(ffi.addressof(axis), text.encode(), ffi.NULL, out) != 0:
            what = "numbers" if axis.unit == lib.TIME_AXIS_NUMBER else \
                "dates on the %s calendar" % ffi.string(
                    lib.slowscan_calendar_name(axis.calendar)).decode()
            raise SlowscanError("%s=%r: not a time of the input, whose times are %s"
                                % (option, value, what))
        return out[0]

    def ready(self, start=None, end=None, log=False, resample=None, max_gap=None):
        """As the command readies a table: the span start..end, the grid, log=, then at least
        MIN_ROWS samples; the notices about what was read as missing."""
        err = ffi.new("io_error *")
        lo, hi = self.bound("start", start), self.bound("end", end)
        if lo == lo or hi == hi:
            st = lib.slowscan_table_select_span(self.c, lo, hi, err)
            if st != 0:
                raise io_refusal(st, err)
        self._grid(resample, max_gap, err)
        if log:
            st = lib.slowscan_table_log(self.c, err)
            if st != 0:
                raise io_refusal(st, err)
        if self.c.n < MIN_ROWS:
            raise SlowscanError("%s: %d samples in the analysed span; at least %d are needed"
                                % (self.source, self.c.n, MIN_ROWS))
        return self

    @property
    def n(self):
        return self.c.n

    def time_values(self):
        return np.frombuffer(ffi.buffer(self.c.time, self.c.n * 8), dtype=np.float64).copy()

    def time_text(self):
        """The table's times as the command prints them (made once: the table is ready)."""
        if getattr(self, "_time_text", None) is None:
            self._time_text = self._format_times()
        return self._time_text

    def _format_times(self):
        axis = self.c.axis
        buf = ffi.new("char[]", 64)
        out = []
        for i in range(self.c.n):
            v = self.c.time[i]
            if axis.unit == lib.TIME_AXIS_NUMBER or v != v:
                out.append(number_text(-v if axis.backward else v))
            else:
                lib.slowscan_time_axis_format(ffi.addressof(axis), v, buf, 64)
                out.append(ffi.string(buf).decode())
        return out


def number_text(v):
    """A number as the command prints it (%.12g, NA for NaN, no -0)."""
    if v != v or v in (float("inf"), float("-inf")):
        return "NA"
    return "%.12g" % (0.0 if v == 0 else v)


def is_number(x):
    return isinstance(x, numbers.Real) and not isinstance(x, bool)
