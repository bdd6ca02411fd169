"""The summary block (the answer first), its rows for the report, the caution line's "show where",
and the charge plot's rows and clipped spikes."""

import numpy as np
import pytest
from app_helpers import wait_for_solve
from test_line_figures_view import wait_until

import solver
from app import colours, edits
from app.files import project_files as files
from app.panels.plots import SPIKE_CLIP, clip_spikes
from app.panels.summary_block import summary_rows
from app.units import format_field
from solver.cli.formatting import digits_for


def test_rows_before_a_solve_say_only_the_state():
    assert summary_rows("none") == [("Results", "not solved")]
    assert summary_rows("solving") == [("Results", "solving")]
    with pytest.raises(KeyError):
        summary_rows("sideways")


def test_microstrip_rows_give_c_z0_and_the_low_voltage_verdict(window, qtbot):
    window.commands.open(files.SAMPLES_DIR / "microstrip_on_substrate.json")
    window.solve()
    wait_for_solve(qtbot, window)
    summary = window.results_panel.summary
    wait_until(lambda: summary.line_figures is not None)
    rows = dict(summary.rows())
    sol = window.results.solution
    figures = solver.transmission_line_figures(sol)
    assert rows["Results"] == "up to date"
    # Each figure to the digits its error estimate supports (solver.cli.formatting.digits_for).
    digits_c, digits_z = digits_for(sol.estimated_relative_error), digits_for(figures.estimated_relative_error)
    assert rows["C' per metre"].startswith(f"{sol.capacitance_maxwell_F_per_m[0, 0] * 1e12:.{digits_c}g} pF/m")
    assert rows["Line"] == (f"Z0 {figures.characteristic_impedance_ohm:.{digits_z}g} Ω, "
                            f"εeff {figures.effective_permittivity:.{digits_z}g}")
    assert 2 <= digits_z <= 6
    assert rows["High voltage"].startswith("not assessed: low voltage")
    assert not summary.caution.isVisible()  # 1 V on a trace: no breakdown caution
    # the trace's peak sits at its sharp edge: a mesh value, and the row says so
    assert sol.peak_surface_fields[0].at_sharp_corner
    assert "(mesh value at a sharp corner) on 'trace'" in rows["Peak |E| (solve mesh)"]


def test_show_where_marks_the_judged_peak_and_brings_it_into_view(window, qtbot):
    window.commands.open(files.SAMPLES_DIR / "hv_electrode_over_earth.json")
    window.solve()
    wait_for_solve(qtbot, window)
    summary = window.results_panel.summary
    assert summary.caution.isVisible() and summary.verdict.status == "ample"
    assert summary.caution.headline.text().startswith(colours.SEVERITY["ample"].symbol)
    window.canvas.plotItem.vb.setRange(xRange=(10, 20), yRange=(10, 20), padding=0)  # look elsewhere
    summary.caution.where_button.click()
    peak = window.results.solution.peak_surface_fields[0]
    x, y = window.canvas.overlays._marker.getData()
    assert (x[0], y[0]) == pytest.approx(tuple(peak.location_m))  # the model is in metres
    (vx0, vx1), (vy0, vy1) = window.canvas.plotItem.vb.viewRange()
    assert vx0 < x[0] < vx1 and vy0 < y[0] < vy1


def test_solve_state_follows_the_runner(window, qtbot):
    summary = window.results_panel.summary
    window.commands.open(files.SAMPLES_DIR / "twin_lead.json")
    window._on_busy_changed(True)
    assert summary.state == "solving"
    window._on_busy_changed(False)  # cancelled before any result
    assert summary.state == "none"
    window.document.apply(edits.update_conductor(window.document.model, 0, potential_V=-1.0), "Potential")
    window._show_error("Conductors 'go' and 'return' touch", ["go"])
    assert summary.state == "failed" and dict(summary.rows())["Results"] == "cannot solve"


