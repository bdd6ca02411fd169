"""The "High voltage" section: refined peak fields, margins, the verdict it hands to the caution
line, the sweep and the radius."""

import csv
import io
import re

import pytest
from test_line_figures_view import wait_until

import solver
from app.jobs.results import compute_results
from solver import HIGH_VOLTAGE_CAUTION, Circle, Conductor, GroundPlane, Model, Rectangle
from solver.cli.formatting import digits_for

HV_SAMPLE = "sample_geometries/hv_electrode_over_earth.json"


def open_view(qtbot, model):
    from app.panels.hot_spots_view import HotSpotsView

    view = HotSpotsView()
    qtbot.addWidget(view)
    view.verdicts = []  # what the section hands to the summary block's caution line
    view.verdict_ready.connect(view.verdicts.append)
    view.show()
    view.show_results(compute_results(model, grid_points=0, n_field_lines=0))
    wait_until(lambda: view.margins is not None or "No hot-spot" in view.status.text())
    return view


def column(view, name: str) -> dict[str, str]:
    """Quantity -> shown text for one conductor's column of the table."""
    t = view.table
    j = [t.horizontalHeaderItem(k).text().replace("\n", " ") for k in range(t.columnCount())].index(name)
    return {t.verticalHeaderItem(i).text().replace("\n", " "): t.item(i, j).text() for i in range(t.rowCount())}


def test_hv_electrode_peak_error_and_margins(qtbot):
    view = open_view(qtbot, solver.load_project(HV_SAMPLE))
    shown = column(view, "electrode")
    assert float(shown["error (%)"]) < 1.0
    peak = view.report.for_conductor("electrode")
    # the figures the peak's error supports, at most 3 (as on the drawing and in the summary)
    digits = min(3, digits_for(peak.estimated_relative_error))
    assert digits == 3 and shown["peak |E| (kV/m)"] == f"{peak.field_V_per_m / 1e3:.{digits}g}"
    margin = view.margins.margins[0]
    assert shown["breakdown margin"] == f"{margin.air_breakdown_margin:.3g}" and margin.air_breakdown_margin > 1
    assert shown["corona margin"] == f"{margin.corona_onset_margin:.3g}" and margin.corona_onset_margin > 1
    assert shown["sharp corner"] == "no" and shown["status"] == "ample"
    assert view.verdicts[-1].status == "ample" and not view.verdicts[-1].alarming
    assert "does not determine clearances" in view.verdicts[-1].caution  # the standing statement, in the details


def test_altitude_reruns_the_assessment(qtbot):
    view = open_view(qtbot, solver.load_project(HV_SAMPLE))
    before = view.margins.margins[0].air_breakdown_margin
    view.air_box.altitude_edit.setText("2000")
    view.air_box.apply_button.click()
    after = view.margins.margins[0].air_breakdown_margin
    gap = view.margins.margins[0].gap_m

    def ratio(delta):  # uniform-field strength for the gap, Kuffel, Zaengl & Kuffel (2000)
        return solver.air_strength(gap, delta).field_V_per_m / solver.air_strength(gap, 1.0).field_V_per_m

    assert after == pytest.approx(before * ratio(solver.relative_air_density_at_altitude(2000.0)), rel=1e-12)
    assert "δ = 0.78" in view.air_box.label.text()
    box = view.air_box
    box.mode.setCurrentIndex(1)
    box.pressure_edit.setText("90")
    box.temperature_edit.setText("30")
    box.apply_button.click()
    delta = (90.0 / 101.325) * (293.15 / 303.15)
    assert abs(view.margins.margins[0].air_breakdown_margin / (before * ratio(delta)) - 1) < 1e-9
    # the same air typed with units gives the same margin
    box.pressure_edit.setText("0.9 bar")
    box.temperature_edit.setText("303.15 K")
    box.apply_button.click()
    assert abs(view.margins.margins[0].air_breakdown_margin / (before * ratio(delta)) - 1) < 1e-9
    box.mode.setCurrentIndex(0)
    box.temperature_edit.setText("20")
    box.altitude_edit.setText("2 km")
    box.apply_button.click()
    assert view.margins.margins[0].air_breakdown_margin == pytest.approx(after, rel=1e-12)
    view.air_box.altitude_edit.setText("high")
    view.air_box.apply_button.click()
    assert "not applied" in view.air_box.label.text()


def test_voltage_basis_is_chosen_in_the_box_and_said(qtbot):
    # rms to crest by sqrt 2 (common practice): every margin falls by sqrt 2, and the notes say so
    view = open_view(qtbot, solver.load_project(HV_SAMPLE))
    before = view.margins.margins[0].corona_onset_margin
    assert "at operating voltage" in view.margins.verdict.headline
    view.air_box.rms_box.setChecked(True)
    view.air_box.apply_button.click()
    assert view.margins.margins[0].corona_onset_margin == pytest.approx(before / 2**0.5, rel=1e-12)
    assert "converted to crest" in view.air_box.label.text() and "× 1.414" in view.notes.text()
    view.air_box.basis.setCurrentIndex(view.air_box.basis.findData("factor"))
    view.air_box.factor_edit.setText("0")
    view.air_box.apply_button.click()
    assert "not applied" in view.air_box.label.text()


