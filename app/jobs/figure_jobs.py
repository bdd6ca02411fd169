"""Background jobs for the figure sections: one solver call at a time, off the GUI thread.

:class:`FigureJobRunner` runs ``function(*args, **kwargs)`` (a solver call) in a QThread and
emits exactly one of ``result_ready(result)`` or ``job_failed(message)`` on the GUI thread for
the latest job it started. Solver calls that take ``progress`` and ``cancel`` hooks (hot spots,
corner-radius sweep, equivalent radius, line figures) are started with
:meth:`FigureJobRunner.start_with_progress`: they report ``progress_changed(fraction, message)``
and stop soon after :meth:`FigureJobRunner.cancel` (like the main solve, :mod:`app.jobs.worker`).
A cancelled job's outcome is never shown; a job started meanwhile waits for the cancelled
thread to end, so one runner never has two threads computing at once. Errors are passed on as
text (the solver's own message, or the type and text of an unexpected failure), never
swallowed. :class:`JobProgress` is the small progress bar with a Cancel button each section shows.
"""

from __future__ import annotations

import atexit
from collections.abc import Callable

from PySide6.QtCore import QObject, Signal
from PySide6.QtWidgets import QHBoxLayout, QLabel, QProgressBar, QPushButton, QWidget

from app.jobs.job_thread import JobThread, error_text
from solver import SolveCancelled

#: Threads still running, kept alive here so that a closed view never destroys a running thread.
_LIVE_THREADS: set = set()


class _JobThread(JobThread):
    """One solver call (``function(*args, **kwargs)``), with progress and cancel hooks when asked."""

    progressed = Signal(float, str)

    def __init__(self, function: Callable, args: tuple, kwargs: dict, with_progress: bool) -> None:
        super().__init__()
        if with_progress:
            kwargs = {**kwargs, "progress": self.progressed.emit, "cancel": self.stop.is_set}
        self.function, self.args, self.kwargs = function, args, kwargs

    def work(self) -> object:
        return self.function(*self.args, **self.kwargs)


class FigureJobRunner(QObject):
    """Runs one solver call at a time in a worker thread; a new call cancels the one running."""

    result_ready = Signal(object)
    job_failed = Signal(str)
    job_cancelled = Signal()
    busy_changed = Signal(bool)
    progress_changed = Signal(float, str)

    def __init__(self, parent: QObject | None = None) -> None:
        super().__init__(parent)
        self._current: _JobThread | None = None  # the job whose outcome will be reported
        self._running: _JobThread | None = None  # the thread still computing (perhaps a cancelled job)
        self._queued: _JobThread | None = None  # waits for a cancelled job's thread to end

    @property
    def is_busy(self) -> bool:
        return self._current is not None

    def start(self, function: Callable, *args, **kwargs) -> None:
        """Run ``function(*args, **kwargs)``; the job still running is cancelled and its outcome dropped.

        The function takes no cancel hook: a cancelled call runs to its end unseen, and a new
        job waits for it.
        """
        self._start(function, args, kwargs, with_progress=False)

    def start_with_progress(self, function: Callable, *args, **kwargs) -> None:
        """Like :meth:`start`, for a solver call that takes ``progress`` and ``cancel`` hooks
        (they are added here): it reports progress and stops soon after :meth:`cancel`."""
        self._start(function, args, kwargs, with_progress=True)

    def _start(self, function: Callable, args: tuple, kwargs: dict, with_progress: bool) -> None:
        self.cancel()
        thread = _JobThread(function, args, kwargs, with_progress)
        thread.finished_with.connect(self._on_thread_finished)
        thread.progressed.connect(self._on_thread_progressed)
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
        """Stop the current job (its result or error will not be reported; ``job_cancelled`` is)."""
        if self._queued is not None:
            self._queued.deleteLater()
            self._queued = None
        if self._running is not None:
            self._running.stop.set()
        if self._current is not None:
            self._current.stop.set()
            self._current = None
            self.busy_changed.emit(False)
            self.job_cancelled.emit()

    def _on_thread_ended(self) -> None:
        thread = self.sender()
        _forget(thread)
        if thread is self._running:
            self._running = None
            queued, self._queued = self._queued, None
            if queued is not None:
                self._launch(queued)

    def _on_thread_progressed(self, fraction: float, message: str) -> None:
        if self.sender() is self._current:
            self.progress_changed.emit(fraction, message)

    def _on_thread_finished(self, result, error) -> None:
        if self.sender() is not self._current:
            return
        self._current = None
        self.busy_changed.emit(False)
        if isinstance(error, SolveCancelled):
            self.job_cancelled.emit()
        elif error is not None:
            self.job_failed.emit(error_text(error))
        else:
            self.result_ready.emit(result)


class JobProgress(QWidget):
    """A progress bar, the stage being computed and a Cancel button, shown while ``runner`` is busy."""

    def __init__(self, runner: FigureJobRunner, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.runner = runner
        layout = QHBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        self.bar = QProgressBar()
        self.bar.setRange(0, 100)
        self.bar.setMaximumWidth(160)
        self.message = QLabel("")
        self.cancel_button = QPushButton("Cancel")
        self.cancel_button.clicked.connect(runner.cancel)
        layout.addWidget(self.bar)
        layout.addWidget(self.message, 1)
        layout.addWidget(self.cancel_button)
        runner.progress_changed.connect(self._on_progress_changed)
        runner.busy_changed.connect(self._on_busy_changed)
        self.setVisible(False)

    def _on_progress_changed(self, fraction: float, message: str) -> None:
        self.bar.setValue(int(round(100 * max(0.0, min(1.0, fraction)))))
        self.message.setText(message)

    def _on_busy_changed(self, busy: bool) -> None:
        if busy:
            self.bar.setValue(0)
            self.message.setText("")
        self.setVisible(busy)


def _forget(thread: _JobThread) -> None:
    _LIVE_THREADS.discard(thread)
    thread.deleteLater()


def wait_for_all(timeout_ms: int = 60000) -> None:
    """Block until every figure job thread has ended (for closing the program and for tests)."""
    for thread in list(_LIVE_THREADS):
        thread.wait(timeout_ms)


atexit.register(wait_for_all)  # a thread still running at exit would otherwise abort the interpreter
