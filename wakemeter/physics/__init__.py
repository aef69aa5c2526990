"""Wave physics and inversion: pure numpy/scipy, no Qt, no I/O.

Modules: :mod:`.dispersion` (omega^2 = g k tanh kh), :mod:`.kelvin` (ship-wave
geometry), :mod:`.havelock` (finite-depth half-angle), :mod:`.hull` (fast-hull
arm angle), :mod:`.radar` (azimuth displacement), :mod:`.gravity`,
:mod:`.units`, :mod:`.inversion` (speed estimates with 95 % intervals).
"""

from __future__ import annotations

from .gravity import STANDARD_GRAVITY, normal_gravity
from .kelvin import CUSP_PROPAGATION_DEG, KELVIN_HALF_ANGLE_DEG
from .units import KNOT_MPS, knots_to_mps, mps_to_knots

__all__ = [
    "STANDARD_GRAVITY",
    "normal_gravity",
    "CUSP_PROPAGATION_DEG",
    "KELVIN_HALF_ANGLE_DEG",
    "KNOT_MPS",
    "knots_to_mps",
    "mps_to_knots",
]
