"""slowscan.feedback: the sliding regression N = F + lambda T of a forced run's net flux on its
response (the `feedback` command; response/feedback through slowscan_feedback_run), one row
per window, the run's one drift test in attrs."""
import math

import numpy as np

from . import _ensemble, _forced
from ._config import _number
from ._errors import SlowscanError, status_text
from ._library import ffi, lib

COLUMNS = ["start", "end", "pairs", "lambda", "lambda_se", "lambda_se_adjusted", "lambda_lo",
           "lambda_hi", "n_effective", "forcing", "forcing_se", "forcing_se_adjusted",
           "r_squared", "equilibrium", "equilibrium_se", "equilibrium_note", "flags"]
OWN = ("window", "stride", "fit", "noise_ratio", "skip", "fit_span", "scale", "baseline",
       "baseline_mode", "baseline_offset", "annual")
_NOTES = ("", "no_restoring_feedback", "no_fit")
_FLAGS = ("none", "weak", "reversed", "weak+reversed")
_VERDICTS = ("untested", "steady", "drifting")
_METHODS = ("none", "first_vs_last", "weighted_trend")


def feedback(data, flux, response, ensemble=False, members=None, **options):
    """The sliding-window regression N = F + lambda T of a forced run (Gregory et al. 2004),
    as `slowscan feedback --flux FLUX --response RESPONSE` writes it.

    data: the run (a DataFrame with index = time, an xarray Dataset, or values with time=
    and names=) holding the columns `flux` (net flux N) and `response` (T). Options, with the
    command's defaults: window=None (100 time units or 50% of the record after skip=,
    whichever is shorter), stride=None (a tenth of the window, at least one step),
    fit="ols" (or "tls"), noise_ratio=None (tls: required unless baseline= gives it),
    skip=None, fit_span=None (a pair (A, B): one fit over A..B), scale=1, baseline=None (a
    control run, read like data: both columns become anomalies against it),
    baseline_mode="mean" (or "drift"), baseline_offset=0, annual=False; for the input: time=,
    names=, calendar=, time_units=, missing=, start=, end=, resample=, max_gap=.

    ensemble=True: the columns FLUX.MEMBER and RESPONSE.MEMBER (at least 4 members) are
    fitted member by member, then the members' mean flux against their mean response; the
    rows gain a leading column member (the suffix, or "mean"); members= (a list or "a,b,...")
    takes only those suffixes. A split of the response's members is warned of.

    Returns a DataFrame with the command's columns, one row per window; attrs["run"] holds
    what --json writes for the run (settings and the drift test: verdict, method, windows,
    slope, slope_se, z, p_value). An equilibrium extrapolated from a transient is not a
    forecast. With ensemble=True, attrs["runs"] holds it per member.
    """
    inputs, opts = _forced.split("feedback", options, OWN)
    table = _forced.read(data, inputs, "input")
    annual = bool(opts.get("annual"))
    baseline = None
    if opts.get("baseline") is not None:
        baseline = _forced.read(opts["baseline"], inputs, "baseline", cut=False)
    if not (ensemble or members is not None):
        rows, summary = _one_run(_forced.Run.of(table, [flux, response], "input", annual),
                                 baseline, opts)
        out = _forced.frame(rows, COLUMNS)
        out.attrs["run"] = summary
        return out.astype({"pairs": np.int64})
    rows, runs = [], {}
    for member, _, run in _ensemble.member_runs(table, response, flux, members, annual,
                                                "input"):
        run.names = [flux, response]  # the order of a single run's columns
        run.values.reverse()
        got, runs[member] = _one_run(run, baseline, opts)
        rows.extend([member] + r for r in got)
    out = _forced.frame(rows, ["member"] + COLUMNS).astype({"pairs": np.int64})
    out.attrs["runs"] = runs
    return out


def _one_run(run, baseline, opts):
    """(rows, summary) of one run: anomalies, the configuration, the library's windows."""
    ratio = opts.get("noise_ratio")
    ratio = float("nan") if ratio is None else _positive("noise_ratio", ratio)
    estimated, offset = False, float("nan")
    if baseline is not None:
        b, offset = run.anomalies(baseline, opts)
        if opts.get("fit", "ols") == "tls" and math.isnan(ratio):
            ratio, estimated = _ratio_from(b, run, offset), True
    cfg = _configure(run, opts, ratio)
    count = ffi.new("size_t *")
    time, n = _forced.ptr(run.time), run.n
    if lib.slowscan_feedback_window_count(time, n, cfg, count) != 0:
        raise SlowscanError("%s: no window fits the record with these options" % run.source)
    w = ffi.new("feedback_window[]", count[0])
    drift = ffi.new("feedback_drift *")
    st = lib.slowscan_feedback_run(time, _forced.ptr(run.values[0]),
                                   _forced.ptr(run.values[1]), n, cfg, w, count[0], drift)
    if st != 0:
        raise SlowscanError("%s: the feedback regression failed (%s)"
                            % (run.source, status_text(st)), st)
    return [_row(run.axis, w[j]) for j in range(count[0])], \
        _summary(cfg, count[0], drift, estimated, offset)


def _positive(option, value):
    v = _number(option, value)
    if not v > 0 or math.isinf(v):
        raise SlowscanError("%s=%r: a positive number is needed" % (option, value))
    return v


