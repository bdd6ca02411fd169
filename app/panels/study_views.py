"""The table, the plot and the caution line of a study's results (views only; the numbers come
from the solver).

:class:`StudyTableView` shows a :class:`solver.studies.StudyTable` with a unit in each column
header (an SI prefix chosen per column from its values); failed cases show their reason.
:class:`StudyPlot` draws one figure of the table against the varied field, with the goal
search's solves, its target and the value found when there is one. :class:`CautionLine` shows
a caution as one line that opens to the whole text.
"""

from __future__ import annotations

import html
import math

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import Qt
from PySide6.QtWidgets import QComboBox, QHBoxLayout, QLabel, QTableWidget, QTableWidgetItem, QVBoxLayout, QWidget

from app import colours
from app.canvas.drawing import plot_widget
from app.figure_names import figure_label, figure_title
from solver.studies.plot import figure_unit, unit_scale


def column_scale(values, figure: str) -> tuple[float, str]:
    """(divisor, prefixed unit) of one figure column."""
    return unit_scale(np.asarray(values, dtype=float), figure_unit(figure))


def _number(value: float) -> str:
    if not math.isfinite(value):
        return "\u2013"
    text = f"{value:.5g}"
    return "\u2212" + text[1:] if text.startswith("-") else text


class StudyTableView(QTableWidget):
    """One row per case: the varied field, the figures, and the reason of a failed case."""

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self.setEditTriggers(QTableWidget.NoEditTriggers)
        self.setAlternatingRowColors(True)
        self.verticalHeader().setVisible(False)

    def show_table(self, table, parameter_label: str) -> None:
        scales = {f: column_scale(table.column(f), f) for f in table.figures}
        headers = [parameter_label] + [figure_label(f, u) for f, (_, u) in scales.items()] + ["note"]
        self.clear()
        self.setColumnCount(len(headers))
        self.setHorizontalHeaderLabels(headers)
        self.setRowCount(len(table))
        for i, row in enumerate(table.rows):
            cells = [_number(float(row[table.parameters[0]]))]
            cells += [_number(float(row[f]) / scales[f][0]) for f in table.figures]
            cells.append(row.get("error") or "")
            for j, text in enumerate(cells):
                item = QTableWidgetItem(text)
                item.setTextAlignment(Qt.AlignRight | Qt.AlignVCenter if j < len(cells) - 1 else Qt.AlignLeft)
                self.setItem(i, j, item)
        self.resizeColumnsToContents()


class StudyPlot(QWidget):
    """A figure of the study against the varied field (choose the figure above the plot)."""

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self.table = None
        self.search = None
        self.x_label = ""
        self.figure_combo = QComboBox()
        self.figure_combo.currentTextChanged.connect(lambda _: self.redraw())
        self.plot = plot_widget(grid_alpha=0.25)
        top = QHBoxLayout()
        top.addWidget(QLabel("Plot:"))
        top.addWidget(self.figure_combo, 1)
        column = QVBoxLayout(self)
        column.setContentsMargins(0, 0, 0, 0)
        column.addLayout(top)
        column.addWidget(self.plot, 1)

    def show_study(self, table, x_label: str, search=None) -> None:
        """Plot ``table`` (a sweep) and/or ``search`` (a SearchResult) against the varied field."""
        self.table, self.search, self.x_label = table, search, x_label
        names = list(dict.fromkeys([*(table.figures if table else ()), *((search.figure,) if search else ())]))
        current = self.figure_name()
        self.figure_combo.blockSignals(True)
        self.figure_combo.clear()
        for name in names:
            self.figure_combo.addItem(figure_title(name), name)
        if search is not None:
            self.choose_figure(search.figure)
        elif current in names:
            self.choose_figure(current)
        self.figure_combo.blockSignals(False)
        self.redraw()

    def figure_name(self) -> str:
        """The study's name of the figure plotted ("" for none)."""
        return self.figure_combo.currentData() or ""

    def choose_figure(self, name: str) -> None:
        """Plot figure ``name`` (a study's figure name)."""
        self.figure_combo.setCurrentIndex(self.figure_combo.findData(name))

    def curve_data(self) -> tuple[np.ndarray, np.ndarray]:
        """(x, y in the plotted unit) of the sweep curve now shown (failed cases dropped)."""
        figure = self.figure_name()
        if self.table is None or figure not in self.table.figures:
            return np.array([]), np.array([])
        x = np.array(self.table.column(self.table.parameters[0]), dtype=float)
        y = np.array(self.table.column(figure), dtype=float)
        scale, _ = self._scale(figure)
        keep = np.isfinite(y)
        order = np.argsort(x[keep])
        return x[keep][order], y[keep][order] / scale

    def _scale(self, figure: str) -> tuple[float, str]:
        values = []
        if self.table is not None and figure in self.table.figures:
            values += self.table.column(figure)
        if self.search is not None and figure == self.search.figure:
            values += [self.search.target, *self.search.evaluations.column(figure)]
        return column_scale(values, figure)

    def redraw(self) -> None:
        self.plot.clear()
        figure = self.figure_name()
        if not figure:
            return
        scale, unit = self._scale(figure)
        self.plot.setLabel("left", figure_label(figure, unit))
        self.plot.setLabel("bottom", self.x_label)
        x, y = self.curve_data()
        if len(x):
            self.plot.plot(x, y, pen=pg.mkPen(colours.PLOT_DATA, width=2), symbol="o", symbolSize=7,
                           symbolBrush=colours.PLOT_DATA, symbolPen=None, name="sweep")
        s = self.search
        if s is not None and figure == s.figure:
            ev = s.evaluations
            self.plot.plot(np.array(ev.column(s.parameter), float), np.array(ev.column(figure), float) / scale,
                           pen=None, symbol="x", symbolSize=10, symbolPen=pg.mkPen(colours.PLOT_DATA, width=2))
            target_pen = pg.mkPen(colours.PLOT_GUIDE, width=1, style=Qt.DashLine)
            self.plot.addItem(pg.InfiniteLine(s.target / scale, angle=0, pen=target_pen))
            self.plot.addItem(pg.InfiniteLine(s.value, angle=90, pen=target_pen))


class CautionLine(QLabel):
    """A caution in one line (its first three sentences) with "details" that shows the whole text."""

    def __init__(self, text: str, parent=None) -> None:
        super().__init__(parent)
        self.caution = text
        self.full = False
        self.setWordWrap(True)
        self.setTextFormat(Qt.RichText)
        self.setStyleSheet(colours.style_sheet(colours.SEVERITY["not assessed"]))
        self.setToolTip(text)
        self.linkActivated.connect(lambda _: self.set_full(not self.full))
        self.setVisible(False)
        self.set_full(False)

    def set_full(self, full: bool) -> None:
        self.full = full
        shown = self.caution if full else ". ".join(self.caution.split(". ")[:3]) + "."
        self.setText(f"\u26a0 {html.escape(shown)} <a href='toggle'>{'less' if full else 'details'}</a>")
