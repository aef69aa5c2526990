"""The window's file questions: open a scene or a session, save a session, load reports and positions, export.

Each dialog starts where the analyst is working: the folder last used for that kind of file, else the open
scene's folder (never the program's own folder); a new session file is named after its scene.
"""

from __future__ import annotations

from pathlib import Path

from PySide6.QtWidgets import QFileDialog, QInputDialog

from .window_part import WindowPart

SCENE_FILTER = (
    "Images (*.tif *.tiff *.png *.jpg *.jpeg *.jp2 *.img *.vrt);;Sentinel-1 and -2 products (*.zip);;"
    "STAC items (*.json);;All files (*)"
)
SESSION_FILTER = "wakemeter sessions (*.json)"
SESSION_SUFFIX = ".wakemeter.json"


class FileDialogs(WindowPart):
    """Mixed into the main window (uses ``settings``, ``doc``, ``controller``, ``say``, ``confirm``)."""

    # ---- where a dialog starts -------------------------------------------------
    def start_folder(self, kind: str) -> str:
        """The folder last used for ``kind`` ("scene", "session", "reports", "positions", "gis"), else the
        scene's folder, else the home folder."""
        last = self.settings.value(f"folders/{kind}", "")
        if isinstance(last, str) and last and Path(last).is_dir():
            return last
        sc = self.doc.scene
        if sc is not None and sc.info.origin.parent.is_dir():
            return str(sc.info.origin.parent)
        return str(Path.home())

    def used_folder(self, kind: str, path: str) -> None:
        self.settings.setValue(f"folders/{kind}", str(Path(path).parent))

    def suggested_session_path(self) -> str:
        """Where Save session proposes to write: the session's own file, else one named after the scene."""
        if self.controller.session_path:
            return self.controller.session_path
        sc = self.doc.scene
        stem = sc.info.origin.stem if sc is not None else "analysis"
        return str(Path(self.start_folder("session")) / f"{stem}{SESSION_SUFFIX}")

    def _ask_open(self, kind: str, title: str, filters: str) -> str | None:
        path, _ = QFileDialog.getOpenFileName(self, title, self.start_folder(kind), filters)
        if path:
            self.used_folder(kind, path)
        return path or None

    # ---- the dialogs -------------------------------------------------------------
    def open_dialog(self) -> None:
        """One image file, or several single-band files of one acquisition (selected together) as one scene."""
        paths, _ = QFileDialog.getOpenFileNames(self, "Open scene", self.start_folder("scene"), SCENE_FILTER)
        if not paths:
            return
        self.used_folder("scene", paths[0])
        if len(paths) == 1:
            self.open_path(paths[0])
            return
        from ..errors import WakemeterError
        from ..scene.band_set import band_list_vrt

        try:
            vrt = band_list_vrt([Path(p) for p in paths])
        except WakemeterError as err:
            self.error(f"Could not open {len(paths)} files as one scene", str(err))
            return
        self.open_path(str(vrt))

    def open_folder_dialog(self) -> None:
        """A folder of one file per band (…_B02.tif, …_B03.tif…), or a Sentinel-1 or -2 SAFE product folder,
        opened as one scene."""
        path = QFileDialog.getExistingDirectory(
            self, "Open a folder (band files, or a SAFE product)", self.start_folder("scene")
        )
        if path:
            self.settings.setValue("folders/scene", str(Path(path).parent))
            self.open_path(path)

    def save_dialog(self) -> None:
        path, _ = QFileDialog.getSaveFileName(self, "Save session", self.suggested_session_path(), SESSION_FILTER)
        if path:
            self.used_folder("session", path)
            self.controller.save_session(path)

    def open_session_dialog(self) -> None:
        path = self._ask_open("session", "Open session", SESSION_FILTER)
        if path:
            self.open_session_path(path)

    def open_session_path(self, path: str) -> bool:
        """Open a session in place of the scene and work shown (asking first about unsaved work)."""
        leaving = self._may_leave_scene()
        if leaving is None:
            return False
        if leaving != "nothing":
            self.controller.scene_replaced(kept_work=leaving == "keep")
        self.canvas.report_marks = []
        return self.controller.open_session(path)

    def locate_scene(self, old: str | None, problem: str) -> str | None:
        if not self.confirm("Scene not found", f"{problem}:\n{old}\n\nLocate the scene?"):
            return None
        path, _ = QFileDialog.getOpenFileName(self, "Locate scene", str(Path(old or ".").parent))
        return path or None

    def load_reports_dialog(self) -> None:
        path = self._ask_open(
            "reports", "Position reports", "Position reports (*.csv *.nmea *.txt *.log);;All files (*)"
        )
        if path:
            self.load_reports(path)

    def load_reports(self, path: str, columns: str | None = None, when: str | None = None) -> bool:
        """Load reports; asks for the scene time when the metadata lacks it, and for column names when needed."""
        sc = self.doc.scene
        if sc is not None and not sc.info.acquisition_time and when is None:
            when, ok = QInputDialog.getText(
                self, "Scene time", "The scene's metadata has no acquisition time. Its time (UTC, ISO 8601):"
            )
            if not ok or not when.strip():
                return False
        if not self.controller.load_reports(path, columns=columns, when=when):
            if "no column for" in (self.last_error or "") and columns is None:
                columns, ok = QInputDialog.getText(
                    self, "Column names", "Name the CSV columns, e.g. id=MMSI,time=BaseDateTime,lat=LAT,lon=LON"
                )
                if ok and columns.strip():
                    return self.load_reports(path, columns, when)
            return False
        self.canvas.report_marks = self.controller.report_marks()
        self.canvas.update()
        return True

    def import_vessels_dialog(self) -> None:
        path = self._ask_open(
            "positions", "Vessel positions", "Positions (*.csv *.geojson *.json *.gpkg);;All files (*)"
        )
        if path:
            self.controller.import_vessels(path)

    def export_gis_dialog(self) -> None:
        sc = self.doc.scene
        name = f"{sc.info.origin.stem}_vessels.gpkg" if sc is not None else "vessels.gpkg"
        path, _ = QFileDialog.getSaveFileName(
            self,
            "Export map layers",
            str(Path(self.start_folder("gis")) / name),
            "GeoPackage (*.gpkg);;GeoJSON (*.geojson)",
        )
        if path:
            self.used_folder("gis", path)
            self.controller.export_gis(path, force=True)  # the file dialog has asked about replacing

    def export_dialog(self) -> None:
        vid = self.doc.vessel_of_selection()
        if vid is None or vid not in self.doc.findings:
            self.say("analyse a vessel first, then export its evidence")
            return
        from .export_dialog import ExportForm

        every = [v for v in self.doc.vessels if v not in self.doc.rejected and v in self.doc.findings]
        if not every:
            self.say("every finding is rejected: nothing to export (untick Reject to export one)")
            return
        form = ExportForm(
            self,
            n_vessels=len(every),
            selected_name=self.doc.vessels[vid].name,
            settings=self.settings,
            selected_rejected=vid in self.doc.rejected,
        )
        if form.exec() != ExportForm.DialogCode.Accepted:
            return
        c = form.choice()
        self.controller.export(
            every if c.all_vessels else vid,
            c.folder,
            ask=True,
            analyst=c.analyst,
            case_reference=c.case_reference,
            basename=c.name or None,
        )
