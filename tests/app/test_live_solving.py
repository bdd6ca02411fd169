"""One running and one pending solve, staged results, Cancel at every stage, live dragging."""

from __future__ import annotations

import threading
import time

import pytest
from app_helpers import to_pixel
from PySide6.QtCore import Qt
from PySide6.QtTest import QTest

import solver
from app.jobs import results as results_module
from app.jobs import worker
from solver import Circle, Conductor, Model, Ring, SolveCancelled


def _coax(inner_radius: float) -> Model:
    return Model(unit="mm", mesh_density="coarse", conductors=(
        Conductor("inner", (Circle((0.0, 0.0), inner_radius),), potential_V=1.0),
        Conductor("shield", (Ring((0.0, 0.0), 3.5, 4.0),), role="reference"),
    ))


class _Concurrency:
    """Wraps compute_first to count how many solver threads are inside it at once."""

    def __init__(self, original) -> None:
        self.original = original
        self.lock = threading.Lock()
        self.inside = 0
        self.most = 0
        self.models: list[Model] = []

    def __call__(self, model, progress=None, cancel=None, **kwargs):
        with self.lock:
            self.inside += 1
            self.most = max(self.most, self.inside)
            self.models.append(model)
        try:
            time.sleep(0.05)  # widen the window in which a second thread could overlap
            return self.original(model, progress, cancel, **kwargs)
        finally:
            with self.lock:
                self.inside -= 1


def test_rapid_edits_never_run_two_solver_threads_and_the_last_edit_is_solved(qtbot, monkeypatch):
    counter = _Concurrency(results_module.compute_first)
    monkeypatch.setattr(worker, "compute_first", counter)
    runner = worker.SolveRunner(grid_points=12, n_field_lines=4)
    ready = []
    runner.solution_ready.connect(ready.append)
    edits = [_coax(0.8 + 0.05 * k) for k in range(12)]
    for model in edits:
        runner.start(model)
        qtbot.wait(15)
    qtbot.waitUntil(lambda: not runner.is_busy, timeout=60000)
    runner.wait()
    assert counter.most == 1
    assert runner.threads_started < len(edits)  # superseded edits were never started
    assert len(ready) == 1 and ready[0].model == edits[-1]  # only the latest edit reports
    assert ready[0].complete


def test_live_solves_finish_and_are_drawn_while_newer_drag_positions_wait(qtbot, monkeypatch):
    counter = _Concurrency(results_module.compute_first)
    monkeypatch.setattr(worker, "compute_first", counter)
    runner = worker.SolveRunner(grid_points=12, n_field_lines=4)
    ready = []
    runner.solution_ready.connect(ready.append)
    drags = [_coax(0.8 + 0.05 * k) for k in range(8)]
    for model in drags:
        runner.start(model, live=True)
        qtbot.wait(15)
    qtbot.waitUntil(lambda: not runner.is_busy, timeout=60000)
    runner.wait()
    assert counter.most == 1
    assert counter.models[0] == drags[0] and counter.models[-1] == drags[-1]
    assert runner.threads_started < len(drags)  # positions passed over while a solve ran
    assert [r.model for r in ready] == counter.models  # every live solve started was drawn
    assert not any(r.complete for r in ready)  # live solves stop after the first stage


def test_first_stage_is_reported_before_the_figures(qtbot):
    runner = worker.SolveRunner(grid_points=12, n_field_lines=4)
    order = []
    runner.first_results_ready.connect(lambda r: order.append(("first", r.complete, r.field_lines)))
    runner.solution_ready.connect(lambda r: order.append(("done", r.complete, r.solution.estimated_relative_error)))
    with qtbot.waitSignal(runner.solution_ready, timeout=60000):
        runner.start(_coax(1.0))
    runner.wait()
    assert [o[0] for o in order] == ["first", "done"]
    assert order[0][1] is False and order[0][2] == ()
    assert order[1][1] is True and order[1][2] is not None


TWO_WIRES = Model(unit="mm", mesh_density="coarse", conductors=(
    Conductor("a", (Circle((-3.0, 0.0), 1.0),), potential_V=1.0),
    Conductor("b", (solver.Rectangle((2.0, -1.0), 2.0, 2.0),), role="reference"),
))

STAGES = ["Meshing", "Solving", "potential and field maps", "Estimating the error",
          "Tracing field lines", "Equivalent radius of a", "Equivalent radius of b"]


