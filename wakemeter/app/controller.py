"""Analysis, sessions and evidence export in the program: the glue between the results panel,
background jobs and the document.  Numbers come from the core; this file only moves them."""

from __future__ import annotations

import hashlib
from collections.abc import Callable
from pathlib import Path
from typing import Protocol

from PySide6.QtCore import QObject, QTimer

from ..errors import WakemeterError
from ..project import session as session_mod
from .document import Document, SetFinding, SetRejected
from .results import ResultsPanel
from .workers import Job


class Host(Protocol):
    """What the controller needs from the window: messages, jobs, opening scenes and asking the user."""

    job: Job | None

    def say(self, text: str) -> None: ...

    def error(self, title: str, text: str) -> None: ...

    def run_job(self, job: Job, on_done: Callable, on_fail: Callable | None = None) -> None: ...

    def open_path(self, path: str) -> bool: ...

    def confirm(self, title: str, text: str) -> bool: ...

    def locate_scene(self, old: str | None, problem: str) -> str | None: ...


class Controller(QObject):
    """Analysis jobs, sessions and export for the program's document; it owns no widgets: the window
    builds the panel and the menus and hands them over, and answers the controller's questions."""

    def __init__(self, doc: Document, panel: ResultsPanel, host: Host, parent: QObject | None = None) -> None:
        super().__init__(parent)
        self.doc, self.panel, self.host = doc, panel, host
        self.queue: list[int] = []
        self.panel.analyse_one.connect(self.analyse_selected)
        self.panel.analyse_all.connect(self.analyse_all)
        self.panel.reject_toggled.connect(self._reject)
        self.doc.selection_changed.connect(lambda _i: self.refresh())
        self.doc.findings_changed.connect(lambda _i: self.refresh())
        self.doc.changed.connect(self.refresh)
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
            self.panel.set_request(self.doc.requests.get(vid))
            self._shown_vid = vid
        eff = self.doc.effective_finding(vid)
        name = self.doc.vessels[vid].name
        if eff is None:
            self.panel.show_result(name, None)
            return
        self.panel.show_result(name, eff.to_json(), rejected=vid in self.doc.rejected, analysis=eff)

    # ---- analysis ---------------------------------------------------------
    def analyse_selected(self) -> None:
        vid = self.doc.vessel_of_selection()
        if vid is None:
            self.host.say("mark and select a vessel first (Vessel tool)")
            return
        self.queue = [vid]
        self._next()

    def analyse_all(self) -> None:
        self.queue = list(self.doc.vessels)
        if not self.queue:
            self.host.say("mark vessels first (Vessel tool)")
        self._next()

    def _next(self) -> None:
        if not self.queue or self.host.job is not None:
            return
        vid = self.queue.pop(0)
        v = self.doc.vessels.get(vid)
        scene = self.doc.scene
        if v is None or scene is None:
            return self._next()
        if vid == self.doc.vessel_of_selection():  # the panel shows this vessel: take what it says
            try:
                self.doc.requests[vid] = self.panel.request(v.position, self.doc.requests.get(vid))
            except WakemeterError as err:
                self.host.error("Cannot analyse", str(err))
                self.queue.clear()
                return
        request = self.doc.project.request_for(vid)  # a frozen copy, taken on the GUI thread
        self.doc.requests[vid] = request
        from ..detect.analysis import analyze
        from ..detect.findings import CautionCode

        def work(progress, cancelled):
            return analyze(scene, request, progress=progress, cancelled=cancelled)

        def done(result):
            self.doc.undo.push(SetFinding(self.doc, vid, result, f"analyse {v.name}"))
            self.host.say(
                f"{v.name}: "
                + (
                    f"{result.speed.speed_mps:.2f} m/s"
                    + (" over ground" if result.has_caution(CautionCode.OVER_GROUND) else "")
                    + f", 95 % {result.speed.ci95_low_mps:.2f}–{result.speed.ci95_high_mps:.2f} m/s"
                    if result.speed is not None
                    else (
                        f"wake seen as a line, heading {result.heading_deg:.1f}°, no speed"
                        if result.wake_found
                        else "no wake found"
                    )
                )
            )
            QTimer.singleShot(0, self._next)

        def failed(_msg):
            self.queue.clear()

        self.host.run_job(Job(work, f"analysing {v.name}"), done, failed)

    def _reject(self, value: bool) -> None:
        vid = self.doc.vessel_of_selection()
        if vid is not None and vid in self.doc.findings:
            self.doc.undo.push(SetRejected(self.doc, vid, value))

    # ---- sessions ---------------------------------------------------------
    def session_data(self) -> dict:
        return session_mod.to_session(self.doc.project)

    def save_session(self, path: str) -> bool:
        try:
            session_mod.save(path, self.session_data())
        except WakemeterError as err:
            self.host.error("Could not save the session", str(err))
            return False
        self.session_path = path
        self.doc.undo.setClean()
        self.host.say(f"session saved: {path}")
        return True

    def open_session(self, path: str, *, locate=None) -> bool:
        """Reopen a session.  ``locate(old_path) -> new path or None`` is asked when the scene moved or changed."""
        try:
            data = session_mod.load(path)
        except WakemeterError as err:
            self.host.error("Could not open the session", str(err))
            return False
        sc_info = data["scene"]
        scene_path = sc_info.get("resolved_path")
        problem = ""
        if not scene_path or not Path(scene_path).exists():
            problem = "the scene file is not where the session says"
        elif sc_info.get("sha256") and _sha256(scene_path) != sc_info["sha256"]:
            problem = "the scene file has changed since the session was saved"
        if problem:
            locate = locate or self.host.locate_scene
            new = locate(sc_info.get("absolute_path"), problem)
            if not new:
                self.host.error("Session not opened", problem)
                return False
            scene_path = new
        if not self.host.open_path(scene_path):
            return False
        doc = self.doc
        try:
            if data.get("calibration") and not doc.scene.info.georeferenced:
                from ..scene import geodesy

                c = data["calibration"]
                doc.scene.calibrate(
                    geodesy.calibrated_frame(pixel_size_m=c["pixel_size_m"], north_up_deg=c["north_up_deg"])
                )
            session_mod.fill_project(doc.project, data)
        except (WakemeterError, KeyError, TypeError) as err:
            doc.project.clear()
            doc.loaded()
            self.host.error("Could not open the session", str(err))
            return False
        doc.loaded()
        self.session_path = path
        self.host.say(f"session opened: {path}")
        return True

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
        ask = ask or (lambda text: self.host.confirm("Restore work?", text))
        if ask("wakemeter did not close normally last time. Restore the work saved automatically?"):
            return self.open_session(str(p))
        p.unlink(missing_ok=True)
        return False

    def has_unsaved_work(self) -> bool:
        """Vessels or measurements changed since the session was last saved or opened."""
        return bool(self.doc.vessels or self.doc.measurements) and not self.doc.undo.isClean()

    def closing(self, *, discard: bool = False) -> None:
        """The window closes: the autosave is removed only when nothing would be lost (the work was saved,
        or the analyst chose to discard it); otherwise it is kept and offered at the next start."""
        self.autosave.stop()
        if discard or not self.has_unsaved_work():
            session_mod.autosave_path().unlink(missing_ok=True)
        else:
            self.autosave_now()

    # ---- evidence ---------------------------------------------------------
    def export(self, vid: int, folder: str, *, ask: bool = False, force: bool = False, analyst: str | None = None):
        from ..evidence.export import default_basename, export_evidence
        from ..evidence.from_session import with_plots

        if vid in self.doc.rejected:
            self.host.error("Not exported", "this finding was rejected")
            return None
        try:  # a finding read from a session has no plot arrays: its own request is run again (deterministic)
            eff = with_plots(self.doc.project, vid)
        except WakemeterError as err:
            self.host.error("Could not export", str(err))
            return None
        base = default_basename(self.doc.scene, eff)
        exists = any((Path(folder) / f"{base}{s}").exists() for s in (".png", ".pdf", ".json"))
        if exists and ask and not force:
            force = self.host.confirm("Replace files?", f"{base}.* already exist in {folder}. Replace them?")
            if not force:
                return None
        try:
            files = export_evidence(
                self.doc.scene,
                eff,
                folder,
                analyst=analyst,
                force=force,
                parameters={"vessel": self.doc.vessels[vid].name},
            )
        except WakemeterError as err:
            self.host.error("Could not export", str(err))
            return None
        self.host.say(f"evidence written: {files.image.name}, {files.report.name}, {files.data.name}")
        return files


def _sha256(path: str) -> str:
    h = hashlib.sha256()
    with open(path, "rb") as fh:
        for block in iter(lambda: fh.read(4 << 20), b""):
            h.update(block)
    return h.hexdigest()
