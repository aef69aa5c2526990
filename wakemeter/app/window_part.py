"""What the window's parts (file dialogs, vessel search, calibration) may use of the main window.

Each part is a class in its own module mixed into :class:`~wakemeter.app.window.MainWindow`.  For the type
checker a part is a main window with these members; at run time it is a plain class (the window provides them).
"""

from __future__ import annotations

from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from PySide6.QtCore import QSettings
    from PySide6.QtWidgets import QMainWindow

    from .canvas import Canvas
    from .controller import Controller
    from .document import Document
    from .workers import Job

    class WindowPart(QMainWindow):
        doc: Document
        canvas: Canvas
        controller: Controller
        settings: QSettings
        last_error: str

        def say(self, text: str) -> None: ...
        def error(self, title: str, text: str) -> None: ...
        def confirm(self, title: str, text: str) -> bool: ...
        def open_path(self, path: str, *, ask_first: bool = True) -> bool: ...
        def run_job(self, job: Job, on_done, on_fail=None) -> None: ...
        def _may_leave_scene(self) -> str | None: ...
        def _ask_open(self, kind: str, title: str, filters: str) -> str | None: ...

else:
    WindowPart = object
