"""Where the wake starts when a radar image shows the hull away from its own wake.

A target moving with a radial speed v_r is imaged shifted in azimuth by -(R/V) v_r (Raney 1971),
while its wake, made of slow water-surface features, stays in place: a vessel clicked on its bright
hull can sit hundreds of metres beside the wake it made.  The turbulent wake is a long dark line
(damped short waves); it starts at the true position of the vessel.  This module finds the darkest
long line near the hull with a Radon transform of the chip (Rey et al. 1990 detect radar wakes as
dark Radon minima) and, along it, the point where the darkness begins: a step in the mean profile
along the line, dark on one side only.

References
----------
1. Raney, R. K. (1971). Synthetic aperture imaging radar and moving targets. *IEEE Trans. Aerosp.
   Electron. Syst.* 7(3), 499-505.
2. Rey, M. T. et al. (1990). Application of Radon transform techniques to wake detection in Seasat-A
   SAR images. *IEEE Trans. Geosci. Remote Sens.* 28(4), 553-560.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy import ndimage

from ..scene.raster import Scene
from .prepare import prepare_chip
from .radon import radon
from .robust import median_spread
from .tuning import DEFAULT_TUNING, Tuning

_ANGLES = np.arange(0.0, 180.0, 1.0)


@dataclass(frozen=True)
class Apex:
    """The start of a wake found beside a displaced hull."""

    apex_px: tuple[float, float]  #: scene (col, row) where the wake line starts
    back_angle_deg: float  #: image angle of the wake direction from the apex
    line_significance: float  #: darkness of the line against all Radon lines of the chip
    step_contrast: float  #: darkness behind the apex minus ahead, in robust spreads of the profile
    distance_m: float  #: from the clicked hull to the apex


def find_displaced_apex(
    scene: Scene,
    hull_px: tuple[float, float],
    *,
    step: int = 1,
    size_px: int = 640,
    max_distance_m: float = 2500.0,
    radar: bool | None = True,
    tuning: Tuning = DEFAULT_TUNING,
) -> Apex | None:
    """Find the dark wake line near a radar hull and the point where it starts (None if there is none)."""
    chip = prepare_chip(scene, hull_px, size_px=size_px, step=step, radar=radar)
    n = chip.data.shape[0]
    c = n // 2
    img = ndimage.gaussian_filter(np.where(chip.valid, chip.data, 0.0), 2.0)
    rr, cc = np.mgrid[:n, :n]
    img = np.where((rr - c) ** 2 + (cc - c) ** 2 > (c - 1) ** 2, 0.0, img)
    sino = radon(img, _ANGLES)
    max_off = min(max_distance_m / chip.m_per_px, 0.4 * n)
    offs = np.arange(n) - c
    band = np.abs(offs) <= max_off
    ref = sino[band]
    med, mad = median_spread(ref)
    z = (sino - med) / mad
    # the three darkest lines with distinct directions (a Kelvin arm can be dark in some looks)
    tried: list[float] = []
    for flat in np.argsort(np.where(band[:, None], z, np.inf), axis=None)[:400]:
        i, j = np.unravel_index(flat, z.shape)
        if -z[i, j] < tuning.apex_line_significance_min or len(tried) >= 3:
            break
        if any(abs(((_ANGLES[j] - t) + 90) % 180 - 90) < 6 for t in tried):
            continue
        tried.append(float(_ANGLES[j]))
        cand = _apex_on_line(
            img, chip.valid, float(offs[i]), float(_ANGLES[j]), float(-z[i, j]), tuning.apex_step_contrast_min
        )
        if cand is None:
            continue
        row, col, back, contrast = cand
        apex_px = chip.to_scene(row, col)
        dist = float(np.hypot(*(np.subtract(apex_px, hull_px)))) * chip.m_per_px / chip.step
        if dist > max_distance_m:
            continue
        # the lines come darkest first: the first with a start is the wake (a fainter line a few degrees off
        # crosses the wake's dark strip and shows a sharper but false step where it leaves it)
        return Apex(apex_px, back, float(-z[i, j]), contrast, dist)
    return None


def _apex_on_line(
    img: np.ndarray,
    valid: np.ndarray,
    s: float,
    theta_deg: float,
    significance: float,
    step_contrast_min: float,
    half_width: int = 3,
) -> tuple[float, float, float, float] | None:
    """Start of the darkness along the Radon line (s, theta): (row, col, back angle, step contrast)."""
    n = img.shape[0]
    c = n // 2
    th = np.radians(theta_deg)
    nx, ny = np.cos(th), np.sin(th)  # line normal, x right / y up
    dx, dy = -ny, nx  # line direction (image angle theta - 90 + 180: either way)
    reach = np.sqrt(max((c - 4) ** 2 - s * s, 0.0))
    t = np.arange(-reach, reach, 1.0)
    if t.size < 80:
        return None
    w = np.arange(-half_width, half_width + 1, 1.0)
    x = (s + w[None, :]) * nx + t[:, None] * dx
    y = (s + w[None, :]) * ny + t[:, None] * dy
    rows, cols = c - y, c + x
    vals = ndimage.map_coordinates(img, [rows.ravel(), cols.ravel()], order=1).reshape(rows.shape)
    ok = ndimage.map_coordinates(valid.astype(float), [rows.ravel(), cols.ravel()], order=0).reshape(rows.shape) > 0
    prof = np.where(
        ok.sum(axis=1) > half_width, np.sum(np.where(ok, vals, 0), axis=1) / np.maximum(ok.sum(axis=1), 1), np.nan
    )
    good = np.isfinite(prof)
    if good.sum() < 60:
        return None
    spread = median_spread(prof[good])[1]
    win = int(min(120, t.size // 3))
    csum = np.concatenate([[0.0], np.cumsum(np.where(good, prof, 0.0))])
    cnt = np.concatenate([[0], np.cumsum(good)])

    def mean(a: int, b: int) -> float:
        k = cnt[b] - cnt[a]
        return (csum[b] - csum[a]) / k if k >= win // 2 else np.nan

    best = (-np.inf, 0, 1)
    for i in range(win, t.size - win):
        before, after = mean(i - win, i), mean(i, i + win)
        for sign, (ahead, behind) in ((1, (before, after)), (-1, (after, before))):
            # the wake lies behind the apex: darker (lower) there than ahead
            d = (ahead - behind) / spread
            if np.isfinite(d) and d > best[0]:
                best = (d, i, sign)
    contrast, i, sign = best
    if not contrast >= step_contrast_min:
        return None
    row, col = float(rows[i, half_width]), float(cols[i, half_width])
    back = float(np.degrees(np.arctan2(sign * dy, sign * dx)) % 360.0)
    return row, col, back, float(contrast)
