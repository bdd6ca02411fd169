"""The voltage basis in the desktop program: the High voltage tab and the PDF name it.

rms to crest by sqrt 2 (common practice). Built without a main window and with a synchronous
solve, so no background job runs while the project changes.
"""

import html

import solver
from app.document import Document
from app.files.report import report_html
from app.jobs.results import compute_results
from app.panels.safety_views import HighVoltageView


def _words(text: str) -> str:
    return " ".join(html.unescape(text).split())


def test_the_high_voltage_tab_and_the_pdf_name_the_voltage_basis(qtbot):
    model = solver.load_project("sample_geometries/hv_electrode_over_earth.json").with_mesh_density("coarse")
    document = Document(model)
    tab = HighVoltageView(document)
    qtbot.addWidget(tab)
    results = compute_results(model, grid_points=0, n_field_lines=0)
    tab.show_results(results)
    assert tab.headline.text().endswith("at operating voltage.")
    assert "check again with the voltage basis set to those levels" in tab.detail.text()
    report = _words(report_html(results, "hv.json", settings_model=document.model))
    assert "voltage basis: operating voltage (crest)" in report
    # choose rms in the tab: saved in the project, and the words follow
    tab.air_box.rms_box.setChecked(True)
    tab.air_box.apply_button.click()
    assert document.model.extras["voltage_basis"] == {"basis": "operating", "potentials": "rms"}
    assert "converted to crest (x 1.414)" in tab.detail.text()
    report = _words(report_html(results, "hv.json", settings_model=document.model))
    assert "potentials entered as rms, converted to crest (x 1.414)" in report
