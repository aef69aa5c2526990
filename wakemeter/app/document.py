"""The observable document: scene, vessels, hand measurements and automatic findings.

Widgets never change it directly: they push undoable commands onto ``doc.undo``;
the document emits ``changed`` (and finer signals) and views redraw.  Every number
shown comes from the core (``wakemeter.detect.handmeasure``, ``wakemeter.detect.analysis``).
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass, field, replace

from PySide6.QtCore import QObject, Signal
from PySide6.QtGui import QUndoCommand, QUndoStack

from ..detect import handmeasure as hm
from ..errors import WakemeterError
from ..physics import units
from ..scene import geodesy
from ..scene.raster import Scene, open_scene

Point = tuple[float, float]
KINDS = ("track", "arm", "crest", "ruler", "calibration")


@dataclass(frozen=True)
class Vessel:
    id: int
    name: str
    position: Point


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


class Document(QObject):
    changed = Signal()  #: anything that is drawn changed
    scene_changed = Signal()  #: a new scene was opened (or closed)
    selection_changed = Signal(int)  #: id of the selected vessel/measurement (0: none)
    findings_changed = Signal(int)  #: automatic findings of a vessel changed

    def __init__(self) -> None:
        super().__init__()
        self.scene: Scene | None = None
        self.vessels: dict[int, Vessel] = {}
        self.measurements: dict[int, Measurement] = {}
        self.findings: dict[int, object] = {}  #: vessel id -> WakeAnalysis
        self.inputs: dict[int, dict] = {}  #: vessel id -> analysis inputs the user gave
        self.rejected: set[int] = set()  #: vessels whose finding the analyst rejected
        self._effective: dict[int, tuple] = {}
        self.selected = 0
        self.undo = QUndoStack(self)
        self._ids = itertools.count(1)

    # ---- scene ------------------------------------------------------------
    def open(self, path: str) -> None:
        """Open a scene; on failure the current one stays and the error propagates (SceneReadError)."""
        scene = open_scene(path)
        if self.scene is not None:
            self.scene.close()
        self.scene = scene
        self.vessels.clear()
        self.measurements.clear()
        self.findings.clear()
        self.inputs.clear()
        self.rejected.clear()
        self.selected = 0
        self.undo.clear()
        self.scene_changed.emit()
        self.changed.emit()

    def new_id(self) -> int:
        return next(self._ids)

    def select(self, item_id: int) -> None:
        if item_id != self.selected:
            self.selected = item_id
            self.selection_changed.emit(item_id)
            self.changed.emit()

    # ---- values from the core -------------------------------------------
    def evaluate(self, m: Measurement) -> Measurement:
        """Recompute a measurement's value with the core; errors become a message, not an exception."""
        sc = self.scene
        if sc is None:
            return m
        try:
            if m.kind == "calibration":
                r = m.values.get("distance_m")
                return replace(m, text=f"calibration: {r:.2f} m" if r else "calibration", error="")
            if not sc.info.georeferenced and sc.calibration is None:
                return replace(m, text="", error="calibrate the image first (pixel size or two points)")
            if m.kind == "ruler":
                r = hm.ruler(sc, *m.points)
                return replace(m, values={"length_m": r.length_m, "length_std_m": r.length_std_m,
                                          "bearing_deg": r.bearing_deg},
                               text=f"{r.length_m:.1f} ± {r.length_std_m:.1f} m, {r.bearing_deg:.1f}°", error="")
            if m.kind == "track":
                r = hm.track_heading(sc, m.points[0], m.points[1])
                return replace(m, values={"heading_deg": r.bearing_deg, "heading_std_deg": r.bearing_std_deg},
                               text=f"heading {r.bearing_deg:.1f} ± {r.bearing_std_deg:.1f}°"
                               + ("" if self._north_known() else " (from image up)"), error="")
            if m.kind == "arm":
                track = self._track_of(m.vessel_id)
                if track is None:
                    return replace(m, text="", error="draw the vessel's track first")
                a, sd = hm.angle_to_track(sc, track.points, m.points)
                return replace(m, values={"half_angle_deg": a, "half_angle_std_deg": sd},
                               text=f"half-angle {a:.1f} ± {sd:.1f}°", error="")
            if m.kind == "crest":
                c = hm.crest_ruler(sc, *m.points)
                values = {"spacing_m": c.spacing_m, "spacing_std_m": c.spacing_std_m, "snr": c.snr,
                          "profile": c.profile, "step_m": c.step_m}
                text = f"crests {c.spacing_m:.1f} ± {c.spacing_std_m:.1f} m"
                track = self._track_of(m.vessel_id)
                if track is not None:
                    ang, _ = hm.angle_to_track(sc, track.points, m.points)
                    values["angle_to_track_deg"] = ang
                    text += f", {ang:.0f}° to track"
                return replace(m, values=values, text=text, error="")
        except WakemeterError as err:
            return replace(m, text="", error=str(err))
        return m

    def _north_known(self) -> bool:
        sc = self.scene
        return bool(sc and (sc.info.georeferenced or (sc.calibration is not None and sc.calibration.north_known)))

    def _track_of(self, vessel_id: int | None) -> Measurement | None:
        tracks = [m for m in self.measurements.values() if m.kind == "track"
                  and (vessel_id is None or m.vessel_id == vessel_id)]
        return tracks[-1] if tracks else None

    def nearest_vessel(self, p: Point) -> int | None:
        if not self.vessels:
            return None
        return min(self.vessels.values(), key=lambda v: (v.position[0] - p[0]) ** 2 + (v.position[1] - p[1]) ** 2).id

    def reevaluate_all(self) -> None:
        for k, m in list(self.measurements.items()):
            self.measurements[k] = self.evaluate(m)
        self.changed.emit()

    # ---- used by commands only ------------------------------------------
    def _put(self, item) -> None:
        if isinstance(item, Vessel):
            self.vessels[item.id] = item
        else:
            self.measurements[item.id] = self.evaluate(item)
            if item.kind == "track":  # arms and crest angles depend on the track
                for k, m in list(self.measurements.items()):
                    if m.kind in ("arm", "crest") and k != item.id:
                        self.measurements[k] = self.evaluate(m)
        self.changed.emit()

    def _remove(self, item_id: int) -> None:
        self.vessels.pop(item_id, None)
        self.measurements.pop(item_id, None)
        self.findings.pop(item_id, None)
        if self.selected == item_id:
            self.selected = 0
        self.reevaluate_all()

    def item(self, item_id: int):
        return self.vessels.get(item_id) or self.measurements.get(item_id)

    def vessel_of_selection(self) -> int | None:
        item = self.item(self.selected)
        if isinstance(item, Vessel):
            return item.id
        if isinstance(item, Measurement) and item.vessel_id in self.vessels:
            return item.vessel_id
        return next(iter(self.vessels), None) if len(self.vessels) == 1 else None

    def effective_finding(self, vessel_id: int):
        """The finding as it stands after the analyst's hand corrections (crest ruler, arm)."""
        from ..detect.analysis import WakeAnalysis
        from ..detect.revise import kelvin_crest_lines, revise

        raw = self.findings.get(vessel_id)
        if not isinstance(raw, WakeAnalysis):
            return raw
        crest = [m for m in self.measurements.values() if m.kind == "crest" and m.vessel_id == vessel_id
                 and "spacing_m" in m.values]
        arm = [m for m in self.measurements.values() if m.kind == "arm" and m.vessel_id == vessel_id
               and "half_angle_deg" in m.values]
        hand_crest = None
        if crest:
            v = crest[-1].values
            hand_crest = (v["spacing_m"], v["spacing_std_m"], min(v.get("angle_to_track_deg", 0.0), 80.0))
        hand_arm = (arm[-1].values["half_angle_deg"], max(arm[-1].values["half_angle_std_deg"], 0.5)) if arm else None
        key = (vessel_id, id(raw), hand_crest, hand_arm)
        cached = self._effective.get(vessel_id)
        if cached is not None and cached[0] == key:
            return cached[1]
        try:
            eff = revise(raw, hand_crest=hand_crest, hand_half_angle=hand_arm)
        except WakemeterError:
            eff = raw
        if eff.wake_found and self.scene is not None and "crests" not in eff.geometry:
            geo = dict(eff.geometry)
            geo["crests"] = kelvin_crest_lines(self.scene, eff)
            eff = replace(eff, geometry=geo)
        self._effective[vessel_id] = (key, eff)
        return eff

    def speed_from_hand(self, vessel_id: int) -> str:
        """Plain text of what the hand measurements imply (through the core inversion)."""
        from ..physics import inversion as inv

        crest = [m for m in self.measurements.values() if m.kind == "crest" and m.vessel_id == vessel_id
                 and "spacing_m" in m.values]
        if not crest:
            return ""
        m = crest[-1]
        # the ruler runs along the crests' propagation direction: its angle to the track is theta
        theta = min(m.values.get("angle_to_track_deg", 0.0), 80.0)
        try:
            est = inv.speed_from_crest_wavelength(inv.Uncertain(m.values["spacing_m"], m.values["spacing_std_m"]),
                                                  inv.Uncertain(theta, 2.0), draws=20_000)
        except WakemeterError as err:
            return str(err)
        return (f"from the crest ruler: {est.speed_mps:.2f} m/s ({units.mps_to_knots(est.speed_mps):.1f} kn), "
                f"95 % {est.ci95_low_mps:.2f}-{est.ci95_high_mps:.2f} m/s (deep water assumed)")


