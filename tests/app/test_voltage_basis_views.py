"""The voltage basis in the desktop program: the High voltage tab and the PDF name it.

rms to crest by sqrt 2 (common practice); the cable sample's 8.7 kV is an rms rating.
"""

import html

from app_helpers import wait_for_solve

from app.files import project_files as files
from app.files.report import report_html


def _words(text: str) -> str:
    return " ".join(html.unescape(text).split())


def test_the_high_voltage_tab_and_the_pdf_name_the_voltage_basis(window, qtbot):
    window.commands.open(files.SAMPLES_DIR / "hv_electrode_over_earth.json")
    wait_for_solve(qtbot, window)
    tab = window.results_panel.high_voltage
    assert tab.headline.text().endswith("at operating voltage.")
    assert "check again with the voltage basis set to those levels" in tab.detail.text()
    report = _words(report_html(window.results, "hv.json", settings_model=window.document.model))
    assert "voltage basis: operating voltage (crest)" in report
    # choose rms in the tab: saved in the project, and the words follow
    tab.air_box.rms_box.setChecked(True)
    tab.air_box.apply_button.click()
    assert window.document.model.extras["voltage_basis"] == {"basis": "operating", "potentials": "rms"}
    assert "converted to crest (x 1.414)" in tab.detail.text()
    report = _words(report_html(window.results, "hv.json", settings_model=window.document.model))
    assert "potentials entered as rms, converted to crest (x 1.414)" in report
