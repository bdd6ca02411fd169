"""The Solve button: the program's primary action, showing the state of the results.

It sits at the end of the drawing-tools bar, in larger bold type, always filled (never white
like the tools), one width in every state, and says in the freshness colours of
:mod:`app.colours` whether the results need a solve ("▶ Solve — out of date", strongly
filled), are being computed ("… Solving", tinted) or match the drawing ("✓ Up to date",
tinted). It follows the summary block's state, so the two never disagree.
"""

from __future__ import annotations

from PySide6.QtCore import Qt
from PySide6.QtGui import QAction
from PySide6.QtWidgets import QToolButton

from app import colours

#: The button's text against the drawing tools' text.
FONT_SCALE = 1.15

#: Tooltips by state.
TIPS = {
    "none": "Solve the drawing (F5).",
    "stale": "The drawing changed after the results shown were computed: solve again (F5).",
    "solving": "Solving; Cancel solve (Ctrl+.) stops it and keeps the results from before.",
    "fresh": "The results shown belong to this drawing. Solve again (F5) to recompute them.",
    "failed": "The drawing could not be solved (the reason is above the canvas). Fix it and solve again (F5).",
}


class SolveButton(QToolButton):
    """A tool button for ``action`` (the Solve command) whose look follows :meth:`set_state`."""

    def __init__(self, action: QAction, parent=None) -> None:
        super().__init__(parent)
        self.setDefaultAction(action)
        self.setToolButtonStyle(Qt.ToolButtonTextOnly)
        self.setObjectName("solve_button")
        font = self.font()
        font.setPointSizeF(font.pointSizeF() * FONT_SCALE)  # a step above the tools beside it
        font.setBold(True)
        self.setFont(font)
        self.state = ""
        widest = 0
        for state in colours.SOLVE_BUTTON:  # one width for every state: the bar never shifts
            self.set_state(state)
            self.ensurePolished()
            widest = max(widest, self.sizeHint().width())
        self.setMinimumWidth(widest)
        self.set_state("none")

    def set_state(self, state: str) -> None:
        """Show ``state``: one of "none", "stale", "solving", "fresh", "failed"."""
        if state == self.state:
            return
        self.state = state
        self.setText(colours.SOLVE_BUTTON[state][0])
        self.setToolTip(TIPS[state])
        self.setStyleSheet(colours.solve_button_style(state))