class AddItem(QUndoCommand):
    def __init__(self, doc: Document, item, text: str):
        super().__init__(text)
        self.doc, self.item_ = doc, item

    def redo(self) -> None:
        self.doc._put(self.item_)
        self.doc.select(self.item_.id)

    def undo(self) -> None:
        self.doc._remove(self.item_.id)


class RemoveItem(QUndoCommand):
    def __init__(self, doc: Document, item_id: int):
        super().__init__("delete")
        self.doc = doc
        self.item_ = doc.item(item_id)
        self.dependants = [m for m in doc.measurements.values() if m.vessel_id == item_id] \
            if isinstance(self.item_, Vessel) else []

    def redo(self) -> None:
        for m in self.dependants:
            self.doc._remove(m.id)
        self.doc._remove(self.item_.id)

    def undo(self) -> None:
        self.doc._put(self.item_)
        for m in self.dependants:
            self.doc._put(m)


class ChangeItem(QUndoCommand):
    """Replace an item by an edited copy (moved handle, new name); consecutive drags merge."""

    def __init__(self, doc: Document, before, after, text: str = "edit"):
        super().__init__(text)
        self.doc, self.before, self.after = doc, before, after

    def redo(self) -> None:
        self.doc._put(self.after)

    def undo(self) -> None:
        self.doc._put(self.before)


