"""Analysis, sessions and evidence export in the program: the glue between the results panel,
background jobs and the document.  Numbers come from the core; this file only moves them."""

from __future__ import annotations

import datetime as _dt
from collections.abc import Callable
from dataclasses import asdict
from pathlib import Path
from typing import Protocol

from PySide6.QtCore import QObject, QTimer

from ..errors import WakemeterError
from ..project import session as session_mod
from .document import Document, SetFinding, SetRejected, SetRequest
from .results import ResultsPanel
from .workers import Job


class Host(Protocol):
    """What the controller needs from the window: messages, jobs, opening scenes and asking the user."""

    job: Job | None

    def say(self, text: str) -> None: ...

    def error(self, title: str, text: str) -> None: ...

    def run_job(self, job: Job, on_done: Callable, on_fail: Callable | None = None) -> None: ...

    def open_path(self, path: str, *, ask_first: bool = True) -> bool: ...

    def confirm(self, title: str, text: str) -> bool: ...

    def locate_scene(self, old: str | None, problem: str) -> str | None: ...


class Controller(QObject):
    """Analysis jobs, sessions and export for the program's document; it owns no widgets: the window
    builds the panel and the menus and hands them over, and answers the controller's questions."""

    def __init__(self, doc: Document, panel: ResultsPanel, host: Host, parent: QObject | None = None) -> None:
        super().__init__(parent)
        self.doc, self.panel, self.host = doc, panel, host
        self.queue: list[int] = []
        self.fold_when_done = False  #: Analyse all folds rows of one vessel when its queue is done
        self.panel.analyse_one.connect(self.analyse_selected)
        self.panel.analyse_all.connect(self.analyse_all)
        self.panel.reject_toggled.connect(self._reject)
        self.doc.selection_changed.connect(lambda _i: self.refresh())
        self.doc.findings_changed.connect(lambda _i: self.refresh())
        self.doc.changed.connect(self.refresh)
        self.session_path: str | None = None
        self.autosave_file = session_mod.new_autosave_path()  #: this window's own autosave
        self.restored = False  #: work restored from an autosave and not saved since
        self.autosave = QTimer(self)
        self.autosave.setInterval(60_000)
        self.autosave.timeout.connect(self.autosave_now)
        self.autosave.start()
        self._shown_vid: int | None = None
        self.reports: list = []  #: loaded position reports (positions.reports.PositionReport)
        self.report_time: _dt.datetime | None = None  #: the scene time they are taken at (UTC)

    # ---- display ----------------------------------------------------------
    def refresh(self) -> None:
        vid = self.doc.vessel_of_selection()
        if vid is None or vid not in self.doc.vessels:
            prev, self._shown_vid = self._shown_vid, None
            self._keep_form(prev)
            self.panel.show_result(None, None)
            return
        if vid != self._shown_vid:
            prev, self._shown_vid = self._shown_vid, vid
            self._keep_form(prev)
            self.panel.set_request(self.doc.requests.get(vid))
        eff = self.doc.effective_finding(vid)
        name = self.doc.vessels[vid].name
        if eff is None:
            self.panel.show_result(name, None)
            return
        compared = None
        if self.reports:
            c = self.report_comparisons()[0].get(vid)
            compared = None if c is None else c.text
        self.panel.show_result(name, eff, rejected=vid in self.doc.rejected, position_report=compared)

    def _keep_form(self, vid: int | None) -> None:
        """What the form says about the vessel shown until now stays with it (one undo step), so a limit or a
        depth typed for it is there when it is selected again, and in the session."""
        v = self.doc.vessels.get(vid) if vid is not None else None
        if v is None or vid is None:
            return
        old = self.doc.requests.get(vid)
        try:
            new = self.panel.request(v.position, old)
        except WakemeterError:  # a value the form cannot turn into a request: the stored one stays
            return
        from ..detect.request import AnalysisRequest

        nothing_typed = old is None and new == AnalysisRequest(vessel_px=v.position).at_pixel(v.position)
        if new != old and not nothing_typed:
            self.doc.undo.push(SetRequest(self.doc, vid, new, f"details of {v.name}"))

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
        self.fold_when_done = bool(self.queue)
        if not self.queue:
            self.host.say("mark vessels first (Vessel tool)")
        self._next()

    def fold_repeats(self) -> int:
        """Rows of the finder that are the same vessel as another after analysis (``detect.same_vessel``)
        folded into it, in one undo step; returns how many."""
        from ..detect.same_vessel import same_as
        from .document import FoldRepeats

        ids = list(self.doc.vessels)
        rows = [
            (self.doc.vessels[v].name, self.doc.effective_finding(v), self.doc.vessels[v].found_score is not None)
            for v in ids
        ]
        repeats = {ids[j]: ids[k] for j, k in same_as(rows).items()}
        if repeats:
            names = ", ".join(f"{self.doc.vessels[r].name} into {self.doc.vessels[k].name}" for r, k in repeats.items())
            self.doc.undo.push(FoldRepeats(self.doc, repeats))
            self.host.say(
                f"{len(repeats)} row(s) were the same vessel as another and were merged: {names} (Undo keeps both)"
            )
        return len(repeats)

    def _next(self) -> None:
        if not self.queue and self.fold_when_done and self.host.job is None:
            self.fold_when_done = False
            self.fold_repeats()
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
                self.fold_when_done = False
                return
        request = self.doc.project.request_for(vid)  # a frozen copy, taken on the GUI thread
        self.doc.requests[vid] = request
        from ..detect.analysis import analyze

        def work(progress, cancelled):
            return analyze(scene, request, progress=progress, cancelled=cancelled)

        def done(result):
            self.doc.undo.push(SetFinding(self.doc, vid, result, f"analyse {v.name}"))
            self.host.say(
                f"{v.name}: "
                + (
                    f"{result.speed.speed_mps:.2f} m/s"
                    + (" over ground" if result.speed_over_ground else "")
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
            self.fold_when_done = False

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
        self.restored = False
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
        elif sc_info.get("sha256") and _scene_sha256(scene_path) != sc_info["sha256"]:
            problem = "the scene file has changed since the session was saved"
        if problem:
            locate = locate or self.host.locate_scene
            new = locate(sc_info.get("absolute_path"), problem)
            if not new:
                self.host.error("Session not opened", problem)
                return False
            scene_path = new
        if not self.host.open_path(scene_path, ask_first=False):
            return False
        doc = self.doc
        try:
            session_mod.restore_calibration(doc.scene, data)
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
        p = self.autosave_file
        try:
            p.parent.mkdir(parents=True, exist_ok=True)
            session_mod.save(p, self.session_data())
        except (OSError, WakemeterError) as err:
            reason = getattr(err, "strerror", None) or str(err)
            self.host.say(f"automatic save failed ({reason}): save the session yourself to keep your work")

    def offer_restore(self, ask=None) -> bool:
        """Autosaves of windows that ended without closing (a crash, a kill) are offered one by one, newest
        first (``ask(text) -> bool``): the first accepted is restored here and becomes this window's autosave;
        a declined one is deleted; the rest stay for the next start.  Other running windows' are never
        touched."""
        ask = ask or (lambda text: self.host.confirm("Restore work?", text))
        orphans = session_mod.orphaned_autosaves()
        for i, p in enumerate(orphans):
            when = _dt.datetime.fromtimestamp(p.stat().st_mtime).strftime("%Y-%m-%d %H:%M")
            what = session_mod.describe_autosave(p)
            if ask(
                f"A wakemeter window did not close normally. Restore the work it saved automatically at {when} "
                f"({what})?"
            ):
                adopted = session_mod.adopt_autosave(p)
                if not self.open_session(str(adopted)):
                    return False
                session_mod.release_autosave(self.autosave_file, remove=True)
                self.autosave_file = adopted
                self.session_path = None  # saving asks where: the autosave is not the analyst's file
                self.restored = True
                left = len(orphans) - i - 1
                if left:
                    self.host.say(f"work restored; {left} more automatic save(s) will be offered at the next start")
                return True
            p.unlink(missing_ok=True)
        return False

    def has_unsaved_work(self) -> bool:
        """Vessels or measurements changed since the session was last saved or opened, or restored work."""
        return bool(self.doc.vessels or self.doc.measurements) and (self.restored or not self.doc.undo.isClean())

    def scene_replaced(self, *, kept_work: bool) -> None:
        """Another scene was opened: the work of the one before stays in its autosave when ``kept_work`` (offered
        at the next start) and is otherwise removed; the new scene gets its own autosave and no position
        reports (those belonged to the scene before)."""
        session_mod.release_autosave(self.autosave_file, remove=not kept_work)
        self.autosave_file = session_mod.new_autosave_path()
        self.restored = False
        self.reports, self.report_time = [], None
        self._shown_vid = None

    def closing(self, *, discard: bool = False) -> None:
        """The window closes: its own autosave is removed only when nothing would be lost (the work was
        saved, or the analyst chose to discard it); otherwise it is kept and offered at the next start."""
        self.autosave.stop()
        keep = not discard and self.has_unsaved_work()
        if keep:
            self.autosave_now()
        session_mod.release_autosave(self.autosave_file, remove=not keep)

    # ---- position reports and GIS ---------------------------------------
    def load_reports(self, path: str, *, columns: str | None = None, when: str | None = None) -> bool:
        """Read position reports and take them at the scene time (its metadata's, or ``when``)."""
        from ..positions.match import scene_time
        from ..positions.reports import parse_columns, read_reports

        sc = self.doc.scene
        if sc is None:
            self.host.say("open a scene first, then its position reports")
            return False
        try:
            t = scene_time(sc.info.acquisition_time, when)
            reports = read_reports(path, parse_columns(columns))
        except WakemeterError as err:
            self.host.error("Could not load the position reports", str(err))
            return False
        self.reports, self.report_time = reports, t
        states = self.report_states()
        dropped = reports.dropped_text()
        self.host.say(
            f"{len(reports)} position reports from {len({r.vessel_id for r in reports})} vessel(s); "
            f"{len(states)} heard within 10 minutes of the scene time {t.isoformat()}"
            + (f"; {dropped}" if dropped else "")
        )
        self.refresh()
        return True

    def report_states(self) -> list:
        from ..positions.match import states_at

        if not self.reports or self.report_time is None:
            return []
        return states_at(self.reports, self.report_time)

    def report_marks(self) -> list[tuple[float, float, str, float | None]]:
        """Where the reporting vessels were at the scene time, in scene pixels, with a label and the course."""
        sc = self.doc.scene
        if sc is None or not sc.info.georeferenced:
            return []
        from ..scene import geodesy

        out = []
        for s in self.report_states():
            col, row = geodesy.lonlat_to_pixel(sc.georef, s.lon, s.lat)
            speed = "" if s.sog_kn is None else f" {s.sog_kn:.1f} kn"
            out.append((float(col), float(row), f"{s.vessel_id}{speed}", s.cog_deg))
        return out

    def report_comparisons(self) -> tuple[dict, list]:
        """{vessel id: comparison} for every analysed vessel not rejected, matched one to one, and the
        reporting vessels matched to none."""
        from ..positions.match import compare_results

        ids, named = [], []
        for vid, v in self.doc.vessels.items():
            eff = self.doc.effective_finding(vid)
            if eff is not None and vid not in self.doc.rejected:
                ids.append(vid)
                named.append((v.name, eff))
        if self.report_time is None:
            return {}, []
        comps, unmatched = compare_results(named, self.reports, self.report_time)
        return {vid: c for vid, c in zip(ids, comps) if c is not None}, unmatched

    def import_vessels(self, path: str) -> int:
        """Mark vessels at the positions of a CSV, GeoJSON or GeoPackage file (undoable, one step each)."""
        from ..evidence.gis import read_vessel_positions
        from ..project.model import Vessel
        from ..scene import geodesy
        from .document import AddItem

        sc = self.doc.scene
        if sc is None or not sc.info.georeferenced:
            self.host.error("Cannot import positions", "positions in longitude and latitude need a georeferenced scene")
            return 0
        try:
            positions = read_vessel_positions(path)
        except WakemeterError as err:
            self.host.error("Could not import the positions", str(err))
            return 0
        added = 0
        for p in positions:
            col, row = geodesy.lonlat_to_pixel(sc.georef, p.lon, p.lat)
            if 0 <= col < sc.width and 0 <= row < sc.height:
                self.doc.undo.push(
                    AddItem(self.doc, Vessel(self.doc.new_id(), p.name, (float(col), float(row))), "import")
                )
                added += 1
        self.host.say(f"{added} vessel(s) marked from {Path(path).name}; {len(positions) - added} outside the scene")
        return added

    def export_gis(self, path: str, *, force: bool = False) -> bool:
        """Analysed vessels (not rejected), tracks, wake lines and areas as a GeoPackage or GeoJSON file."""
        from ..evidence.gis import vessel_features, write_features

        sc = self.doc.scene
        comps = self.report_comparisons()[0] if self.reports else {}
        features = []
        try:
            for vid, v in self.doc.vessels.items():
                eff = self.doc.effective_finding(vid)
                if eff is None or vid in self.doc.rejected:
                    continue
                c = comps.get(vid)
                features += vessel_features(sc, v.name, eff, None if c is None else c.to_json())
            write_features(path, features, force=force)
        except WakemeterError as err:
            self.host.error("Could not write the map layers", str(err))
            return False
        self.host.say(f"map layers written: {Path(path).name} ({sum(f.layer == 'vessels' for f in features)} vessels)")
        return True

    # ---- evidence ---------------------------------------------------------
    def export(
        self,
        vids: int | list[int],
        folder: str,
        *,
        ask: bool = False,
        force: bool = False,
        analyst: str | None = None,
        case_reference: str | None = None,
        basename: str | None = None,
    ):
        """One evidence set for the given vessels (rejected ones are left out, and said so)."""
        from ..evidence.export import (
            CaseDetails,
            VesselEvidence,
            export_evidence_set,
            hand_measurement_rows,
            set_basename,
            set_folder,
        )
        from ..evidence.from_session import with_plots

        ids = [vids] if isinstance(vids, int) else list(vids)
        kept = [v for v in ids if v not in self.doc.rejected and v in self.doc.vessels]
        if not kept:
            self.host.error("Not exported", "the finding was rejected" if ids else "no vessel to export")
            return None
        vessels = []
        try:  # a finding read from a session has no plot arrays: its own request is run again (deterministic)
            comps, unmatched = self.report_comparisons() if self.reports else ({}, None)
            for vid in kept:
                hand = [m for m in self.doc.measurements.values() if m.vessel_id == vid]
                c = comps.get(vid)
                vessels.append(
                    VesselEvidence(
                        with_plots(self.doc.project, vid),
                        self.doc.vessels[vid].name,
                        tuple(hand_measurement_rows(hand)),
                        None if c is None else c.to_json(),
                    )
                )
        except WakemeterError as err:
            self.host.error("Could not export", str(err))
            return None
        sc = self.doc.scene
        base = basename or set_basename(sc, vessels)
        target = set_folder(folder, base)
        if target.exists() and ask and not force:
            force = self.host.confirm("Replace the set?", f"{target.name} already exists in {folder}. Replace it?")
            if not force:
                return None
        try:
            files = export_evidence_set(
                sc,
                vessels,
                folder,
                case=CaseDetails(analyst or None, case_reference or None),
                force=force,
                basename=base,
                parameters={"vessels": [v.name for v in vessels]},
                unmatched_reports=None if unmatched is None else [asdict(u) for u in unmatched],
            )
        except WakemeterError as err:
            self.host.error("Could not export", str(err))
            return None
        left = len(ids) - len(kept)
        self.host.say(
            f"evidence written to {files.folder.name}: {len(vessels)} vessel(s)"
            + (f"; {left} rejected finding(s) left out" if left else "")
        )
        return files


def _scene_sha256(path: str) -> str | None:
    """The scene's SHA-256 as a session records it (a band folder's covers its files); None when unreadable."""
    from ..scene.raster import open_scene

    try:
        with open_scene(path) as sc:
            return sc.sha256()
    except WakemeterError:
        return None
