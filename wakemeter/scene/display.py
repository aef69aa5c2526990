"""Display helpers: percentile stretch, gamma, radar intensity to dB, band choice / RGB composite.

All take float arrays with an optional validity mask and return float32 in
[0, 1] (or (rows, cols, 3) for composites); invalid pixels become NaN.
"""

from __future__ import annotations

import numpy as np

from ..errors import ParameterError
from .sensor import BandRole, band_roles


def to_db(intensity: np.ndarray, *, floor: float = 1e-10) -> np.ndarray:
    """10 log10 of linear radar intensity (values below ``floor`` clipped to it)."""
    return (10.0 * np.log10(np.maximum(np.asarray(intensity, dtype=np.float64), floor))).astype(np.float32)


def percentile_stretch(
    data: np.ndarray, valid: np.ndarray | None = None, *, low: float = 2.0, high: float = 98.0, gamma: float = 1.0
) -> np.ndarray:
    """Linear stretch between two percentiles of the valid pixels, then gamma."""
    if not 0 <= low < high <= 100:
        raise ParameterError(f"percentiles must satisfy 0 <= low < high <= 100, got {low!r}, {high!r}")
    if not np.isfinite(gamma) or gamma <= 0:
        raise ParameterError(f"gamma must be > 0, got {gamma!r}")
    a = np.asarray(data, dtype=np.float32)
    ok = np.isfinite(a) if valid is None else (valid & np.isfinite(a))
    if not np.any(ok):
        return np.full(a.shape, np.nan, dtype=np.float32)
    lo, hi = np.percentile(a[ok], [low, high])
    if hi <= lo:
        hi = lo + 1.0
    out = np.clip((a - lo) / (hi - lo), 0.0, 1.0)
    if gamma != 1.0:
        out = out ** (1.0 / gamma)
    return np.where(ok, out, np.nan).astype(np.float32)


def composite(
    bands: np.ndarray,
    valid: np.ndarray | None = None,
    *,
    rgb: tuple[int, int, int] | None = None,
    low: float = 2.0,
    high: float = 98.0,
    gamma: float = 1.0,
    db: bool = False,
) -> np.ndarray:
    """Grey (one band) or RGB (three chosen band indices, 0-based) display image.

    Returns (rows, cols) for grey, (rows, cols, 3) for RGB.
    """
    b = np.asarray(bands, dtype=np.float32)
    if b.ndim == 2:
        b = b[None]
        valid = None if valid is None else valid[None]
    if db:
        b = to_db(b)
    if rgb is None:
        return percentile_stretch(b[0], None if valid is None else valid[0], low=low, high=high, gamma=gamma)
    if any(i < 0 or i >= b.shape[0] for i in rgb):
        raise ParameterError(f"rgb band indices must be within 0..{b.shape[0] - 1}, got {rgb!r}")
    chans = [
        percentile_stretch(b[i], None if valid is None else valid[i], low=low, high=high, gamma=gamma) for i in rgb
    ]
    return np.stack(chans, axis=-1)


def to_uint8(img: np.ndarray) -> np.ndarray:
    """[0, 1] float image (NaN = invalid, shown black) to uint8."""
    return np.round(np.nan_to_num(img, nan=0.0) * 255.0).astype(np.uint8)


def _float_sample(dtype: str, count: int, sample: np.ndarray) -> np.ndarray | None:
    """The finite values of a single-band float sample, or None for other data (never radar backscatter)."""
    if count != 1 or not dtype.startswith("float"):
        return None
    s = np.asarray(sample, dtype=np.float64)
    return s[np.isfinite(s)]


def _runs(s: np.ndarray, width: int = 16) -> np.ndarray:
    """Consecutive runs of ``width`` neighbouring pixels of a row-major sample, (n_runs, width)."""
    return s[: s.size // width * width].reshape(-1, width)


def looks_like_radar_db(dtype: str, count: int, sample: np.ndarray) -> bool:
    """Heuristic: single-band float radar already in decibels (mostly negative, speckle of a few dB).

    Common practice, no source for the thresholds: calibrated backscatter of the sea lies around -30 to 0 dB,
    and log-speckle has a constant spread of 5.6 / sqrt(L) dB for L looks (from memory), so short runs of
    neighbouring pixels scatter by roughly 1-10 dB whatever their mean.
    """
    s = _float_sample(dtype, count, sample)
    if s is None or s.size < 64 or np.mean(s < 0) < 0.5:
        return False
    p1, med, p99 = np.percentile(s, [1, 50, 99])
    if not (p1 > -80.0 and p99 < 30.0 and -40.0 <= med <= 5.0):
        return False
    sd = _runs(s).std(axis=1)
    return 0.8 <= float(np.median(sd)) <= 10.0


def looks_like_radar(dtype: str, count: int, sample: np.ndarray) -> bool:
    """Heuristic: single-band, non-negative float data with multiplicative speckle (linear backscatter).

    Common practice, no source for the thresholds: linear sigma0 is positive with a mean above its
    median, and speckle is multiplicative, so in short runs of neighbouring pixels the spread grows
    with the mean (log-log slope near 1) and the equivalent number of looks, mean^2 / variance, is
    small (1-20 for multi-look products; Oliver & Quegan 1998, Understanding SAR Images, from
    memory).  Additive sensor noise on reflectance gives a slope near 0 and a far larger ratio.
    ``sample`` is a row-major run of valid pixels (neighbours stay neighbours).
    """
    s = _float_sample(dtype, count, sample)
    if s is None or s.size < 16 or np.any(s < 0):
        return False
    med = float(np.median(s))
    if med <= 0:
        return False
    if float(np.mean(s)) > 1.1 * med:
        return True
    blocks = _runs(s)
    mu, sd = blocks.mean(axis=1), blocks.std(axis=1)
    ok = (mu > 0) & (sd > 0)
    if ok.sum() < 20:
        return False
    enl = float(np.median(mu[ok] ** 2 / sd[ok] ** 2))
    lm = np.log(mu[ok])
    if np.ptp(lm) < 1e-6:
        return False
    slope = float(np.polyfit(lm, np.log(sd[ok]), 1)[0])
    return enl < 20.0 and slope > 0.6


def true_colour_bands(band_descriptions: tuple[str | None, ...]) -> tuple[int, int, int]:
    """Red, green and blue band numbers (1-based): from the band roles of the sensor table
    (:func:`~.sensor.band_roles`: Sentinel-2 B04 B03 B02, or red/green/blue) when the file names them, else
    the first three bands."""
    roles = band_roles(band_descriptions)
    if all(r in roles for r in (BandRole.RED, BandRole.GREEN, BandRole.BLUE)):
        return roles[BandRole.RED], roles[BandRole.GREEN], roles[BandRole.BLUE]
    return 1, 2, 3
