"""slowscan for Python: screening time series for critical slowing down, on the slowscan
C library (through cffi, no compiled extension).

The functions mirror the commands: detrend, indicators, surrogates, screen. They take a
pandas DataFrame (index = time, one column per series), a pandas Series, an xarray
DataArray, or numpy arrays with time=; options are the command's, as keyword arguments with
its defaults; results are pandas DataFrames with the command's columns. The library's
refusals raise SlowscanError with its message; its warnings are SlowscanWarning.

Indicators of slowing down are evidence, not forecasts; decisions with consequences for
people belong to the responsible experts and authorities.
"""
from ._errors import SlowscanError, SlowscanWarning
from ._library import lib as _lib, ffi as _ffi, path as library_path
from ._detrend import detrend
from ._screen import Progress, screen
from ._rolling import indicators, surrogates

__version__ = _ffi.string(_lib.slowscan_version()).decode()

__all__ = ["detrend", "indicators", "surrogates", "screen", "Progress", "SlowscanError", "SlowscanWarning", "library_path", "__version__"]

# recovery, robustness and the forced-run functions (the commands of the same names)
from ._recovery import recovery, robustness  # noqa: E402
from ._feedback import feedback  # noqa: E402
from ._modes import timescales  # noqa: E402
from ._emulate import emulate  # noqa: E402
__all__ += ["recovery", "robustness", "feedback", "timescales", "emulate"]
