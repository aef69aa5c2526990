"""Error types of wakemeter.

One root, :class:`WakemeterError`; every subclass also inherits the built-in
exception it resembles, so callers may catch either.  Third-party errors are
translated at the boundary of the package that calls them (``raise ... from err``).
"""

from __future__ import annotations


class WakemeterError(Exception):
    """Root of every error raised on purpose by wakemeter."""


class ParameterError(WakemeterError, ValueError):
    """A parameter is outside what the method allows (names it, its value and the range)."""


class TooLittleWaterError(ParameterError):
    """The area around the vessel has too little open water (valid pixels) for the analysis asked for; another
    stage with a smaller footprint may still look (the wave spectrum's box -> the line search)."""


class SceneReadError(WakemeterError, OSError):
    """A scene cannot be opened or read (names the file and what is wrong)."""


class GeoreferenceError(WakemeterError, ValueError):
    """A scene has no usable georeference for the operation asked for."""


class SceneWriteError(WakemeterError, OSError):
    """An output file cannot be written; nothing half-written is left behind."""


class SetExistsError(SceneWriteError):
    """An evidence set of that name is already there and replacing it was not asked for."""

    def __init__(self, message: str, *, name: str = "", folder: str = ""):
        super().__init__(message)
        self.name, self.folder = name, folder


class CancelledError(WakemeterError):
    """Long work was cancelled by the user."""


def check_finite(name: str, value: object) -> None:
    """Raise :class:`ParameterError` if ``value`` (scalar or array) holds NaN or inf."""
    import numpy as np

    arr = np.asarray(value, dtype=float)
    if not np.all(np.isfinite(arr)):
        raise ParameterError(f"{name} must be finite, got {_show(arr, ~np.isfinite(arr))}")


def check_positive(name: str, value: object, *, allow_inf: bool = False, allow_zero: bool = False) -> None:
    """Raise :class:`ParameterError` unless every element of ``value`` is > 0 (or >= 0)."""
    import numpy as np

    arr = np.asarray(value, dtype=float)
    if np.any(np.isnan(arr)):
        raise ParameterError(f"{name} must be a number, got {_show(arr, np.isnan(arr))}")
    if not allow_inf and np.any(np.isinf(arr)):
        raise ParameterError(f"{name} must be finite, got {_show(arr, np.isinf(arr))}")
    bad = arr < 0 if allow_zero else arr <= 0
    if np.any(bad):
        rel = ">= 0" if allow_zero else "> 0"
        raise ParameterError(f"{name} must be {rel}, got {_show(arr, bad)}")


def _show(arr, bad) -> str:
    """The offending value(s) in plain numbers (never an array repr)."""
    import numpy as np

    if arr.ndim == 0:
        return f"{float(arr):g}"
    values = ", ".join(f"{float(v):g}" for v in np.asarray(arr)[bad].ravel()[:3])
    n = int(np.count_nonzero(bad))
    return values if n <= 3 else f"{values} and {n - 3} more of {arr.size} values"
