"""Background jobs for the figure sections: one solver call at a time, off the GUI thread.

:class:`FigureJobRunner` runs ``function(*args, **kwargs)`` (a solver call) in a QThread and
emits exactly one of ``result_ready(result)`` or ``job_failed(message)`` on the GUI thread for
the latest job it started. ``cancel()`` drops the running job: the solver calls used here take no
cancel hook, so the thread runs to its end, but its outcome is never shown; a job started
meanwhile waits for that thread, so one runner never has two threads computing at once. Errors are passed
on as text (the solver's own message, or the type and text of an unexpected failure), never
swallowed.
"""

from __future__ import annotations

import atexit
import logging
from typing import Callable

from PySide6.QtCore import QObject, QThread, Signal

from solver import SolverError

logger = logging.getLogger(__name__)

#: Threads still running, kept alive here so that a closed view never destroys a running thread.
_LIVE_THREADS: set = set()


def error_text(error: BaseException) -> str:
    """The message shown to the user for a failed job."""
    if isinstance(error, SolverError):
        return str(error)
    return f"Unexpected error in the solver: {type(error).__name__}: {error}"


class _JobThread(QThread):
    finished_with = Signal(object, object)  # (result or None, error or None)

    def __init__(self, function: Callable, args: tuple, kwargs: dict) -> None:
        super().__init__()
        self.function, self.args, self.kwargs = function, args, kwargs

    def run(self) -> None:
        try:
            result = self.function(*self.args, **self.kwargs)
        except Exception as exc:  # reported to the user on the GUI thread
            if not isinstance(exc, SolverError):
                logger.exception("figure job %s failed", getattr(self.function, "__name__", self.function))
            self.finished_with.emit(None, exc)
            return
        self.finished_with.emit(result, None)


class FigureJobRunner(QObject):
    """Runs one solver call at a time in a worker thread; a new call drops the one running."""

    result_ready = Signal(object)
    job_failed = Signal(str)
    busy_changed = Signal(bool)

    def __init__(self, parent: QObject | None = None) -> None:
        super().__init__(parent)
        self._current: _JobThread | None = None  # the job whose outcome will be reported
        self._running: _JobThread | None = None  # the thread still computing (perhaps a dropped job)
        self._queued: _JobThread | None = None  # waits for a dropped job's thread to end

    @property
    def is_busy(self) -> bool:
        return self._current is not None

    def start(self, function: Callable, *args, **kwargs) -> None:
        """Run ``function(*args, **kwargs)``; the outcome of any job still running is dropped.

        At most one thread per runner computes at a time: while a dropped job's thread is still
        running, the new job waits for it (the solver calls take no cancel hook).
        """
        self.cancel()
        thread = _JobThread(function, args, kwargs)
        thread.finished_with.connect(self._on_thread_finished)
        thread.finished.connect(self._on_thread_ended)  # delivered on the GUI thread
        self._current = thread
        self.busy_changed.emit(True)
        if self._running is None:
            self._launch(thread)
        else:
            self._queued = thread

    def _launch(self, thread: _JobThread) -> None:
        _LIVE_THREADS.add(thread)
        self._running = thread
        thread.start()

    def cancel(self) -> None:
        """Drop the current job (its result or error will not be reported)."""
        if self._queued is not None:
            self._queued.deleteLater()
            self._queued = None
        if self._current is not None:
            self._current = None
            self.busy_changed.emit(False)

    def _on_thread_ended(self) -> None:
        thread = self.sender()
        _forget(thread)
        if thread is self._running:
            self._running = None
            queued, self._queued = self._queued, None
            if queued is not None:
                self._launch(queued)

    def _on_thread_finished(self, result, error) -> None:
        if self.sender() is not self._current:
            return
        self._current = None
        self.busy_changed.emit(False)
        if error is not None:
            self.job_failed.emit(error_text(error))
        else:
            self.result_ready.emit(result)


def _forget(thread: _JobThread) -> None:
    _LIVE_THREADS.discard(thread)
    thread.deleteLater()


def wait_for_all(timeout_ms: int = 60000) -> None:
    """Block until every figure job thread has ended (for closing the program and for tests)."""
    for thread in list(_LIVE_THREADS):
        thread.wait(timeout_ms)


atexit.register(wait_for_all)  # a thread still running at exit would otherwise abort the interpreter
