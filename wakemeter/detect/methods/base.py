"""The small protocol every speed method follows, and what it is given."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Protocol

import numpy as np

from ...physics import inversion as inv
from ...scene import geodesy
from ...scene.raster import Scene
from ..depth_model import DepthModel
from ..findings import Caution, Segment
from ..look import Look
from ..request import AnalysisRequest
from ..spread import Spread
from ..tuning import Tuning
from ..wake_measures import WakeMeasures


@dataclass(frozen=True, eq=False)
class MethodContext:
    """Everything the earlier stages found, read-only; ``rng`` is shared so draws stay reproducible."""

    scene: Scene
    request: AnalysisRequest
    look: Look
    model: DepthModel
    measures: WakeMeasures
    spread: Spread
    heading_deg: float  #: true bearing of travel
    frame: geodesy.LocalFrame
    conditions: inv.Conditions  #: gravity, depth (given or fitted), pixel-size uncertainty
    gravity: inv.Uncertain
    rng: np.random.Generator
    hull_px: tuple[float, float] | None  #: a radar hull seen away from the wake's start (scene px)
    tuning: Tuning


@dataclass(frozen=True)
class MethodOutput:
    """A method's estimates (none: not applicable here), with its drawing, cautions and diagnostics."""

    estimates: tuple[inv.SpeedEstimate, ...] = ()
    segments: tuple[Segment, ...] = ()
    cautions: tuple[Caution, ...] = ()
    diagnostics: Mapping[str, float] = field(default_factory=dict)


NOTHING = MethodOutput()


class SpeedMethod(Protocol):
    """One way of reading the speed from the scene; registered in :data:`wakemeter.detect.methods.SPEED_METHODS`."""

    name: str

    def estimate(self, ctx: MethodContext) -> MethodOutput: ...
