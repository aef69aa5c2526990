"""The observable document: the Qt adapter of the project model (``wakemeter.project``).

Widgets never change it directly: they push undoable commands onto ``doc.undo``;
the document emits ``changed`` (and finer signals) and views redraw.  State and rules
(evaluation of hand measurements, the effective finding after hand corrections) live in
:class:`~wakemeter.project.Project`; this class only adds signals and undo.
"""

from __future__ import annotations

from dataclasses import replace

from PySide6.QtCore import QObject, Signal
from PySide6.QtGui import QUndoCommand, QUndoStack

from ..project import Measurement, Project, Vessel
from ..scene import geodesy
from ..scene.raster import open_scene

__all__ = [
    "Document",
    "Measurement",
    "Vessel",
    "AddItem",
    "RemoveItem",
    "FoldRepeats",
    "ChangeItem",
    "SetCalibration",
    "SetFinding",
    "SetRejected",
]


class Document(QObject):
    changed = Signal()  #: anything that is drawn changed
    scene_changed = Signal()  #: a new scene was opened (or closed)
    selection_changed = Signal(int)  #: id of the selected vessel/measurement (0: none)
    findings_changed = Signal(int)  #: automatic findings of a vessel changed

    def __init__(self) -> None:
        super().__init__()
        self.project = Project()
        self.undo = QUndoStack(self)

    # ---- the model's state, read through ------------------------------------
    @property
    def scene(self):
        return self.project.scene

    @property
    def vessels(self):
        return self.project.vessels

    @property
    def measurements(self):
        return self.project.measurements

    @property
    def findings(self):
        return self.project.findings

    @property
    def requests(self):
        return self.project.requests

    @property
    def rejected(self):
        return self.project.rejected

    @property
    def selected(self) -> int:
        return self.project.selected

    # ---- scene ------------------------------------------------------------
    def open(self, path: str, *, allow_system_files: bool = False) -> None:
        """Open a scene; on failure the current one stays and the error propagates (SceneReadError)."""
        scene = open_scene(path, allow_system_files=allow_system_files)
        if self.project.scene is not None:
            self.project.scene.close()
        self.project.scene = scene
        self.project.clear()
        self.undo.clear()
        self.scene_changed.emit()
        self.changed.emit()

    def new_id(self) -> int:
        return self.project.new_id()

    def select(self, item_id: int) -> None:
        if item_id != self.project.selected:
            self.project.selected = item_id
            self.selection_changed.emit(item_id)
            self.changed.emit()

    # ---- read-only questions, answered by the model ---------------------------
    def item(self, item_id: int):
        return self.project.item(item_id)

    def nearest_vessel(self, p):
        return self.project.nearest_vessel(p)

    def vessel_of_selection(self) -> int | None:
        return self.project.vessel_of_selection()

    def effective_finding(self, vessel_id: int):
        return self.project.effective_finding(vessel_id)

    def speed_from_hand(self, vessel_id: int) -> str:
        return self.project.speed_from_hand(vessel_id)

    def evaluate(self, m: Measurement) -> Measurement:
        return self.project.evaluate(m)

    def reevaluate_all(self) -> None:
        self.project.reevaluate_all()
        self.changed.emit()

    def loaded(self) -> None:
        """The model was filled from a session: nothing to undo, everything to redraw."""
        self.undo.clear()
        self.changed.emit()

    # ---- used by commands only ------------------------------------------
    def _put(self, item, *, tell: bool = True) -> None:
        self.project.put(item)
        if tell:
            self.changed.emit()

    def _remove(self, item_id: int, *, tell: bool = True) -> None:
        self.project.remove(item_id)
        if tell:
            self.changed.emit()


class AddItem(QUndoCommand):
    def __init__(self, doc: Document, item, text: str):
        super().__init__(text)
        self.doc, self.item_ = doc, item

    def redo(self) -> None:
        self.doc._put(self.item_)
        self.doc.select(self.item_.id)

    def undo(self) -> None:
        self.doc._remove(self.item_.id)


class AddItems(QUndoCommand):
    """Several items in one undo step (one command: PySide's macros of Python commands crash at exit)."""

    def __init__(self, doc: Document, items: list, text: str):
        super().__init__(text)
        self.doc, self.items_ = doc, list(items)

    def redo(self) -> None:
        for it in self.items_:  # one "changed" for all: the views redraw once, not once per item
            self.doc._put(it, tell=False)
        self.doc.changed.emit()

    def undo(self) -> None:
        for it in reversed(self.items_):
            self.doc._remove(it.id, tell=False)
        self.doc.changed.emit()


