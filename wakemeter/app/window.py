"""The main window: canvas in the middle, tools on top, measurement and result panels at the side."""

from __future__ import annotations

from functools import partial
from pathlib import Path

import numpy as np
from PySide6.QtCore import QSettings, Qt, QTimer
from PySide6.QtGui import QAction, QActionGroup, QGuiApplication, QIcon, QKeySequence
from PySide6.QtWidgets import (
    QDockWidget,
    QHBoxLayout,
    QInputDialog,
    QLabel,
    QMainWindow,
    QMessageBox,
    QProgressBar,
    QPushButton,
    QScrollArea,
    QWidget,
)

from ..errors import WakemeterError
from ..physics.units import KNOT_MPS
from ..scene import geodesy
from . import actions, help_texts, style
from .calibration import Calibration
from .canvas import Canvas
from .document import ChangeItem, Document, RemoveItem, Vessel
from .file_dialogs import FileDialogs
from .measurement_list import MeasurementList
from .results import ResultsPanel
from .vessel_search import VesselSearch
from .vessel_table import VesselTable
from .workers import Job, Relay

ICONS = Path(__file__).resolve().parents[2] / "icons"
TOOL_INFO = {
    "look": ("Look", "Pan by dragging, zoom with the wheel; drag a point of a drawing to adjust it"),
    "vessel": ("Vessel", "Click on a vessel to mark it"),
    "track": ("Track", "Drag from the vessel back along its wake: gives the heading (true bearing)"),
    "arm": ("Arm", "Drag along a wake arm from the vessel: gives its half-angle to the track"),
    "crest": ("Crest ruler", "Drag across a train of crests: gives the crest spacing and its angle to the track"),
    "ruler": ("Ruler", "Drag to measure a ground distance and true bearing"),
    "calibrate": ("Calibrate", "For images without georeference: drag between two points a known distance apart"),
}