def test_clip_spikes_keeps_the_rest_readable():
    s = np.linspace(0.0, 1.0, 200)
    sigma = 1.0 + 0.1 * np.sin(6 * s)
    sigma[[0, 100]] = [40.0, -30.0]  # two corner spikes
    clipped, mask, limit = clip_spikes(sigma)
    assert mask.sum() == 2 and mask[0] and mask[100]
    assert limit == pytest.approx(SPIKE_CLIP * np.percentile(np.abs(sigma), 95))
    assert clipped.max() == pytest.approx(limit) and clipped.min() == pytest.approx(-limit)
    smooth = 1.0 + 0.1 * np.sin(6 * s)
    same, none, _ = clip_spikes(smooth)
    assert not none.any() and np.array_equal(same, smooth)


def test_charge_plot_has_one_row_per_conductor_in_its_colour(window, qtbot):
    window.commands.open(files.SAMPLES_DIR / "three_traces_over_ground.json")
    window.solve()
    wait_for_solve(qtbot, window)
    plot = window.results_panel.boundary
    model = window.results.model
    assert len(plot.rows) == len(model.conductors) == 3
    for k, (item, s, _y, idx) in enumerate(plot.rows):
        curve = item.listDataItems()[0]
        assert curve.opts["pen"].color().name() == colours.display_colour(model.conductors[k], k)
        assert s.min() >= 0 and np.all(window.results.solution.mesh.conductor_index[idx] == k)
        (x0, x1), _ = item.vb.viewRange()
        assert x1 - x0 < 1.2 * (s.max() - s.min()) + 1e-9  # each row spans its own boundary
    colours_used = {item.listDataItems()[0].opts["pen"].color().name() for item, *_ in plot.rows}
    assert len(colours_used) == 3
    plot.choice.setCurrentIndex(2)  # one conductor alone
    assert len(plot.rows) == 1


def test_the_peak_row_gives_the_largest_field_even_when_no_peak_is_graded():
    # three traces at 1 V: every peak "not assessed"; the row once named the first trace's 488 kV/m
    # while the middle trace carries 1.06 MV/m (and the status bar said so)
    model = solver.load_project(files.SAMPLES_DIR / "three_traces_over_ground.json").with_mesh_density("coarse")
    solution = solver.solve(model)
    verdict = solver.judge_solution(solution, solver.air_conditions_of(model))
    assert {v.status for v in verdict.verdicts} == {"not assessed"}
    largest = max(verdict.verdicts, key=lambda v: v.peak_field_V_per_m)
    assert largest.where == "'trace_mid'" and largest is not verdict.verdicts[0]
    rows = dict(summary_rows("fresh", solution, verdict))
    peak = rows["Peak |E| (solve mesh)"]
    # the traces' peaks sit at their sharp edges: mesh values, and the row says so
    assert largest.at_sharp_corner
    assert peak.startswith(f"{format_field(largest.peak_field_V_per_m)} (mesh value at a sharp corner) on 'trace_mid', "
                           "no margin, not assessed")
    assert "deciding" not in peak  # one peak, named once


def test_after_a_failed_solve_the_sections_say_why_as_the_summary_does(window, qtbot):
    """A failed first solve: the summary says "cannot solve", and the sections no longer say
    "Not solved yet" but give the reason; editing the drawing keeps the reason shown."""
    window.commands.open(files.SAMPLES_DIR / "twin_lead.json")
    window._on_solve_failed("Conductors 'go' and 'return' touch; move them apart")
    assert window.results_panel.summary.state == "failed"
    panel = window.results_panel
    for status in (panel.numbers.status, panel.hot_spots.status, panel.line_figures.status):
        assert status.text().startswith("Cannot solve: Conductors 'go' and 'return' touch; move them apart")
        assert "Not solved yet" not in status.text()
    panel.mark_stale(False)  # an edit without results: nothing out of date, the reason stays
    assert panel.numbers.status.text().startswith("Cannot solve:")
    assert panel.line_figures.status.text().startswith("Cannot solve:")
