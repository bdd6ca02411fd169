"""Python's cyclic garbage collection, kept on the GUI thread.

Qt widgets must be destroyed on the thread that owns them. Python's cyclic collector runs in
whichever thread happens to cross its allocation threshold; when that is a solver thread and the
garbage holds a widget (a closed window's menu, say), the widget is destroyed there: the solver
thread then waits for the interpreter lock inside Qt's destructor while the GUI thread, holding
that lock, waits for the same object's mutex, and both stop for good (seen in the test suite:
a solve froze inside shapely while a menu was being deleted). So the automatic collector is
switched off and a timer on the GUI thread collects at the collector's own thresholds.
"""

from __future__ import annotations

import gc

from PySide6.QtCore import QCoreApplication, QObject, QTimer

#: How often the GUI thread checks whether a collection is due, milliseconds.
CHECK_INTERVAL_MS = 250


class GuiThreadCollector(QObject):
    """Switches off automatic collection and collects from a GUI-thread timer instead."""

    def __init__(self, parent: QObject | None = None, interval_ms: int = CHECK_INTERVAL_MS) -> None:
        super().__init__(parent)
        self.thresholds = gc.get_threshold()
        self.was_enabled = gc.isenabled()
        gc.disable()
        self.timer = QTimer(self)
        self.timer.timeout.connect(self.collect_if_due)
        self.timer.start(interval_ms)

    def collect_if_due(self) -> int:
        """Collect the generations whose counts passed their thresholds; the objects freed."""
        counts = gc.get_count()
        generation = -1
        for g, (count, threshold) in enumerate(zip(counts, self.thresholds, strict=True)):
            if threshold and count > threshold:
                generation = g
        return gc.collect(generation) if generation >= 0 else 0

    def stop(self) -> None:
        """Collect once more here, then give collection back to Python."""
        self.timer.stop()
        gc.collect()
        if self.was_enabled:
            gc.enable()


def collect_on_gui_thread(app: QCoreApplication) -> GuiThreadCollector:
    """Install (once per application) the GUI-thread collector; returns it."""
    existing = app.findChild(GuiThreadCollector)
    return existing if existing is not None else GuiThreadCollector(app)
