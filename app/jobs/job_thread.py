"""The worker thread every background job runs in: one call, one report.

A :class:`JobThread` runs :meth:`JobThread.work` once and emits ``finished_with(result, None)``
or ``finished_with(None, error)`` — never neither, so a failure always reaches the user. The
solver's own errors (SolverError) are expected and reported as they are; anything else is
logged with its traceback first. ``stop`` is the event the job polls to cancel.
"""

from __future__ import annotations

import logging
import threading
from typing import Any

from PySide6.QtCore import QThread, Signal

from solver import SolverError

logger = logging.getLogger(__name__)


def error_text(error: BaseException) -> str:
    """The message shown to the user for a failed job: the solver's own words for its errors."""
    if isinstance(error, SolverError):
        return str(error)
    return f"Unexpected error in the solver: {type(error).__name__}: {error}"


class JobThread(QThread):
    """Runs :meth:`work` once in a worker thread and reports its outcome on ``finished_with``."""

    finished_with = Signal(object, object)  # (result or None, error or None)

    def __init__(self) -> None:
        super().__init__()
        self.stop = threading.Event()

    def work(self) -> Any:
        """The job; runs in the worker thread. Subclasses define it."""
        raise NotImplementedError

    def after_report(self) -> None:
        """Work done in the worker thread after a successful report (none by default): idle-time
        work whose failure is logged, not reported, as the result is already out."""

    def run(self) -> None:
        try:
            result = self.work()
        except Exception as exc:  # reported to the user on the GUI thread, never lost
            if not isinstance(exc, SolverError):
                logger.exception("%s failed", type(self).__name__)
            self.finished_with.emit(None, exc)
            return
        self.finished_with.emit(result, None)
        try:
            self.after_report()
        except Exception:  # the result is out; this work only makes the next one faster
            logger.exception("%s: work after the report failed", type(self).__name__)
