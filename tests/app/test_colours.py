"""One colour table (app.colours): legible text, reserved meanings, a potential map centred on 0 V,
and no colour written inline in the modules that draw results."""

import re
from pathlib import Path

import pytest

from app import colours

#: A colour written inline: a hex literal, rgb()/rgba(), QColor/mkPen/mkBrush of numbers, a tuple or
#: a name, a colour keyword argument or style-sheet property given as a literal, a Qt colour constant.
INLINE_COLOUR = re.compile(
    r"""#[0-9a-fA-F]{6}\b|#[0-9a-fA-F]{3}\b(?!\w)|(?<![.\w])rgba?\s*\("""
    r"""|QColor\(\s*(?:\d|["'])|mk(?:Pen|Brush)\(\s*(?:\(|\d|["'])"""
    r"""|(?:background|color|colour|symbolBrush|symbolPen|brush|pen)\s*=\s*["']|setBackground\(\s*["']"""
    r"""|(?:color|background(?:-color)?|border(?:-\w+)?)\s*:\s*(?:[^;{"']*\s)?[a-z]+\s*[;"']"""
    r"""|Qt\.(?:GlobalColor\.)?(?:red|green|blue|black|white|gray|darkGray|lightGray|yellow|cyan|magenta|dark[A-Z]\w*)\b""")

ROOT = Path(__file__).resolve().parents[2]


def text_pairs():
    """Every (text colour, background) the program shows text in."""
    pairs = [(colours.TEXT, colours.PAGE), (colours.TEXT_MUTED, colours.PAGE), (colours.STALE_TEXT, colours.PAGE),
             (colours.STALE_TEXT, colours.FRESHNESS["stale"].background)]
    for badge in list(colours.SEVERITY.values()) + list(colours.FRESHNESS.values()):
        pairs += [(badge.text, badge.background), (badge.text, colours.PAGE)]
    label_fill = "#{:02x}{:02x}{:02x}".format(*colours.LABEL_FILL[:3])
    pairs.append((colours.TEXT, label_fill))
    pairs.append((colours.TEXT, colours.TABLE_SELECTION))
    return pairs


@pytest.mark.parametrize("text, background", text_pairs())
def test_text_contrast_meets_wcag_minimum(text, background):
    # WCAG 2.1, success criterion 1.4.3: at least 4.5:1 for normal text
    assert colours.contrast_ratio(text, background) >= 4.5


def test_contrast_ratio_matches_known_values():
    # WCAG 2.1 definitions: black on white is 21:1; rgb(150,150,150) on white about 2.96:1
    assert colours.contrast_ratio("#000000", "#ffffff") == pytest.approx(21.0)
    assert colours.contrast_ratio("#969696", "#ffffff") == pytest.approx(2.96, abs=0.01)
    assert colours.contrast_ratio("#ffffff", "#ffffff") == pytest.approx(1.0)


def test_reserved_meanings_do_not_share_a_colour():
    severity = {b.text for b in colours.SEVERITY.values()} | {b.background for b in colours.SEVERITY.values()}
    freshness = {b.text for b in colours.FRESHNESS.values()} | {b.background for b in colours.FRESHNESS.values()}
    assert not (severity & freshness - {colours.PAGE})  # "thin" and "out of date" no longer share a colour
    assert colours.EARTH not in colours.CONDUCTOR_PALETTE and colours.INVALID not in severity
    assert colours.TABLE_SELECTION not in colours.CONDUCTOR_PALETTE + tuple(severity | freshness)
    assert len(set(colours.CONDUCTOR_PALETTE)) == len(colours.CONDUCTOR_PALETTE)
    assert [colours.conductor_colour(i) for i in range(7)][6] == colours.CONDUCTOR_PALETTE[0]
    assert colours.conductor_colour(2, "reference") == colours.EARTH


