"""Radar azimuth displacement of a moving target (Raney 1971).

A target with radial (line-of-sight) speed v_r appears shifted in azimuth by
dx = -(R / V) v_r, with R the slant range and V the platform speed; its wake
is not shifted.  The offset between hull and wake apex gives v_r.

Sign convention: v_r > 0 when the target moves away from the radar; the
displacement is then negative (against the platform's flight direction).

References
----------
1. Raney, R. K. (1971). Synthetic aperture imaging radar and moving targets.
   *IEEE Trans. Aerosp. Electron. Syst.* AES-7(3), 499-505.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike

from ..errors import ParameterError, check_positive


def azimuth_offset(
    radial_speed_mps: ArrayLike, slant_range_m: ArrayLike, platform_speed_mps: ArrayLike
) -> np.ndarray | float:
    """Azimuth displacement (m) of a target with radial speed v_r: dx = -(R/V) v_r."""
    r = np.asarray(slant_range_m, dtype=float)
    v = np.asarray(platform_speed_mps, dtype=float)
    check_positive("slant_range_m", r)
    check_positive("platform_speed_mps", v)
    dx = -(r / v) * np.asarray(radial_speed_mps, dtype=float)
    return float(dx) if dx.ndim == 0 else dx


def radial_speed_from_offset(
    offset_m: ArrayLike, slant_range_m: ArrayLike, platform_speed_mps: ArrayLike
) -> np.ndarray | float:
    """Radial speed (m/s) from the hull-to-wake azimuth offset: v_r = -(V/R) dx."""
    r = np.asarray(slant_range_m, dtype=float)
    v = np.asarray(platform_speed_mps, dtype=float)
    check_positive("slant_range_m", r)
    check_positive("platform_speed_mps", v)
    vr = -(v / r) * np.asarray(offset_m, dtype=float)
    return float(vr) if vr.ndim == 0 else vr


#: below this projection factor the azimuth offset says almost nothing about the speed
MIN_PROJECTION = 0.1


def projection_factor(heading_deg, look_bearing_deg: float, incidence_deg: float):
    """cos(heading - look bearing) sin(incidence): the share of the speed that is radial (scalars or arrays)."""
    return np.cos(np.radians(np.asarray(heading_deg) - look_bearing_deg)) * np.sin(np.radians(incidence_deg))


def ground_speed_from_radial(
    radial_speed_mps: ArrayLike,
    *,
    incidence_deg: float,
    heading_deg: float,
    look_bearing_deg: float,
    min_projection: float = MIN_PROJECTION,
) -> np.ndarray | float:
    """Speed over the water (m/s) from the radial speed, given the geometry.

    v_r = U cos(heading - look bearing) sin(incidence), with the look bearing the
    true bearing from the radar towards the scene (across track).

    Raises
    ------
    ParameterError
        When the vessel moves so nearly along the azimuth direction that the
        projection factor is below ``min_projection`` (the offset then says
        almost nothing about the speed).
    """
    if not 0 < incidence_deg < 90:
        raise ParameterError(f"incidence_deg must be within (0, 90), got {incidence_deg!r}")
    proj = float(projection_factor(heading_deg, look_bearing_deg, incidence_deg))
    if abs(proj) < min_projection:
        raise ParameterError(
            f"the vessel moves almost along the radar's flight direction (projection factor {proj:.3f} "
            f"< {min_projection}); the azimuth offset cannot give its speed"
        )
    u = np.asarray(radial_speed_mps, dtype=float) / proj
    return float(u) if u.ndim == 0 else u
