"""Gravity: standard gravity and WGS 84 normal gravity at a latitude.

References
----------
1. CGPM (1901). 3rd General Conference on Weights and Measures: standard
   acceleration of gravity g_n = 9.80665 m/s^2.
2. NIMA (2000). *Department of Defense World Geodetic System 1984*, TR8350.2,
   3rd ed., eq. (4-1) (Somigliana closed formula) and Table 3.4 constants.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike

from ..errors import ParameterError

#: Standard acceleration of gravity, m/s^2 (CGPM 1901, exact by definition).
STANDARD_GRAVITY: float = 9.80665

# WGS 84 constants (NIMA TR8350.2, Table 3.4).
_GAMMA_E = 9.7803253359  # normal gravity at the equator, m/s^2
_K_SOMIGLIANA = 0.00193185265241  # normal gravity constant
_E2 = 0.00669437999013  # first eccentricity squared


def normal_gravity(latitude_deg: ArrayLike) -> np.ndarray | float:
    """WGS 84 normal gravity on the ellipsoid surface at a geodetic latitude.

    Parameters
    ----------
    latitude_deg : array_like
        Geodetic latitude in degrees, within [-90, 90].

    Returns
    -------
    gamma : ndarray or float
        Normal gravity in m/s^2 (9.7803 at the equator, 9.8322 at the poles).

    References
    ----------
    .. [1] NIMA TR8350.2 (2000), eq. (4-1), Somigliana's formula.
    """
    lat = np.asarray(latitude_deg, dtype=float)
    if np.any(~np.isfinite(lat)) or np.any(np.abs(lat) > 90.0):
        raise ParameterError(f"latitude_deg must be within [-90, 90], got {latitude_deg!r}")
    s2 = np.sin(np.radians(lat)) ** 2
    gamma = _GAMMA_E * (1.0 + _K_SOMIGLIANA * s2) / np.sqrt(1.0 - _E2 * s2)
    return float(gamma) if gamma.ndim == 0 else gamma
