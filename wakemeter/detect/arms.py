"""Wake arms: the half-angle from the outer edge of the wave energy, and the turbulent wake line.

Half-angle: in the track frame, the local wave energy at each distance behind
the vessel is scanned outward on both sides; the edge is where it falls below
20 % of the way from the background (measured ahead of the vessel) to the
peak.  A straight line fitted to the edges of each side gives the arm; the
half-angle is the mean of both sides (the Kelvin wedge edge, Havelock's
angle in finite depth).  The turbulent wake: the strongest line through the
vessel in a Radon transform of the chip behind it.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy import ndimage

from .radon import radon
from .robust import median_spread


@dataclass(frozen=True)
class Arms:
    half_angle_deg: float
    half_angle_std_deg: float
    left_deg: float
    right_deg: float
    left_offset_px: float  #: lateral offset of the left arm line at u = 0 (track-frame px)
    right_offset_px: float
    n_points: int


def _fit_side(us: np.ndarray, vs: np.ndarray) -> tuple[float, float, float]:
    """Robust line v = a + b u; returns (angle deg, offset, residual std)."""
    keep = np.isfinite(vs)
    us, vs = us[keep], vs[keep]
    if us.size < 5:
        return np.nan, np.nan, np.nan
    for _ in range(3):
        b, a = np.polyfit(us, vs, 1)
        r = vs - (a + b * us)
        s = 1.4826 * np.median(np.abs(r)) + 1e-9
        k = np.abs(r) < 3 * s
        if k.all() or k.sum() < 5:
            break
        us, vs = us[k], vs[k]
    b, a = np.polyfit(us, vs, 1)
    r = vs - (a + b * us)
    return float(np.degrees(np.arctan(b))), float(a), float(np.std(r))


def half_angle_from_edges(
    energy: np.ndarray, *, u_offset: int, background: float, noise: float, frac: float = 0.2
) -> Arms | None:
    """Edges of the energy wedge in a track-frame energy map (v rows centred, u columns from ``u_offset``).

    Returns None when the wedge does not stand above the background.
    """
    n_v, n_u = energy.shape
    c = n_v // 2
    us, left, right = [], [], []
    vv = np.arange(n_v) - c
    for j in range(int(0.15 * n_u), n_u, max(1, n_u // 60)):
        prof = ndimage.uniform_filter1d(energy[:, max(j - 2, 0) : j + 3].mean(axis=1), 3)
        u = j + u_offset
        core = np.abs(vv) <= max(2.0, u * np.tan(np.radians(4.0)))  # skip the track itself
        row = []
        for side in (vv < 0, vv > 0):
            sel = side & ~core
            peak = float(prof[sel].max()) if sel.any() else 0.0
            if peak < background + 4 * noise:
                row.append(np.nan)
                continue
            thr = background + frac * (peak - background)
            above = np.nonzero(sel & (prof >= thr))[0]
            row.append(float(np.abs(vv[above]).max()) if above.size else np.nan)
        if np.all(np.isnan(row)):
            continue
        us.append(u)
        left.append(row[0])
        right.append(row[1])
    if len(us) < 6:
        return None
    u_arr = np.asarray(us, float)
    la, lo, ls = _fit_side(u_arr, np.asarray(left, float))
    ra, ro, rs = _fit_side(u_arr, np.asarray(right, float))
    angs = [a for a in (la, ra) if np.isfinite(a) and 0 < a < 89]
    if not angs:
        return None
    half = float(np.mean(angs))
    spread = abs(la - ra) / 2 if len(angs) == 2 else 3.0
    fit_se = np.degrees(np.nanmean([ls, rs]) / max(u_arr.max() - u_arr.min(), 1.0)) * 2.0
    std = float(np.hypot(max(spread, 0.3), fit_se))
    return Arms(half, std, la, ra, lo, ro, int(u_arr.size))


@dataclass(frozen=True)
class TurbulentWake:
    angle_deg: float  #: image angle of the line (direction from the vessel backwards)
    offset_px: float  #: perpendicular distance of the line from the vessel, chip px
    significance: float
    dark: bool
    sinogram: np.ndarray | None = None  #: localised Radon transform (rows: offset px, columns: angles)
    angles_deg: np.ndarray | None = None  #: Radon angles of the sinogram columns
    radon_angle_deg: float = float("nan")  #: Radon angle of the picked line


def wave_energy(frame_img: np.ndarray, m_per_px: float, *, k_lo: float, k_hi: float, smooth_px: float) -> np.ndarray:
    """Local energy of the waves in a track-frame image (v rows, u columns).

    Band-pass to wavenumbers in [k_lo, k_hi] and remove the narrow strip |k_u| <= 2 bins,
    which holds the turbulent wake and foam along the track (not waves), then square
    and smooth.
    """
    n_v, n_u = frame_img.shape
    spec = np.fft.fft2(frame_img)
    ku = 2 * np.pi * np.fft.fftfreq(n_u, m_per_px)[None, :]
    kv = 2 * np.pi * np.fft.fftfreq(n_v, m_per_px)[:, None]
    k = np.hypot(ku, kv)
    keep = (k >= k_lo) & (k <= k_hi) & (np.abs(ku) > 2 * (2 * np.pi / (n_u * m_per_px)))
    band = np.fft.ifft2(np.where(keep, spec, 0)).real
    return ndimage.gaussian_filter(band * band, smooth_px)


_RADON_ANGLES = np.arange(0.0, 180.0, 1.0)  # 1-deg steps: the spectral fit refines the direction


def turbulent_wake(
    chip_data: np.ndarray,
    valid: np.ndarray,
    vessel_rc: tuple[float, float],
    back_angle_deg: float,
    *,
    search_deg: float = 25.0,
    smooth_px: float = 2.0,
) -> TurbulentWake | None:
    """Strongest bright or dark line through the vessel near the wake direction (localised Radon).

    The chip is masked to the half behind the vessel, centred on the vessel, and
    transformed once on a fixed 1-deg angle set (its interpolation matrix is cached).
    Significance: the line's Radon value against the robust spread of all lines through
    the centre region.
    """
    n = chip_data.shape[0]
    img = ndimage.gaussian_filter(np.where(valid, chip_data, 0.0), smooth_px)
    rr, cc = np.mgrid[:n, :n]
    a = np.radians(back_angle_deg)
    along = (cc - vessel_rc[1]) * np.cos(a) - (rr - vessel_rc[0]) * np.sin(a)
    img = np.where(along > 0, img, 0.0)
    img = ndimage.shift(img, (n // 2 - vessel_rc[0], n // 2 - vessel_rc[1]), order=1, mode="constant")
    img[(rr - n // 2) ** 2 + (cc - n // 2) ** 2 > (n // 2 - 1) ** 2] = 0
    sino = radon(img, _RADON_ANGLES)
    # a line along image angle beta has its Radon normal at beta + 90 (mod 180)
    normal = (back_angle_deg + 90.0) % 180.0
    dang = (_RADON_ANGLES - normal + 90.0) % 180.0 - 90.0
    cols = np.abs(dang) <= search_deg
    band = np.abs(np.arange(n) - n // 2) <= max(2, n // 160)
    sub = sino[np.ix_(band, cols)]
    ref = sino[np.abs(np.arange(n) - n // 2) <= max(2, n // 160)]
    med, mad = median_spread(ref)
    k = np.unravel_index(np.argmax(np.abs(sub - med)), sub.shape)
    val = float(sub[k])
    th = _RADON_ANGLES[cols][k[1]]
    ang = (th - 90.0) % 360.0
    if np.cos(np.radians(ang - back_angle_deg)) < 0:
        ang = (ang + 180.0) % 360.0
    s = float(np.nonzero(band)[0][k[0]] - n // 2)
    return TurbulentWake(float(ang), s, float(abs(val - med) / mad), bool(val < med), sino, _RADON_ANGLES, float(th))


def wake_line_offset(
    chip_data: np.ndarray, valid: np.ndarray, back_angle_deg: float, *, max_offset_px: float, smooth_px: float = 2.0
) -> tuple[float, float, float] | None:
    """The turbulent wake as a straight line of the track direction anywhere near the chip centre.

    For the radar azimuth-offset method the hull is displaced from its own wake, so the wake line
    need not pass through the clicked hull.  The whole chip is Radon-transformed (fixed 1-deg angle
    set) and the strongest line within +/- 2 deg of the track direction and ``max_offset_px`` of
    the centre is taken.  Returns (offset s in px along the line's normal, Radon angle in deg,
    significance) or None.
    """
    n = chip_data.shape[0]
    img = ndimage.gaussian_filter(np.where(valid, chip_data, 0.0), smooth_px)
    rr, cc = np.mgrid[:n, :n]
    img = np.where((rr - n // 2) ** 2 + (cc - n // 2) ** 2 > (n // 2 - 1) ** 2, 0.0, img)
    sino = radon(img, _RADON_ANGLES)
    normal = (back_angle_deg + 90.0) % 180.0
    dang = np.abs((_RADON_ANGLES - normal + 90.0) % 180.0 - 90.0)
    cols = dang <= 2.0
    offs = np.arange(n) - n // 2
    band = np.abs(offs) <= max_offset_px
    sub = sino[np.ix_(band, cols)]
    ref = sino[band]
    med, mad = median_spread(ref)
    k = np.unravel_index(np.argmax(np.abs(sub - med)), sub.shape)
    return float(offs[band][k[0]]), float(_RADON_ANGLES[cols][k[1]]), float(abs(sub[k] - med) / mad)
