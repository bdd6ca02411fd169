"""Every export writes a file that reads back: CSV, JSON, PNG, SVG, PDF."""

import csv
import json
import xml.etree.ElementTree as ET

import numpy as np
import pytest
from app_helpers import wait_for_solve
from PySide6.QtGui import QImage

from app.files import project_files as files


@pytest.fixture
def solved(window, qtbot):
    window.commands.open(files.SAMPLES_DIR / "twin_lead.json")
    wait_for_solve(qtbot, window)
    assert window.results is not None
    return window


def test_matrices_csv_reads_back(solved, tmp_path):
    path = tmp_path / "m.csv"
    assert solved.commands.export_matrices_csv(path)
    rows = list(csv.reader(path.open()))
    names = list(solved.results.solution.signal_names)
    assert rows[0] == ["Maxwell capacitance matrix (pF/m)"] + names
    c = solved.results.solution.capacitance_maxwell_F_per_m
    assert float(rows[1][1]) == pytest.approx(c[0, 0] * 1e12, rel=1e-8)


def test_matrices_json_reads_back(solved, tmp_path):
    path = tmp_path / "m.json"
    assert solved.commands.export_matrices_json(path)
    data = json.loads(path.read_text())
    assert data["conductors"] == list(solved.results.solution.signal_names)
    assert np.allclose(data["capacitance_mutual_F_per_m"], solved.results.solution.capacitance_mutual_F_per_m, rtol=1e-12)
    assert len(data["per_conductor"]) == len(solved.results.model.conductors)


def test_drawing_png_and_svg(solved, tmp_path):
    png, svg = tmp_path / "d.png", tmp_path / "d.svg"
    assert solved.commands.export_picture(solved.canvas, "png", png)
    assert solved.commands.export_picture(solved.results_panel.boundary.plot, "svg", svg)
    image = QImage(str(png))
    assert not image.isNull() and image.width() > 100
    assert ET.parse(svg).getroot().tag.endswith("svg")


def test_probe_profile_csv(solved, tmp_path, qtbot):
    from app_helpers import drag

    probe = solved.results_panel.probe
    assert not probe.potential_plot.isVisibleTo(probe) and not probe.field_plot.isVisibleTo(probe)  # no empty axes
    solved.canvas.set_tool("probe line")
    m = solved.results.model
    drag(solved.canvas, (-0.9 * 10, 2.0), (0.9 * 10, 2.0))
    assert probe.profile is not None and probe.potential_plot.isVisibleTo(probe) and probe.field_plot.isVisibleTo(probe)
    path = tmp_path / "p.csv"
    assert solved.commands.export_profile_csv(path)
    rows = list(csv.reader(path.open()))
    assert rows[0][0] == f"distance ({m.unit})" and len(rows) == 302


def test_report_pdf(solved, tmp_path):
    path = tmp_path / "r.pdf"
    assert solved.commands.export_report(path)
    data = path.read_bytes()
    assert data.startswith(b"%PDF")
    assert data.count(b"/Type /Page") - data.count(b"/Type /Pages") == 1  # one page
