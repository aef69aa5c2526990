"""Straight wake lines through the vessel, each with a significance against the background.

A localised Radon transform restricted to the lines that pass through the vessel (Copeland et
al. 1995 localise the transform around the target; here only the fan of rays from the vessel
is needed): the mean of the image along each ray behind the vessel, for a fan of directions
around the track.  The same fan turned to point *ahead* of the vessel, where there is no wake,
gives the background statistics: a line's significance is its excess over the median of the
ahead fan in units of that fan's robust spread.

Two uses:

* the Kelvin arms, as ridges of local wave energy at the edge of the wedge (the cusp lines,
  where the wave amplitude is largest);
* in radar, the narrow bright V: two thin lines a few degrees either side of the track
  (Bragg-scattering short waves; Munk, Scully-Power & Zachariasen 1987, Proc. R. Soc. A 412, from memory).

References
----------
1. Copeland, A. C., Ravichandran, G. & Trivedi, M. M. (1995). Localized Radon transform-based
   detection of ship wakes in SAR images. *IEEE Trans. Geosci. Remote Sens.* 33(1), 35-45.
2. Rey, M. T., Tunaley, J. K., Folinsbee, J. T., Jahans, P. A., Dixon, J. A. & Vant, M. R. (1990).
   Application of Radon transform techniques to wake detection in Seasat-A SAR images.
   *IEEE Trans. Geosci. Remote Sens.* 28(4), 553-560.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy import ndimage

from .findings import LineKind
from .robust import median_spread
from .tuning import DEFAULT_TUNING, REACH_FRACTION


@dataclass(frozen=True)
class WakeLine:
    """One straight wake line through the vessel."""

    kind: LineKind
    angle_from_track_deg: float  #: signed image angle from the backward track direction (counter-clockwise +)
    significance: float  #: excess over the ahead fan's median, in robust spreads
    length_px: float  #: length of the rays used, chip pixels


def ray_fan(
    img: np.ndarray,
    valid: np.ndarray,
    origin_rc: tuple[float, float],
    direction_deg: float,
    angles_deg: np.ndarray,
    *,
    r_min_px: float,
    r_max_px: float,
) -> np.ndarray:
    """Mean of ``img`` along rays from ``origin_rc`` at ``direction_deg + angles_deg`` (image angles,
    counter-clockwise from the column axis); NaN where fewer than half of a ray's samples are valid."""
    r = np.arange(r_min_px, r_max_px, 1.0)
    a = np.radians(direction_deg + np.asarray(angles_deg, float))[:, None]
    rows = origin_rc[0] - r[None, :] * np.sin(a)
    cols = origin_rc[1] + r[None, :] * np.cos(a)
    vals = ndimage.map_coordinates(
        np.where(valid, img, 0.0), [rows.ravel(), cols.ravel()], order=1, mode="constant", cval=0.0
    ).reshape(rows.shape)
    ok = (
        ndimage.map_coordinates(
            valid.astype(float), [rows.ravel(), cols.ravel()], order=0, mode="constant", cval=0.0
        ).reshape(rows.shape)
        > 0.5
    )
    n = ok.sum(axis=1)
    return np.where(n >= 0.5 * r.size, np.sum(np.where(ok, vals, 0.0), axis=1) / np.maximum(n, 1), np.nan)


def _significance(behind: np.ndarray, ahead: np.ndarray) -> np.ndarray:
    ref = ahead[np.isfinite(ahead)]
    if ref.size < 10:
        return np.full(behind.shape, np.nan)
    med, mad = median_spread(ref)
    return (behind - med) / mad


def _best_each_side(angles: np.ndarray, sig: np.ndarray, lo: float, hi: float) -> list[tuple[float, float]]:
    out = []
    for sign in (1.0, -1.0):
        sel = (sign * angles >= lo) & (sign * angles <= hi) & np.isfinite(sig)
        if not sel.any():
            continue
        idx = np.nonzero(sel)[0]
        j = int(np.argmax(sig[idx]))
        if j == 0 or j == idx.size - 1:
            continue  # a maximum on the edge of the search is not a line of its own
        out.append((float(angles[idx[j]]), float(sig[idx[j]])))
    return out


def narrow_v_lines(
    chip_data: np.ndarray,
    valid: np.ndarray,
    vessel_rc: tuple[float, float],
    back_angle_deg: float,
    *,
    r_min_px: float = 8.0,
    max_angle_deg: float = 7.0,
    min_angle_deg: float = 0.8,
    significance_min: float = DEFAULT_TUNING.wave_line_significance_min,
) -> list[WakeLine]:
    """Bright thin lines through the vessel within ``min_angle_deg``-``max_angle_deg`` of the track, each side."""
    n = chip_data.shape[0]
    r_max = REACH_FRACTION * n
    img = ndimage.gaussian_filter(np.where(valid, chip_data, 0.0), 0.7)
    angles = np.arange(-max_angle_deg - 3.0, max_angle_deg + 3.0 + 1e-9, 0.2)
    behind = ray_fan(img, valid, vessel_rc, back_angle_deg, angles, r_min_px=r_min_px, r_max_px=r_max)
    wide = np.arange(-40.0, 40.0 + 1e-9, 0.2)
    ahead = ray_fan(img, valid, vessel_rc, back_angle_deg + 180.0, wide, r_min_px=r_min_px, r_max_px=r_max)
    sig = _significance(behind, ahead)
    return [
        WakeLine(LineKind.NARROW_V, a, s, r_max - r_min_px)
        for a, s in _best_each_side(angles, sig, min_angle_deg, max_angle_deg)
        if s >= significance_min
    ]


def kelvin_arm_lines(
    energy: np.ndarray,
    valid: np.ndarray,
    *,
    u0: int,
    near_deg: float | None,
    r_min_px: float = 8.0,
    window_deg: float = 8.0,
    significance_min: float = DEFAULT_TUNING.wave_line_significance_min,
) -> list[WakeLine]:
    """Ridges of wave energy through the vessel in a track-frame energy map (rows: lateral, centred;
    columns: along the track, the vessel at column ``u0``, behind to the right).

    Searched within ``window_deg`` of ``near_deg`` (the measured half-angle) on each side, or
    between 8 and 75 deg when no half-angle is known (never closer than 8 deg to the track).
    """
    n_v, n_u = energy.shape
    origin = ((n_v - 1) / 2.0, float(u0))
    r_max = min(n_u - u0, u0, n_v / 2) - 1
    if r_max <= r_min_px + 10:
        return []
    # never within 8 deg of the track: that is where the turbulent wake and the radar narrow V lie
    lo, hi = (8.0, 75.0) if near_deg is None else (max(near_deg - window_deg, 8.0), max(near_deg + window_deg, 16.0))
    angles = np.concatenate([-np.arange(hi, lo - 1e-9, -0.5), np.arange(lo, hi + 1e-9, 0.5)])
    behind = ray_fan(energy, valid, origin, 0.0, angles, r_min_px=r_min_px, r_max_px=r_max)
    wide = np.arange(-80.0, 80.0 + 1e-9, 0.5)
    ahead = ray_fan(energy, valid, origin, 180.0, wide, r_min_px=r_min_px, r_max_px=r_max)
    sig = _significance(behind, ahead)
    return [
        WakeLine(LineKind.KELVIN_ARM, a, s, r_max - r_min_px)
        for a, s in _best_each_side(angles, sig, lo, hi)
        if s >= significance_min
    ]
