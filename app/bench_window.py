"""Click-to-drawn in the desktop program itself: ``python -m app.bench_window``.

Drives the real main window offscreen on the busbar sample (normal density, 120 x 120 map,
as the program opens it): after a full solve, the mouse presses on bar L1 and moves it one
snap step (the first edit after a fresh solve, solved live), moves it one more step (to 30 mm
from L2, whose panels are then taken exactly beside the low-rank terms) and one more (a new
disc past L2), then releases it (the full solve of the released drawing). For each it reports the
wall-clock time from the mouse event to the moment the window has drawn the solution and the
map (the results shown and the window repainted), split into

* *waiting*: from the mouse event to the solver thread starting;
* *solver part*: the re-solve and the map in the solver thread (:func:`app.jobs.results.compute_first`,
  its own "solve" and "map" seconds in brackets);
* *drawing*: from the solver thread's end to the window repainted (the results handed to the
  GUI thread, the views and overlays updated, the canvas and panels painted).

Process CPU seconds over the whole interval are given too (both threads). The least of
``--repeat`` runs (each from a fresh solve) is reported. Numbers are wall-clock on whatever
machine runs it: compare them in one run, with the load average beside them. The solver's
own timings are in ``python -m solver.bench`` (which cannot import Qt).
"""

from __future__ import annotations

import argparse
import os
import sys
import tempfile
import time
from dataclasses import dataclass
from pathlib import Path

#: The model measured (the one ``python -m solver.bench`` times).
SAMPLE_NAME = "busbar_enclosure.json"

#: Where the mouse presses: the centre of bar L1 (model units).
PRESS_AT = (-40.0, 0.0)


@dataclass
class Click:
    """One mouse event and the drawing it led to (seconds)."""

    name: str
    waiting: float = float("nan")
    solve: float = float("nan")
    map: float = float("nan")
    drawing: float = float("nan")
    total: float = float("nan")
    cpu: float = float("nan")

    @property
    def solver_part(self) -> float:
        return self.solve + self.map


class _Watch:
    """Notes the mouse event and the moment the window has drawn the next results (a slot
    connected after the window's own, which repaints the window at once)."""

    def __init__(self, window) -> None:
        self.window = window
        self.clicked = self.clicked_cpu = 0.0
        self.results = None
        self.drawn_at = self.drawn_cpu = float("nan")
        window.runner.first_results_ready.connect(self._on_drawn)
        window.runner.solution_ready.connect(self._on_drawn)

    def _on_drawn(self, results) -> None:
        if self.results is not None:
            return
        self.window.repaint()  # everything the new results changed, painted now
        self.drawn_at, self.drawn_cpu = time.perf_counter(), time.process_time()
        self.results = results

    def arm(self) -> None:
        self.results = None
        self.drawn_at = self.drawn_cpu = float("nan")
        self.clicked, self.clicked_cpu = time.perf_counter(), time.process_time()

    def click(self, name: str) -> Click:
        s = self.results.seconds
        return Click(name, s["began"] - self.clicked, s["solve"], s["map"], self.drawn_at - s["ended"],
                     self.drawn_at - self.clicked, self.drawn_cpu - self.clicked_cpu)


def _wait(app, condition, timeout_s: float = 120.0) -> None:
    """Process events until ``condition()`` holds, sleeping in between (the solver thread has
    the processor to itself, as when the user waits)."""
    from PySide6.QtCore import QEventLoop, QTimer

    wake = QTimer()
    wake.start(20)  # wakes the wait below now and then, to check the clock
    end = time.perf_counter() + timeout_s
    try:
        while not condition():
            if time.perf_counter() > end:
                raise TimeoutError("the window did not draw the results in time")
            app.processEvents(QEventLoop.WaitForMoreEvents)
    finally:
        wake.stop()