class SetCalibration(QUndoCommand):
    def __init__(self, doc: Document, frame: geodesy.LocalFrame | None, marker: Measurement | None):
        super().__init__("calibrate")
        self.doc, self.frame, self.marker = doc, frame, marker
        self.old = doc.scene.calibration if doc.scene else None
        self.old_markers = [m for m in doc.measurements.values() if m.kind == "calibration"]

    def _apply(self, frame, markers) -> None:
        self.doc.scene.calibrate(frame)
        for m in [m for m in self.doc.measurements.values() if m.kind == "calibration"]:
            self.doc.measurements.pop(m.id)
        for m in markers:
            self.doc.measurements[m.id] = m
        self.doc.reevaluate_all()

    def redo(self) -> None:
        self._apply(self.frame, [self.marker] if self.marker else [])

    def undo(self) -> None:
        self._apply(self.old, self.old_markers)


@dataclass(frozen=True)
class StoredFinding:
    """A finding read back from a session: its numbers and drawing, without the arrays for plots."""

    result: dict
    geometry: dict

    @property
    def wake_found(self) -> bool:
        return bool(self.result.get("wake_found"))

    def to_json(self) -> dict:
        return self.result


class SetFinding(QUndoCommand):
    def __init__(self, doc: Document, vessel_id: int, new, text: str = "analysis"):
        super().__init__(text)
        self.doc, self.vid, self.new = doc, vessel_id, new
        self.old = doc.findings.get(vessel_id)

    def _set(self, value) -> None:
        if value is None:
            self.doc.findings.pop(self.vid, None)
        else:
            self.doc.findings[self.vid] = value
        self.doc.findings_changed.emit(self.vid)
        self.doc.changed.emit()

    def redo(self) -> None:
        self._set(self.new)

    def undo(self) -> None:
        self._set(self.old)


class SetRejected(QUndoCommand):
    def __init__(self, doc: Document, vessel_id: int, rejected: bool):
        super().__init__("reject finding" if rejected else "accept finding")
        self.doc, self.vid, self.value = doc, vessel_id, rejected

    def _set(self, value: bool) -> None:
        (self.doc.rejected.add if value else self.doc.rejected.discard)(self.vid)
        self.doc.findings_changed.emit(self.vid)
        self.doc.changed.emit()

    def redo(self) -> None:
        self._set(self.value)

    def undo(self) -> None:
        self._set(not self.value)
