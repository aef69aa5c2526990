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
