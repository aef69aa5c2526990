"""Long work off the GUI thread: a job runs in a QThread, reports progress, can be cancelled,
and hands its result (or a plain-language error) back on the GUI thread."""

from __future__ import annotations

import threading
import traceback
from collections.abc import Callable

from PySide6.QtCore import QObject, QThread, Signal, Slot

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
        self.worker_thread = QThread()
        self.moveToThread(self.worker_thread)
        self.worker_thread.started.connect(self._run)

    def start(self) -> None:
        self.worker_thread.start()

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
            self.worker_thread.quit()


class Relay(QObject):
    """Lives on the GUI thread; its slots run the given callbacks there (queued from the job's thread).

    Plain Python callables connected to a signal emitted in another thread would run in that
    thread; a QObject's bound methods run in the thread the object lives in.
    """

    def __init__(self, job: Job, *, on_progress, on_done, on_failed, on_cancelled, parent=None):
        super().__init__(parent)
        self._p, self._d, self._f, self._c = on_progress, on_done, on_failed, on_cancelled
        job.progress.connect(self.progress)
        job.done.connect(self.done)
        job.failed.connect(self.failed)
        job.cancelled.connect(self.cancelled)

    @Slot(float, str)
    def progress(self, f: float, msg: str) -> None:
        self._p(f, msg)

    @Slot()
    def done(self) -> None:
        self._d()

    @Slot(str)
    def failed(self, msg: str) -> None:
        self._f(msg)

    @Slot()
    def cancelled(self) -> None:
        self._c()