class MainWindow(FileDialogs, VesselSearch, Calibration, QMainWindow):
    """The window; its file questions, vessel search and calibration live in their own modules (mixed in)."""

    def __init__(self) -> None:
        super().__init__()
        self.setWindowTitle("wakemeter")
        self.resize(1320, 860)
        self.doc = Document()
        self.canvas = Canvas(self.doc)
        self.setCentralWidget(self.canvas)
        self.settings = QSettings("wakemeter", "wakemeter")
        self.last_error = ""
        self.job: Job | None = None
        self.db_action: QAction  # set from the actions table (its entry names it)
        self.water_action: QAction  # likewise
        self._build_actions()
        self._build_panels()
        self._build_status()
        from .controller import Controller

        self.controller = Controller(self.doc, self.panel, self, parent=self)
        self.panel.export_requested.connect(self.export_dialog)
        self.panel.analyse_all.connect(self.table_dock.show)
        self.doc.scene_changed.connect(lambda: setattr(self, "land_layer", None))  # read for the scene it was
        self.setAcceptDrops(True)
        self.canvas.cursor_moved.connect(self._readout)
        self.canvas.message.connect(self.say)
        self.canvas.calibration_line.connect(self._ask_calibration)
        self.canvas.area_drawn.connect(lambda area: self.find_vessels(area=area))
        self.doc.scene_changed.connect(self._on_scene)
        self.setStyleSheet(style.WINDOW)

    # ---- construction -----------------------------------------------------
    def _icon(self, name: str) -> QIcon:
        p = ICONS / f"{name}.svg"
        return QIcon(str(p)) if p.exists() else QIcon()

    def _build_actions(self) -> None:
        """Menus from the table in :mod:`.actions`, then the tool bar."""
        mb = self.menuBar()
        for title, attribute, entries in actions.MENUS:
            menu = mb.addMenu(title)
            setattr(self, attribute, menu)
            for e in entries:
                self._add_entry(menu, e)
        self._build_toolbar()

    def _add_entry(self, menu, e: actions.Entry) -> None:
        if e.text == actions.SEPARATOR:
            menu.addSeparator()
            return
        if e.slot == actions.RECENT:
            self.recent_menu = menu.addMenu(e.text)
            self._fill_recent()
            return
        if e.slot == actions.PANELS:
            self.panels_menu = menu.addMenu(e.text)
            return
        if e.slot in (actions.UNDO, actions.REDO):
            make = self.doc.undo.createUndoAction if e.slot == actions.UNDO else self.doc.undo.createRedoAction
            act = make(self, e.text)
            menu.addAction(act)
            self.addAction(act)
        else:
            act = menu.addAction(e.text, getattr(self, e.slot))
        act.setShortcuts(actions.sequences(e.keys))
        if e.checkable:
            act.setCheckable(True)
        if e.attribute:
            setattr(self, e.attribute, act)

    def _build_toolbar(self) -> None:
        tb = self.addToolBar("Tools")
        tb.setObjectName("tools")
        tb.setToolButtonStyle(Qt.ToolButtonStyle.ToolButtonTextUnderIcon)
        tb.setMovable(False)
        self.tool_actions: dict[str, QAction] = {}
        group = QActionGroup(self)
        for tool, (label, tip) in TOOL_INFO.items():
            key = actions.TOOL_KEYS[tool]
            act = QAction(self._icon(tool), label, self)
            act.setCheckable(True)
            act.setToolTip(f"{label} ({key}): {tip}")
            act.setShortcut(QKeySequence(key))
            act.triggered.connect(lambda _=False, t=tool: self.set_tool(t))
            group.addAction(act)
            tb.addAction(act)
            self.tool_actions[tool] = act
        self.tool_actions["look"].setChecked(True)
        tb.addSeparator()
        run = QAction(self._icon("analyse"), "Analyse", self)
        run.setToolTip(
            f"Analyse ({actions.ANALYSE_KEY}): find the selected vessel's wake and estimate speed, heading and depth "
            "regime"
        )
        run.setShortcut(QKeySequence(actions.ANALYSE_KEY))
        run.triggered.connect(lambda: self.controller.analyse_selected())
        tb.addAction(run)
        self.toolbar = tb

    # ---- the menus' small commands -------------------------------------------
    def zoom_in(self) -> None:
        self.canvas.set_zoom(self.canvas.zoom * 1.25)

    def zoom_out(self) -> None:
        self.canvas.set_zoom(self.canvas.zoom / 1.25)

    def zoom_fit(self) -> None:
        self.canvas.fit()

    def zoom_one(self) -> None:
        self.canvas.set_zoom(1.0)

    def brighter(self) -> None:
        self._contrast(1.25)

    def darker(self) -> None:
        self._contrast(0.8)

    def limit_for_every_vessel(self) -> None:
        """The limit and current the form shows become the scene's, for every vessel without its own (undoable);
        an empty form clears them."""
        from .document import SetSceneCheck

        limit, current = self.panel.limit_and_current()
        self.doc.undo.push(SetSceneCheck(self.doc, limit, current))
        if limit is None and current is None:
            self.say("no limit or current for the scene: each vessel keeps its own")
            return
        said = [] if limit is None else [f"a {limit.limit_mps / KNOT_MPS:.1f} kn limit"]
        said += [] if current is None else ["the current"]
        self.say(f"{' and '.join(said)} for every vessel without its own; Vessels → Analyse all applies it")

    def analyse_all(self) -> None:
        self.table_dock.show()  # scene-wide work ends in the table of every vessel
        self.controller.analyse_all()

    def help_keys(self) -> None:
        self._show_text("Keys and tools", help_texts.keys_text(TOOL_INFO))

    def help_methods(self) -> None:
        self._show_text("How the speed is measured", help_texts.METHODS)

    def help_about(self) -> None:
        self._show_text("About wakemeter", help_texts.about_text())

    def _build_panels(self) -> None:
        self.items = MeasurementList(self.doc, self.canvas)
        dock = QDockWidget("Measurements", self)
        dock.setObjectName("measurements")
        dock.setWidget(self.items)
        self.addDockWidget(Qt.DockWidgetArea.RightDockWidgetArea, dock)
        self.hand_summary = QLabel("")
        self.hand_summary.setWordWrap(True)
        self.items_dock = dock
        self.panel = ResultsPanel()
        results = QDockWidget("Results", self)
        results.setObjectName("results")
        scroll = QScrollArea()
        scroll.setWidgetResizable(True)
        scroll.setFrameShape(QScrollArea.Shape.NoFrame)
        scroll.setStyleSheet(style.RESULTS_SCROLL)
        scroll.setWidget(self.panel)
        results.setWidget(scroll)
        self.addDockWidget(Qt.DockWidgetArea.RightDockWidgetArea, results)
        self.resizeDocks([dock, results], [400, 400], Qt.Orientation.Horizontal)
        self.resizeDocks([dock, results], [160, 600], Qt.Orientation.Vertical)
        self.results_dock = results
        self.vessel_table = VesselTable(self.doc, reports=lambda: self.controller.report_comparisons()[0])
        table = QDockWidget("Vessel table", self)
        table.setObjectName("vessel_table")
        table.setWidget(self.vessel_table)
        self.addDockWidget(Qt.DockWidgetArea.BottomDockWidgetArea, table)
        table.hide()  # shown from View > Panels, and after Analyse all
        self.table_dock = table
        self.panels_menu.addAction(dock.toggleViewAction())
        self.panels_menu.addAction(results.toggleViewAction())
        self.panels_menu.addAction(table.toggleViewAction())

    def _build_status(self) -> None:
        sb = self.statusBar()
        self.message = QLabel("Ready")
        self.readout = QLabel("")
        self.readout.setToolTip("Cursor: pixel, map coordinates (CRS), latitude/longitude, pixel value")
        self.progress = QProgressBar()
        self.progress.setMaximumWidth(180)
        self.progress.setRange(0, 1000)
        self.progress.hide()
        self.cancel_button = QPushButton("Cancel")
        self.cancel_button.setToolTip("Stop the work in progress")
        self.cancel_button.hide()
        self.cancel_button.clicked.connect(self.cancel_job)
        box = QWidget()
        lay = QHBoxLayout(box)
        lay.setContentsMargins(0, 0, 0, 0)
        lay.addWidget(self.progress)
        lay.addWidget(self.cancel_button)
        sb.addWidget(self.message, 1)
        sb.addPermanentWidget(self.readout)
        sb.addPermanentWidget(box)

    # ---- scene ------------------------------------------------------------
    def open_path(self, path: str, *, ask_first: bool = True) -> bool:
        """Open a scene; a bad file gives a clear message and the program keeps what it had.  A file that
        reads system or private files (a crafted VRT) is opened only when the analyst confirms."""
        from ..scene.limits import ReferencedFilesError

        leaving = self._may_leave_scene() if ask_first else "nothing"  # a session's opening asked already
        if leaving is None:
            return False
        try:
            try:
                self.doc.open(path)
            except ReferencedFilesError as err:
                listed = "\n".join(err.files[:10])
                if not self.confirm(
                    "Open a file that reads system files?",
                    f"{Path(path).name} does not hold its pixels itself: it reads these files, which are system or "
                    f"private files, not images:\n\n{listed}\n\nOpen it anyway?",
                ):
                    self.say(f"{Path(path).name} not opened: it reads system or private files")
                    return False
                self.doc.open(path, allow_system_files=True)
        except WakemeterError as err:
            self.error(f"Could not open {Path(path).name}", str(err))
            return False
        if leaving != "nothing":
            self.controller.scene_replaced(kept_work=leaving == "keep")
        self.controller.session_path = None  # a scene opened on its own belongs to no session file yet
        self.canvas.report_marks = []
        self._remember(path)
        self.setWindowTitle(f"wakemeter — {Path(path).name}")
        return True

    def _may_leave_scene(self) -> str | None:
        """Before another scene replaces this one: None to stay; "nothing" when there is no scene; "keep" when
        the unsaved work stays in its autosave (offered at the next start); "done" when it was saved or
        discarded."""
        if self.doc.scene is None:
            return "nothing"
        if not self.controller.has_unsaved_work():
            return "done"
        answer = self.ask_unsaved()
        if answer == "cancel":
            return None
        if answer == "save":
            self.save_dialog()
            return None if self.controller.has_unsaved_work() else "done"
        if answer == "keep":
            self.controller.autosave_now()
            return "keep"
        return "done"

    def _on_scene(self) -> None:
        sc = self.doc.scene
        if sc is None:
            return
        self._show_contrast_state()  # the menu says what is shown
        self.panel.form.geometry_in_scene(sc.radar_product is not None)
        note = "" if sc.info.georeferenced else " — no georeference: use Calibrate before measuring"
        self.say(
            f"{sc.info.origin.name}: {sc.width} × {sc.height} px, {sc.info.count} band(s), {sc.info.dtype}"
            + (f", {sc.info.crs}" if sc.info.crs and sc.info.crs.startswith("EPSG") else "")
            + note
        )
        from ..scene.pyramid import ensure_pyramid, needs_pyramid

        if needs_pyramid(sc):

            def work(progress, cancelled):
                return ensure_pyramid(
                    sc, progress=lambda f: progress(f, "building overview levels"), cancelled=cancelled
                )

            self.run_job(Job(work, "building overview levels (once)"), lambda _r: self.canvas.set_contrast())

    def _remember(self, path: str) -> None:
        recent = [p for p in self._recent() if p != path]
        self.settings.setValue("recent", [path] + recent[:7])
        self._fill_recent()

    def _fill_recent(self) -> None:
        self.recent_menu.clear()
        for p in self._recent():
            self.recent_menu.addAction(p, partial(self.open_path, p))

    def _recent(self) -> list[str]:
        """The recent scenes; QSettings gives a single stored path back as a plain string, not a list."""
        value = self.settings.value("recent", [])
        if isinstance(value, str):
            return [value]
        return [str(p) for p in value] if isinstance(value, (list, tuple)) else []

    def dragEnterEvent(self, ev) -> None:
        if ev.mimeData().hasUrls():
            ev.acceptProposedAction()

    def dropEvent(self, ev) -> None:
        urls = ev.mimeData().urls()
        if urls:
            self.open_path(urls[0].toLocalFile())

    # ---- tools, list, edits ----------------------------------------------
    def set_tool(self, tool: str) -> None:
        self.canvas.cancel_area()
        self.canvas.set_tool(tool)
        self.tool_actions[tool].setChecked(True)
        self.say(TOOL_INFO[tool][1])

    def delete_selected(self) -> None:
        if self.doc.selected and self.doc.item(self.doc.selected) is not None:
            self.doc.undo.push(RemoveItem(self.doc, self.doc.selected))

    def rename_selected(self, name: str | None = None) -> None:
        v = self.doc.vessels.get(self.doc.selected)
        if v is None:
            self.say("select a vessel to rename it")
            return
        if name is None:
            name, ok = QInputDialog.getText(self, "Rename vessel", "Name:", text=v.name)
            if not ok or not name.strip():
                return
        self.doc.undo.push(ChangeItem(self.doc, v, Vessel(v.id, name.strip(), v.position), "rename vessel"))

    # ---- status, jobs, errors --------------------------------------------
    def say(self, text: str) -> None:
        self.message.setText(text)

    # ---- questions the controller asks (modal dialogs live here, not in the controller) ----
    def confirm(self, title: str, text: str) -> bool:
        return QMessageBox.question(self, title, text) == QMessageBox.StandardButton.Yes

    def error(self, title: str, text: str) -> None:
        self.last_error = f"{title}: {text}"
        self.say(self.last_error)
        box = QMessageBox(QMessageBox.Icon.Warning, title, text, QMessageBox.StandardButton.Ok, self)
        box.setModal(False)
        box.open()
        self._error_box = box

    def _readout(self, col: float, row: float) -> None:
        sc = self.doc.scene
        if sc is None or not (0 <= col < sc.width and 0 <= row < sc.height):
            self.readout.setText("")
            return
        parts = [f"px {col:.1f}, {row:.1f}"]
        if sc.info.georeferenced:
            gr = sc.georef
            x, y = geodesy.pixel_to_map(gr, col, row)
            lon, lat = geodesy.pixel_to_lonlat(gr, col, row)
            code = sc.info.crs if sc.info.crs.startswith("EPSG") else "CRS"
            parts.append(f"{code} {float(x):.1f}, {float(y):.1f}")
            parts.append(f"lat {float(lat):.6f}° lon {float(lon):.6f}°")
        try:
            v, ok = sc.read(window=(int(col), int(row), 1, 1))
            parts.append(
                f"value {v[:, 0, 0].tolist() if v.shape[0] > 1 else float(v[0, 0, 0]):.4g}"
                if v.shape[0] == 1 and ok.all()
                else f"value {np.round(v[:, 0, 0], 3).tolist()}"
            )
        except WakemeterError:
            pass
        self.readout.setText("   ".join(parts))

    def run_job(self, job: Job, on_done, on_fail=None) -> None:
        if self.job is not None:
            self.say("busy: wait for the current work or cancel it")
            return
        self.job = job
        self.progress.setValue(0)
        self.progress.show()
        self.cancel_button.show()
        self.say(job.label + " …")

        def progress(f, msg):
            self.progress.setValue(int(1000 * f))
            if msg:
                self.say(msg)

        def finish():
            self.progress.hide()
            self.cancel_button.hide()
            self.job = None
            self._relay = None

        def done():
            finish()
            self.say(job.label + ": done")
            on_done(job.result)

        def failed(msg):
            finish()
            self.error(job.label, msg)
            if on_fail:
                on_fail(msg)

        def cancelled():
            finish()
            self.say(job.label + ": cancelled")
            if on_fail:
                on_fail("cancelled")

        self._relay = Relay(
            job, on_progress=progress, on_done=done, on_failed=failed, on_cancelled=cancelled, parent=self
        )
        job.start()

    def cancel_job(self) -> None:
        if self.job is not None:
            self.job.cancel()

    def _contrast(self, factor: float) -> None:
        c = self.canvas.loader.contrast
        if c is not None:
            self.canvas.set_contrast(gamma=c.gamma * factor, db=c.db, bands=c.bands, on_water=c.on_water)

    def choose_bands(self, text: str | None = None) -> bool:
        """Show one band as grey or three as red, green, blue (1-based numbers)."""
        sc = self.doc.scene
        if sc is None:
            return False
        if text is None:
            cur = self.canvas.loader.contrast
            text, ok = QInputDialog.getText(
                self,
                "Bands",
                f"Band numbers to show, 1..{sc.info.count} (one for grey, three for red, green, blue):",
                text=",".join(map(str, cur.bands if cur else (1,))),
            )
            if not ok:
                return False
        try:
            bands = tuple(int(x) for x in text.replace(" ", "").split(",") if x)
            c = self.canvas.loader.contrast
            self.canvas.set_contrast(bands=bands, gamma=c.gamma if c else 1.0, on_water=c.on_water if c else None)
        except (ValueError, WakemeterError) as err:
            self.error("Bands not changed", str(err))
            return False
        return True

    def _show_text(self, title: str, text: str) -> None:
        box = QMessageBox(QMessageBox.Icon.NoIcon, title, text, QMessageBox.StandardButton.Close, self)
        box.setModal(False)
        box.open()
        self.last_help = text

    def _toggle_db(self) -> None:
        c = self.canvas.loader.contrast
        self.canvas.set_contrast(db=self.db_action.isChecked(), bands=c.bands if c else None)
        self._show_contrast_state()

    def _toggle_water_stretch(self) -> None:
        c = self.canvas.loader.contrast
        want = self.water_action.isChecked()
        self.canvas.set_contrast(bands=c.bands if c else None, db=c.db if c else None, on_water=want)
        got = self.canvas.loader.contrast
        if want and got is not None and not got.on_water:
            self.say("no water index here (a green and a near-infrared band), or too little water: whole scene")
        self._show_contrast_state()

    def _show_contrast_state(self) -> None:
        """The View menu's ticks say what is shown."""
        c = self.canvas.loader.contrast
        self.db_action.setChecked(bool(c is not None and c.db))
        self.water_action.setChecked(bool(c is not None and c.on_water))

    def ask_unsaved(self) -> str:
        """'save', 'discard', 'cancel', or 'keep' (close and keep the autosave: nobody to ask offscreen)."""
        if QGuiApplication.platformName() == "offscreen":
            return "keep"
        box = QMessageBox(
            QMessageBox.Icon.Question,
            "Unsaved work",
            "The vessels and measurements have changed since they were last saved.",
            parent=self,
        )
        save = box.addButton("Save session…", QMessageBox.ButtonRole.AcceptRole)
        discard = box.addButton("Discard", QMessageBox.ButtonRole.DestructiveRole)
        box.addButton(QMessageBox.StandardButton.Cancel)
        box.exec()
        return "save" if box.clickedButton() is save else "discard" if box.clickedButton() is discard else "cancel"

    def closeEvent(self, ev) -> None:
        discard = False
        if self.controller.has_unsaved_work():
            answer = self.ask_unsaved()
            if answer == "save":
                self.save_dialog()
                if self.controller.has_unsaved_work():  # not saved after all
                    ev.ignore()
                    return
            elif answer == "cancel":
                ev.ignore()
                return
            discard = answer == "discard"
        if self.job is not None:
            self.job.cancel()
            self.job.worker_thread.wait(5000)
        self.canvas.loader.shutdown()
        self.controller.closing(discard=discard)
        super().closeEvent(ev)


def wait_for_tiles(win: MainWindow, app, timeout_ms: int = 10_000) -> None:
    """Process events until the visible tiles are loaded (for screenshots and tests)."""
    import time

    t0 = time.time()
    while (time.time() - t0) * 1000 < timeout_ms:
        app.processEvents()
        win.canvas.loader.wait(50)
        app.processEvents()
        if win.doc.scene is None:
            return
        keys = win.canvas.visible_tiles(win.canvas.level())
        if all(win.canvas.loader.cached(k) is not None for k in keys) and not win.canvas.loader.pending:
            return
    QTimer.singleShot(0, lambda: None)
