"""The voltage basis in the desktop program: the air box saves it, the caution line and the PDF
name it.

rms to crest by sqrt 2 (common practice). Built without a main window and with a synchronous
solve, so no background job runs while the project changes.
"""

import html

import solver
from app.cautions import caution_body
from app.document import Document
from app.files.report import report_html
from app.jobs.results import compute_results
from app.panels.air_conditions_box import AirConditionsBox
from app.panels.safety_views import caution_for
from app.panels.summary_block import CautionLine


def _words(text: str) -> str:
    return " ".join(html.unescape(text).split())


def test_the_caution_line_and_the_pdf_name_the_voltage_basis(qtbot):
    model = solver.load_project("sample_geometries/hv_electrode_over_earth.json").with_mesh_density("coarse")
    document = Document(model)
    results = compute_results(model, grid_points=0, n_field_lines=0)
    line = CautionLine()
    qtbot.addWidget(line)
    verdict = caution_for(results, document.model)
    line.show_verdict(verdict)
    assert verdict.headline.endswith("at operating voltage.") and line.headline.text().endswith(verdict.headline)
    assert "check again with the voltage basis set to those levels" in _words(caution_body(verdict))
    report = _words(report_html(results, "hv.json", settings_model=document.model))
    assert "Voltage basis: operating voltage (crest)" in report
    # choose rms in the air box: saved in the project, and the words follow
    box = AirConditionsBox()
    qtbot.addWidget(box)
    box.show_project_air(document.model)
    box.rms_box.setChecked(True)
    document.apply(box.applied_to(document.model), "Set air conditions and voltage basis")
    assert document.model.extras["voltage_basis"] == {"basis": "operating", "potentials": "rms"}
    assert "converted to crest (x 1.414)" in _words(caution_body(caution_for(results, document.model)))
    report = _words(report_html(results, "hv.json", settings_model=document.model))
    assert "potentials entered as rms, converted to crest (x 1.414)" in report
