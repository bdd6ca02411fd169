"""Plots of study tables as SVG text (no plotting library needed).

:func:`table_plot_svg` draws one panel per figure, stacked, against one parameter on a shared
horizontal axis. In a grid sweep the other parameters label one curve each. Failed cases (NaN)
leave a gap in their curve. Ticks are round numbers (1, 2 or 5 times a power of ten); the
vertical axis of each panel carries the figure's unit with an SI prefix chosen from its values
("pF/m", "kV/m"). :func:`histogram_svg` draws the histograms of a tolerance spread.

Every data point is written as a ``<circle>`` with ``data-x`` and ``data-y`` attributes holding
the plotted values (SI), so that a plot can be checked against its table.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from xml.sax.saxutils import escape, quoteattr

import numpy as np

from solver.studies.table import StudyTable

#: Colour-blind-safe series colours (Okabe & Ito, "Color Universal Design", 2008).
SERIES_COLOURS = ("#0072B2", "#D55E00", "#009E73", "#CC79A7", "#E69F00", "#56B4E9", "#000000")
#: Figure-name endings and the unit they stand for.
UNIT_SUFFIXES = (("_F_per_m", "F/m"), ("_V_per_m", "V/m"), ("_s_per_m", "s/m"), ("_ohm", "\u03a9"), ("_m", "m"))
_PREFIXES = ((1e-15, "f"), (1e-12, "p"), (1e-9, "n"), (1e-6, "\u00b5"), (1e-3, "m"), (1.0, ""), (1e3, "k"),
             (1e6, "M"), (1e9, "G"))

WIDTH, PANEL_HEIGHT = 640, 220
LEFT, RIGHT, TOP, GAP, BOTTOM = 78, 30, 34, 48, 48


def figure_unit(figure: str) -> str:
    """The unit of a figure from its name ("" for dimensionless ones).

    >>> figure_unit("C_F_per_m.a.a"), figure_unit("Z0_ohm"), figure_unit("margin.bar")
    ('F/m', 'Ω', '')
    """
    word = figure.split(".")[0]
    return next((unit for suffix, unit in UNIT_SUFFIXES if word.endswith(suffix)), "")


def unit_scale(values: np.ndarray, unit: str) -> tuple[float, str]:
    """(divisor, prefixed unit) that brings the largest |value| into [1, 1000)."""
    finite = np.abs(values[np.isfinite(values)])
    if not unit or finite.size == 0 or finite.max() == 0:
        return 1.0, unit
    big = float(finite.max())
    factor, prefix = next(((f, p) for f, p in reversed(_PREFIXES) if big >= f), _PREFIXES[0])
    return factor, prefix + unit


def nice_ticks(lo: float, hi: float, count: int = 5) -> np.ndarray:
    """Round tick values (1, 2 or 5 times a power of ten) covering [lo, hi].

    >>> nice_ticks(0.13, 0.87).tolist()
    [0.0, 0.2, 0.4, 0.6000000000000001, 0.8, 1.0]
    """
    if not (math.isfinite(lo) and math.isfinite(hi)):
        return np.array([0.0, 1.0])
    if hi <= lo:
        pad = abs(lo) * 0.05 or 1.0
        lo, hi = lo - pad, hi + pad
    raw = (hi - lo) / count
    power = 10.0 ** math.floor(math.log10(raw))
    step = next(m * power for m in (1, 2, 5, 10) if m * power >= raw)
    return np.arange(math.floor(lo / step), math.ceil(hi / step) + 1) * step


def _label(value: float) -> str:
    text = f"{value:.6g}"
    return "\u2212" + text[1:] if text.startswith("-") else text


class _Axes:
    """Maps data to pixels inside one panel."""

    def __init__(self, x_ticks: np.ndarray, y_ticks: np.ndarray, top: float) -> None:
        self.x0, self.x1 = float(x_ticks[0]), float(x_ticks[-1])
        self.y0, self.y1 = float(y_ticks[0]), float(y_ticks[-1])
        self.top, self.bottom = top, top + PANEL_HEIGHT

    def px(self, x: float) -> float:
        return LEFT + (x - self.x0) / (self.x1 - self.x0) * (WIDTH - LEFT - RIGHT)

    def py(self, y: float) -> float:
        return self.bottom - (y - self.y0) / (self.y1 - self.y0) * PANEL_HEIGHT


def _frame(out: list[str], axes: _Axes, x_ticks, y_ticks, y_scale: float, title: str, x_label: str | None) -> None:
    out.append(f'<rect x="{LEFT}" y="{axes.top}" width="{WIDTH - LEFT - RIGHT}" height="{PANEL_HEIGHT}" '
               'fill="none" stroke="#444"/>')
    for t in y_ticks:
        y = axes.py(t)
        out.append(f'<line x1="{LEFT}" x2="{WIDTH - RIGHT}" y1="{y:.2f}" y2="{y:.2f}" stroke="#ddd"/>')
        out.append(f'<text x="{LEFT - 6}" y="{y + 4:.2f}" text-anchor="end">{escape(_label(t / y_scale))}</text>')
    for t in x_ticks:
        x = axes.px(t)
        out.append(f'<line x1="{x:.2f}" x2="{x:.2f}" y1="{axes.top}" y2="{axes.bottom}" stroke="#ddd"/>')
        out.append(f'<text x="{x:.2f}" y="{axes.bottom + 16}" text-anchor="middle">{escape(_label(t))}</text>')
    out.append(f'<text x="{LEFT}" y="{axes.top - 8}" font-weight="bold">{escape(title)}</text>')
    if x_label:
        out.append(f'<text x="{(LEFT + WIDTH - RIGHT) / 2}" y="{axes.bottom + 36}" text-anchor="middle">'
                   f'{escape(x_label)}</text>')


def _document(body: list[str], height: float) -> str:
    return (f'<svg xmlns="http://www.w3.org/2000/svg" width="{WIDTH}" height="{height:.0f}" '
            f'viewBox="0 0 {WIDTH} {height:.0f}" font-family="sans-serif" font-size="12" fill="#222">\n'
            f'<rect width="{WIDTH}" height="{height:.0f}" fill="white"/>\n' + "\n".join(body) + "\n</svg>\n")


def _curves(table: StudyTable, x: str) -> list[tuple[str, list[dict]]]:
    """Rows grouped by the values of the other parameters (one curve each), sorted along x."""
    others = [p for p in table.parameters if p != x]
    groups: dict[tuple, list[dict]] = {}
    for row in table.rows:
        groups.setdefault(tuple(row.get(p) for p in others), []).append(row)
    curves = []
    for key, rows in groups.items():
        name = ", ".join(f"{p.split('.')[-1] if len(others) > 1 else p} = {v:.4g}" for p, v in zip(others, key))
        curves.append((name, sorted(rows, key=lambda r: r[x])))
    return curves


def table_plot_svg(table: StudyTable, x: str | None = None, figures: Sequence[str] | None = None, *,
                   x_label: str | None = None, path=None) -> str:
    """An SVG plot of ``figures`` (default: all) against parameter ``x`` (default: the first).

    Parameters
    ----------
    table : StudyTable
    x : str, optional
        The parameter on the horizontal axis.
    figures : sequence of str, optional
        Figures to plot, one panel each.
    x_label : str, optional
        Text under the horizontal axis (default: the parameter path).
    path : str or path-like, optional
        Also write the SVG there.

    Returns
    -------
    str
        The SVG document.
    """
    if not table.parameters:
        raise ValueError("A plot needs a table with at least one parameter column.")
    x = x or table.parameters[0]
    if x not in table.parameters:
        raise ValueError(f"'{x}' is not a parameter of the table; use one of {', '.join(table.parameters)}.")
    figures = list(figures or table.figures)
    xs = np.array(table.column(x), dtype=float)
    x_ticks = nice_ticks(float(np.nanmin(xs)), float(np.nanmax(xs)))
    curves = _curves(table, x)
    body: list[str] = []
    for k, figure in enumerate(figures):
        ys = np.array(table.column(figure), dtype=float)
        scale, unit = unit_scale(ys, figure_unit(figure))
        finite = ys[np.isfinite(ys)]
        y_ticks = scale * (nice_ticks(float(finite.min()) / scale, float(finite.max()) / scale)
                           if finite.size else np.array([0.0, 1.0]))
        axes = _Axes(x_ticks, y_ticks, TOP + k * (PANEL_HEIGHT + GAP + 20))
        title = f"{figure} ({unit})" if unit else figure
        _frame(body, axes, x_ticks, y_ticks, scale, title, (x_label or x) if k == len(figures) - 1 else None)
        for c, (name, rows) in enumerate(curves):
            colour = SERIES_COLOURS[c % len(SERIES_COLOURS)]
            runs: list[list[tuple[float, float]]] = [[]]
            for row in rows:
                value = float(row.get(figure, math.nan))
                if math.isfinite(value):
                    runs[-1].append((float(row[x]), value))
                elif runs[-1]:
                    runs.append([])
            for run in runs:
                if len(run) > 1:
                    points = " ".join(f"{axes.px(a):.2f},{axes.py(b):.2f}" for a, b in run)
                    body.append(f'<polyline points="{points}" fill="none" stroke="{colour}" stroke-width="1.5"/>')
                for a, b in run:
                    body.append(f'<circle cx="{axes.px(a):.2f}" cy="{axes.py(b):.2f}" r="3" fill="{colour}" '
                                f'data-x="{float(a)!r}" data-y="{float(b)!r}" data-figure={quoteattr(figure)}/>')
            if name and k == 0:
                body.append(f'<text x="{WIDTH - RIGHT - 4}" y="{axes.top + 16 + 14 * c}" text-anchor="end" '
                            f'fill="{colour}">{escape(name)}</text>')
    svg = _document(body, TOP + len(figures) * (PANEL_HEIGHT + GAP + 20))
    if path is not None:
        with open(path, "w", encoding="utf-8") as f:
            f.write(svg)
    return svg


def histogram_svg(histograms: Mapping[str, tuple[np.ndarray, np.ndarray]], *, path=None) -> str:
    """An SVG of spread histograms: ``{figure: (counts, bin edges in SI)}``, one panel each.

    Every bar is a ``<rect>`` with ``data-count``, ``data-low`` and ``data-high`` attributes.
    """
    body: list[str] = []
    for k, (figure, (counts, edges)) in enumerate(histograms.items()):
        counts, edges = np.asarray(counts, dtype=float), np.asarray(edges, dtype=float)
        scale, unit = unit_scale(edges, figure_unit(figure))
        x_ticks = nice_ticks(float(edges[0]) / scale, float(edges[-1]) / scale)
        y_ticks = nice_ticks(0.0, float(counts.max()) if counts.size else 1.0)
        axes = _Axes(x_ticks, y_ticks, TOP + k * (PANEL_HEIGHT + GAP + 20))
        _frame(body, axes, x_ticks, y_ticks, 1.0, f"{figure}: cases per bin",
               f"{figure} ({unit})" if unit else figure)
        for n, lo, hi in zip(counts, edges[:-1], edges[1:]):
            x0, x1, y = axes.px(lo / scale), axes.px(hi / scale), axes.py(n)
            body.append(f'<rect x="{x0:.2f}" y="{y:.2f}" width="{max(x1 - x0 - 1, 0.5):.2f}" '
                        f'height="{axes.bottom - y:.2f}" fill="{SERIES_COLOURS[0]}" data-count="{int(n)}" '
                        f'data-low="{float(lo)!r}" data-high="{float(hi)!r}"/>')
    svg = _document(body, TOP + len(histograms) * (PANEL_HEIGHT + GAP + 20))
    if path is not None:
        with open(path, "w", encoding="utf-8") as f:
            f.write(svg)
    return svg
