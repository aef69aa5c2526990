"""Hull Froude number and the apparent (brightest-arm) wake angle of fast hulls.

A hull of length L cannot efficiently make waves longer than itself
(Rabaud & Moisy 2013).  At high hull Froude number Fr_L = U / sqrt(g L) the
transverse waves and the long divergent waves near the cusp are then weak, and
the brightest arms lie at the ray of the longest wave the hull still makes,
lambda = L.  In deep water that wave has cos^2(theta) = 1 / (2 pi Fr_L^2) and
its ray angle tends to 1 / (2 sqrt(2 pi) Fr_L) radians.  The envelope of the
pattern stays at 19.47 deg (Darmon, Benzaquen & Raphael 2014); only the
brightest arms close in.  A measured arm angle below 19.47 deg therefore
suggests a fast, short vessel, not necessarily an error.

References
----------
1. Rabaud, M. & Moisy, F. (2013). Ship wakes: Kelvin or Mach angle?
   *Phys. Rev. Lett.* 110, 214503.
2. Darmon, A., Benzaquen, M. & Raphael, E. (2014). Kelvin wake pattern at
   large Froude numbers. *J. Fluid Mech.* 738, R3.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike

from ..errors import check_positive
from .kelvin import CUSP_PROPAGATION_DEG, KELVIN_HALF_ANGLE_DEG

#: Hull Froude number above which the brightest arms close in (Rabaud & Moisy 2013: ~0.5).
#: The model below gives sqrt(3 / (4 pi)) = 0.4886 exactly.
FR_HULL_TRANSITION: float = float(np.sqrt(3.0 / (4.0 * np.pi)))


def hull_froude(speed_mps: ArrayLike, hull_length_m: ArrayLike, *, g: float) -> np.ndarray | float:
    """Hull Froude number Fr_L = U / sqrt(g L) (dimensionless)."""
    u = np.asarray(speed_mps, dtype=float)
    length = np.asarray(hull_length_m, dtype=float)
    check_positive("speed_mps", u, allow_zero=True)
    check_positive("hull_length_m", length)
    fr = u / np.sqrt(g * length)
    return float(fr) if fr.ndim == 0 else fr


def apparent_arm_angle(hull_froude_number: ArrayLike) -> np.ndarray | float:
    """Angle (deg) of the brightest wake arms for a hull at Fr_L (deep water).

    Kelvin's 19.47 deg for Fr_L below ~0.49; above, the ray angle of the wave
    with wavelength equal to the hull length, tending to 1/(2 sqrt(2 pi) Fr_L) rad.
    """
    fr = np.asarray(hull_froude_number, dtype=float)
    check_positive("hull_froude_number", fr)
    cos2 = np.minimum(1.0 / (2.0 * np.pi * fr * fr), 1.0)
    theta = np.arccos(np.sqrt(cos2))
    theta = np.maximum(theta, np.radians(CUSP_PROPAGATION_DEG))
    phi = np.degrees(np.arctan(np.sin(theta) * np.cos(theta) / (1.0 + np.sin(theta) ** 2)))
    phi = np.where(fr <= FR_HULL_TRANSITION, KELVIN_HALF_ANGLE_DEG, phi)
    return float(phi) if phi.ndim == 0 else phi


def narrow_angle_explained(
    measured_deg: float, speed_mps: float, hull_length_m: float, *, g: float, tolerance_deg: float = 2.0
) -> bool:
    """True when a measured arm angle below 19.47 deg fits the fast-hull model within tolerance."""
    expected = float(apparent_arm_angle(hull_froude(speed_mps, hull_length_m, g=g)))
    return bool(abs(measured_deg - expected) <= tolerance_deg)


def hull_froude_from_arm_angle(arm_angle_deg: ArrayLike) -> np.ndarray | float:
    """The hull Froude number whose brightest arms lie at ``arm_angle_deg`` (the inverse of
    :func:`apparent_arm_angle` on its fast branch, Fr_L above the transition); NaN for angles at or above
    Kelvin's 19.47 deg, where the angle does not depend on Fr_L.

    The model gives, for the wave of length L (cos^2 theta = 1 / (2 pi Fr^2)), the ray angle
    tan(phi) = sin(theta) cos(theta) / (1 + sin^2(theta)); with t = tan(theta) this is
    tan(phi) = t / (1 + 2 t^2).  The fast hull follows the branch theta from 35.26 deg to 90 deg (phi falling
    from 19.47 deg to 0), where t = (1 + sqrt(1 - 8 tan^2 phi)) / (4 tan phi); then cos^2 theta = 1 / (1 + t^2)
    gives Fr^2 = (1 + t^2) / (2 pi).
    """
    phi = np.radians(np.asarray(arm_angle_deg, dtype=float))
    tp = np.tan(phi)
    disc = 1.0 - 8.0 * tp * tp
    with np.errstate(invalid="ignore", divide="ignore"):
        t = (1.0 + np.sqrt(disc)) / (4.0 * tp)
        fr = np.sqrt((1.0 + t * t) / (2.0 * np.pi))
    ok = (phi > 0) & (disc >= 0) & (np.degrees(phi) < KELVIN_HALF_ANGLE_DEG - 1e-9) & (fr > FR_HULL_TRANSITION)
    fr = np.where(ok, fr, np.nan)
    return float(fr) if fr.ndim == 0 else fr
