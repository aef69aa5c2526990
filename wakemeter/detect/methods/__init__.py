"""Speed methods: each one module with one class following :class:`~.base.SpeedMethod`.

Both the wave path and the line path of the analysis run the same :data:`SPEED_METHODS` (a method reads the
stages it needs, :class:`~.base.WaveStages` or :class:`~.base.LineStages`, and gives nothing without them)
and combine their estimates by one rule (:func:`wakemeter.physics.inversion.combine_estimates`: a single
method keeps its own interval, several are weighted and tested for consistency).  To add a method, write
its module and add one line here; or pass ``methods=`` to :func:`wakemeter.detect.analysis.analyze`.  The
order is part of the reproducible result (the Monte Carlo draws share one generator).
"""

from __future__ import annotations

from collections.abc import Sequence

from ...physics import inversion as inv
from .base import LineStages, MethodContext, MethodOutput, SpeedMethod, WaveStages
from .havelock_pair import HavelockPair
from .hull_band_shift import HullBandShift
from .narrow_arms import NarrowArms
from .radar_offset import RadarOffset
from .spectral_fit import SpectralFit
from .transverse import TransverseCrests

SPEED_METHODS: tuple[SpeedMethod, ...] = (
    SpectralFit(),
    TransverseCrests(),
    HavelockPair(),
    RadarOffset(),
    HullBandShift(),
    NarrowArms(),
)


def run_methods(
    ctx: MethodContext, methods: Sequence[SpeedMethod]
) -> tuple[list[MethodOutput], tuple[inv.SpeedEstimate, ...], inv.SpeedEstimate | None]:
    """Every method's output, all their estimates in order, and the estimate the depth regime is read from
    (that of the first method that ``reads_depth``, when it gave one)."""
    outputs = [m.estimate(ctx) for m in methods]
    estimates = tuple(e for o in outputs for e in o.estimates)
    depth_source = next(
        (o.estimates[0] for m, o in zip(methods, outputs) if m.reads_depth and o.estimates),
        None,
    )
    return outputs, estimates, depth_source


def combine(estimates: Sequence[inv.SpeedEstimate]) -> inv.CombinedSpeed | None:
    """The one combination rule of both paths (None without an estimate)."""
    return inv.combine_estimates(list(estimates)) if estimates else None


__all__ = [
    "SPEED_METHODS",
    "LineStages",
    "MethodContext",
    "MethodOutput",
    "SpeedMethod",
    "WaveStages",
    "combine",
    "run_methods",
]