def measure(repeat: int = 3) -> list[Click]:
    """The least (by total) of ``repeat`` runs of each mouse event, as :class:`Click` records."""
    from PySide6.QtCore import QPointF, QSettings, Qt
    from PySide6.QtTest import QTest
    from PySide6.QtWidgets import QApplication

    import solver
    from app.main_window import MainWindow

    app = QApplication.instance() or QApplication([sys.argv[0]])
    scratch = tempfile.mkdtemp(prefix="edgewise-bench-")
    window = MainWindow(QSettings(str(Path(scratch) / "settings.ini"), QSettings.IniFormat))
    window.auto_solve = True
    original = solver.load_project(solver.sample_path(SAMPLE_NAME))
    window.load(original, None)
    window.resize(1366, 768)
    window.show()
    _wait(app, lambda: window.isVisible())
    canvas, viewport = window.canvas, window.canvas.viewport()
    watch = _Watch(window)

    def pixel(x: float, y: float):
        return canvas.mapFromScene(canvas.plotItem.vb.mapViewToScene(QPointF(x, y)))

    best: dict[str, Click] = {}
    for _ in range(repeat):
        window.runner.edits = solver.GeometryEditSolver()  # the next solve is a fresh one
        window.load(original, None)
        window.solve()
        # the user looks at the results: the solver thread ends (it makes each part's first edit
        # ready after reporting, solver.GeometryEditSolver.prepare) before the mouse is pressed
        _wait(app, lambda: window.results is not None and window.results.complete and not window.runner.is_busy
              and not window.runner.is_running)
        step = canvas.snap_step()
        x, y = PRESS_AT
        QTest.mousePress(viewport, Qt.LeftButton, Qt.NoModifier, pixel(x, y))
        for k, name in ((1, f"first edit of L1 after a fresh solve (drag by {step:g} mm)"),
                        (2, "a drag step that reaches L2 (its panels exact)"),
                        (3, "a further step past L2 (a new disc)")):
            watch.arm()
            QTest.mouseMove(viewport, pixel(x + k * step, y))
            _wait(app, lambda: watch.results is not None)
            _keep_best(best, watch.click(name))
            _wait(app, lambda: not window.runner.is_busy)
        watch.arm()
        QTest.mouseRelease(viewport, Qt.LeftButton, Qt.NoModifier, pixel(x + 3 * step, y))
        _wait(app, lambda: watch.results is not None)
        _keep_best(best, watch.click("release (the full solve of the drawing left)"))
        _wait(app, lambda: not window.runner.is_busy)
    window.runner.cancel()
    window.runner.wait()
    window.document.mark_saved(Path(scratch) / "busbar.json")
    window.close()
    return list(best.values())


def _keep_best(best: dict, click: Click) -> None:
    if click.name not in best or click.total < best[click.name].total:
        best[click.name] = click


def report(clicks: list[Click]) -> str:
    """The measured clicks as a table (milliseconds)."""
    load = os.getloadavg()[0] if hasattr(os, "getloadavg") else float("nan")
    lines = [f"click-to-drawn in the desktop program (busbar sample, offscreen; load average {load:.2f}); "
             "milliseconds, least of the runs",
             f"  {'':48s} {'total':>7s} {'waiting':>8s} {'solver (solve + map)':>22s} {'drawing':>8s} {'CPU':>7s}"]
    for c in clicks:
        lines.append(f"  {c.name:48s} {1e3 * c.total:7.0f} {1e3 * c.waiting:8.1f} "
                     f"{1e3 * c.solver_part:7.0f} ({1e3 * c.solve:4.0f} + {1e3 * c.map:4.0f}) "
                     f"{1e3 * c.drawing:8.0f} {1e3 * c.cpu:7.0f}")
    lines.append("  goal: total < 300 ms")
    return "\n".join(lines)


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(prog="python -m app.bench_window", description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=3, help="runs from a fresh solve (default 3)")
    args = parser.parse_args(argv)
    os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
    os.environ.setdefault("QT_LOGGING_RULES", "qt.qpa.*=false")
    os.environ.setdefault("EDGEWISE_RECOVERY_DIR", tempfile.mkdtemp(prefix="edgewise-bench-recovery-"))
    print(report(measure(args.repeat)))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
