"""Kelvin ship-wave geometry: wavelength <-> speed, ray angles, the cusp.

Angles: ``propagation_deg`` (theta) is the angle between a wave's propagation
direction and the vessel's track; ``ray_deg`` (phi) is the angle, seen from the
vessel, between the track behind it and the line on which a stationary wave
is found.  The stationarity condition is U cos(theta) = c(k, h); energy is
carried along the ray whose angle satisfies
tan(phi) = n sin(theta) cos(theta) / (1 - n cos^2(theta)), with n = c_g / c.

References
----------
1. Thomson, W. (Lord Kelvin) (1887). On ship waves. *Proc. Inst. Mech. Eng.* 38, 409-434.
2. Lamb, H. (1932). *Hydrodynamics*, 6th ed., section 256.
3. Havelock, T. H. (1908). The propagation of groups of waves in dispersive
   media, with application to waves on water produced by a travelling
   disturbance. *Proc. R. Soc. Lond. A* 81, 398-430.
4. US Army Corps of Engineers (2002). *Coastal Engineering Manual*, Part II-7.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike

from ..errors import ParameterError, check_positive
from .dispersion import group_factor, phase_speed, steady_wavenumber

#: Deep-water Kelvin half-angle, arcsin(1/3), degrees (19.4712...).
KELVIN_HALF_ANGLE_DEG: float = float(np.degrees(np.arcsin(1.0 / 3.0)))
#: Propagation angle of the waves at the deep-water cusp, arctan(1/sqrt 2), degrees (35.2644...).
CUSP_PROPAGATION_DEG: float = float(np.degrees(np.arctan(1.0 / np.sqrt(2.0))))
#: Deep-water ratio of the cusp wavelength to the transverse wavelength (cos^2 of the cusp angle).
CUSP_WAVELENGTH_RATIO: float = 2.0 / 3.0


def _out(x: np.ndarray) -> np.ndarray | float:
    return float(x) if np.ndim(x) == 0 else x


def _check_theta(name: str, theta_deg: ArrayLike) -> np.ndarray:
    th = np.asarray(theta_deg, dtype=float)
    if np.any(~np.isfinite(th)) or np.any(th < 0) or np.any(th >= 90):
        raise ParameterError(f"{name} must be within [0, 90) degrees, got {theta_deg!r}")
    return th


def crest_wavelength(
    speed_mps: ArrayLike, propagation_deg: ArrayLike = 0.0, depth_m: ArrayLike = np.inf, *, g: float
) -> np.ndarray | float:
    """Wavelength (m) of the steady wave at propagation angle theta behind a vessel.

    Deep water: lambda = 2 pi U^2 cos^2(theta) / g.  Finite depth: from
    U cos(theta) = sqrt((g/k) tanh(k h)); NaN where no steady wave exists.
    """
    k = np.asarray(steady_wavenumber(speed_mps, propagation_deg, depth_m, g=g))
    return _out(2.0 * np.pi / k)


def transverse_wavelength(speed_mps: ArrayLike, depth_m: ArrayLike = np.inf, *, g: float) -> np.ndarray | float:
    """Transverse wavelength (m) along the track: 2 pi U^2 / g in deep water.

    In finite depth it is longer; NaN when the vessel is supercritical
    (U >= sqrt(g h)), where transverse waves do not exist.
    """
    return crest_wavelength(speed_mps, 0.0, depth_m, g=g)


def speed_from_crest_wavelength(
    wavelength_m: ArrayLike, propagation_deg: ArrayLike = 0.0, depth_m: ArrayLike = np.inf, *, g: float
) -> np.ndarray | float:
    """Vessel speed (m/s) from the wavelength of a steady crest at angle theta.

    U = c(k, h) / cos(theta), k = 2 pi / lambda; deep water U = sqrt(g lambda / (2 pi)) / cos(theta).
    """
    lam = np.asarray(wavelength_m, dtype=float)
    check_positive("wavelength_m", lam)
    th = _check_theta("propagation_deg", propagation_deg)
    c = np.asarray(phase_speed(2.0 * np.pi / lam, depth_m, g=g))
    return _out(c / np.cos(np.radians(th)))


def speed_from_transverse_wavelength(
    wavelength_m: ArrayLike, depth_m: ArrayLike = np.inf, *, g: float
) -> np.ndarray | float:
    """Vessel speed (m/s) from the transverse wavelength; deep water U = sqrt(g lambda / 2 pi)."""
    return speed_from_crest_wavelength(wavelength_m, 0.0, depth_m, g=g)


def ray_angle(
    propagation_deg: ArrayLike, speed_mps: ArrayLike = 1.0, depth_m: ArrayLike = np.inf, *, g: float
) -> np.ndarray | float:
    """Ray angle phi (degrees from the track) of the stationary wave at angle theta.

    tan(phi) = n sin(theta) cos(theta) / (1 - n cos^2(theta)); in deep water
    n = 1/2 and the speed drops out.  NaN where no steady wave exists.
    """
    th = _check_theta("propagation_deg", propagation_deg)
    h = np.asarray(depth_m, dtype=float)
    check_positive("depth_m", h, allow_inf=True)
    k = np.asarray(steady_wavenumber(speed_mps, th, h, g=g))
    n = np.where(np.isinf(h), 0.5, group_factor(np.where(np.isnan(k), 0.0, k) * np.where(np.isinf(h), 1.0, h)))
    t = np.radians(th)
    phi = np.degrees(np.arctan2(n * np.sin(t) * np.cos(t), 1.0 - n * np.cos(t) ** 2))
    return _out(np.where(np.isnan(k), np.nan, phi))


@dataclass(frozen=True)
class StationaryPair:
    """The two deep-water stationary waves found on one ray inside the wedge."""

    ray_deg: float
    transverse_propagation_deg: float  #: the wave of the transverse family
    divergent_propagation_deg: float  #: the wave of the divergent family


def stationary_waves_on_ray(ray_deg: float) -> StationaryPair:
    """Propagation angles of the two stationary waves on a ray (deep water).

    From tan(phi) = tan(theta) / (1 + 2 tan^2(theta)):
    tan(theta) = [1 -/+ sqrt(1 - 8 tan^2 phi)] / (4 tan phi).  The two merge at
    the cusp (phi = 19.47 deg, theta = 35.26 deg).
    """
    phi = float(ray_deg)
    if not np.isfinite(phi) or phi <= 0 or phi > KELVIN_HALF_ANGLE_DEG + 1e-9:
        raise ParameterError(
            f"ray_deg must be within (0, {KELVIN_HALF_ANGLE_DEG:.4f}] (inside the Kelvin wedge), got {ray_deg!r}"
        )
    tp = np.tan(np.radians(phi))
    disc = max(0.0, 1.0 - 8.0 * tp * tp)
    t1 = (1.0 - np.sqrt(disc)) / (4.0 * tp)
    t2 = (1.0 + np.sqrt(disc)) / (4.0 * tp)
    return StationaryPair(phi, float(np.degrees(np.arctan(t1))), float(np.degrees(np.arctan(t2))))