class _VesselState:
    """A vessel's item with everything kept beside it (its measurements, request, finding and rejection), to be
    put back as it was when its removal is undone."""

    def __init__(self, doc: Document, item_id: int):
        self.item_ = doc.item(item_id)
        self.dependants = (
            [m for m in doc.measurements.values() if m.vessel_id == item_id] if isinstance(self.item_, Vessel) else []
        )
        self.finding = doc.findings.get(item_id)
        self.request = doc.requests.get(item_id)
        self.rejected = item_id in doc.rejected

    def remove(self, doc: Document) -> None:
        for m in self.dependants:
            doc._remove(m.id, tell=False)
        doc._remove(self.item_.id, tell=False)
        doc.requests.pop(self.item_.id, None)
        doc.rejected.discard(self.item_.id)

    def restore(self, doc: Document) -> None:
        vid = self.item_.id
        doc._put(self.item_, tell=False)
        for m in self.dependants:
            doc._put(m, tell=False)
        if self.finding is not None:
            doc.findings[vid] = self.finding
        if self.request is not None:
            doc.requests[vid] = self.request
        if self.rejected:
            doc.rejected.add(vid)


class RemoveItem(QUndoCommand):
    def __init__(self, doc: Document, item_id: int):
        super().__init__("delete")
        self.doc = doc
        self.state = _VesselState(doc, item_id)

    def redo(self) -> None:
        self.state.remove(self.doc)
        self.doc.changed.emit()

    def undo(self) -> None:
        self.state.restore(self.doc)
        self.doc.changed.emit()
        self.doc.findings_changed.emit(self.state.item_.id)


class FoldRepeats(QUndoCommand):
    """Rows that repeat a vessel after scene-wide work (``detect.same_vessel``: {repeat id: kept id}) removed,
    each kept vessel's count of ``merged`` raised; undone, all of it comes back as it was."""

    def __init__(self, doc: Document, repeats: dict[int, int]):
        super().__init__(f"merge {len(repeats)} row(s) that repeat a vessel")
        self.doc = doc
        self.states = [_VesselState(doc, r) for r in repeats]
        counts: dict[int, int] = {}
        for r, k in repeats.items():
            counts[k] = counts.get(k, 0) + 1 + doc.vessels[r].merged
        self.before = [doc.vessels[k] for k in counts]
        self.after = [replace(v, merged=v.merged + counts[v.id]) for v in self.before]

    def redo(self) -> None:
        for st in self.states:
            st.remove(self.doc)
        for v in self.after:
            self.doc._put(v, tell=False)
        self.doc.changed.emit()

    def undo(self) -> None:
        for v in self.before:
            self.doc._put(v, tell=False)
        for st in reversed(self.states):
            st.restore(self.doc)
        self.doc.changed.emit()


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
            del self.doc.measurements[m.id]
        for m in markers:
            self.doc.measurements[m.id] = m
        self.doc.reevaluate_all()

    def redo(self) -> None:
        self._apply(self.frame, [self.marker] if self.marker else [])

    def undo(self) -> None:
        self._apply(self.old, self.old_markers)


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


class SetRequest(QUndoCommand):
    """What the analyst told the program about a vessel (depth, hull length, limit, current...): kept with the
    vessel when another one is selected, undoable, and saved with the session."""

    def __init__(self, doc: Document, vessel_id: int, new, text: str = "vessel details"):
        super().__init__(text)
        self.doc, self.vid, self.new = doc, vessel_id, new
        self.old = doc.requests.get(vessel_id)

    def _set(self, value) -> None:
        if value is None:
            self.doc.requests.pop(self.vid, None)
        else:
            self.doc.requests[self.vid] = value
        self.doc.changed.emit()

    def redo(self) -> None:
        self._set(self.new)

    def undo(self) -> None:
        self._set(self.old)


class SetSceneCheck(QUndoCommand):
    """The speed limit and water current for every vessel of the scene without its own."""

    def __init__(self, doc: Document, limit, current):
        super().__init__("limit and current for every vessel")
        self.doc, self.new = doc, (limit, current)
        self.old = (doc.project.scene_limit, doc.project.scene_current)

    def _set(self, value) -> None:
        self.doc.project.scene_limit, self.doc.project.scene_current = value
        self.doc.changed.emit()

    def redo(self) -> None:
        self._set(self.new)

    def undo(self) -> None:
        self._set(self.old)
