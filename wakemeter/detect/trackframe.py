"""Resampling a chip into the vessel's track frame, and the direction of the wake.

Track frame: ``u`` runs from the vessel backwards along the wake (u > 0 behind),
``v`` across it (v > 0 to the left of the direction of travel... as seen on the
image, with the image's own handedness).  Angles on the chip are image angles:
counter-clockwise from the image's "right" axis, with "up" at +90 deg.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy import ndimage

from .prepare import Chip
from .robust import median_spread
from .tuning import REACH_FRACTION


def track_frame(
    img: np.ndarray,
    centre_rc: tuple[float, float],
    back_angle_deg: float,
    *,
    u_range: tuple[float, float],
    v_half: float,
    order: int = 1,
) -> np.ndarray:
    """Sample ``img`` on a grid u in [u0, u1) (1-px steps), v in [-v_half, v_half); returns (v, u) array."""
    a = np.radians(back_angle_deg)
    bu = np.array([np.cos(a), -np.sin(a)])  # (dcol, drow) of +u
    bv = np.array([-np.sin(a), -np.cos(a)])  # +v: u rotated +90 deg (image angle)
    u = np.arange(u_range[0], u_range[1], dtype=float)
    v = np.arange(-v_half, v_half, dtype=float)
    vv, uu = np.meshgrid(v, u, indexing="ij")
    cols = centre_rc[1] + uu * bu[0] + vv * bv[0]
    rows = centre_rc[0] + uu * bu[1] + vv * bv[1]
    return ndimage.map_coordinates(img, [rows, cols], order=order, mode="constant", cval=0.0)


@dataclass(frozen=True)
class WakeSide:
    """Which way the wake lies from the vessel."""

    back_angle_deg: float  #: image angle of the wake direction (behind the vessel)
    contrast: float  #: wedge energy over the surroundings, in robust standard deviations


def polar_energy(chip: Chip, *, smooth_px: float = 3.0, n_angles: int = 360) -> tuple[np.ndarray, np.ndarray]:
    """Mean local energy along rays from the vessel, 1-deg steps (image angles)."""
    e = ndimage.gaussian_filter(chip.data.astype(np.float64) ** 2, smooth_px)
    n = chip.data.shape[0]
    ang = np.arange(n_angles) * 360.0 / n_angles
    r = np.linspace(0.06 * n, REACH_FRACTION * n, 64)
    a = np.radians(ang)[:, None]
    rows = chip.vessel_rc[0] - r[None, :] * np.sin(a)
    cols = chip.vessel_rc[1] + r[None, :] * np.cos(a)
    vals = ndimage.map_coordinates(e, [rows, cols], order=1, mode="nearest")
    ok = ndimage.map_coordinates(chip.valid.astype(float), [rows, cols], order=0, mode="constant") > 0
    prof = np.array([np.mean(v[k]) if k.sum() > 8 else np.nan for v, k in zip(vals, ok)])
    return ang, prof


def wake_side(chip: Chip, *, wedge_deg: float = 40.0) -> WakeSide:
    """Image direction of the wake: the centre of the most energetic wedge of rays."""
    ang, prof = polar_energy(chip)
    p = np.where(np.isfinite(prof), prof, np.nanmedian(prof))
    w = int(round(wedge_deg))
    kernel = np.ones(w) / w
    ext = np.concatenate([p[-w:], p, p[:w]])
    sm = np.convolve(ext, kernel, mode="same")[w:-w]
    i = int(np.argmax(sm))
    # circular centroid of the excess inside the best wedge
    idx = (np.arange(i - w // 2, i + w // 2 + 1)) % p.size
    ex = np.clip(p[idx] - np.median(p), 0, None)
    if ex.sum() > 0:
        z = np.sum(ex * np.exp(1j * np.radians(ang[idx])))
        centre = float(np.degrees(np.angle(z)) % 360)
    else:
        centre = float(ang[i])
    med, mad = median_spread(sm)
    return WakeSide(centre, float((sm[i] - med) / mad))
