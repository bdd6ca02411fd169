"""The results area: one tab per kind of result. Further sections (dielectric and
transmission-line figures, hot-spot margins) register with :meth:`ResultsPanel.add_section`.

A section is any QWidget; if it has ``show_results(results)`` it is called after every
solve, and ``mark_stale(bool)`` when the drawing changes after a solve.
"""

from __future__ import annotations

from PySide6.QtWidgets import QScrollArea, QTabWidget

from app.panels.cross_check_view import CrossCheckView
from app.panels.hot_spots_view import HotSpotsView
from app.panels.line_figures_view import LineFiguresView
from app.panels.matrices_view import MatricesView
from app.panels.plots import BoundaryPlot, ProbePlot
from app.panels.safety_views import CaveatsView, HighVoltageView


class ResultsPanel(QTabWidget):
    def __init__(self, document, parent=None) -> None:
        super().__init__(parent)
        self.sections: dict[str, object] = {}
        self.numbers = self.add_section("Numbers", MatricesView(), scroll=True)
        self.boundary = self.add_section("Charge along boundary", BoundaryPlot())
        self.probe = self.add_section("Probe line", ProbePlot())
        self.high_voltage = self.add_section("High voltage", HighVoltageView(document), scroll=True)
        self.caveats = self.add_section("Limits of 2-D", CaveatsView(document), scroll=True)
        self.line_figures = self.add_section("Line figures", LineFiguresView(), scroll=True)
        self.hot_spots = self.add_section("Hot spots", HotSpotsView(document), scroll=True)
        self.cross_check = self.add_section("Cross-check", CrossCheckView(), scroll=True)

    def add_section(self, title: str, widget, *, scroll: bool = False):
        """Add a tab; returns ``widget``."""
        shown = widget
        if scroll:
            shown = QScrollArea()
            shown.setWidgetResizable(True)
            shown.setWidget(widget)
        self.addTab(shown, title)
        self.sections[title] = widget
        return widget

    def show_section(self, title: str) -> None:
        widget = self.sections[title]
        for i in range(self.count()):
            page = self.widget(i)
            if page is widget or (isinstance(page, QScrollArea) and page.widget() is widget):
                self.setCurrentIndex(i)
                return

    def show_results(self, results) -> None:
        for widget in self.sections.values():
            if hasattr(widget, "show_results"):
                widget.show_results(results)

    def mark_stale(self, stale: bool) -> None:
        for widget in self.sections.values():
            if hasattr(widget, "mark_stale"):
                widget.mark_stale(stale)
