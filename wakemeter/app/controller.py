"""Analysis, sessions and evidence export in the program: the glue between the results panel,
background jobs and the document.  Numbers come from the core; this file only moves them."""

from __future__ import annotations

import hashlib
from pathlib import Path

from PySide6.QtCore import QObject, Qt, QTimer
from PySide6.QtGui import QKeySequence
from PySide6.QtWidgets import QDockWidget, QFileDialog, QMessageBox, QScrollArea

from .. import session as session_mod
from ..errors import WakemeterError
from .document import Measurement, SetFinding, SetRejected, StoredFinding, Vessel
from .results import ResultsPanel
from .workers import Job


class Controller(QObject):
    def __init__(self, win) -> None:
        super().__init__(win)
        self.win = win
        self.doc = win.doc
        self.panel = ResultsPanel()
        dock = QDockWidget("Results", win)
        dock.setObjectName("results")
        scroll = QScrollArea()
        scroll.setWidgetResizable(True)
        scroll.setFrameShape(QScrollArea.NoFrame)
        scroll.setStyleSheet("QScrollArea { background: #1c2028; } QScrollArea > QWidget > QWidget { background: #1c2028; }")
        scroll.setWidget(self.panel)
        self.panel.setMinimumHeight(520)
        dock.setWidget(scroll)
        win.addDockWidget(Qt.RightDockWidgetArea, dock)
        win.resizeDocks([win.items_dock, dock], [400, 400], Qt.Horizontal)
        win.resizeDocks([win.items_dock, dock], [160, 600], Qt.Vertical)
        self.dock = dock
        self.queue: list[int] = []
        self.panel.analyse_one.connect(self.analyse_selected)
        self.panel.analyse_all.connect(self.analyse_all)
        self.panel.reject_toggled.connect(self._reject)
        self.panel.export_requested.connect(self.export_dialog)
        self.doc.selection_changed.connect(lambda _i: self.refresh())
        self.doc.findings_changed.connect(lambda _i: self.refresh())
        self.doc.changed.connect(self.refresh)
        fm = win.file_menu
        first = fm.actions()[2] if len(fm.actions()) > 2 else None
        a = fm.addAction("&Save session…", self.save_dialog)
        a.setShortcut(QKeySequence.Save)
        fm.addAction("Open &session…", self.open_session_dialog)
        fm.addAction("&Export evidence…", self.export_dialog).setShortcut(QKeySequence("Ctrl+E"))
        if first is not None:
            for act in fm.actions()[-3:]:
                fm.removeAction(act)
                fm.insertAction(first, act)
        self.session_path: str | None = None
        self.autosave = QTimer(self)
        self.autosave.setInterval(60_000)
        self.autosave.timeout.connect(self.autosave_now)
        self.autosave.start()
        self._shown_vid: int | None = None

    # ---- display ----------------------------------------------------------
    def refresh(self) -> None:
        vid = self.doc.vessel_of_selection()
        if vid is None or vid not in self.doc.vessels:
            self.panel.show_result(None, None)
            self._shown_vid = None
            return
        if vid != self._shown_vid:
            self.panel.set_inputs(self.doc.inputs.get(vid))
            self._shown_vid = vid
        eff = self.doc.effective_finding(vid)
        name = self.doc.vessels[vid].name
        if eff is None:
            self.panel.show_result(name, None)
            return
        from ..detect.analysis import WakeAnalysis
        self.panel.show_result(name, eff.to_json(), rejected=vid in self.doc.rejected,
                               analysis=eff if isinstance(eff, WakeAnalysis) else None)

    # ---- analysis ---------------------------------------------------------
    def analyse_selected(self) -> None:
        vid = self.doc.vessel_of_selection()
        if vid is None:
            self.win.say("mark and select a vessel first (Vessel tool)")
            return
        self.queue = [vid]
        self._next()

    def analyse_all(self) -> None:
        self.queue = list(self.doc.vessels)
        if not self.queue:
            self.win.say("mark vessels first (Vessel tool)")
        self._next()

    def _next(self) -> None:
        if not self.queue or self.win.job is not None:
            return
        vid = self.queue.pop(0)
        v = self.doc.vessels.get(vid)
        scene = self.doc.scene
        if v is None or scene is None:
            return self._next()
        inputs = self.panel.inputs() if vid == self.doc.vessel_of_selection() else dict(self.doc.inputs.get(vid, {}))
        self.doc.inputs[vid] = inputs
        position = tuple(v.position)  # copies taken on the GUI thread
        from ..detect.analysis import RadarGeometry, analyze

        rg = RadarGeometry(*inputs["radar_geometry"]) if inputs.get("radar_geometry") else None

        def work(progress, cancelled):
            return analyze(scene, vessel_px=position, depth_m=inputs.get("depth_m"),
                           hull_length_m=inputs.get("hull_length_m"), radar_geometry=rg,
                           progress=progress, cancelled=cancelled)

        def done(result):
            self.doc.undo.push(SetFinding(self.doc, vid, result, f"analyse {v.name}"))
            self.win.say(f"{v.name}: " + (f"{result.speed.speed_mps:.2f} m/s, 95 % {result.speed.ci95_low_mps:.2f}"
                                          f"–{result.speed.ci95_high_mps:.2f} m/s" if result.wake_found
                                          else "no wake found"))
            QTimer.singleShot(0, self._next)

        def failed(_msg):
            self.queue.clear()
        self.win.run_job(Job(work, f"analysing {v.name}"), done, failed)

    def _reject(self, value: bool) -> None:
        vid = self.doc.vessel_of_selection()
        if vid is not None and vid in self.doc.findings:
            self.doc.undo.push(SetRejected(self.doc, vid, value))

    # ---- sessions ---------------------------------------------------------
    def session_data(self) -> dict:
        sc = self.doc.scene
        if sc is None:
            raise WakemeterError("open a scene first")
        cal = sc.calibration
        findings = {}
        for vid, f in self.doc.findings.items():
            eff = self.doc.effective_finding(vid)
            if eff is None:
                continue
            geo = {k: v for k, v in eff.geometry.items()}
            findings[str(vid)] = {"result": eff.to_json(), "geometry": geo, "rejected": vid in self.doc.rejected}
        return {
            "scene": {"absolute_path": str(sc.info.path), "sha256": sc.sha256(), "size_bytes": sc.info.file_size},
            "calibration": None if cal is None else {"pixel_size_m": cal.m_per_col,
                                                     "north_up_deg": cal.bearing_up_deg if cal.north_known else None},
            "vessels": [{"id": v.id, "name": v.name, "position_px": list(v.position)} for v in self.doc.vessels.values()],
            "measurements": [{"id": m.id, "kind": m.kind, "points_px": [list(p) for p in m.points],
                              "vessel_id": m.vessel_id, "values": {k: v for k, v in m.values.items()
                                                                    if k in ("distance_m",)}}
                             for m in self.doc.measurements.values()],
            "inputs": {str(k): v for k, v in self.doc.inputs.items()},
            "findings": findings,
        }

    def save_session(self, path: str) -> bool:
        try:
            session_mod.save(path, self.session_data())
        except WakemeterError as err:
            self.win.error("Could not save the session", str(err))
            return False
        self.session_path = path
        self.win.say(f"session saved: {path}")
        return True

    def save_dialog(self) -> None:
        path, _ = QFileDialog.getSaveFileName(self.win, "Save session", self.session_path or "analysis.wakemeter.json",
                                              "wakemeter sessions (*.json)")
        if path:
            self.save_session(path)

    def open_session_dialog(self) -> None:
        path, _ = QFileDialog.getOpenFileName(self.win, "Open session", "", "wakemeter sessions (*.json)")
        if path:
            self.open_session(path)

    def open_session(self, path: str, *, locate=None) -> bool:
        """Reopen a session.  ``locate(old_path) -> new path or None`` is asked when the scene moved or changed."""
        try:
            data = session_mod.load(path)
        except WakemeterError as err:
            self.win.error("Could not open the session", str(err))
            return False
        sc_info = data["scene"]
        scene_path = sc_info.get("resolved_path")
        problem = ""
        if not scene_path or not Path(scene_path).exists():
            problem = "the scene file is not where the session says"
        elif sc_info.get("sha256") and _sha256(scene_path) != sc_info["sha256"]:
            problem = "the scene file has changed since the session was saved"
        if problem:
            locate = locate or self._locate_dialog
            new = locate(sc_info.get("absolute_path"), problem)
            if not new:
                self.win.error("Session not opened", problem)
                return False
            scene_path = new
        if not self.win.open_path(scene_path):
            return False
        doc = self.doc
        if data.get("calibration") and not doc.scene.info.georeferenced:
            from ..scene import geodesy
            c = data["calibration"]
            doc.scene.calibrate(geodesy.calibrated_frame(pixel_size_m=c["pixel_size_m"], north_up_deg=c["north_up_deg"]))
        for v in data["vessels"]:
            doc.vessels[int(v["id"])] = Vessel(int(v["id"]), v["name"], tuple(v["position_px"]))
        for m in data["measurements"]:
            item = Measurement(int(m["id"]), m["kind"], tuple(tuple(p) for p in m["points_px"]), m.get("vessel_id"),
                               values=m.get("values") or {})
            doc.measurements[item.id] = item
        doc.reevaluate_all()
        doc.inputs = {int(k): v for k, v in (data.get("inputs") or {}).items()}
        for k, f in (data.get("findings") or {}).items():
            doc.findings[int(k)] = StoredFinding(f["result"], f.get("geometry") or {})
            if f.get("rejected"):
                doc.rejected.add(int(k))
        import itertools
        top = max([0] + list(doc.vessels) + list(doc.measurements))
        doc._ids = itertools.count(top + 1)
        doc.undo.clear()
        doc.changed.emit()
        self.session_path = path
        self.win.say(f"session opened: {path}")
        return True

    def _locate_dialog(self, old: str | None, problem: str) -> str | None:
        ans = QMessageBox.question(self.win, "Scene not found", f"{problem}:\n{old}\n\nLocate the scene?")
        if ans != QMessageBox.Yes:
            return None
        path, _ = QFileDialog.getOpenFileName(self.win, "Locate scene", str(Path(old or ".").parent))
        return path or None

    def autosave_now(self) -> None:
        if self.doc.scene is None:
            return
        p = session_mod.autosave_path()
        try:
            p.parent.mkdir(parents=True, exist_ok=True)
            session_mod.save(p, self.session_data())
        except (OSError, WakemeterError):
            pass

    def offer_restore(self, ask=None) -> bool:
        """After a crash the autosave is still there: offer to restore it (``ask(text) -> bool``)."""
        p = session_mod.autosave_path()
        if not p.exists():
            return False
        ask = ask or (lambda text: QMessageBox.question(self.win, "Restore work?", text) == QMessageBox.Yes)
        if ask("wakemeter did not close normally last time. Restore the work saved automatically?"):
            return self.open_session(str(p))
        p.unlink(missing_ok=True)
        return False

    def closing(self) -> None:
        """A clean exit: the autosave is no longer needed."""
        self.autosave.stop()
        session_mod.autosave_path().unlink(missing_ok=True)

    # ---- evidence ---------------------------------------------------------
    def export_dialog(self) -> None:
        vid = self.doc.vessel_of_selection()
        if vid is None or vid not in self.doc.findings:
            self.win.say("analyse a vessel first, then export its evidence")
            return
        folder = QFileDialog.getExistingDirectory(self.win, "Export evidence to folder")
        if folder:
            self.export(vid, folder, ask=True)

    def export(self, vid: int, folder: str, *, ask: bool = False, force: bool = False, analyst: str | None = None):
        from ..detect.analysis import WakeAnalysis, analyze
        from ..evidence.export import default_basename, export_evidence

        if vid in self.doc.rejected:
            self.win.error("Not exported", "this finding was rejected")
            return None
        eff = self.doc.effective_finding(vid)
        if not isinstance(eff, WakeAnalysis):  # reopened from a session: recompute (deterministic)
            inp = self.doc.inputs.get(vid, {})
            raw = analyze(self.doc.scene, vessel_px=self.doc.vessels[vid].position, depth_m=inp.get("depth_m"),
                          hull_length_m=inp.get("hull_length_m"))
            self.doc.findings[vid] = raw
            eff = self.doc.effective_finding(vid)
        base = default_basename(self.doc.scene, eff)
        exists = any((Path(folder) / f"{base}{s}").exists() for s in (".png", ".pdf", ".json"))
        if exists and ask and not force:
            ans = QMessageBox.question(self.win, "Replace files?", f"{base}.* already exist in {folder}. Replace them?")
            force = ans == QMessageBox.Yes
            if not force:
                return None
        try:
            files = export_evidence(self.doc.scene, eff, folder, analyst=analyst, force=force,
                                    parameters={"vessel_px": list(self.doc.vessels[vid].position),
                                                **{k: v for k, v in self.doc.inputs.get(vid, {}).items() if v}})
        except WakemeterError as err:
            self.win.error("Could not export", str(err))
            return None
        self.win.say(f"evidence written: {files.image.name}, {files.report.name}, {files.data.name}")
        return files


def _sha256(path: str) -> str:
    h = hashlib.sha256()
    with open(path, "rb") as fh:
        for block in iter(lambda: fh.read(4 << 20), b""):
            h.update(block)
    return h.hexdigest()