def test_low_margin_hands_an_alarming_verdict_to_the_caution_line(qtbot):
    wire = Model(unit="mm", mesh_density="coarse", ground_plane=GroundPlane(0.0), conductors=(
        Conductor("wire", (Circle((0.0, 100.0), 5.0),), potential_V=60e3),))
    view = open_view(qtbot, wire)
    status = column(view, "wire")["status"]
    assert status in ("thin", "exceeded")
    verdict = view.verdicts[-1]
    assert verdict is view.margins.verdict and verdict.alarming and verdict.caution.endswith(HIGH_VOLTAGE_CAUTION)
    assert "'wire'" in verdict.headline


def test_sharp_corner_is_singular_and_a_radius_rounds_it(qtbot):
    bar = Model(unit="mm", mesh_density="coarse", ground_plane=GroundPlane(0.0), conductors=(
        Conductor("bar", (Rectangle((0.0, 30.0), 40.0, 10.0),), potential_V=10e3),))
    view = open_view(qtbot, bar)
    assert column(view, "bar")["sharp corner"].replace("\n", " ").startswith("yes, σ ~ r^\u22120.333")
    assert "grows with every refinement" in view.notes.text()
    assert column(view, "bar")["status"] == "not assessed" and view.verdicts[-1].alarming
    assert "No margin for 'bar'" in view.verdicts[-1].headline
    view.corner_edit.setText("2")
    view.corner_button.click()
    wait_until(lambda: view.report is not None and view.report.corner_radius_m == 0.002 and view.margins is not None
               and view.margins.margins[0].peak_field_V_per_m == view.report.hot_spots[0].field_V_per_m)
    assert column(view, "bar")["sharp corner"] == "no" and column(view, "bar")["status"] == "ample"
    assert not view.verdicts[-1].alarming


def test_typed_radii_are_kept_through_a_re_solve_of_the_same_conductor(qtbot):
    model = solver.load_project(HV_SAMPLE)
    view = open_view(qtbot, model)
    part = view.sweep_part
    offered = part.radii_edit.text()
    part.radii_edit.setText("0.01, 0.02, 0.03")
    view.show_results(compute_results(model, grid_points=0, n_field_lines=0))  # e.g. a drag step
    assert part.radii_edit.text() == "0.01, 0.02, 0.03"
    part.radii_edit.setText("")  # an empty field is offered the defaults again
    view.show_results(compute_results(model, grid_points=0, n_field_lines=0))
    assert part.radii_edit.text() == offered


def test_sweep_plots_one_point_per_radius_and_exports_csv(qtbot, tmp_path):
    view = open_view(qtbot, solver.load_project(HV_SAMPLE))
    part = view.sweep_part
    part.radii_edit.setText("0.01, 0.02, 0.03")
    part.run_sweep()
    wait_until(lambda: part.sweep is not None)
    x, y = part.curve.getData()
    assert len(x) == 3 and list(x) == [0.01, 0.02, 0.03]
    assert y[0] > y[1] > y[2]  # the peak falls as the radius grows
    assert part.table.rowCount() == 3
    assert "corner radius (m)" in part.plot.getAxis("bottom").labelText
    copied = part.table.as_text().splitlines()  # the radius is the first column; no row headings
    assert copied[0].startswith("corner radius (m)\t") and [line.split("\t")[0] for line in copied[1:]] == [
        "0.01", "0.02", "0.03"]
    path = tmp_path / "sweep.csv"
    part.write_csv(str(path))
    rows = list(csv.DictReader(io.StringIO(path.read_text())))
    assert [float(r["corner_radius_m"]) for r in rows] == [0.01, 0.02, 0.03]
    assert [float(r["peak_field_V_per_m"]) for r in rows] == [float(f"{v:.9g}") for v in part.sweep.peak_field_V_per_m]
    # one number of figures down the peak column: those the largest estimated error supports
    from app.units import digits_for, format_plain

    errors = [e for e in part.sweep.estimated_relative_error if e == e]
    digits = digits_for(max(errors) if errors else None)
    shown = [line.split("\t")[1] for line in copied[1:]]
    assert shown == [format_plain(v, digits) for v in y]


def test_equivalent_radius_of_a_regular_bundle(qtbot):
    bundle = Model(unit="mm", mesh_density="coarse", ground_plane=GroundPlane(0.0), conductors=(
        Conductor("a", (Circle((-200.0, 10000.0), 10.0),), potential_V=1e5),
        Conductor("b", (Circle((200.0, 10000.0), 10.0),), potential_V=1e5)))
    view = open_view(qtbot, bundle)
    part = view.radius_part
    assert part.checked_names() == ["a", "b"]
    part.compute()
    wait_until(lambda: part.comparison is not None)
    text = part.result.text().replace("\u00a0", " ")  # numbers and units are joined by no-break spaces
    from app.units import digits_for, format_plain

    digits = digits_for(part.comparison.estimated_relative_error)  # figures the error supports
    assert f"bundle formula (n r A^(n−1))^(1/n) gives {format_plain(4000 ** 0.5, digits)} mm" in text  # sqrt(2*10*200)
    assert f"{format_plain(part.comparison.equivalent_radius_m * 1e3, digits)} mm" in text
    assert re.search(r"differs by [+\u2212][\d.]+ %", text) and not re.search(r"\de[+-]\d", text)


