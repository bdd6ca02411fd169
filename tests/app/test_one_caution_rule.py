"""One caution rule everywhere: the caution line (solve mesh, then refined peaks), the High voltage
section, the summary rows, PDF text, command-line text
and JSON show the same status and words for one model near the threshold, in the project's air.

The model: a 100 mm (diameter) smooth wire 1 m above earth, at 1000 m altitude (saved in the
project file), at the potential that puts its peak surface field at 1/1.25 of Peek's corona
onset (F. W. Peek, Dielectric Phenomena in High-Voltage Engineering, 1929) -- between 1 and the
thin-margin line of 1.5.
"""

import html
import json

import pytest
from app_helpers import wait_for_solve
from test_line_figures_view import wait_until

import solver
from app.files.report import report_html
from solver import (
    HIGH_VOLTAGE_CAUTION,
    AirConditions,
    Circle,
    Conductor,
    GroundPlane,
    Model,
)
from solver.cli.command import main

WANTED_MARGIN = 1.25


def _words(text: str) -> str:
    return " ".join(html.unescape(text).replace("<br>", " ").split())


@pytest.fixture(scope="module")
def near_threshold():
    air = AirConditions.at_altitude(1000.0)
    model = Model(unit="mm", ground_plane=GroundPlane(0.0), mesh_density="coarse", title="Wire over earth",
                  conductors=(Conductor("wire", (Circle((0.0, 1000.0), 50.0),), potential_V=1.0),))
    peak_per_volt = solver.solve(model).peak_surface_fields[0].field_V_per_m
    onset = solver.peek_corona_onset_field_V_per_m(0.05, air.relative_air_density)
    model = model.with_potentials({"wire": round(onset / WANTED_MARGIN / peak_per_volt, -2)})
    return solver.with_air_conditions(model, air)


def test_every_view_shows_the_same_verdict(window, qtbot, tmp_path, capsys, near_threshold):
    path = tmp_path / "wire.json"
    solver.save_project(near_threshold, path)
    assert json.loads(path.read_text())["air_conditions"]["altitude_m"] == 1000.0  # saved with the project
    model = solver.load_project(path)

    # the solver's own verdict, to compare every view with
    expected = solver.judge_solution(solver.solve(model), solver.air_conditions_of(model))
    assert expected.status == "thin" and expected.verdicts[0].margin == pytest.approx(WANTED_MARGIN, rel=0.02)
    headline, caution = expected.headline, expected.caution
    assert "flashover" not in caution and caution.endswith(HIGH_VOLTAGE_CAUTION)

    window.load(model, path)
    window.solve()
    wait_for_solve(qtbot, window)

    # the caution line, right after the solve (solve mesh): one graded line, the full text in its details
    summary = window.results_panel.summary
    line = summary.caution
    assert line.isVisible() and summary.verdict_basis == "solve mesh"
    assert line.headline.text().startswith("▲  APPROACHING") and line.headline.text().endswith(headline)
    assert _words(line.details.text()) == _words(caution) and not line.details_area.isVisible()
    line.details_button.click()
    assert line.details_area.isVisible()
    rows = dict(summary.rows())
    assert "margin 1.2" in rows["Peak |E| (solve mesh)"] and rows["High voltage"].endswith(headline)

    # High voltage section (refined peaks, same rule, same air): its verdict replaces the line's
    window.results_panel.show_section("High voltage")
    spots = window.results_panel.hot_spots
    assert spots.air_box.altitude_edit.text() == "1000"
    wait_until(lambda: spots.margins is not None)
    assert spots.margins.air.relative_air_density == pytest.approx(solver.air_conditions_of(model).relative_air_density)
    assert [m.status for m in spots.margins.margins] == ["thin"]
    assert summary.verdict_basis == "refined peaks" and summary.verdict is spots.margins.verdict
    assert line.headline.text().endswith(headline) and _words(line.details.text()) == _words(caution)

    # PDF report text
    report = _words(report_html(window.results, "wire.json", settings_model=window.document.model))
    assert f"High-voltage verdict: approaching (thin margin). {_words(headline)}" in report
    assert _words(HIGH_VOLTAGE_CAUTION) in report

    # command line: text and JSON
    assert main([str(path)]) == 0
    text = _words(capsys.readouterr().out)
    assert "High-voltage verdict: approaching (thin margin) (voltage basis: operating voltage (crest))." in text and _words(caution) in text
    assert main([str(path), "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["margin_status"] == ["thin"] and data["caution_status"] == "thin"
    assert data["caution_headline"] == headline and data["high_voltage_caution"] == caution
    assert data["relative_air_density"] == pytest.approx(solver.air_conditions_of(model).relative_air_density)


def test_changing_the_air_in_one_tab_changes_it_everywhere(window, qtbot, near_threshold):
    window.load(near_threshold, None)
    window.solve()
    wait_for_solve(qtbot, window)
    assert window.results_panel.summary.caution.isVisible()
    spots = window.results_panel.hot_spots
    spots.air_box.mode.setCurrentIndex(0)
    spots.air_box.altitude_edit.setText("0")
    spots.air_box.apply_button.click()
    # sea level: denser air, higher onset: margin about 1.25 x (onset at sea level / at 1000 m) > 1.37
    assert solver.air_conditions_of(window.document.model).altitude_m == 0.0
    assert spots.air_box.altitude_edit.text() == "0"
    verdict = solver.judge_solution(window.results.solution, solver.air_conditions_of(window.document.model))
    summary = window.results_panel.summary
    assert summary.verdict.headline == verdict.headline and summary.verdict.status == verdict.status
    assert summary.caution.isVisible() and summary.caution.headline.text().endswith(verdict.headline)
    assert not window.stale_label.isVisible()  # air conditions do not outdate the solution
