"""Keyword arguments -> the library's screen_config, starting from its defaults
(slowscan_screen_config_default), with the command line's per-command defaults and the same
spellings of values ("50%", "gaussian-linear", "phase")."""
import math
import os

from ._errors import SlowscanError
from ._inputs import is_number
from ._library import ffi, lib

_ALTERNATIVES = {"increasing": 0, "decreasing": 1, "two-sided": 2}
_UNITS = {"d": "LENGTH_DAYS", "mon": "LENGTH_MONTHS", "y": "LENGTH_YEARS"}


def _length(option, value):
    """A length: a number (time units), 'N%' of the span, or 'Nd', 'Nmon', 'Ny'."""
    if is_number(value):
        if not value > 0 or math.isinf(value):
            raise SlowscanError("%s=%r: a positive length is needed" % (option, value))
        return float(value), 0, lib.LENGTH_AXIS
    if not isinstance(value, str):
        raise TypeError("%s=: a number (time units) or a string such as '50%%' is needed, not "
                        "%s" % (option, type(value).__name__))
    text = value.strip()
    for suffix, unit in [("%", None)] + sorted(_UNITS.items(), key=lambda s: -len(s[0])):
        if text.endswith(suffix):
            try:
                amount = float(text[:-len(suffix)])
            except ValueError:
                break
            if not amount > 0 or math.isinf(amount) or (unit is None and amount > 100):
                break
            return amount, int(unit is None), getattr(lib, unit) if unit else lib.LENGTH_AXIS
    try:
        amount = float(text)
        if amount > 0 and not math.isinf(amount):
            return amount, 0, lib.LENGTH_AXIS
    except ValueError:
        pass
    raise SlowscanError("%s=%r: not a length (a number of time units, a percentage of the "
                        "span up to 100%%, or a number followed by d, mon or y)" % (option, value))


def _set_length(field, option, value):
    field.amount, field.percent, field.unit = _length(option, value)


def _whole(option, value, low, high=None):
    if not isinstance(value, int) or isinstance(value, bool):
        raise TypeError("%s=: a whole number is needed, not %s" % (option, type(value).__name__))
    if value < low or (high is not None and value > high):
        raise SlowscanError("%s=%d: a whole number %s is needed" % (
            option, value, ">= %d" % low if high is None else "in %d..%d" % (low, high)))
    return value


def _number(option, value):
    if not is_number(value):
        raise TypeError("%s=: a number is needed, not %s" % (option, type(value).__name__))
    return float(value)


def _indicators(cfg, value, command):
    names = value.split(",") if isinstance(value, str) else list(value)
    kind = ffi.new("indicator_kind *")
    cfg.nindicators = 0
    cfg.drift_test = 0
    for name in names:
        if not isinstance(name, str):
            raise TypeError("indicators=: names are needed, not %s" % type(name).__name__)
        name = name.strip()
        if name == "recovery_trend":
            if command not in ("screen", "robustness"):
                raise SlowscanError("indicators=: recovery_trend is a test of screen and "
                                    "robustness, not a rolling indicator")
            cfg.drift_test = 1
            continue
        if lib.slowscan_indicator_lookup(name.encode(), kind) != 0:
            raise SlowscanError("indicators=: unknown indicator '%s' (%s)" % (name, ", ".join(
                ffi.string(lib.slowscan_indicator_name(k)).decode()
                for k in range(lib.INDICATOR_COUNT))))
        if any(cfg.indicators[j] == kind[0] for j in range(cfg.nindicators)):
            raise SlowscanError("indicators=: '%s' is listed twice" % name)
        cfg.indicators[cfg.nindicators] = kind[0]
        cfg.nindicators += 1
    if cfg.nindicators == 0 and not cfg.drift_test:
        raise SlowscanError("indicators=: no indicator given")


def _null(cfg, value, keep):
    kind = ffi.new("surrogate_kind *")
    if not isinstance(value, str) or lib.slowscan_surrogate_lookup(value.encode(), kind) != 0:
        raise SlowscanError("null=%r: not a null model (%s)" % (value, ", ".join(
            ffi.string(lib.slowscan_surrogate_name(k)).decode()
            for k in range(lib.SURROGATE_COUNT))))
    cfg.null_kind = kind[0]  # its streams are named by make_config, as the command names them


def _detrend(cfg, value):
    if not isinstance(value, str):
        raise TypeError("detrend=: a method name is needed, not %s" % type(value).__name__)
    if lib.slowscan_detrend_parse_method(value.encode(), ffi.addressof(cfg, "detrend")) != 0:
        raise SlowscanError("detrend=%r: not a method (gaussian-linear, gaussian, moving, "
                            "loess, linear, poly:K, difference, none)" % value)


def _band(cfg, value):
    try:
        lo, hi = (float(v) for v in value)
    except (TypeError, ValueError):
        raise TypeError("band=: a pair (lo, hi) of frequencies is needed") from None
    if not 0 < lo < hi:
        raise SlowscanError("band=%r: 0 < lo < hi is needed" % (value,))
    cfg.band_lo, cfg.band_hi = lo, hi


