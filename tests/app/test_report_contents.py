"""The PDF report: traceable to its project file, with refined margins, insulation stress and air,
and a drawing without the selection handles or the probe line."""

import hashlib
import shutil

import numpy as np
from app_helpers import wait_for_solve
from test_export_pictures import _pixels

import solver
from app.document import PartRef
from app.files import project_files as files
from app.files.report import drawing_for_report, report_html
from app.help_menu import program_version


def test_report_names_version_date_and_the_hash_of_the_project_file(window, qtbot, tmp_path):
    project = tmp_path / "cable.json"
    shutil.copy(files.SAMPLES_DIR / "two_layer_coax_cable.json", project)
    window.commands.open(project)
    wait_for_solve(qtbot, window)
    text = report_html(window.results, project.name, settings_model=window.document.model,
                       project_path=window.document.path, modified=window.document.is_modified)
    assert f"Edgewise {program_version()}" in text
    assert f"SHA-256 {hashlib.sha256(project.read_bytes()).hexdigest()}" in text
    assert "unsaved changes" not in text
    assert "Insulation stress" in text and "inner insulation" in text  # the largest field in each layer
    assert "Air conditions:" in text and "Voltage basis:" in text
    assert "Refined margins:</b> not computed" in text
    assert "e+0" not in text and "e-0" not in text  # no exponents in the figures


def test_report_carries_the_refined_margins_when_computed(window, qtbot):
    window.commands.open(files.SAMPLES_DIR / "hv_electrode_over_earth.json")
    wait_for_solve(qtbot, window)
    r = window.results
    spots = solver.analyse_hot_spots(r.solution, 0.01)
    air = solver.air_conditions_of(window.document.model)
    margins = solver.assess_margins(spots.solved_model, spots.hot_spots, air, solver.THIN_MARGIN, spots.air_region,
                                    solver.solution_potential_difference_V(spots.solution))
    text = report_html(r, "hv.json", settings_model=window.document.model, margins=margins)
    assert "Refined margins</b> (peak fields refined to 1 %" in text
    for m in margins.margins:
        assert f"<td>{m.conductor}</td>" in text and f"<td>{m.status}</td>" in text


def test_report_drawing_leaves_out_handles_and_probe(window, qtbot):
    window.commands.open(files.SAMPLES_DIR / "twin_lead.json")
    wait_for_solve(qtbot, window)
    canvas = window.canvas
    canvas.clear_probe()
    window.document.select(PartRef("conductor", 0, 0))
    qtbot.wait(10)
    canvas._handles.setVisible(False)
    clean = _pixels(canvas.grab().toImage())  # the selected part, without its handles
    canvas._handles.setVisible(True)
    canvas.show_probe((-9.0, 2.0), (9.0, 2.0))
    qtbot.wait(10)
    marked = _pixels(canvas.grab().toImage())
    assert np.mean(np.abs(marked - clean)) > 0.05  # the handles and probe line are on screen
    assert np.array_equal(_pixels(drawing_for_report(canvas)), clean)  # and not in the report
    assert np.array_equal(_pixels(canvas.grab().toImage()), marked)  # and back on screen after


def test_a_tall_drawing_does_not_fill_the_page():
    from app.files.report import drawing_width

    assert drawing_width(None) == drawing_width(0.5) == 640  # a wide drawing keeps the page width
    assert drawing_width(1.5) * 1.5 <= 440  # a tall one is narrowed to keep room for the figures
