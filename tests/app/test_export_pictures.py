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
from scipy import ndimage

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


def _compare_whole_drawing(window, tmp_path, name):
    canvas = window.canvas
    png, svg, path = _both(window, canvas, name, tmp_path)
    # The whole exported view is compared, axes and colour key included. Qt's SVG renderer (used
    # here) ignores clip paths, so the export must not rely on them: what the plot area shows is
    # cut to it in geometry (app/canvas/export_clip.py). Outside the plot area the picture holds
    # only axes, ticks and the key, and must match there too (shading or curves drawn past the
    # axes, as before the cut, fill whole bands there). The two rasterisers draw thin lines a
    # little apart (the screen's hatch pattern is aliased 1 px lines, the SVG's hatch lines are
    # smoothed over 2 px; the key's frame may land a pixel over), so both pictures are first
    # averaged over 3 x 3 pixels: that evens out such line placement, not a missing band.
    vb = canvas.plotItem.vb
    area = canvas.mapFromScene(vb.mapRectToScene(vb.boundingRect())).boundingRect()
    outside = np.ones(png.shape[:2], dtype=bool)
    outside[area.top() - 1:area.bottom() + 2, area.left() - 1:area.right() + 2] = False
    assert png.std() > 5
    smooth_png, smooth_svg = (ndimage.uniform_filter(p, size=(3, 3, 1)) for p in (png, svg))
    assert np.mean(np.abs(smooth_png - smooth_svg)) < SAME_PICTURE
    assert np.mean(np.abs(smooth_png[outside] - smooth_svg[outside])) < SAME_PICTURE
    return area, path


def test_drawing_svg_matches_the_png_over_the_whole_view(solved, tmp_path):
    area, path = _compare_whole_drawing(solved, tmp_path, "drawing")
    # browsers and drawing programs get the clip paths as well (the geometry is cut already)
    clips = [[float(v) for v in re.findall(r"[-\d.]+", d)] for d in
             re.findall(r'<clipPath id="[^"]+">\s*<path[^>]* d="([^"]+)"', path.read_text(encoding="utf-8"))]
    rects = [(min(c[0::2]), min(c[1::2]), max(c[0::2]), max(c[1::2])) for c in clips if len(c) >= 8]
    assert any(np.allclose(r, (area.left(), area.top(), area.right() + 1, area.bottom() + 1), atol=1.5)
               for r in rects), rects


def test_a_board_wider_than_the_view_exports_as_seen(window, qtbot, tmp_path):
    # the microstrip's board and its hatching run far past the framed view on both sides
    window.commands.open(files.SAMPLES_DIR / "microstrip_on_substrate.json")
    wait_for_solve(qtbot, window)
    qtbot.waitUntil(lambda: window.results.complete and not window.canvas.overlays.detail_runner.is_busy, timeout=60000)
    qtbot.wait(20)
    assert window.canvas.overlays._detail is not None  # the thin trace's finer map is exported too
    _compare_whole_drawing(window, tmp_path, "board")


def test_segments_are_cut_at_the_rectangle_as_shapely_cuts_them():
    import shapely

    from app.canvas.export_clip import clip_segments

    rng = np.random.default_rng(7)
    x0, y0, x1, y1 = rng.uniform(-2.0, 3.0, (4, 400))
    rect = (0.0, 0.0, 1.0, 1.0)
    cut = clip_segments(x0, y0, x1, y1, rect)
    expected = [shapely.LineString([(a, b), (c, d)]).intersection(shapely.box(*rect)) for a, b, c, d in zip(x0, y0, x1, y1)]
    kept = [e for e in expected if not e.is_empty and e.length > 0]
    assert len(cut[0]) == len(kept)
    for k, e in enumerate(kept):
        ends = sorted([(cut[0][k], cut[1][k]), (cut[2][k], cut[3][k])])
        np.testing.assert_allclose(ends, sorted(e.coords), atol=1e-12)


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
