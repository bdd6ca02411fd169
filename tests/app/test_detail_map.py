"""A finer potential map over the framed view where the parts are thin against the map's cells
(board samples), and none where they are not (the busbar)."""

import doctest

import numpy as np
import pytest
from app_helpers import wait_for_solve

import solver
from app.canvas import detail_map
from app.canvas.detail_map import CELLS_PER_PART, detail_axes
from app.files import project_files as files


def test_the_examples_in_the_module_hold():
    assert doctest.testmod(detail_map).failed == 0


@pytest.fixture
def window(qtbot, settings):
    """A main window with the program's own map (120 cells along the longer side)."""
    from app.main_window import MainWindow

    w = MainWindow(settings, n_field_lines=6)
    w.auto_solve = False
    w.show()
    qtbot.waitExposed(w)
    yield w
    w.runner.cancel()
    w.runner.wait()
    w.document.mark_saved(w.document.path or (settings.fileName() + ".json"))
    w.close()
    w.deleteLater()
    qtbot.wait(1)


def _settled(window, qtbot, sample):
    window.commands.open(files.SAMPLES_DIR / sample)
    wait_for_solve(qtbot, window)
    qtbot.waitUntil(lambda: window.results is not None and window.results.complete, timeout=60000)
    overlays = window.canvas.overlays
    qtbot.waitUntil(lambda: not overlays.detail_runner.is_busy, timeout=60000)
    return overlays


def test_a_thin_trace_gets_a_finer_map_on_the_colour_keys_levels(window, qtbot):
    overlays = _settled(window, qtbot, "microstrip_on_substrate.json")
    results = window.results
    detail = overlays._detail
    assert detail is not None
    model = results.model
    trace = model.conductor("trace").shapes[0].bounds()
    thickness_m = (trace[3] - trace[1]) * model.metres_per_unit
    step = detail.x_m[1] - detail.x_m[0]
    coarse = results.grid.x_m[1] - results.grid.x_m[0]
    assert thickness_m < CELLS_PER_PART * coarse  # the first map spans the trace with fewer than 3 cells ...
    assert step <= thickness_m / 2 and step < coarse / 2  # ... the finer one with at least two
    assert detail.x_m[0] <= trace[0] * model.metres_per_unit and detail.x_m[-1] >= trace[2] * model.metres_per_unit
    # the finer map is the solver's map of the same solution at those points (a lattice of other
    # points sums the panels by another route: agreement to a part per million of the potential)
    again = solver.evaluate_on_grid(results.solution, detail.x_m[::40], detail.y_m[::40])
    np.testing.assert_array_equal(np.isnan(again.potential_V), np.isnan(detail.potential_V[::40, ::40]))
    np.testing.assert_allclose(again.potential_V, detail.potential_V[::40, ::40], rtol=0, atol=1e-6)
    # drawn above the first map, on the same levels (one colour key)
    images = [i for i in overlays._items if type(i).__name__ == "ImageItem"]
    assert len(images) == 2 and images[1].zValue() > images[0].zValue()
    assert images[1].image.shape == detail.potential_V.shape and np.array_equal(images[0].levels, images[1].levels)


def test_the_busbar_gets_no_second_map(window, qtbot):
    overlays = _settled(window, qtbot, "busbar_enclosure.json")
    assert overlays._detail is None and overlays._detail_for is None
    assert detail_axes(window.results.model, window.results.grid.x_m, window.results.grid.y_m) is None
    assert len([i for i in overlays._items if type(i).__name__ == "ImageItem"]) == 1