@pytest.mark.parametrize("stage", STAGES)
def test_cancel_stops_each_stage(stage):
    """Cancel pressed while a stage is announced: that stage raises SolveCancelled and no later
    stage starts (the hooks are the ones the worker thread passes)."""
    seen, pressed = [], []

    def progress(fraction, message):
        seen.append(message)
        if stage in message:
            pressed.append(True)

    with pytest.raises(SolveCancelled):
        first = results_module.compute_first(TWO_WIRES, progress, lambda: bool(pressed), grid_points=12)
        results_module.compute_rest(first, progress, lambda: bool(pressed), n_field_lines=4,
                                    radii=results_module.RadiusCache())
    assert stage in seen[-1]  # nothing was announced after the cancelled stage


def test_cancel_during_the_figures_reports_cancelled_and_keeps_the_first_stage(qtbot):
    runner = worker.SolveRunner(grid_points=12, n_field_lines=4)
    ready, firsts = [], []
    runner.solution_ready.connect(ready.append)
    runner.first_results_ready.connect(firsts.append)
    runner.first_results_ready.connect(lambda _: runner.cancel())
    with qtbot.waitSignal(runner.solve_cancelled, timeout=60000):
        runner.start(TWO_WIRES)
    runner.wait()
    assert len(firsts) == 1 and not ready and not runner.is_busy


def test_field_line_tracing_polls_cancel():
    sol = solver.solve(_coax(1.0), estimate_error=False)
    calls = []

    def cancel():
        calls.append(1)
        return len(calls) > 3

    with pytest.raises(SolveCancelled):
        solver.trace_field_lines(sol, 8, cancel=cancel)
    assert len(calls) == 4


def test_equivalent_radii_are_kept_per_conductor_geometry():
    cache = results_module.RadiusCache()
    model = Model(unit="mm", mesh_density="coarse", conductors=(
        Conductor("a", (Circle((-3.0, 0.0), 1.0),), potential_V=1.0),
        Conductor("b", (solver.Rectangle((2.0, -1.0), 2.0, 2.0),), role="reference"),
    ))
    first = results_module.compute_first(model, grid_points=0)
    done = results_module.compute_rest(first, n_field_lines=0, radii=cache)
    assert cache.computed == 2
    moved = model.with_potentials({"a": 5.0}).with_conductors((
        Conductor("a", (Circle((-4.0, 0.0), 1.0),), potential_V=5.0), model.conductors[1]))
    again = results_module.compute_rest(results_module.compute_first(moved, grid_points=0),
                                        n_field_lines=0, radii=cache)
    assert cache.computed == 3  # only the moved circle; the square did not change: found, not solved
    assert again.equivalent_radius_m["b"] == done.equivalent_radius_m["b"]
    assert again.equivalent_radius_m["b"] == pytest.approx(
        solver.equivalent_radius_m(again.solution, ["b"]), rel=1e-15)


def _wire_in_shield() -> Model:
    return Model(unit="mm", mesh_density="coarse", conductors=(
        Conductor("inner", (Circle((0.0, 20.0), 2.0),), potential_V=1000.0),
        Conductor("shield", (Ring((0.0, 20.0), 14.0, 16.0),), role="reference"),
    ))


def _open_wire_in_shield(window, qtbot) -> None:
    """The wire-in-shield model in the window, solved on edits, the view on the shield."""
    window.auto_solve = True
    window.load(_wire_in_shield(), None)
    window.canvas.plotItem.vb.setRange(xRange=(-20, 20), yRange=(0, 40), padding=0)
    qtbot.wait(10)


def test_dragging_a_conductor_updates_the_capacitance_while_the_mouse_moves(window, qtbot):
    from app.main_window import live_figures_text

    _open_wire_in_shield(window, qtbot)
    step = window.canvas.snap_step()
    assert 4 * step <= 10.0  # the inner wire stays inside the shield
    window.solve()
    qtbot.waitUntil(lambda: window.results is not None and window.results.complete, timeout=60000)
    vp = window.canvas.viewport()
    shown = [window.live_figures.text()]
    QTest.mousePress(vp, Qt.LeftButton, Qt.NoModifier, to_pixel(window.canvas, 0.0, 20.0))
    for k in range(1, 5):
        QTest.mouseMove(vp, to_pixel(window.canvas, k * step, 20.0))
        qtbot.waitUntil(lambda: not window.runner.is_busy, timeout=60000)
        shown.append(window.live_figures.text())
        assert window.results.model == window._dragged_model  # the drawn results follow the mouse
        assert not window.results.complete
    assert window.document.model.conductors[0].shapes[0].center == (0.0, 20.0)  # no edit yet
    assert len(set(shown)) == len(shown)  # C' and the peak field changed at every step
    QTest.mouseRelease(vp, Qt.LeftButton, Qt.NoModifier, to_pixel(window.canvas, 4 * step, 20.0))
    qtbot.waitUntil(lambda: window.results is not None and window.results.complete
                    and window.results.model == window.document.model, timeout=60000)
    centre = window.document.model.conductors[0].shapes[0].center
    assert centre[0] == pytest.approx(4 * step)
    assert window.live_figures.text() == live_figures_text(solver.solve(window.document.model))
    assert not window.stale_label.isVisible()


