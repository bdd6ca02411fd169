"""The "Line figures" section: background transmission-line figures after each solve.

Waiting: PySide6's QTest.qWait (behind qtbot.waitUntil) keeps the Python GIL while it waits, which
starves a Python worker thread; :func:`wait_until` spins a QEventLoop instead, which releases it.
"""

import math

import pytest
from PySide6.QtCore import QEventLoop, QTimer

import solver
from app.jobs.results import compute_results
from solver import Conductor, GroundPlane, Model, Rectangle

SAMPLE = "sample_geometries/microstrip_on_substrate.json"
ETA0_OHM = 376.73  # free-space wave impedance


def wait_until(condition, timeout_s: float = 60.0) -> None:
    """Run the Qt event loop until ``condition()`` holds (AssertionError after ``timeout_s``)."""
    import time

    deadline = time.monotonic() + timeout_s
    while not condition():
        assert time.monotonic() < deadline, "timed out waiting for the background job"
        loop = QEventLoop()
        QTimer.singleShot(20, loop.quit)
        loop.exec()


def results_of(model):
    return compute_results(model, grid_points=0, n_field_lines=0)


def hammerstad_jensen_thick(w: float, h: float, t: float, eps_r: float) -> tuple[float, float]:
    """Z0 (ohm) and eps_eff of a microstrip of width w and thickness t on a substrate of height h.

    E. Hammerstad and O. Jensen, "Accurate models for microstrip computer-aided design", IEEE
    MTT-S International Microwave Symposium Digest, 1980: the zero-thickness forms at the widths
    u1 = u + du1 and ur = u + dur corrected for thickness,
    du1 = (t/pi) ln(1 + 4e / (t coth^2 sqrt(6.517 u))), dur = (1 + sech sqrt(eps_r - 1)) du1 / 2
    (t normalised by h); Z0 = Z01(ur) / sqrt(eps_eff0(ur)), eps_eff = eps_eff0(ur) (Z01(u1) / Z01(ur))^2.
    """
    def z01(u):
        f = 6 + (2 * math.pi - 6) * math.exp(-((30.666 / u) ** 0.7528))
        return ETA0_OHM / (2 * math.pi) * math.log(f / u + math.sqrt(1 + 4 / u**2))

    def eps_eff0(u):
        a = 1 + math.log((u**4 + (u / 52) ** 2) / (u**4 + 0.432)) / 49 + math.log(1 + (u / 18.1) ** 3) / 18.7
        b = 0.564 * ((eps_r - 0.9) / (eps_r + 3)) ** 0.053
        return (eps_r + 1) / 2 + (eps_r - 1) / 2 * (1 + 10 / u) ** (-a * b)

    u, tn = w / h, t / h
    du1 = tn / math.pi * math.log(1 + 4 * math.e / (tn / math.tanh(math.sqrt(6.517 * u)) ** 2))
    dur = 0.5 * (1 + 1 / math.cosh(math.sqrt(eps_r - 1))) * du1
    u1, ur = u + du1, u + dur
    return z01(ur) / math.sqrt(eps_eff0(ur)), eps_eff0(ur) * (z01(u1) / z01(ur)) ** 2


def ohms(value: float, figures) -> str:
    """An impedance as shown under its heading's unit (Ω): the digits the figures' error
    estimate supports."""
    from solver.cli.formatting import digits_for

    digits = digits_for(figures.estimated_relative_error)
    assert 2 <= digits <= 6 and 1.0 <= value < 1000.0
    return f"{value:.{digits}g}"


def shown_value(view, row_name: str) -> str:
    table = view.line_table
    for i in range(table.rowCount()):
        if table.verticalHeaderItem(i).text().replace("\n", " ").startswith(row_name):  # headings may wrap
            return table.item(i, 0).text()
    raise AssertionError(f"no row {row_name!r} in {table.as_text()}")


def test_microstrip_sample_shows_its_impedance(qtbot):
    from app.panels.line_figures_view import LineFiguresView

    model = solver.load_project(SAMPLE)
    view = LineFiguresView()
    qtbot.addWidget(view)
    view.show()
    view.show_results(results_of(model))
    wait_until(lambda: view.figures is not None)
    own = solver.transmission_line_figures(model, estimate_error=True)
    assert "characteristic impedance Z₀ (Ω)" in view.line_table.as_text()  # the unit in the heading
    shown_z0 = float(shown_value(view, "characteristic impedance"))
    assert shown_value(view, "characteristic impedance") == ohms(own.characteristic_impedance_ohm, own)
    trace, board = model.conductors[0].shapes[0], model.dielectrics[0]
    z0_hj, eps_hj = hammerstad_jensen_thick(trace.width, board.shapes[0].height, trace.height, board.eps_r)
    assert abs(shown_z0 / z0_hj - 1) < 0.01
    assert abs(float(shown_value(view, "effective permittivity")) / eps_hj - 1) < 0.01
    assert "propagation delay (ns/m)" in view.line_table.as_text()
    assert float(shown_value(view, "propagation delay")) == pytest.approx(own.delay_s_per_m * 1e9, rel=1e-3)
    assert "nH/m" in view.inductance_label.text() and view.inductance.rowCount() == 1
    assert "quasi-tem" in view.note.text().lower() and "skin effect" in view.note.text()


