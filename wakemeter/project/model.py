"""The project model, without Qt: the scene, the vessels, the hand measurements, what the analyst asked
for each vessel and what the analysis found, and the finding as it stands after hand corrections.

The desktop program wraps it (``wakemeter.app.document``) with change signals and undo; headless reports
(``wakemeter.evidence.from_session``) use it as it is, so the hand-correction rules exist once.
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass, field, replace
from enum import StrEnum

from ..detect import handmeasure as hm
from ..detect.findings import SegmentKind
from ..detect.request import AnalysisRequest, SpeedLimit, WaterCurrent
from ..detect.result import WakeAnalysis
from ..detect.revise import HAND_ANGLE_MAX_DEG, HAND_ANGLE_STD_DEG, revise, with_crest_lines
from ..errors import WakemeterError
from ..names import clean_name
from ..physics import inversion as inv
from ..physics import units
from ..physics.inversion import weighted_mean
from ..scene.raster import Scene

Point = tuple[float, float]


class MeasureKind(StrEnum):
    TRACK = "track"
    ARM = "arm"
    CREST = "crest"
    RULER = "ruler"
    CALIBRATION = "calibration"


KINDS = tuple(k.value for k in MeasureKind)
#: smallest standard uncertainty of a hand-drawn arm angle (common practice, no source)
HAND_ARM_STD_MIN_DEG = 0.5


@dataclass(frozen=True)
class Vessel:
    id: int
    name: str  #: shown as one printable line of bounded length (names.clean_name)
    position: Point
    found_score: float | None = None  #: the vessel finder's score when the finder marked it; None: marked by hand
    merged: int = 0  #: detections or rows of the same vessel folded into this one (finder and Analyse all)

    def __post_init__(self) -> None:
        object.__setattr__(self, "name", clean_name(self.name))


@dataclass(frozen=True)
class Measurement:
    """A hand measurement: two points on the scene, optionally tied to a vessel."""

    id: int
    kind: str
    points: tuple[Point, Point]
    vessel_id: int | None = None
    text: str = ""  #: value and standard uncertainty, for display
    values: dict = field(default_factory=dict, compare=False)
    error: str = ""
    placement_px: float = hm.PLACEMENT_PX  #: standard uncertainty of each point (scene px), from the zoom used


@dataclass(frozen=True)
class HandCorrections:
    """What the hand measurements of one vessel say, in the form :func:`revise` takes."""

    crest: tuple[float, float, float] | None = None  #: (spacing m, std m, angle to track deg)
    half_angle: tuple[float, float] | None = None  #: (deg, std deg)


class Project:
    """Plain state and the rules on it; every change goes through the methods marked *change*."""

    def __init__(self) -> None:
        self.scene: Scene | None = None
        self.vessels: dict[int, Vessel] = {}
        self.measurements: dict[int, Measurement] = {}
        self.findings: dict[int, WakeAnalysis] = {}  #: vessel id -> the analysis as it came out
        self.requests: dict[int, AnalysisRequest] = {}  #: vessel id -> what the analyst asked
        self.rejected: set[int] = set()  #: vessels whose finding the analyst rejected
        #: a speed limit and a water current for every vessel of the scene that has none of its own
        self.scene_limit: SpeedLimit | None = None
        self.scene_current: WaterCurrent | None = None
        self.selected = 0
        self._ids = itertools.count(1)
        self._effective: dict[int, tuple] = {}

    # ---- identity -----------------------------------------------------------
    def new_id(self) -> int:
        return next(self._ids)

    def continue_ids(self) -> None:
        """After loading: new ids start above every id in use."""
        top = max([0] + list(self.vessels) + list(self.measurements))
        self._ids = itertools.count(top + 1)

    def clear(self) -> None:
        """*change*: forget everything but the scene."""
        self.vessels.clear()
        self.measurements.clear()
        self.findings.clear()
        self.requests.clear()
        self.rejected.clear()
        self.scene_limit = self.scene_current = None
        self._effective.clear()
        self.selected = 0

    # ---- items --------------------------------------------------------------
    def item(self, item_id: int) -> Vessel | Measurement | None:
        return self.vessels.get(item_id) or self.measurements.get(item_id)

    def put(self, item: Vessel | Measurement) -> None:
        """*change*: add or replace a vessel or a measurement (measurements are evaluated)."""
        if isinstance(item, Vessel):
            self.vessels[item.id] = item
            return
        self.measurements[item.id] = self.evaluate(item)
        if item.kind == MeasureKind.TRACK:  # arms and crest angles depend on the track
            for k, m in list(self.measurements.items()):
                if m.kind in (MeasureKind.ARM, MeasureKind.CREST) and k != item.id:
                    self.measurements[k] = self.evaluate(m)

    def remove(self, item_id: int) -> None:
        """*change*: remove a vessel (with its finding) or a measurement."""
        self.vessels.pop(item_id, None)
        self.measurements.pop(item_id, None)
        self.findings.pop(item_id, None)
        if self.selected == item_id:
            self.selected = 0
        self.reevaluate_all()

    def reevaluate_all(self) -> None:
        for k, m in list(self.measurements.items()):
            self.measurements[k] = self.evaluate(m)

    def nearest_vessel(self, p: Point) -> int | None:
        if not self.vessels:
            return None
        return min(self.vessels.values(), key=lambda v: (v.position[0] - p[0]) ** 2 + (v.position[1] - p[1]) ** 2).id

    def vessel_of_selection(self) -> int | None:
        item = self.item(self.selected)
        if isinstance(item, Vessel):
            return item.id
        if isinstance(item, Measurement) and item.vessel_id in self.vessels:
            return item.vessel_id
        return next(iter(self.vessels), None) if len(self.vessels) == 1 else None

    def request_for(self, vessel_id: int) -> AnalysisRequest:
        """The vessel's request at its current position (a default one when nothing was given), with the scene's
        limit and current where the vessel has none of its own."""
        pos = self.vessels[vessel_id].position
        req = self.requests.get(vessel_id)
        req = AnalysisRequest(vessel_px=pos) if req is None else req.at_pixel(pos)
        if req.speed_limit is None and self.scene_limit is not None:
            req = replace(req, speed_limit=self.scene_limit)
        if req.current is None and self.scene_current is not None:
            req = replace(req, current=self.scene_current)
        return req

    # ---- values from the core -------------------------------------------
    def north_known(self) -> bool:
        sc = self.scene
        return bool(sc and (sc.info.georeferenced or (sc.calibration is not None and sc.calibration.north_known)))

    def track_of(self, vessel_id: int | None) -> Measurement | None:
        tracks = [
            m
            for m in self.measurements.values()
            if m.kind == MeasureKind.TRACK and (vessel_id is None or m.vessel_id == vessel_id)
        ]
        return tracks[-1] if tracks else None

    def reference_track(self, vessel_id: int | None) -> tuple[tuple[Point, Point], float | None, str] | None:
        """The track arms and crest rulers are measured against: the vessel's hand-drawn track, else the track
        its analysis found (with the analysis' heading uncertainty); (points, std deg or None, source)."""
        hand = self.track_of(vessel_id)
        if hand is not None:
            return hand.points, None, "hand"
        finding = self.findings.get(vessel_id) if vessel_id is not None else None
        seg = finding.drawing.first(SegmentKind.TRACK) if finding is not None and finding.wake_found else None
        if seg is None:
            return None
        std = finding.heading_std_deg if finding is not None else None
        return (seg.points[0], seg.points[-1]), std, "analysis"

    def evaluate(self, m: Measurement) -> Measurement:
        """Recompute a measurement's value with the core; errors become a message, not an exception."""
        sc = self.scene
        if sc is None:
            return m
        try:
            if m.kind == MeasureKind.CALIBRATION:
                r = m.values.get("distance_m")
                return replace(m, text=f"calibration: {r:.2f} m" if r else "calibration", error="")
            if not sc.info.georeferenced and sc.calibration is None:
                return replace(m, text="", error="calibrate the image first (pixel size or two points)")
            if m.kind == MeasureKind.RULER:
                r = hm.ruler(sc, *m.points, placement=m.placement_px)
                return replace(
                    m,
                    values={"length_m": r.length_m, "length_std_m": r.length_std_m, "bearing_deg": r.bearing_deg},
                    text=f"{r.length_m:.1f} ± {r.length_std_m:.1f} m, {r.bearing_deg:.1f}°",
                    error="",
                )
            if m.kind == MeasureKind.TRACK:
                t = hm.track_heading(sc, m.points[0], m.points[1], placement=m.placement_px)
                return replace(
                    m,
                    values={"heading_deg": t.bearing_deg, "heading_std_deg": t.bearing_std_deg},
                    text=f"heading {t.bearing_deg:.1f} ± {t.bearing_std_deg:.1f}°"
                    + ("" if self.north_known() else " (from image up)"),
                    error="",
                )
            if m.kind == MeasureKind.ARM:
                ref = self.reference_track(m.vessel_id)
                if ref is None:
                    return replace(m, text="", error="draw the vessel's track first, or analyse the vessel")
                points, track_std, source = ref
                a, sd = hm.angle_to_track(sc, points, m.points, placement=m.placement_px, track_std_deg=track_std)
                return replace(
                    m,
                    values={"half_angle_deg": a, "half_angle_std_deg": sd},
                    text=f"half-angle {a:.1f} ± {sd:.1f}°" + ("" if source == "hand" else " (to the analysed track)"),
                    error="",
                )
            if m.kind == MeasureKind.CREST:
                c = hm.crest_ruler(sc, *m.points, placement=m.placement_px)
                values = {
                    "spacing_m": c.spacing_m,
                    "spacing_std_m": c.spacing_std_m,
                    "snr": c.snr,
                    "profile": c.profile,
                    "step_m": c.step_m,
                }
                text = f"crests {c.spacing_m:.1f} ± {c.spacing_std_m:.1f} m"
                ref = self.reference_track(m.vessel_id)
                if ref is not None:
                    ang, _ = hm.angle_to_track(sc, ref[0], m.points, placement=m.placement_px, track_std_deg=ref[1])
                    values["angle_to_track_deg"] = ang
                    text += f", {ang:.0f}° to track"
                return replace(m, values=values, text=text, error="")
        except WakemeterError as err:
            return replace(m, text="", error=str(err))
        return m

    # ---- findings -------------------------------------------------------
    def hand_corrections(self, vessel_id: int) -> HandCorrections:
        """The last crest ruler and every arm of the vessel (combined: their weighted mean, widened when they
        disagree), as corrections (the rules live here only)."""
        crest = [
            m
            for m in self.measurements.values()
            if m.kind == MeasureKind.CREST and m.vessel_id == vessel_id and "spacing_m" in m.values
        ]
        arm = [
            m
            for m in self.measurements.values()
            if m.kind == MeasureKind.ARM and m.vessel_id == vessel_id and "half_angle_deg" in m.values
        ]
        hand_crest = hand_arm = None
        if crest:
            v = crest[-1].values
            hand_crest = (
                v["spacing_m"],
                v["spacing_std_m"],
                min(v.get("angle_to_track_deg", 0.0), HAND_ANGLE_MAX_DEG),
            )
        if arm:
            hand_arm = weighted_mean(
                [m.values["half_angle_deg"] for m in arm],
                [max(m.values["half_angle_std_deg"], HAND_ARM_STD_MIN_DEG) for m in arm],
            )
        return HandCorrections(hand_crest, hand_arm)

    def effective_finding(self, vessel_id: int) -> WakeAnalysis | None:
        """The finding as it stands after the analyst's hand corrections (crest ruler, arm), with the
        fitted crest lines in its drawing."""
        raw = self.findings.get(vessel_id)
        if raw is None:
            return None
        hand = self.hand_corrections(vessel_id)
        key = (id(raw), hand)
        cached = self._effective.get(vessel_id)
        if cached is not None and cached[0] == key:
            return cached[1]
        try:
            eff = revise(raw, hand_crest=hand.crest, hand_half_angle=hand.half_angle)
        except WakemeterError:
            eff = raw
        if eff.wake_found and self.scene is not None:
            eff = with_crest_lines(self.scene, eff)
        self._effective[vessel_id] = (key, eff)
        return eff

    def speed_from_hand(self, vessel_id: int) -> str:
        """Plain text of what the crest ruler alone implies (through the core inversion, deep water)."""
        hand = self.hand_corrections(vessel_id)
        if hand.crest is None:
            return ""
        lam, sd, theta = hand.crest
        try:
            est = inv.speed_from_crest_wavelength(
                inv.Uncertain(lam, sd), inv.Uncertain(theta, HAND_ANGLE_STD_DEG), draws=20_000
            )
        except WakemeterError as err:
            return str(err)
        return (
            f"from the crest ruler: {est.speed_mps:.2f} m/s ({units.mps_to_knots(est.speed_mps):.1f} kn), "
            f"95 % {est.ci95_low_mps:.2f}-{est.ci95_high_mps:.2f} m/s (deep water assumed)"
        )
