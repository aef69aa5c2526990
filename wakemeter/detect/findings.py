"""Typed pieces of a wake finding: cautions with a code, wake-line kinds, the drawing as typed segments,
the decision diagnostics, the arrays for plots and the interval's cover of shallower water.

Code that acts on a finding reads these fields and codes; the texts are for people and may be reworded
without changing what the program does.
"""

from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass, field
from enum import StrEnum
from typing import Any

import numpy as np

Point = tuple[float, float]


class CautionCode(StrEnum):
    """What a caution is about (stable identifiers; the text beside it is free to change)."""

    ESTIMATE = "estimate"  #: every result: an estimate from imagery
    DISPLACED_HULL = "displaced-hull"  #: radar hull seen away from its wake's start
    NO_GEOREFERENCE = "no-georeference"  #: distances from a hand calibration
    RADAR_OFFSET_MISSING = "radar-offset-missing"  #: radar geometry given but no hull offset measured
    INTERVAL_WIDENED = "interval-widened"  #: interval covers shallower water not ruled out
    NARROW_ARMS = "narrow-arms"  #: arms narrower than Kelvin's (fast hull)
    METHODS_DISAGREE = "methods-disagree"  #: the chi-square test rejected the combination
    DEPTH_FITTED = "depth-fitted"  #: depth not given, fitted to the waves
    DEPTH_OPEN = "depth-open"  #: depth not given, deep and shallow water both fit
    DEEP_ASSUMED = "deep-assumed"  #: depth not given, deep water assumed
    DEPTH_CONTRADICTED = "depth-contradicted"  #: the waves fit another depth clearly better than the given one
    THROUGH_WATER = "through-water"  #: the speed is through the water, not over ground
    HAND_CREST = "hand-crest"  #: a crest spacing measured by hand is included
    HAND_ARM = "hand-arm"  #: the half-angle was corrected by hand
    FORCED = "forced"  #: analysed at the analyst's insistence although no vessel was seen at the point
    LINES_ONLY = "lines-only"  #: the wake was seen as lines only: no wave crests, and why no speed from waves
    OVER_GROUND = "over-ground"  #: a speed over ground (hull shift between bands), not through the water
    SHIFT_OFF_TRACK = "shift-off-track"  #: the hull's shift between bands does not follow its wake
    SHIFT_NOT_MOTION = "shift-not-motion"  #: the bands recorded in between do not show the hull moving
    OUT_OF_DOMAIN = "out-of-domain"  #: a method's figure fell outside its domain: not given as a speed
    STREAK = "streak"  #: the wake is a short streak fading from its head: direction read from which end is bright
    NOTE = "note"  #: a caution read from an older record that names no code


@dataclass(frozen=True)
class Caution:
    code: CautionCode
    text: str

    def to_json(self) -> dict:
        return {"code": str(self.code), "text": self.text}

    @classmethod
    def from_json(cls, data: Any) -> Caution:
        if isinstance(data, str):  # older records: text only
            return cls(CautionCode.ESTIMATE if "licensed" in data else _guess_code(data), data)
        return cls(CautionCode(data["code"]), str(data["text"]))


def _guess_code(text: str) -> CautionCode:
    """Code of a caution stored as text only by an earlier version (read-only compatibility)."""
    for code, words in (
        (CautionCode.HAND_CREST, "measured by hand"),
        (CautionCode.HAND_ARM, "corrected by hand"),
        (CautionCode.DISPLACED_HULL, "start of its wake"),
        (CautionCode.DEPTH_FITTED, "depth was fitted"),
        (CautionCode.DEEP_ASSUMED, "deep water assumed"),
        (CautionCode.THROUGH_WATER, "through the water"),
        (CautionCode.METHODS_DISAGREE, "DISAGREE"),
        (CautionCode.INTERVAL_WIDENED, "widened"),
        (CautionCode.NARROW_ARMS, "narrower than Kelvin"),
        (CautionCode.NO_GEOREFERENCE, "georeference"),
        (CautionCode.RADAR_OFFSET_MISSING, "azimuth offset not measured"),
    ):
        if words in text:
            return code
    return CautionCode.NOTE


class LineKind(StrEnum):
    TURBULENT_DARK = "turbulent wake (dark)"
    TURBULENT_BRIGHT = "turbulent wake (bright)"
    KELVIN_ARM = "Kelvin arm"
    NARROW_V = "narrow-V arm"


class SegmentKind(StrEnum):
    """What a drawn polyline of a finding shows (scene pixel coordinates)."""

    AREA = "chip"  #: outline of the analysed area (closed)
    TRACK = "track"  #: from the vessel back along the wake
    ARM_LEFT = "arm_left"
    ARM_RIGHT = "arm_right"
    NARROW_V_LEFT = "narrow_v_left"
    NARROW_V_RIGHT = "narrow_v_right"
    HULL_SHIFT = "hull_shift"  #: from the radar hull as imaged to where its wake starts
    CREST = "crests"  #: a crest of the fitted Kelvin pattern


ARM_KINDS = (SegmentKind.ARM_LEFT, SegmentKind.ARM_RIGHT)
NARROW_V_KINDS = (SegmentKind.NARROW_V_LEFT, SegmentKind.NARROW_V_RIGHT)


@dataclass(frozen=True)
class Segment:
    kind: SegmentKind
    points: tuple[Point, ...]

    def to_json(self) -> dict:
        return {"kind": str(self.kind), "points": [[float(x), float(y)] for x, y in self.points]}