def _alternative(cfg, value):
    if value not in _ALTERNATIVES:
        raise SlowscanError("alternative=%r: not increasing, decreasing or two-sided"
                            % (value,))
    cfg.alternative = _ALTERNATIVES[value]


def _threads(value):
    if value is None:
        return len(os.sched_getaffinity(0)) if hasattr(os, "sched_getaffinity") else 1
    return _whole("threads", value, 1, 256)


# keyword -> what it sets; each takes (cfg, value, keep, command)
_SETTERS = {
    "detrend": lambda c, v, k, m: _detrend(c, v),
    "bandwidth": lambda c, v, k, m: _set_length(c.bandwidth, "bandwidth", v),
    "deseason": lambda c, v, k, m: setattr(c, "deseason", _number("deseason", v)),
    "deseason_window": lambda c, v, k, m: _set_length(c.deseason_window, "deseason_window", v),
    "harmonics": lambda c, v, k, m: setattr(c, "harmonics", _whole("harmonics", v, 0, 1000)),
    "window": lambda c, v, k, m: _set_length(c.window, "window", v),
    "indicators": lambda c, v, k, m: _indicators(c, v, m),
    "min_coverage": lambda c, v, k, m: setattr(c, "min_coverage", _number("min_coverage", v)),
    "recovery": lambda c, v, k, m: setattr(c, "recovery", {"log": lib.RECOVERY_LOG_AR1,
                                                           "increments": lib.RECOVERY_INCREMENTS}
                                           [v] if v in ("log", "increments") else _bad(
                                               "recovery", v, "neither 'log' nor 'increments'")),
    "step": lambda c, v, k, m: setattr(c, "step", _whole("step", v, 1)),
    "band": lambda c, v, k, m: _band(c, v),
    "surrogates": lambda c, v, k, m: setattr(c, "surrogates", _whole("surrogates", v, 0, 10**8)),
    "null": lambda c, v, k, m: _null(c, v, k),
    "iaaft_tol": lambda c, v, k, m: setattr(c.null_options, "iaaft_tolerance",
                                            _number("iaaft_tol", v)),
    "iaaft_iterations": lambda c, v, k, m: setattr(c.null_options, "iaaft_max_iterations",
                                                   _whole("iaaft_iterations", v, 1)),
    "block_length": lambda c, v, k, m: setattr(c.null_options, "block_length",
                                               _whole("block_length", v, 1)),
    "fdr": lambda c, v, k, m: setattr(c, "fdr", _number("fdr", v)),
    "alternative": lambda c, v, k, m: _alternative(c, v),
    "noise_trend": lambda c, v, k, m: setattr(c, "noise_trend", int(bool(v))),
    "seed": lambda c, v, k, m: setattr(c, "seed", _whole("seed", v, 0, 2**63 - 1)),
    "threads": lambda c, v, k, m: setattr(c, "threads", _threads(v)),
}


def _bad(option, value, why):
    raise SlowscanError("%s=%r: %s" % (option, value, why))


# the options of each command (as the command line accepts them)
SERIES = ("detrend", "bandwidth", "deseason", "deseason_window", "harmonics")
ROLLING = SERIES + ("window", "indicators", "min_coverage", "recovery", "step", "band")
NULL = ("surrogates", "null", "iaaft_tol", "iaaft_iterations", "block_length", "seed")
OPTIONS = {
    "detrend": SERIES,
    "indicators": ROLLING,
    "surrogates": SERIES + NULL,
    "screen": ROLLING + NULL + ("fdr", "alternative", "noise_trend", "threads"),
    "screen_grid": ROLLING + NULL + ("fdr", "alternative", "noise_trend", "threads"),
}


def make_config(command, options, keep):
    """A screen_config for `command` from its keyword options (unknown ones refused)."""
    allowed = OPTIONS[command]
    unknown = sorted(set(options) - set(allowed))
    if unknown:
        raise TypeError("%s() got an unexpected keyword argument %r (its options: %s)"
                        % (command, unknown[0], ", ".join(allowed)))
    cfg = ffi.new("screen_config *", lib.slowscan_screen_config_default())
    if command == "surrogates":
        cfg.surrogates = 10  # the command writes a few by default
    cfg.threads = 1
    for name in allowed:  # a fixed order: indicators before anything that reads them
        if name in options and options[name] is not None:
            _SETTERS[name](cfg, options[name], keep, command)
        elif name == "threads":
            cfg.threads = _threads(None)
    if not math.isnan(cfg.deseason) and cfg.deseason <= 0:
        raise SlowscanError("deseason=%g: a positive period is needed" % cfg.deseason)
    if not 0 < cfg.min_coverage <= 1:
        raise SlowscanError("min_coverage=%g: a share in (0, 1] is needed" % cfg.min_coverage)
    if not 0 < cfg.fdr < 1:
        raise SlowscanError("fdr=%g: a rate strictly between 0 and 1 is needed" % cfg.fdr)
    # the random streams carry the null's own name (a static string of the library)
    cfg.null_name = lib.slowscan_surrogate_name(cfg.null_kind)
    return cfg
