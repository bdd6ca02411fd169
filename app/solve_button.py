"""The Solve button: the program's primary action, showing the state of the results.

It sits at the end of the drawing-tools bar and says, in the freshness colours of
:mod:`app.colours`, whether the results need a solve ("▶ Solve — out of date", filled),
are being computed ("… Solving") or match the drawing ("✓ Up to date", plain). It follows the
summary block's state, so the two never disagree.
"""

from __future__ import annotations

from PySide6.QtCore import Qt
from PySide6.QtGui import QAction
from PySide6.QtWidgets import QToolButton

from app import colours

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
        self.state = ""
        self.set_state("none")

    def set_state(self, state: str) -> None:
        """Show ``state``: one of "none", "stale", "solving", "fresh", "failed"."""
        if state == self.state:
            return
        self.state = state
        self.setText(colours.SOLVE_BUTTON[state][0])
        self.setToolTip(TIPS[state])
        self.setStyleSheet(colours.solve_button_style(state))
