"""Solving off the GUI thread: a QThread per solve, with progress, cancel and errors.

:class:`SolveRunner` starts :func:`app.results.compute_results` in a worker thread and emits
``progress_changed(fraction, message)``, then exactly one of ``solution_ready(results)``,
``solve_failed(message)`` or ``solve_cancelled()`` on the GUI thread. A new solve cancels the
one still running; only the latest solve's outcome is reported.
"""

from __future__ import annotations

import logging
import threading

from PySide6.QtCore import QObject, QThread, Signal

from app.jobs.results import compute_results
from solver import Model, SolveCancelled, SolverError

logger = logging.getLogger(__name__)


class _SolveThread(QThread):
    progressed = Signal(float, str)
    finished_with = Signal(object, object)  # (results or None, error or None)

    def __init__(self, model: Model, options: dict) -> None:
        super().__init__()
        self.model = model
        self.options = options
        self.stop = threading.Event()

    def run(self) -> None:
        try:
            results = compute_results(
                self.model, lambda f, m: self.progressed.emit(f, m), self.stop.is_set, **self.options
            )
            self.finished_with.emit(results, None)
        except SolverError as exc:
            self.finished_with.emit(None, exc)
        except Exception as exc:  # an unexpected failure is still reported to the user, never lost
            logger.exception("solve failed")
            self.finished_with.emit(None, exc)


class SolveRunner(QObject):
    """Runs solves one at a time in worker threads."""

    progress_changed = Signal(float, str)
    solution_ready = Signal(object)
    solve_failed = Signal(str)
    solve_cancelled = Signal()
    busy_changed = Signal(bool)

    def __init__(self, parent: QObject | None = None, **options) -> None:
        super().__init__(parent)
        self.options = options
        self._current: _SolveThread | None = None
        self._old: list[_SolveThread] = []

    @property
    def is_busy(self) -> bool:
        return self._current is not None

    def start(self, model: Model) -> None:
        """Solve ``model``; a solve still running is cancelled and its outcome dropped."""
        self.cancel()
        thread = _SolveThread(model, self.options)
        thread.progressed.connect(self._on_thread_progressed)
        thread.finished_with.connect(self._on_thread_finished)
        thread.finished.connect(lambda t=thread: self._forget(t))
        self._current = thread
        self._old.append(thread)
        self.busy_changed.emit(True)
        thread.start()

    def cancel(self) -> None:
        """Ask the running solve to stop (it reports ``solve_cancelled``)."""
        if self._current is not None:
            self._current.stop.set()

    def wait(self, timeout_ms: int = 30000) -> None:
        """Block until every worker thread has ended (for closing and for tests)."""
        for thread in list(self._old):
            thread.wait(timeout_ms)

    def _forget(self, thread: _SolveThread) -> None:
        if thread in self._old:
            self._old.remove(thread)
        thread.deleteLater()

    def _on_thread_progressed(self, fraction: float, message: str) -> None:
        if self.sender() is self._current:
            self.progress_changed.emit(fraction, message)

    def _on_thread_finished(self, results, error) -> None:
        thread = self.sender()
        if thread is not self._current:
            return
        self._current = None
        self.busy_changed.emit(False)
        if isinstance(error, SolveCancelled):
            self.solve_cancelled.emit()
        elif error is not None:
            self.solve_failed.emit(str(error) if isinstance(error, SolverError)
                                   else f"Unexpected error in the solver: {type(error).__name__}: {error}")
        else:
            self.solution_ready.emit(results)