@pytest.mark.parametrize("text, notches, coarse, expected", [
    ("12.5", 1, False, "12.6"), ("12.5", -3, False, "12.2"), ("60", 2, False, "62"), ("60", 1, True, "70"),
    ("0.05", -1, False, "0.04"), ("-0.1", 1, False, "0.0"), ("150 kV", 1, False, "151 kV"),
    ("3.", 1, False, "4"), ("1, 2", 1, False, None), ("1e-3", 1, False, None), ("abc", 1, False, None),
])
def test_wheel_steps_the_last_typed_digit(text, notches, coarse, expected):
    from app.panels.wheel_steps import stepped_text

    assert stepped_text(text, notches, coarse) == expected


def test_wheel_over_a_dimension_field_edits_and_solves_at_once(window, qtbot):
    from PySide6.QtCore import QPoint, QPointF
    from PySide6.QtGui import QWheelEvent
    from PySide6.QtWidgets import QApplication

    from app.document import PartRef

    window.auto_solve = True
    window.load(_coax(1.0), None)
    window.document.select(PartRef("conductor", 0, 0))
    qtbot.wait(10)
    field = window.properties.fields["radius"]
    assert field.text() == "1"
    before = solver.solve(window.document.model, estimate_error=False).capacitance_maxwell_F_per_m[0, 0]
    pos = QPointF(field.width() / 2, field.height() / 2)
    event = QWheelEvent(pos, QPointF(field.mapToGlobal(pos.toPoint())), QPoint(0, 0), QPoint(0, 120),
                        Qt.NoButton, Qt.NoModifier, Qt.NoScrollPhase, False)
    QApplication.sendEvent(field, event)
    assert window.document.model.conductors[0].shapes[0].radius == 2.0
    assert window.runner.is_busy  # solving at once, not after the quiet time of typed edits
    qtbot.waitUntil(lambda: window.results is not None and window.results.complete, timeout=60000)
    assert window.results.model == window.document.model
    after = window.results.solution.capacitance_maxwell_F_per_m[0, 0]
    assert after > before


def test_after_a_full_solve_the_first_drag_step_starts_from_the_prepared_part(window, qtbot):
    """The solver thread, after reporting a full solve, makes each part's first edit ready
    (solver.GeometryEditSolver.prepare); the first live step of a drag then starts from it."""
    _open_wire_in_shield(window, qtbot)
    window.solve()
    qtbot.waitUntil(lambda: window.results is not None and window.results.complete
                    and not window.runner.is_running, timeout=60000)
    assert set(window.runner.edits._prepared) == {"inner"}  # the shield's disc would hold everything
    vp = window.canvas.viewport()
    step = window.canvas.snap_step()
    QTest.mousePress(vp, Qt.LeftButton, Qt.NoModifier, to_pixel(window.canvas, 0.0, 20.0))
    QTest.mouseMove(vp, to_pixel(window.canvas, step, 20.0))
    qtbot.waitUntil(lambda: not window.runner.is_busy, timeout=60000)
    assert window.runner.edits.prepared and window.runner.edits.reused_panels > 0
    assert window.results.model == window._dragged_model
    QTest.mouseRelease(vp, Qt.LeftButton, Qt.NoModifier, to_pixel(window.canvas, step, 20.0))
    qtbot.waitUntil(lambda: window.results is not None and window.results.complete
                    and window.results.model == window.document.model, timeout=60000)


def test_no_preparation_after_a_live_solve_or_once_stopped():
    model = _wire_in_shield()
    for live, stopped in ((True, False), (False, True)):
        edits = solver.GeometryEditSolver()
        edits.solve(model)
        thread = worker._SolveThread(model, {}, live, edits)
        if stopped:
            thread.stop.set()  # a newer request came in
        thread.after_report()
        assert edits._prepared == {}
    thread = worker._SolveThread(model, {}, False, edits)
    thread.after_report()
    assert set(edits._prepared) == {"inner"}
