"""SVG plots of study tables: points where the table says, gaps for failed cases, round ticks, units."""

from __future__ import annotations

import math
import xml.etree.ElementTree as ET
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from solver.studies import StudyTable
from solver.studies.command import main
from solver.studies.plot import figure_unit, histogram_svg, nice_ticks, table_plot_svg, unit_scale

ROOT = Path(__file__).resolve().parents[2]
SVG = "{http://www.w3.org/2000/svg}"


def _table(rows, parameters=("w",), figures=("C_F_per_m.a.a",)) -> StudyTable:
    full = [{"case": i, **r, "error": "" if all(math.isfinite(r[f]) for f in figures) else "failed"}
            for i, r in enumerate(rows)]
    return StudyTable(tuple(parameters), tuple(figures), tuple(full))


def _points(svg: str, figure: str) -> list[tuple[float, float, float, float]]:
    root = ET.fromstring(svg)
    return [(float(c.get("data-x")), float(c.get("data-y")), float(c.get("cx")), float(c.get("cy")))
            for c in root.iter(f"{SVG}circle") if c.get("data-figure") == figure]


def test_every_finite_row_is_plotted_at_its_value_and_in_order():
    rows = [{"w": w, "C_F_per_m.a.a": 40e-12 + 5e-12 * w} for w in (3.0, 1.0, 2.0, 4.0)]
    points = _points(table_plot_svg(_table(rows)), "C_F_per_m.a.a")
    assert sorted((x, y) for x, y, _, _ in points) == sorted((r["w"], r["C_F_per_m.a.a"]) for r in rows)
    by_x = sorted(points)
    assert all(a[2] < b[2] for a, b in zip(by_x, by_x[1:]))  # x grows to the right
    assert all(a[3] > b[3] for a, b in zip(by_x, by_x[1:]))  # larger C is drawn higher
    # the pixel positions are a linear map of the values
    xs, ys, px, py = map(np.array, zip(*by_x))
    assert np.allclose(np.polyval(np.polyfit(xs, px, 1), xs), px, atol=0.01)
    assert np.allclose(np.polyval(np.polyfit(ys, py, 1), ys), py, atol=0.01)


def test_a_failed_case_leaves_a_gap():
    rows = [{"w": w, "C_F_per_m.a.a": (math.nan if w == 3 else 1e-11 * w)} for w in (1.0, 2.0, 3.0, 4.0, 5.0)]
    root = ET.fromstring(table_plot_svg(_table(rows)))
    lines = list(root.iter(f"{SVG}polyline"))
    assert [len(p.get("points").split()) for p in lines] == [2, 2]
    assert len(list(root.iter(f"{SVG}circle"))) == 4


def test_a_grid_sweep_draws_one_labelled_curve_per_other_value():
    rows = [{"w": w, "h": h, "Z0_ohm": 50 * h / w} for h in (1.0, 1.6) for w in (1.0, 2.0, 3.0)]
    svg = table_plot_svg(_table(rows, ("w", "h"), ("Z0_ohm",)))
    root = ET.fromstring(svg)
    assert len(list(root.iter(f"{SVG}polyline"))) == 2
    texts = [t.text for t in root.iter(f"{SVG}text")]
    assert "h = 1" in texts and "h = 1.6" in texts and "Z0_ohm (\u03a9)" in texts


def test_the_vertical_axis_carries_a_prefixed_unit():
    assert unit_scale(np.array([30e-12, 90e-12]), "F/m") == (1e-12, "pF/m")
    assert unit_scale(np.array([2.5e6]), "V/m") == (1e6, "MV/m")
    assert unit_scale(np.array([1.2, 3.0]), "") == (1.0, "")
    assert figure_unit("peak_field_V_per_m.bar") == "V/m" and figure_unit("eps_eff") == ""
    svg = table_plot_svg(_table([{"w": 1.0, "C_F_per_m.a.a": 31e-12}, {"w": 2.0, "C_F_per_m.a.a": 47e-12}]))
    assert "C_F_per_m.a.a (pF/m)" in svg and ">30<" in svg and ">50<" in svg


@given(st.floats(-1e6, 1e6), st.floats(1e-6, 1e6))
def test_ticks_are_round_and_cover_the_range(lo, span):
    hi = lo + span
    ticks = nice_ticks(lo, hi)
    assert ticks[0] <= lo + 1e-9 * span and ticks[-1] >= hi - 1e-9 * span
    step = ticks[1] - ticks[0]
    scale = 10 ** math.floor(math.log10(step))
    mantissa = step / scale
    # ticks far from zero lose digits when subtracted: allow that round-off in the measured step
    cancellation = 4 * np.finfo(float).eps * max(abs(lo), abs(hi)) / scale
    assert min(abs(mantissa - m) for m in (1, 2, 5, 10)) < 1e-3 + cancellation
    assert 3 <= len(ticks) <= 13


def test_histogram_bars_hold_the_counts():
    counts, edges = np.array([1, 4, 9, 4, 2]), np.linspace(48.0, 52.0, 6)
    root = ET.fromstring(histogram_svg({"Z0_ohm": (counts, edges)}))
    bars = [r for r in root.iter(f"{SVG}rect") if r.get("data-count") is not None]
    assert [int(b.get("data-count")) for b in bars] == counts.tolist()
    heights = np.array([float(b.get("height")) for b in bars])
    np.testing.assert_allclose(heights / heights.max(), counts / counts.max(), atol=1e-3)
    np.testing.assert_allclose([float(b.get("data-low")) for b in bars], edges[:-1])


def test_the_studies_command_writes_the_plot(tmp_path, monkeypatch, capsys):
    monkeypatch.chdir(ROOT)
    out = tmp_path / "sweep.svg"
    code = main(["sweep", "sample_geometries/twin_lead.json", "--vary", "conductors.go.shapes.0.radius=0.5,0.8",
                 "--figure", "C_F_per_m.go.go", "--plot", str(out)])
    assert code == 0
    table = capsys.readouterr().out.splitlines()
    values = [float(line.split(",")[2]) for line in table[1:]]
    points = _points(out.read_text(encoding="utf-8"), "C_F_per_m.go.go")
    assert [x for x, _, _, _ in points] == [0.5, 0.8]
    assert [y for _, y, _, _ in points] == pytest.approx(values, rel=1e-12)
    assert "project unit: mm" in out.read_text(encoding="utf-8")


def test_the_spread_command_plots_its_histograms(tmp_path, monkeypatch, capsys):
    import json

    monkeypatch.chdir(ROOT)
    out = tmp_path / "spread.svg"
    code = main(["spread", "sample_geometries/twin_lead.json", "--vary", "conductors.go.shapes.0.radius=uniform:0.05",
                 "--figure", "C_F_per_m.go.go", "--cases", "6", "--bins", "3", "--plot", str(out)])
    assert code == 0
    printed = json.loads(capsys.readouterr().out)
    root = ET.fromstring(out.read_text(encoding="utf-8"))
    bars = [r for r in root.iter(f"{SVG}rect") if r.get("data-count") is not None]
    assert [int(b.get("data-count")) for b in bars] == printed["histograms"]["C_F_per_m.go.go"]["counts"]
    assert sum(int(b.get("data-count")) for b in bars) == 6
