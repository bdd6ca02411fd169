"""Pictures written by the exports look like the screen: each SVG, drawn by QSvgRenderer, is
compared pixel by pixel with the PNG of the same view; failures reach the user in a dialog."""

import re
from pathlib import Path

import numpy as np
import pytest
from app_helpers import wait_for_solve
from PySide6.QtCore import QRectF
from PySide6.QtGui import QColor, QImage, QPainter
from PySide6.QtSvg import QSvgRenderer

from app.files import exports
from app.files import project_files as files

#: Mean difference (0-255 per channel) below which two pictures of a view count as the same; an
#: SVG at another scale than the screen, or without its curves, differs by 8-40 on these views.
SAME_PICTURE = 2.5


def _pixels(image: QImage) -> np.ndarray:
    image = image.convertToFormat(QImage.Format_RGB32)
    raw = np.frombuffer(image.constBits(), np.uint8).reshape(image.height(), image.bytesPerLine() // 4, 4)
    return raw[:, : image.width(), :3].astype(float)


def _svg_as_image(path: Path, width: int, height: int) -> QImage:
    renderer = QSvgRenderer(str(path))
    assert renderer.isValid()
    image = QImage(width, height, QImage.Format_RGB32)
    image.fill(QColor("white"))
    painter = QPainter(image)
    renderer.render(painter, QRectF(0, 0, width, height))
    painter.end()
    return image


@pytest.fixture
def solved(window, qtbot):
    window.commands.open(files.SAMPLES_DIR / "twin_lead.json")
    wait_for_solve(qtbot, window)
    window._on_probe_drawn((-9.0, 2.0), (9.0, 2.0))
    qtbot.wait(20)
    return window


def _both(window, widget, section, tmp_path):
    png, svg = tmp_path / f"{section}.png", tmp_path / f"{section}.svg"
    assert window.commands.export_picture(widget, "png", png)
    assert window.commands.export_picture(widget, "svg", svg)
    on_screen = QImage(str(png))
    assert on_screen.size() == widget.size()
    return _pixels(on_screen), _pixels(_svg_as_image(svg, on_screen.width(), on_screen.height())), svg


@pytest.mark.parametrize("section", ["probe plots", "charge plot"])
def test_plot_svg_matches_the_png(solved, section, tmp_path):
    panel = solved.results_panel
    widget = panel.probe if section == "probe plots" else panel.boundary.plot
    panel.show_section("Probe line" if section == "probe plots" else "Charge along boundary")
    png, svg, _ = _both(solved, widget, section, tmp_path)
    assert png.std() > 5  # a real picture, not an empty page
    assert np.mean(np.abs(png - svg)) < SAME_PICTURE


def test_drawing_svg_matches_the_png_and_clips_to_the_plot_area(solved, tmp_path):
    canvas = solved.canvas
    png, svg, path = _both(solved, canvas, "drawing", tmp_path)
    # QSvgRenderer ignores clip paths, so the shading beyond the plot area shows there; inside
    # the plot area (where the clip changes nothing) the SVG must match the screen.
    vb = canvas.plotItem.vb
    area = canvas.mapFromScene(vb.mapRectToScene(vb.boundingRect())).boundingRect()
    inner = (slice(area.top() + 2, area.bottom() - 2), slice(area.left() + 2, area.right() - 2))
    assert png[inner].std() > 5
    assert np.mean(np.abs(png[inner] - svg[inner])) < SAME_PICTURE
    # browsers and drawing programs clip the shading to the plot area, as on screen
    clips = [[float(v) for v in re.findall(r"[-\d.]+", d)] for d in
             re.findall(r'<clipPath id="[^"]+">\s*<path[^>]* d="([^"]+)"', path.read_text(encoding="utf-8"))]
    rects = [(min(c[0::2]), min(c[1::2]), max(c[0::2]), max(c[1::2])) for c in clips if len(c) >= 8]
    assert any(np.allclose(r, (area.left(), area.top(), area.right() + 1, area.bottom() + 1), atol=1.5)
               for r in rects), rects


def test_probe_svg_used_to_fail_and_now_writes_a_picture(solved, tmp_path):
    path = tmp_path / "probe.svg"
    assert solved.commands.export_picture(solved.results_panel.probe, "svg", path)
    assert path.stat().st_size > 10_000 and "<path" in path.read_text(encoding="utf-8")


def test_a_failing_export_says_so_and_leaves_no_file(solved, tmp_path, shown_messages, monkeypatch):
    def broken(widget, path, title="Edgewise"):
        Path(path).write_text("")
        raise TypeError("render() called with wrong argument types")

    monkeypatch.setattr(exports, "write_widget_svg", broken)
    path = tmp_path / "probe.svg"
    assert not solved.commands.export_picture(solved.results_panel.probe, "svg", path)
    assert not path.exists()
    (_, title, text, _) = shown_messages[-1]
    assert title == "Export failed" and "nothing was written" in text and "TypeError" in text
    missing = tmp_path / "no such folder" / "m.csv"
    assert not solved.commands.export_matrices_csv(missing)
    assert shown_messages[-1][1] == "Export failed" and str(missing) in shown_messages[-1][2]


def test_suggested_names_carry_the_project_and_the_section(tmp_path):
    assert exports.suggested_path(tmp_path / "busbar.json", "x", "drawing", ".svg") == tmp_path / "busbar - drawing.svg"
    assert exports.suggested_path(None, "Bar: 150 kV", "report", ".pdf").name == "Bar_ 150 kV - report.pdf"
    assert exports.suggested_path(None, "", "probe plots", ".png").name == "untitled - probe plots.png"