@dataclass(frozen=True)
class Drawing:
    """The lines of a finding, in scene pixels."""

    segments: tuple[Segment, ...] = ()

    def of(self, kind: SegmentKind) -> list[Segment]:
        return [s for s in self.segments if s.kind == kind]

    def first(self, kind: SegmentKind) -> Segment | None:
        found = self.of(kind)
        return found[0] if found else None

    def points_of(self, *kinds: SegmentKind) -> list[Point]:
        return [p for s in self.segments if s.kind in kinds for p in s.points]

    def plus(self, segments: Iterable[Segment]) -> Drawing:
        return Drawing(self.segments + tuple(segments))

    def without(self, kind: SegmentKind) -> Drawing:
        return Drawing(tuple(s for s in self.segments if s.kind != kind))

    def to_json(self) -> list[dict]:
        return [s.to_json() for s in self.segments]

    @classmethod
    def from_json(cls, data: Any) -> Drawing:
        """From :meth:`to_json`, or the older dict form ``{key: points or list of polylines}``."""
        if not data:
            return cls()
        segs: list[Segment] = []
        if isinstance(data, dict):
            for key, pts in data.items():
                kind = SegmentKind(key)
                lines = pts if kind == SegmentKind.CREST else [pts]
                segs += [Segment(kind, tuple((float(p[0]), float(p[1])) for p in line)) for line in lines]
        else:
            segs = [
                Segment(SegmentKind(s["kind"]), tuple((float(p[0]), float(p[1])) for p in s["points"])) for s in data
            ]
        return cls(tuple(segs))


@dataclass(frozen=True)
class IntervalCover:
    """Speeds the 95 % interval must keep covering because shallower water was not ruled out."""

    low_mps: float
    high_mps: float
    froudes: tuple[float, ...]  #: the depth Froude numbers that fit almost as well

    @property
    def froude_text(self) -> str:
        return ", ".join(f"{f:.2f}" for f in self.froudes)

    def to_json(self) -> dict:
        return {"low_mps": self.low_mps, "high_mps": self.high_mps, "froudes": list(self.froudes)}

    @classmethod
    def from_json(cls, data: Any) -> IntervalCover | None:
        if data is None:
            return None
        return cls(float(data["low_mps"]), float(data["high_mps"]), tuple(float(f) for f in data["froudes"]))


@dataclass(frozen=True)
class Diagnostics:
    """Numbers behind the decision and the fits (for sweeps, reports and review)."""

    side_contrast: float = float("nan")  #: wake-side contrast of the look used
    fit_speed_mps: float = float("nan")  #: speed of the deep-water (or given-depth) fit
    depth_gain: float = float("nan")  #: joint-fit score minus deep-fit score
    shallow_rule_out: float = float("nan")  #: best score minus the score at Fr_h fr_rule_out
    boot_speeds_mps: tuple[float, ...] = ()  #: quarter-box speeds behind the uncertainty
    look_step: int = 1  #: decimation of the look used (1: full resolution)
    vessel_evidence: str = ""  #: what shows a vessel at the point: "hull", "wake lines", "forced" or "none"

    def to_json(self) -> dict:
        return {
            "side_contrast": _num(self.side_contrast),
            "fit_speed_mps": _num(self.fit_speed_mps),
            "depth_gain": _num(self.depth_gain),
            "shallow_rule_out": _num(self.shallow_rule_out),
            "boot_speeds_mps": [_num(v) for v in self.boot_speeds_mps],
            "look_step": self.look_step,
            "vessel_evidence": self.vessel_evidence,
        }

    @classmethod
    def from_json(cls, data: Any) -> Diagnostics:
        if not data:
            return cls()
        nan = float("nan")

        def f(key: str) -> float:
            v = data.get(key)
            return nan if v is None else float(v)

        return cls(
            f("side_contrast"),
            f("fit_speed_mps"),
            f("depth_gain"),
            f("shallow_rule_out"),
            tuple(nan if v is None else float(v) for v in data.get("boot_speeds_mps") or ()),
            int(data.get("look_step") or 1),
            str(data.get("vessel_evidence") or ""),
        )


@dataclass(frozen=True)
class LinePlotData:
    """What a wake found as a line rests on (arrays for plots; not stored, recomputed on demand)."""

    angles_deg: np.ndarray  #: directions from the vessel, degrees clockwise from the wake line
    significance: np.ndarray  #: each direction's significance against the scene's other lines
    threshold: float  #: the significance a line needs
    profile: np.ndarray  #: mean brightness along the wake line (standardised), from the vessel outwards
    profile_m_per_px: float
    dark: bool  #: a dark line (its profile lies below the background)


@dataclass(frozen=True, eq=False)
class PlotData:
    """Arrays for the plots of a finding (not stored in sessions or records; recomputed on demand)."""

    whitened_spectrum: np.ndarray
    spectrum_dk: tuple[float, float]  #: wavenumber steps (along, across the track), rad/m
    spectrum_band: tuple[float, float]  #: wavenumber band used, rad/m
    fitted_curve: tuple[np.ndarray, np.ndarray]  #: steady-wave curve (k along, k across), rad/m
    fit_speed_mps: float
    fit_depth_m: float  #: inf: deep water
    fit_delta_deg: float
    profile: np.ndarray  #: intensity along the track behind the vessel
    profile_m_per_px: float
    transverse_wavelength_m: float | None
    speed_grid: np.ndarray = field(default_factory=lambda: np.zeros(0))
    score_profile: np.ndarray = field(default_factory=lambda: np.zeros(0))
    radon: np.ndarray | None = None
    radon_angles_deg: np.ndarray | None = None
    radon_pick: tuple[float, float, float] | None = None  #: (angle deg, offset px, significance)


def _num(x: float | None) -> float | None:
    return None if x is None or not np.isfinite(x) else float(x)
