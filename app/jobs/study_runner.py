"""Studies off the GUI thread: one QThread runs one call of the solver's study engine.

:class:`StudyRunner` starts ``job(progress, cancel)`` (e.g. a ``solver.studies.sweep`` call
with its callbacks bound) in a worker thread and emits ``progressed(done, total)``, then
exactly one of ``finished(result)``, ``failed(message)`` or ``cancelled()`` on the GUI
thread. :meth:`StudyRunner.cancel` asks the engine to stop between cases.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from PySide6.QtCore import QObject, Signal

from app.jobs.job_thread import JobThread, error_text
from solver import SolveCancelled

#: job(progress(done, total), cancel() -> bool) -> result
StudyJob = Callable[[Callable[[int, int], None], Callable[[], bool]], Any]


class _StudyThread(JobThread):
    progressed = Signal(int, int)

    def __init__(self, job: StudyJob) -> None:
        super().__init__()
        self.job = job

    def work(self) -> Any:
        return self.job(lambda done, total: self.progressed.emit(int(done), int(total)), self.stop.is_set)


class StudyRunner(QObject):
    """Runs one study at a time in a worker thread."""

    progressed = Signal(int, int)
    finished = Signal(object)
    failed = Signal(str)
    cancelled = Signal()
    busy_changed = Signal(bool)

    def __init__(self, parent: QObject | None = None) -> None:
        super().__init__(parent)
        self._thread: _StudyThread | None = None

    @property
    def is_busy(self) -> bool:
        return self._thread is not None

    def start(self, job: StudyJob) -> None:
        """Run ``job``; refused (RuntimeError) while another study runs."""
        if self._thread is not None:
            raise RuntimeError("A study is already running; cancel it first.")
        thread = _StudyThread(job)
        thread.progressed.connect(self.progressed)
        thread.finished_with.connect(self._on_ended)
        self._thread = thread
        self.busy_changed.emit(True)
        thread.start()

    def cancel(self) -> None:
        if self._thread is not None:
            self._thread.stop.set()

    def wait(self) -> None:
        if self._thread is not None:
            self._thread.wait()

    def _on_ended(self, result, error) -> None:
        thread, self._thread = self._thread, None
        if thread is not None:
            thread.wait()
        self.busy_changed.emit(False)
        if isinstance(error, SolveCancelled) or (error is None and thread is not None and thread.stop.is_set()
                                                 and _has_unrun_rows(result)):
            self.cancelled.emit()
            if error is None:
                self.finished.emit(result)  # the cases run before the cancel are still shown
            return
        if error is not None:
            self.failed.emit(error_text(error))
            return
        self.finished.emit(result)


def _has_unrun_rows(result) -> bool:
    from solver.studies import NOT_RUN

    return any(getattr(row, "get", lambda _k: None)("error") == NOT_RUN for row in getattr(result, "rows", ()))
