"""The small protocol every speed method follows, and what it is given.

Both ways the analysis sees a wake run the same methods: the wave path (Kelvin crests resolved: look,
depth model, wake measures, spread in :class:`WaveStages`) and the line path (only lines from the hull:
the line chip and the wake line in :class:`LineStages`).  A method reads the stages it needs and returns
:data:`NOTHING` when they are absent; it states its own domain and, outside it, returns a coded caution
instead of a figure.
"""

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
from ..line_chip import LineChip
from ..look import Look
from ..request import AnalysisRequest
from ..spread import Spread
from ..tuning import Tuning
from ..wake_measures import WakeMeasures
from ..wakeline import LineWake


@dataclass(frozen=True, eq=False, kw_only=True)
class WaveStages:
    """What the wave path found: the look, the depth model, the crests and arms, the quarter-box spread."""

    look: Look
    model: DepthModel
    measures: WakeMeasures
    spread: Spread


@dataclass(frozen=True, eq=False, kw_only=True)
class LineStages:
    """What the line path found: the chip read for lines and the wake line from the hull."""

    chip: LineChip
    wake: LineWake


@dataclass(frozen=True, eq=False, kw_only=True)
class MethodContext:
    """Everything the earlier stages found, read-only; ``rng`` is shared so draws stay reproducible.
    Exactly one of ``waves`` and ``lines`` is set."""

    scene: Scene
    request: AnalysisRequest
    heading_deg: float  #: true bearing of travel
    frame: geodesy.LocalFrame
    conditions: inv.Conditions  #: gravity, depth (given or fitted), pixel-size uncertainty
    gravity: inv.Uncertain
    rng: np.random.Generator
    hull_px: tuple[float, float] | None  #: a radar hull seen away from the wake's start (scene px)
    tuning: Tuning
    waves: WaveStages | None = None
    lines: LineStages | None = None


@dataclass(frozen=True)
class MethodOutput:
    """A method's estimates (none: not applicable here), with its drawing, cautions and diagnostics."""

    estimates: tuple[inv.SpeedEstimate, ...] = ()
    segments: tuple[Segment, ...] = ()
    cautions: tuple[Caution, ...] = ()
    diagnostics: Mapping[str, float] = field(default_factory=dict)
    #: why a method that could have applied here gave no figure (said with the finding's "why no speed")
    why_not: str = ""


NOTHING = MethodOutput()


class SpeedMethod(Protocol):
    """One way of reading the speed from the scene; registered in :data:`wakemeter.detect.methods.SPEED_METHODS`.

    ``reads_depth``: its estimate is the one the depth regime is judged from (the spectral fit)."""

    name: str
    reads_depth: bool

    def estimate(self, ctx: MethodContext) -> MethodOutput: ...
