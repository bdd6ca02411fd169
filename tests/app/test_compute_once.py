"""The desktop program reads the window's solution: no re-solve for figures, real cancel for
background figure jobs, and no geometry rebuilt on every pointer move."""

from __future__ import annotations

import math
import threading

import scipy.linalg
from test_line_figures_view import results_of, wait_until

import solver
from app.jobs.figure_jobs import FigureJobRunner, JobProgress, wait_for_all
from solver import Circle, Conductor, Model, Ring, SolveCancelled
from solver.figures import field_lines


def coax() -> Model:
    return Model(unit="mm", mesh_density="coarse", conductors=(
        Conductor("core", (Circle((0.0, 0.0), 1.0),), role="fixed", potential_V=1.0),
        Conductor("tube", (Ring((0.0, 0.0), 3.5, 4.0),), role="reference")))


def test_line_figures_tab_uses_the_window_solution(qtbot, monkeypatch):
    from app.panels.line_figures_view import LineFiguresView

    results = results_of(coax())
    factorised = []
    original = scipy.linalg.lu_factor
    monkeypatch.setattr(scipy.linalg, "lu_factor", lambda a, *k, **kw: factorised.append(a.shape) or original(a, *k, **kw))
    view = LineFiguresView()
    qtbot.addWidget(view)
    view.show()
    view.show_results(results)
    wait_until(lambda: view.figures is not None)
    assert factorised == []  # a homogeneous model: C0 = C / eps_r, nothing solved again
    c = results.solution.capacitance_maxwell_F_per_m
    assert view.figures.capacitance_F_per_m[0, 0] == c[0, 0]


def cancellable_job(started: threading.Event, *, progress, cancel):
    """Reports progress and waits for cancel, as the solver's long calls do between stages."""
    progress(0.25, "first stage")
    started.set()
    for _ in range(2000):
        if cancel():
            raise SolveCancelled("Solve cancelled.")
        threading.Event().wait(0.005)
    return "not cancelled"


def test_cancel_stops_a_figure_job_and_reports_progress(qtbot):
    runner = FigureJobRunner()
    progress_bar = JobProgress(runner)
    qtbot.addWidget(progress_bar)
    got, progress, cancelled = [], [], []
    runner.result_ready.connect(got.append)
    runner.progress_changed.connect(lambda f, m: progress.append((f, m)))
    runner.job_cancelled.connect(lambda: cancelled.append(True))
    started = threading.Event()
    runner.start_with_progress(cancellable_job, started)
    assert started.wait(10)
    wait_until(lambda: progress != [])
    assert progress[0] == (0.25, "first stage") and not progress_bar.isHidden()
    assert progress_bar.message.text() == "first stage" and progress_bar.bar.value() == 25
    progress_bar.cancel_button.click()
    assert not runner.is_busy and cancelled == [True]
    wait_for_all(5000)  # the thread ends soon after cancel instead of running its 10 s
    qtbot.wait(50)
    assert got == [] and progress_bar.isHidden()


def test_hot_spot_job_is_cancellable(qtbot):
    solution = solver.solve(coax())
    runner = FigureJobRunner()
    outcomes = []
    runner.result_ready.connect(lambda r: outcomes.append("result"))
    runner.job_failed.connect(lambda m: outcomes.append(m))
    runner.job_cancelled.connect(lambda: outcomes.append("cancelled"))
    runner.start_with_progress(solver.analyse_hot_spots, solution, 1e-6)
    runner.cancel()
    wait_for_all(60000)
    qtbot.wait(50)
    assert outcomes == ["cancelled"]


def test_readouts_build_the_conductor_geometry_once_per_model(monkeypatch):
    solution = solver.solve(coax(), estimate_error=False)
    field_lines.conductor_outline.cache_clear()
    built = []
    original = field_lines.conductor_geometries
    monkeypatch.setattr(field_lines, "conductor_geometries", lambda *a: built.append(1) or original(*a))
    readings = [solver.evaluate_at_points(solution, [[x_m, 0.0]])[0][0] for x_m in (2e-3, 2e-3, 0.0)]
    assert len(built) == 1
    # between the coaxial cylinders phi(r) = ln(b / r) / ln(b / a) (closed form, common practice)
    assert abs(readings[0] - math.log(3.5 / 2.0) / math.log(3.5)) < 1e-3
    assert math.isnan(readings[2])  # inside the core


def test_canvas_hit_test_reuses_outlines_until_the_model_changes(window, monkeypatch):
    from app.canvas import canvas as canvas_module

    canvas = window.canvas
    window.document.replace(coax(), None)
    built = []
    original = canvas_module._outline_or_none
    monkeypatch.setattr(canvas_module, "_outline_or_none", lambda s: built.append(s) or original(s))
    hits = [canvas.part_at((x, 0.0)) for x in (0.0, 0.5, 3.7, 3.7)]
    assert len(built) == 2  # the core and the tube, once
    assert hits[0] == hits[1] and hits[0].kind == "conductor" and hits[0].index == 0
    assert hits[2].index == 1
    window.document.replace(coax().with_potentials({"core": 2.0}), None)
    before = len(built)
    canvas.part_at((0.0, 0.0))
    canvas.part_at((0.5, 0.0))
    assert len(built) - before == 2  # a new model: its outlines are built once again
