"""The results area: the summary block on top, then one button per section (all in view at
every width, wrapping onto as many rows as needed) and the section shown below them.

A section is any QWidget registered with :meth:`ResultsPanel.add_section`; if it has
``show_results(results)`` it is called after every solve, and ``mark_stale(bool)`` when the
drawing changes after a solve. Every section's text is also dimmed here, under one
"out of date" strip.
"""

from __future__ import annotations

import math

from PySide6.QtGui import QColor, QPalette
from PySide6.QtWidgets import (
    QButtonGroup,
    QGridLayout,
    QLabel,
    QScrollArea,
    QSizePolicy,
    QStackedWidget,
    QToolButton,
    QVBoxLayout,
    QWidget,
)

from app import colours
from app.panels.cross_check_view import CrossCheckView
from app.panels.hot_spots_view import HotSpotsView
from app.panels.line_figures_view import LineFiguresView
from app.panels.matrices_view import MatricesView
from app.panels.plots import BoundaryPlot, ProbePlot
from app.panels.safety_views import CaveatsView
from app.panels.summary_block import SummaryBlock

#: Earlier section titles, still accepted by :meth:`ResultsPanel.show_section`.
OLD_TITLES = {"Hot spots": "High voltage", "Charge along boundary": "Charge", "Probe line": "Probe"}

#: Narrowest button of the section row, px; the row wraps below this.
BUTTON_MIN_WIDTH = 104

STALE_TEXT = "◐ Out of date: the drawing changed after this solve. Press F5 to solve again."


def _dim(page: QWidget, stale: bool, fresh_palette: QPalette) -> None:
    """Show ``page``'s text in the out-of-date colour while its results are stale (text and
    tables only: the page stays usable and scrolls cleanly; plots dim themselves)."""
    if not stale:
        page.setPalette(fresh_palette)
        return
    palette = QPalette(fresh_palette)
    for role in (QPalette.WindowText, QPalette.Text, QPalette.ButtonText):
        palette.setColor(role, QColor(colours.STALE_TEXT))
    page.setPalette(palette)