def test_stale_figures_are_marked_and_greyed(qtbot):
    from app.panels.line_figures_view import STALE_TEXT, LineFiguresView

    view = LineFiguresView()
    qtbot.addWidget(view)
    view.show()
    view.show_results(results_of(solver.load_project(SAMPLE)))
    wait_until(lambda: view.figures is not None)
    view.mark_stale(True)
    assert view.status.text() == STALE_TEXT and not view.line_table.isEnabled()
    view.mark_stale(False)
    assert view.status.text().startswith("Line figures of 1") and view.line_table.isEnabled()


def test_no_return_path_says_so_plainly(qtbot):
    from app.panels.line_figures_view import NO_RETURN_PATH, LineFiguresView

    floating = Model(unit="mm", mesh_density="coarse", conductors=(
        Conductor("a", (Rectangle((-2.0, 0.0), 1.0, 1.0),), potential_V=1.0),
        Conductor("b", (Rectangle((2.0, 0.0), 1.0, 1.0),), potential_V=0.0)))
    view = LineFiguresView()
    qtbot.addWidget(view)
    view.show()
    view.show_results(results_of(floating))
    assert view.status.text() == NO_RETURN_PATH and not view.runner.is_busy
    assert not view.line_table.isVisible()


def test_pair_shows_even_odd_modes_and_coupling(qtbot):
    from app.panels.line_figures_view import LineFiguresView

    pair = Model(unit="mm", mesh_density="coarse", ground_plane=GroundPlane(0.0), conductors=(
        Conductor("p", (Rectangle((-1.0, 1.0), 1.0, 0.1),), potential_V=1.0),
        Conductor("n", (Rectangle((1.0, 1.0), 1.0, 0.1),), potential_V=1.0)))
    view = LineFiguresView()
    qtbot.addWidget(view)
    view.show()
    view.show_results(results_of(pair))
    wait_until(lambda: view.figures is not None)
    f = view.figures
    assert shown_value(view, "differential impedance") == ohms(f.differential_impedance_ohm, f)
    assert shown_value(view, "odd-mode impedance") == ohms(f.odd_mode_impedance_ohm, f)
    assert view.modes.columnCount() == 2 and view.coupling.rowCount() == 1
    assert float(view.coupling.item(0, 0).text()) > 0.0
    # one medium: both modes travel at one speed, so the modes shown are those of C, and the tab says so
    assert f.modes_defined and "eigenvectors of C" in view.modes_label.text()
    shown = sorted(tuple(view.modes.item(r, k).text() for r in (4, 5)) for k in range(2))  # a column per mode
    assert shown == [("1", "1"), ("1", "\u22121")]  # the modal voltages, largest +1, true minus signs


def test_window_shows_line_figures_when_the_tab_is_shown(window, qtbot):
    from app_helpers import wait_for_solve

    from app.files import project_files as files

    assert window.commands.open(files.SAMPLES_DIR / "microstrip_on_substrate.json")
    wait_for_solve(qtbot, window)
    view = window.results_panel.line_figures
    assert view.figures is None and not view.runner.is_busy  # nothing runs while the tab is hidden
    window.results_panel.show_section("Line figures")
    wait_until(lambda: view.figures is not None)
    assert shown_value(view, "characteristic impedance") == ohms(view.figures.characteristic_impedance_ohm, view.figures)


def test_a_new_solve_replaces_figures_still_being_computed(qtbot):
    from app.panels.line_figures_view import LineFiguresView

    pair = Model(unit="mm", mesh_density="coarse", ground_plane=GroundPlane(0.0), conductors=(
        Conductor("p", (Rectangle((-1.0, 1.0), 1.0, 0.1),), potential_V=1.0),
        Conductor("n", (Rectangle((1.0, 1.0), 1.0, 0.1),), potential_V=1.0)))
    view = LineFiguresView()
    qtbot.addWidget(view)
    view.show()
    view.show_results(results_of(solver.load_project(SAMPLE)))
    assert view.runner.is_busy
    view.show_results(results_of(pair))  # arrives while the microstrip figures are computed
    wait_until(lambda: view.figures is not None)
    assert view.figures.signal_names == ("p", "n") and view.line_label.text() == "Symmetric pair 'p' and 'n'"