def _ratio_from(b, run, offset):
    """The TLS noise ratio from the baseline run over this run's period."""
    ratio = ffi.new("double *")
    st = lib.slowscan_feedback_noise_ratio(
        _forced.ptr(b.time), _forced.ptr(b.values[0]), _forced.ptr(b.values[1]), b.n,
        run.time[0] + offset, run.time[-1] + offset, ratio)
    if st != 0:
        raise SlowscanError("fit='tls': the noise ratio cannot be estimated from the baseline "
                            "run (%s); give noise_ratio=" % status_text(st), st)
    return ratio[0]


def _configure(run, opts, ratio):
    """The library's configuration of the run, as the command makes it (cmd_feedback.c): the
    options as given; their defaults and checks are slowscan_feedback_windows'."""
    c = ffi.new("feedback_config *", lib.slowscan_feedback_config_default())
    fit = opts.get("fit") or "ols"
    if fit not in ("ols", "tls"):
        raise SlowscanError("fit=%r: neither 'ols' nor 'tls'" % (fit,))
    c.fit = lib.FEEDBACK_TLS if fit == "tls" else lib.FEEDBACK_OLS
    if fit == "tls" and math.isnan(ratio):
        raise SlowscanError("fit='tls' needs noise_ratio= (the variance of N's noise over "
                            "T's) or baseline= to estimate it from")
    c.noise_ratio = ratio
    if opts.get("scale") is not None:
        c.scale = _number("scale", opts["scale"])
    q = ffi.new("feedback_request *", lib.slowscan_feedback_request_default())
    unread = None
    if opts.get("fit_span") is not None:
        q.span = 1
        unread = _span(run, opts["fit_span"], q)
    else:
        for key in ("skip", "window", "stride"):
            setattr(q, key, _forced.request(key, opts.get(key))[0])
    d = ffi.new("feedback_windows_detail *")
    if lib.slowscan_feedback_windows(_forced.ptr(run.time), run.n, ffi.addressof(run.axis), q,
                                     c, d) != 0:
        raise _refusal(run, opts, c, d[0], unread)
    return c


def _span(run, span, q):
    """fit_span=(A, B) as times of the run into q; the error of a span that cannot be read,
    raised only when the library refuses the span (after its sample count, as the command)."""
    try:
        try:
            a, b = span
        except (TypeError, ValueError):
            raise TypeError("fit_span=: a pair (A, B) of times is needed") from None
        q.span_from = _forced.axis_value(run.axis, "fit_span", a)
        q.span_until = _forced.axis_value(run.axis, "fit_span", b)
    except (TypeError, SlowscanError) as e:
        q.span_from = q.span_until = float("nan")
        return e
    return None


def _refusal(run, opts, c, d, unread):
    """The library's refusal of the run's windows (slowscan_feedback_windows) in keywords."""
    label = "(default)" if opts.get("window") is None else repr(opts["window"])
    why = {lib.FEEDBACK_REFUSAL_SAMPLES: lambda: "%s: %d samples; a feedback regression "
           "needs at least 4" % (run.source, run.n),
           lib.FEEDBACK_REFUSAL_SPAN: lambda: "fit_span=%r: not an increasing span inside the "
           "record of %s" % (opts.get("fit_span"), run.source),
           lib.FEEDBACK_REFUSAL_SKIP: lambda: "skip=%r: leaves less than 4 samples of %s"
           % (opts.get("skip"), run.source),
           lib.FEEDBACK_REFUSAL_WINDOW_LONG: lambda: "window=%s: %.12g time units is longer "
           "than the record of %s (%.12g after skip=)" % (label, c.window, run.source, d.rest),
           lib.FEEDBACK_REFUSAL_WINDOW_SHORT: lambda: "window=%s: fewer than 4 samples per "
           "window in %s" % (label, run.source),
           lib.FEEDBACK_REFUSAL_STRIDE_SHORT: lambda: "stride=%r: shorter than the time step "
           "(%.12g) of %s" % (opts.get("stride"), d.step, run.source)}
    if d.refusal == lib.FEEDBACK_REFUSAL_SPAN and unread is not None:
        return unread
    if d.refusal == lib.FEEDBACK_REFUSAL_UNIT:
        key = ("skip", "window", "stride")[d.length]
        return _forced.unmeasurable(key, opts.get(key), run.axis)
    return SlowscanError(why[d.refusal]())


def _row(axis, w):
    return [_forced.time_text(axis, w.start), _forced.time_text(axis, w.end), int(w.n),
            getattr(w, "lambda"), w.se_lambda, w.se_lambda_adj, w.lo, w.hi, w.n_eff, w.forcing,
            w.se_forcing, w.se_forcing_adj, w.r2, w.t_eq, w.se_t_eq, _NOTES[w.teq_reason],
            _FLAGS[w.flags & 3]]


def _summary(c, count, d, estimated, offset):
    """The run's entry of --json."""
    span = not math.isnan(c.span_from)
    return {"fit": "tls" if c.fit == lib.FEEDBACK_TLS else "ols",
            "noise_ratio": c.noise_ratio if c.fit == lib.FEEDBACK_TLS else float("nan"),
            "noise_ratio_from_baseline": estimated, "baseline_offset": offset,
            "window": float("nan") if span else c.window,
            "stride": float("nan") if span else c.stride,
            "skip": float("nan") if span else c.skip, "scale": c.scale, "windows": count,
            "drift": {"verdict": _VERDICTS[d.verdict], "method": _METHODS[d.method],
                      "windows": int(d.windows), "slope": d.slope, "slope_se": d.se_slope,
                      "z": d.z, "p_value": d.p_value}}
