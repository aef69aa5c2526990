"""Unit conversions for speeds and angles.

References
----------
1. BIPM (2019). *The International System of Units (SI Brochure)*, 9th ed.,
   Table 8: 1 nautical mile = 1852 m; 1 knot = 1852/3600 m/s.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike

#: One international knot in m/s (exact, BIPM SI Brochure Table 8).
KNOT_MPS: float = 1852.0 / 3600.0
#: One km/h in m/s (exact).
KMH_MPS: float = 1000.0 / 3600.0


def mps_to_knots(speed_mps: ArrayLike) -> np.ndarray | float:
    """Convert m/s to international knots."""
    return np.asarray(speed_mps, dtype=float) / KNOT_MPS


def knots_to_mps(speed_kn: ArrayLike) -> np.ndarray | float:
    """Convert international knots to m/s."""
    return np.asarray(speed_kn, dtype=float) * KNOT_MPS


def mps_to_kmh(speed_mps: ArrayLike) -> np.ndarray | float:
    """Convert m/s to km/h."""
    return np.asarray(speed_mps, dtype=float) / KMH_MPS


def kmh_to_mps(speed_kmh: ArrayLike) -> np.ndarray | float:
    """Convert km/h to m/s."""
    return np.asarray(speed_kmh, dtype=float) * KMH_MPS


def wrap_bearing_deg(bearing_deg: ArrayLike) -> np.ndarray | float:
    """Wrap a bearing into [0, 360) degrees."""
    out = np.mod(np.asarray(bearing_deg, dtype=float), 360.0)
    return np.where(out >= 360.0, 0.0, out)


def format_speed(speed_mps: float) -> str:
    """Speed in m/s, knots and km/h side by side, e.g. ``'7.72 m/s (15.0 kn, 27.8 km/h)'``."""
    return f"{speed_mps:.2f} m/s ({float(mps_to_knots(speed_mps)):.1f} kn, {float(mps_to_kmh(speed_mps)):.1f} km/h)"