def test_stale_results_are_marked(qtbot):
    from app.panels.hot_spots_view import STALE_TEXT

    view = open_view(qtbot, solver.load_project(HV_SAMPLE))
    view.mark_stale(True)
    assert view.status.text() == STALE_TEXT and not view.table.isEnabled()
    assert not view.sweep_part.run_button.isEnabled()
    view.mark_stale(False)
    assert view.status.text().startswith("Peak fields refined") and view.table.isEnabled()


def test_window_runs_the_section_when_its_tab_is_shown_and_marks_it_stale(window, qtbot):
    from app_helpers import wait_for_solve

    from app.files import project_files as files
    from app.panels.hot_spots_view import STALE_TEXT

    assert window.commands.open(files.SAMPLES_DIR / "hv_electrode_over_earth.json")
    wait_for_solve(qtbot, window)
    view = window.results_panel.hot_spots
    assert view.report is None and not view.runner.is_busy  # nothing runs while the tab is hidden
    window.results_panel.show_section("High voltage")
    wait_until(lambda: view.margins is not None)
    assert column(view, "electrode")["status"] == "ample"
    window.document.apply(window.document.model.with_potentials({"electrode": 50e3}), "Lower the potential")
    assert view.status.text() == STALE_TEXT and not view.table.isEnabled()


def test_default_radii_of_every_sample_conductor_with_corners_are_accepted():
    # the busbar's enclosure once got 4.1 ... 72 mm from its 206 mm box; its wall refused them all
    from app.files import project_files as files
    from app.panels.corner_radius_view import default_radii

    model = solver.load_project(files.SAMPLES_DIR / "busbar_enclosure.json")
    for name in ("enclosure", "L1"):
        radii = default_radii(model, name)
        assert len(radii) == 5 and radii == sorted(radii)
        for r in radii:
            solver.round_sharp_corners(model, r * model.metres_per_unit, [name], replace_radius=True)


def test_status_cells_lose_their_severity_colour_while_out_of_date(qtbot):
    # the electrode at 700 kV: "exceeded" stayed red at full strength on a dimmed, changed drawing
    from app import colours
    from app import edits as app_edits

    model = app_edits.update_conductor(solver.load_project(HV_SAMPLE).with_mesh_density("coarse"), 0,
                                       potential_V=700e3)
    view = open_view(qtbot, model)
    cell = view.table.item(view.table.rowCount() - 1, 0)
    assert cell.text() == "exceeded"
    assert cell.foreground().color().name() == colours.SEVERITY["exceeded"].text
    view.mark_stale(True)
    assert cell.foreground().color().name() == colours.STALE_TEXT
    assert cell.background().color().name() == colours.FRESHNESS["stale"].background
    view.mark_stale(False)
    assert cell.foreground().color().name() == colours.SEVERITY["exceeded"].text


def test_the_drawings_peak_label_has_the_figures_of_the_high_voltage_table(window, qtbot):
    """Once the refined peaks are in, the drawing's peak label shows the figures the table shows
    (those the peak's error estimate supports), not a fixed 3."""
    import pyqtgraph as pg
    from app_helpers import wait_for_solve

    from app.files import project_files as files

    assert window.commands.open(files.SAMPLES_DIR / "hv_electrode_over_earth.json")
    wait_for_solve(qtbot, window)
    overlays = window.canvas.overlays
    digits_seen = []
    window.results_panel.hot_spots.peak_digits_ready.connect(digits_seen.append)
    overlays.peak_digits = {}
    window.results_panel.show_section("High voltage")
    view = window.results_panel.hot_spots
    wait_until(lambda: view.report is not None and digits_seen)
    digits = min(3, digits_for(view.report.for_conductor("electrode").estimated_relative_error))
    assert overlays.peak_digits == {"electrode": digits}  # at most 3 figures, as everywhere
    labels = [i.textItem.toPlainText() for i in overlays._items if isinstance(i, pg.TextItem)]
    peak = next(t for t in labels if t.startswith("electrode: "))
    number = peak.split(": ")[1].split()[0]
    assert len(number.replace(".", "").lstrip("0").rstrip("0")) <= min(3, digits)
    overlays.set_peak_digits({"electrode": 2})
    labels = [i.textItem.toPlainText() for i in overlays._items if isinstance(i, pg.TextItem)]
    field = next(t for t in labels if t.startswith("electrode: ")).split(": ")[1].split()[0]
    expected = window.results.solution.peak_surface_fields[0].field_V_per_m
    from app.units import format_plain

    assert field in (format_plain(expected / 1e3, 2), format_plain(expected / 1e6, 2)), field  # no exponent