def test_potential_map_is_centred_on_zero_volts():
    neutral = colours.POTENTIAL_STOPS[len(colours.POTENTIAL_STOPS) // 2]
    positions, stops, lo, hi = colours.potential_stops(-4900.0, 9800.0)
    assert (lo, hi) == (-9800.0, 9800.0)  # symmetric, so 0 V sits at the middle
    assert stops[len(stops) // 2] == neutral and positions[len(stops) // 2] == pytest.approx(0.5)
    positions, stops, lo, hi = colours.potential_stops(0.0, 1.0)  # one sign: sequential from 0 V
    assert (lo, hi) == (0.0, 1.0) and stops[0] == neutral and stops[-1] == colours.POTENTIAL_STOPS[-1]
    positions, stops, lo, hi = colours.potential_stops(-10.0, 0.0)
    assert (lo, hi) == (-10.0, 0.0) and stops[-1] == neutral and stops[0] == colours.POTENTIAL_STOPS[0]


def app_modules():
    """Every module of the program but the colour table itself."""
    return sorted(p.relative_to(ROOT).as_posix() for p in (ROOT / "app").rglob("*.py")
                  if p != ROOT / "app" / "colours.py")


def test_the_walk_finds_the_program():
    modules = app_modules()
    assert "app/main_window.py" in modules and "app/canvas/error_marks.py" in modules and len(modules) > 40


@pytest.mark.parametrize("module", app_modules())
def test_no_inline_colours_outside_the_colour_table(module):
    source = (ROOT / module).read_text(encoding="utf-8")
    inline = [m.group(0) for m in INLINE_COLOUR.finditer(source)]
    assert inline == [], f"{module} writes colours inline (take them from app.colours): {inline}"


@pytest.mark.parametrize("line", [
    'item = shape_item(s, "#ff0000", alpha=0)', 'pen=pg.mkPen("#333", width=1.5)', "fill=pg.mkBrush(255, 235, 235)",
    'pg.PlotWidget(background="w")', 'label.setStyleSheet("color: #7a0000;")', 'image.fill(QColor("white"))',
    '"background: rgba(255, 255, 255, 225);"', 'setStyleSheet("color: red;")', "painter.setPen(Qt.darkGray)",
    'self.plot.plot(x, y, symbolBrush="b")', 'TextItem("g", color="k")', 'self.plot.setBackground("w")',
    "pg.mkPen((200, 0, 0))", "QColor(255, 0, 0)"])
def test_the_inline_colour_pattern_sees_each_way_of_writing_a_colour(line):
    assert INLINE_COLOUR.search(line)


@pytest.mark.parametrize("line", [
    "pen=pg.mkPen(colours.TEXT, width=2)", 'f"color: {colours.TEXT}; font-weight: bold;"', "# issue 11, item 4",
    'self.setStyleSheet(colours.style_sheet(badge))', 'pg.PlotWidget(background=colours.PAGE)', 'f"background: {colours.rgba(colours.HINT_FILL)};"'])
def test_the_inline_colour_pattern_passes_colours_from_the_table(line):
    assert not INLINE_COLOUR.search(line)


def test_noise_near_zero_volts_does_not_make_the_map_diverging():
    # a buried stripline's grid dips to -3.4e-5 V next to its earthed planes (solver noise at 1 V)
    positions, stops, lo, hi = colours.potential_stops(-3.4e-5, 1.0)
    assert (lo, hi) == (0.0, 1.0) and len(stops) == len(colours.POTENTIAL_STOPS) // 2 + 1
    positions, stops, lo, hi = colours.potential_stops(-0.01, 1.0)  # a real negative potential does
    assert (lo, hi) == (-1.0, 1.0)


def test_axis_text_on_the_drawing_and_the_plots_is_legible(window):
    # the axes used to be rgb(150,150,150) on white (2.96:1); every plot in the window, sections included
    import pyqtgraph as pg

    plots = [w.plotItem for w in window.findChildren(pg.PlotWidget)]
    assert window.canvas.plotItem in plots and window.results_panel.probe.field_plot.plotItem in plots
    assert len(plots) >= 5  # drawing, probe (2), corner radius, cross-check (charge rows come with results)
    for plot in plots:
        for side in ("left", "bottom"):
            text = plot.getAxis(side).textPen().color().name()
            assert colours.contrast_ratio(text, colours.PAGE) >= 4.5, (plot, side, text)
