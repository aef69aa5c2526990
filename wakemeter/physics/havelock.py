"""Finite-depth Kelvin wake (Havelock 1908): half-angle vs depth Froude number.

With the depth Froude number Fr_h = U / sqrt(g h):

* Fr_h < 1 (subcritical): the half-angle is the largest ray angle of the
  stationary waves, tan(phi) = n sin(theta) cos(theta) / (1 - n cos^2(theta)),
  over all propagation angles theta.  It stays near 19.47 deg up to Fr_h ~ 0.6
  and widens to 90 deg as Fr_h -> 1.
* Fr_h > 1 (supercritical): no transverse waves; half-angle = arcsin(1/Fr_h).

In units of h = g = 1 the stationary wave at angle theta has k h = x with
tanh(x)/x = Fr_h^2 cos^2(theta), so the half-angle depends on Fr_h alone.

References
----------
1. Havelock, T. H. (1908). The propagation of groups of waves in dispersive
   media, with application to waves on water produced by a travelling
   disturbance. *Proc. R. Soc. Lond. A* 81, 398-430.
2. US Army Corps of Engineers (2002). *Coastal Engineering Manual*, Part II-7
   (19 deg 28' in deep water, widening to 90 deg at Fr_h = 1).
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache
from typing import Any

import numpy as np
from numpy.typing import ArrayLike

from ..errors import ParameterError, check_positive
from .dispersion import group_factor, tanh_ratio, wavenumber_from_phase_speed
from .kelvin import KELVIN_HALF_ANGLE_DEG

#: Below this depth Froude number the half-angle differs from Kelvin's by < 0.01 deg.
FR_DEEP_LIMIT: float = 0.5


def _ray_angles_unit(fr: float | np.ndarray, theta: np.ndarray) -> np.ndarray:
    """Ray angles (rad) for h = g = 1, U = fr, at propagation angles theta (rad)."""
    c = fr * np.cos(theta)
    k = np.asarray(wavenumber_from_phase_speed(c, 1.0, g=1.0))
    theta = np.broadcast_to(theta, k.shape)
    n = group_factor(np.where(np.isnan(k), 0.0, k))
    phi = np.arctan2(n * np.sin(theta) * np.cos(theta), 1.0 - n * np.cos(theta) ** 2)
    return np.where(np.isnan(k), np.nan, phi)


def _half_angle_subcritical(fr: np.ndarray) -> np.ndarray:
    """Largest ray angle (deg) for subcritical Fr_h (1-D array), vectorised over Fr_h.

    Dense grid in theta, then golden-section refinement around each best node.
    """
    fr = np.asarray(fr, dtype=float)[:, None]
    th = np.linspace(1e-6, np.pi / 2 - 1e-6, 2001)[None, :]
    phi = _ray_angles_unit(fr, th)
    i = np.nanargmax(phi, axis=1)
    a = th[0, np.maximum(i - 1, 0)][:, None]
    b = th[0, np.minimum(i + 1, th.size - 1)][:, None]
    gr = (np.sqrt(5.0) - 1.0) / 2.0
    for _ in range(40):
        c = b - gr * (b - a)
        d = a + gr * (b - a)
        fc = _ray_angles_unit(fr, c)
        fd = _ray_angles_unit(fr, d)
        left = fc > fd
        b = np.where(left, d, b)
        a = np.where(left, a, c)
    return np.degrees(_ray_angles_unit(fr, (a + b) / 2))[:, 0]


def half_angle(froude_depth: ArrayLike) -> np.ndarray | float:
    """Wake half-angle (degrees) at depth Froude number Fr_h = U / sqrt(g h).

    Parameters
    ----------
    froude_depth : array_like
        Fr_h > 0.  ``np.inf`` or 0 < Fr_h small means deep water.  At exactly
        Fr_h = 1 the half-angle is 90 deg.

    Returns
    -------
    half_angle_deg : ndarray or float
        19.47 deg for small Fr_h, rising to 90 deg at Fr_h = 1, then arcsin(1/Fr_h).
    """
    fr = np.asarray(froude_depth, dtype=float)
    check_positive("froude_depth", fr)
    flat = fr.ravel()
    out = np.full(flat.shape, KELVIN_HALF_ANGLE_DEG)
    sub = (flat >= 0.05) & (flat < 1.0 - 1e-12)
    sup = flat > 1.0 + 1e-12
    out[np.abs(flat - 1.0) <= 1e-12] = 90.0
    if np.any(sub):
        out[sub] = _half_angle_subcritical(flat[sub])
    out[sup] = np.degrees(np.arcsin(1.0 / flat[sup]))
    shaped = out.reshape(fr.shape)
    return float(shaped) if shaped.ndim == 0 else shaped


@lru_cache(maxsize=1)
def _subcritical_table() -> tuple[Any, float, float]:
    """Monotone interpolant Fr_h(half-angle) on the subcritical branch (scipy.interpolate imported here: it
    costs ~0.5 s at start-up and only the inverse needs it)."""
    from scipy.interpolate import PchipInterpolator

    fr = np.concatenate([np.linspace(0.45, 0.9, 181), np.linspace(0.9005, 0.99999, 400)])
    ang = np.asarray(half_angle(fr))
    keep = np.concatenate([[True], np.diff(ang) > 1e-9])  # strictly increasing for inversion
    return PchipInterpolator(ang[keep], fr[keep]), float(ang[keep][0]), float(ang[keep][-1])


@dataclass(frozen=True)
class FroudeBranches:
    """Depth Froude numbers that give a measured half-angle.

    ``subcritical`` is None when the angle is at or below Kelvin's (then any
    Fr_h below about 0.6 fits and depth cannot be told from the angle), and
    ``supercritical`` always exists for angles in (0, 90).
    """

    half_angle_deg: float
    subcritical: float | None
    supercritical: float
    note: str


def froude_from_half_angle(half_angle_deg: float) -> FroudeBranches:
    """Invert the Havelock half-angle: which Fr_h give this angle?

    Returns both branches when both exist and says so; the transverse waves
    (present only when subcritical) decide between them.
    """
    a = float(half_angle_deg)
    if not np.isfinite(a) or a <= 0 or a >= 90:
        raise ParameterError(f"half_angle_deg must be within (0, 90), got {half_angle_deg!r}")
    sup = 1.0 / np.sin(np.radians(a))
    interp, amin, amax = _subcritical_table()
    if a <= KELVIN_HALF_ANGLE_DEG + 0.01:
        note = (
            "half-angle at or below the deep-water value: subcritical depth Froude number "
            "cannot be told (any Fr_h below ~0.6 fits); supercritical Fr_h = "
            f"{sup:.3f} if transverse waves are absent; a narrow angle may also mean a fast, short hull"
        )
        return FroudeBranches(a, None, float(sup), note)
    if a >= amax:
        sub = 1.0 - 1e-5
    else:
        sub = float(interp(max(a, amin)))
    note = (
        f"two depth Froude numbers fit: subcritical Fr_h = {sub:.3f} (transverse waves present) "
        f"or supercritical Fr_h = {sup:.3f} (no transverse waves)"
    )
    return FroudeBranches(a, sub, float(sup), note)


def subcritical_froude_from_half_angle(half_angle_deg: ArrayLike) -> np.ndarray | float:
    """Vectorised subcritical branch of the inverse (for Monte Carlo draws).

    Angles at or below Kelvin's map to NaN (undetermined); angles >= the table's
    top map to just below 1.
    """
    a = np.asarray(half_angle_deg, dtype=float)
    interp, amin, amax = _subcritical_table()
    fr = interp(np.clip(a, amin, amax))
    fr = np.where(a <= KELVIN_HALF_ANGLE_DEG + 1e-6, np.nan, fr)
    return float(fr) if fr.ndim == 0 else fr


def transverse_wavelength_finite_depth(speed_mps: ArrayLike, depth_m: ArrayLike, *, g: float) -> np.ndarray | float:
    """Transverse wavelength (m) at finite depth; NaN when supercritical."""
    from .kelvin import transverse_wavelength

    return transverse_wavelength(speed_mps, depth_m, g=g)


def depth_from_speed_and_transverse_wavelength(
    speed_mps: ArrayLike, wavelength_m: ArrayLike, *, g: float
) -> np.ndarray | float:
    """Depth (m) at which transverse waves of a vessel at speed U have length lambda.

    From U^2 = (g/k) tanh(k h): h = artanh(U^2 k / g) / k.  NaN when lambda is
    at or below the deep-water value 2 pi U^2 / g (depth then has no effect
    that can be measured).
    """
    u = np.asarray(speed_mps, dtype=float)
    lam = np.asarray(wavelength_m, dtype=float)
    check_positive("speed_mps", u)
    check_positive("wavelength_m", lam)
    k = 2.0 * np.pi / lam
    r = u * u * k / g
    with np.errstate(invalid="ignore", divide="ignore"):
        h = np.where(r < 1.0, np.arctanh(np.clip(r, 0.0, 1.0 - 1e-16)) / k, np.nan)
    return float(h) if np.ndim(h) == 0 else h


def depth_from_speed_and_half_angle(speed_mps: ArrayLike, half_angle_deg: ArrayLike, *, g: float) -> np.ndarray | float:
    """Depth (m) from speed and a half-angle wider than Kelvin's (subcritical branch).

    h = U^2 / (g Fr_h^2); NaN when the angle does not exceed 19.47 deg.
    """
    u = np.asarray(speed_mps, dtype=float)
    check_positive("speed_mps", u)
    fr = np.asarray(subcritical_froude_from_half_angle(half_angle_deg))
    h = u * u / (g * fr * fr)
    return float(h) if np.ndim(h) == 0 else h


def froude_from_kh(kh: ArrayLike) -> np.ndarray | float:
    """Depth Froude number of a vessel whose transverse waves have k h = x: Fr_h^2 = tanh(x)/x."""
    fr = np.sqrt(tanh_ratio(kh))
    return float(fr) if np.ndim(fr) == 0 else fr


def kh_from_froude(froude_depth: ArrayLike) -> np.ndarray | float:
    """k h of the transverse waves at depth Froude number Fr_h < 1 (inverse of :func:`froude_from_kh`)."""
    fr = np.asarray(froude_depth, dtype=float)
    check_positive("froude_depth", fr)
    k = np.asarray(wavenumber_from_phase_speed(fr, 1.0, g=1.0))
    return float(k) if k.ndim == 0 else k
