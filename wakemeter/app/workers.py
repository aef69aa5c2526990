"""Long work off the GUI thread: a job runs in a QThread, reports progress, can be cancelled,
and hands its result (or a plain-language error) back on the GUI thread."""

from __future__ import annotations

import threading
import traceback
from collections.abc import Callable

from PySide6.QtCore import QObject, QThread, Signal

from ..errors import CancelledError, WakemeterError


class Job(QObject):
    """The result travels in ``self.result`` (set before ``done`` fires), not as a signal argument."""

    progress = Signal(float, str)
    done = Signal()
    failed = Signal(str)
    cancelled = Signal()

    def __init__(self, fn: Callable, label: str):
        """``fn(progress, is_cancelled)`` does the work; inputs must be copied before it is made."""
        super().__init__()
        self.fn, self.label = fn, label
        self._cancel = threading.Event()
        self.result = None
        self.thread = QThread()
        self.moveToThread(self.thread)
        self.thread.started.connect(self._run)

    def start(self) -> None:
        self.thread.start()

    def cancel(self) -> None:
        self._cancel.set()

    def is_cancelled(self) -> bool:
        return self._cancel.is_set()

    def _run(self) -> None:
        try:
            result = self.fn(lambda f, msg="": self.progress.emit(float(f), msg), self.is_cancelled)
            if self._cancel.is_set():
                self.cancelled.emit()
            else:
                self.result = result
                self.done.emit()
        except CancelledError:
            self.cancelled.emit()
        except WakemeterError as err:
            self.failed.emit(str(err))
        except Exception as err:  # noqa: BLE001 - report, never crash the program
            self.failed.emit(f"unexpected problem: {err!r}\n{traceback.format_exc(limit=3)}")
        finally:
            self.thread.quit()
