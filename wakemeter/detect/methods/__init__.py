"""Speed methods: each one module with one class following :class:`~.base.SpeedMethod`.

To add a method, write its module and add one line to :data:`SPEED_METHODS`; the analysis runs them in
this order (the Monte Carlo draws share one generator, so the order is part of the reproducible result)
and the inversion core combines their estimates with a consistency test.
"""

from __future__ import annotations

from .base import MethodContext, MethodOutput, SpeedMethod
from .havelock_pair import HavelockPair
from .radar_offset import RadarOffset
from .spectral_fit import SpectralFit
from .transverse import TransverseCrests

SPEED_METHODS: tuple[SpeedMethod, ...] = (SpectralFit(), TransverseCrests(), HavelockPair(), RadarOffset())

__all__ = ["SPEED_METHODS", "MethodContext", "MethodOutput", "SpeedMethod"]