class SectionButtons(QWidget):
    """Checkable buttons, one per section, laid out in as many rows as the width needs."""

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self.grid = QGridLayout(self)
        self.grid.setContentsMargins(0, 0, 0, 0)
        self.grid.setSpacing(2)
        self.group = QButtonGroup(self)
        self.group.setExclusive(True)
        self.buttons: list[QToolButton] = []
        self._columns = 0

    def add(self, title: str) -> QToolButton:
        button = QToolButton()
        button.setText(title)
        button.setCheckable(True)
        button.setSizePolicy(QSizePolicy.Expanding, QSizePolicy.Fixed)
        button.setToolTip(f"Show the {title} section")
        self.group.addButton(button, len(self.buttons))
        self.buttons.append(button)
        self._relayout(force=True)
        return button

    def columns_for(self, width: int) -> int:
        """How many buttons fit side by side in ``width`` px (all of them at most)."""
        n = max(len(self.buttons), 1)
        fit = max(1, width // BUTTON_MIN_WIDTH)
        rows = math.ceil(n / min(fit, n))
        return math.ceil(n / rows)  # balanced rows

    def _relayout(self, force: bool = False) -> None:
        columns = self.columns_for(max(self.width(), BUTTON_MIN_WIDTH))
        if columns == self._columns and not force:
            return
        self._columns = columns
        for b in self.buttons:
            self.grid.removeWidget(b)
        for i, b in enumerate(self.buttons):
            self.grid.addWidget(b, i // columns, i % columns)
        rows = math.ceil(len(self.buttons) / columns)
        self.setFixedHeight(rows * self.buttons[0].sizeHint().height() + (rows - 1) * self.grid.spacing())

    def resizeEvent(self, event) -> None:
        super().resizeEvent(event)
        self._relayout()

    def minimumSizeHint(self):
        hint = super().minimumSizeHint()
        hint.setWidth(BUTTON_MIN_WIDTH)
        return hint


class ResultsPanel(QWidget):
    def __init__(self, document, parent=None) -> None:
        super().__init__(parent)
        self.sections: dict[str, QWidget] = {}
        self._pages: dict[str, QWidget] = {}
        self._palettes: dict[str, QPalette] = {}
        layout = QVBoxLayout(self)
        layout.setContentsMargins(2, 2, 2, 2)
        layout.setSpacing(4)
        self.summary = SummaryBlock()
        layout.addWidget(self.summary)
        self.buttons = SectionButtons()
        layout.addWidget(self.buttons)
        self.stale_strip = QLabel(STALE_TEXT)
        self.stale_strip.setWordWrap(True)
        self.stale_strip.setStyleSheet(colours.style_sheet(colours.FRESHNESS["stale"], bold=True))
        self.stale_strip.setVisible(False)
        layout.addWidget(self.stale_strip)
        self.stack = QStackedWidget()
        layout.addWidget(self.stack, 1)
        self.buttons.group.idClicked.connect(self.stack.setCurrentIndex)
        self.stale = False

        self.numbers = self.add_section("Numbers", MatricesView(), scroll=True)
        self.hot_spots = self.add_section("High voltage", HotSpotsView(document), scroll=True)
        self.high_voltage = self.hot_spots  # one home for the high-voltage verdict
        self.line_figures = self.add_section("Line figures", LineFiguresView(), scroll=True)
        self.boundary = self.add_section("Charge", BoundaryPlot())
        self.probe = self.add_section("Probe", ProbePlot())
        self.caveats = self.add_section("Limits of 2-D", CaveatsView(document), scroll=True)
        self.cross_check = self.add_section("Cross-check", CrossCheckView(), scroll=True)
        self.hot_spots.verdict_ready.connect(lambda v: self.summary.show_verdict(v, "refined peaks"))

    def add_section(self, title: str, widget, *, scroll: bool = False):
        """Add a section with a button of its own; returns ``widget``."""
        shown = widget
        if scroll:
            shown = QScrollArea()
            shown.setWidgetResizable(True)
            shown.setWidget(widget)
        self._palettes[title] = QPalette(shown.palette())
        _dim(shown, self.stale, self._palettes[title])
        self.stack.addWidget(shown)
        button = self.buttons.add(title)
        if len(self.sections) == 0:
            button.setChecked(True)
        self.sections[title] = widget
        self._pages[title] = shown
        return widget

    def section_titles(self) -> list[str]:
        return list(self.sections)

    def current_section(self) -> str:
        page = self.stack.currentWidget()
        return next(t for t, p in self._pages.items() if p is page)

    def show_section(self, title: str) -> None:
        title = OLD_TITLES.get(title, title)
        index = self.stack.indexOf(self._pages[title])
        self.stack.setCurrentIndex(index)
        self.buttons.buttons[index].setChecked(True)

    def show_results(self, results) -> None:
        self.summary.show_results(results)
        for widget in self.sections.values():
            if hasattr(widget, "show_results"):
                widget.show_results(results)

    def show_failure(self, message: str) -> None:
        """The solve failed: sections with nothing solved to show say why, in the words of
        ``message``, as the summary's "cannot solve" does (results from before stay shown)."""
        for widget in self.sections.values():
            if hasattr(widget, "show_failure"):
                widget.show_failure(message)

    def mark_stale(self, stale: bool) -> None:
        """Dim every section and say so when the drawing changed after the solve shown."""
        self.stale = stale
        self.stale_strip.setVisible(stale)
        if self.summary.solution is not None and self.summary.state in ("fresh", "stale"):
            self.summary.set_state("stale" if stale else "fresh")
        for title, page in self._pages.items():
            _dim(page, stale, self._palettes[title])
        for widget in self.sections.values():
            if hasattr(widget, "mark_stale"):
                widget.mark_stale(stale)
