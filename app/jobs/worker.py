"""Solving off the GUI thread: at most one running and one pending solve, in stages, cancellable.

:class:`SolveRunner` runs a solve in a worker thread in two stages
(:func:`app.jobs.results.compute_first`, then :func:`app.jobs.results.compute_rest`) and
emits ``progress_changed(fraction, message)``, ``first_results_ready(results)`` as soon as the
solution and maps can be drawn, then exactly one of ``solution_ready(results)``,
``solve_failed(message)`` or ``solve_cancelled()`` on the GUI thread.

Concurrency: one solver thread at a time. A solve requested while one runs asks the running
one to stop and waits as the *pending* solve; a newer request replaces the pending one (only
the latest drawing is worth solving). When the running thread ends, the pending solve starts.
After reporting a full solve, the thread makes the first edit of each part ready
(:meth:`solver.GeometryEditSolver.prepare`) until a new request stops it.
Only the latest request's outcome is reported. A *live* solve (while the mouse drags a part)
stops after the first stage: it draws the solution and maps and skips the figures. A live
solve is not stopped by a newer live request: it finishes and is drawn while the newer one
waits, so the drawing keeps up with the mouse at the rate the machine can solve.
"""

from __future__ import annotations

from PySide6.QtCore import QObject, Signal

from app.jobs.job_thread import JobThread, error_text
from app.jobs.results import Results, compute_first, compute_rest
from solver import GeometryEditSolver, Model, SolveCancelled


class _SolveThread(JobThread):
    progressed = Signal(float, str)
    first_ready = Signal(object)

    def __init__(self, model: Model, options: dict, live: bool, edits: GeometryEditSolver) -> None:
        super().__init__()
        self.edits = edits
        self.model = model
        self.options = options
        self.live = live

    def work(self) -> Results:
        first = compute_first(
            self.model, lambda f, m: self.progressed.emit(0.5 * f, m), self.stop.is_set,
            grid_points=self.options.get("grid_points", 120), edits=self.edits,
        )
        if self.live:
            return first
        self.first_ready.emit(first)
        return compute_rest(
            first, lambda f, m: self.progressed.emit(0.5 + 0.5 * f, m), self.stop.is_set,
            n_field_lines=self.options.get("n_field_lines", 48),
        )

    def after_report(self) -> None:
        """After a full solve, make the first edit of each part ready while the user looks at
        the results (:meth:`solver.GeometryEditSolver.prepare`); a new request stops it."""
        if not self.live and not self.stop.is_set():
            self.edits.prepare(cancel=self.stop.is_set)


class SolveRunner(QObject):
    """Runs solves in a worker thread: one running, at most one pending."""

    progress_changed = Signal(float, str)
    first_results_ready = Signal(object)
    solution_ready = Signal(object)
    solve_failed = Signal(str)
    solve_cancelled = Signal()
    busy_changed = Signal(bool)

    def __init__(self, parent: QObject | None = None, **options) -> None:
        super().__init__(parent)
        self.options = options
        self._running: _SolveThread | None = None  # the thread computing (perhaps told to stop)
        self._pending: tuple[Model, bool] | None = None  # (model, live) waiting for it to end
        self._wanted: bool = False  # a requested solve has not reported yet
        self.threads_started = 0
        #: Kept across solves (one thread at a time uses it): a drag re-solves only what moved.
        self.edits = GeometryEditSolver()

    @property
    def is_busy(self) -> bool:
        return self._wanted

    @property
    def is_running(self) -> bool:
        """True while a solver thread is computing (perhaps one told to stop)."""
        return self._running is not None

    def start(self, model: Model, *, live: bool = False) -> None:
        """Solve ``model`` (only the first stage when ``live``). A solve still running is asked
        to stop and this one waits for it; a solve already waiting is replaced."""
        if not self._wanted:
            self.busy_changed.emit(True)
        self._wanted = True
        if self._running is None:
            self._launch(model, live)
        else:
            if not (live and self._running.live):
                self._running.stop.set()
            self._pending = (model, live)

    def _launch(self, model: Model, live: bool) -> None:
        thread = _SolveThread(model, self.options, live, self.edits)
        thread.progressed.connect(self._on_thread_progressed)
        thread.first_ready.connect(self._on_first_ready)
        thread.finished_with.connect(self._on_thread_finished)
        thread.finished.connect(self._on_thread_ended)
        self._running = thread
        self.threads_started += 1
        thread.start()

    def cancel(self) -> None:
        """Stop the running solve and drop the pending one (``solve_cancelled`` is reported)."""
        self._pending = None
        if self._running is not None:
            self._running.stop.set()

    def wait(self, timeout_ms: int = 30000) -> None:
        """Block until the worker thread has ended (for closing and for tests); a pending solve
        is dropped."""
        self._pending = None
        thread = self._running
        if thread is not None:
            thread.wait(timeout_ms)

    def _on_thread_progressed(self, fraction: float, message: str) -> None:
        if self.sender() is self._running and self._pending is None:
            self.progress_changed.emit(fraction, message)

    def _on_first_ready(self, results) -> None:
        if self.sender() is self._running and self._pending is None:
            self.first_results_ready.emit(results)

    def _on_thread_finished(self, results, error) -> None:
        thread = self.sender()
        if thread is not self._running:
            return
        if self._pending is not None:
            if thread.live and error is None:
                self.solution_ready.emit(results)  # a recent drag position: draw it meanwhile
            return  # otherwise superseded: the pending solve reports instead
        self._wanted = False
        self.busy_changed.emit(False)
        if isinstance(error, SolveCancelled):
            self.solve_cancelled.emit()
        elif error is not None:
            self.solve_failed.emit(error_text(error))
        else:
            self.solution_ready.emit(results)

    def _on_thread_ended(self) -> None:
        thread = self.sender()
        if thread is self._running:
            self._running = None
            pending, self._pending = self._pending, None
            if pending is not None:
                self._launch(*pending)
        thread.deleteLater()
