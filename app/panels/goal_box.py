"""The goal-search box of the sweep dialog: a figure, a target, Find, and the value found.

Only widgets and wording; the search itself is the solver's (:func:`solver.studies.search`),
started by :class:`app.panels.sweep_dialog.SweepDialog`.
"""

from __future__ import annotations

import html

from PySide6.QtWidgets import QComboBox, QFormLayout, QGroupBox, QHBoxLayout, QLabel, QLineEdit, QPushButton

from app.panels.study_views import column_scale


class GoalBox(QGroupBox):
    """"Find the value that gives ...": ``figure``, ``target``, ``find_button``, ``apply_button``
    and ``result`` (a label with the outcome or the reason there is none)."""

    def __init__(self, parent=None) -> None:
        super().__init__("Find the value that gives ...", parent)
        self.figure = QComboBox()
        self.target = QLineEdit()
        self.target.setPlaceholderText("target, SI units (e.g. 50 for 50 ohm)")
        self.find_button = QPushButton("Find")
        self.apply_button = QPushButton("Use this value")
        self.apply_button.setEnabled(False)
        self.result = QLabel("Searches between the From and To values above.")
        self.result.setWordWrap(True)
        form = QFormLayout(self)
        form.addRow("Figure", self.figure)
        form.addRow("equal to", self.target)
        buttons = QHBoxLayout()
        buttons.addWidget(self.find_button)
        buttons.addWidget(self.apply_button)
        form.addRow(buttons)
        form.addRow(self.result)

    def show_found(self, found, label: str, unit: str) -> None:
        """Say what the search found: ``found`` is a SearchResult, ``label``/``unit`` the field's."""
        scale, figure_unit = column_scale([found.target, found.figure_value], found.figure)
        self.result.setText(
            f"<b>{html.escape(label)} = {found.value:.6g} {html.escape(unit)}</b> gives "
            f"{html.escape(found.figure)} = {found.figure_value / scale:.6g} {html.escape(figure_unit)} "
            f"(target {found.target / scale:.6g}; {found.n_solves} solves; root finder's tolerance "
            f"{found.parameter_tolerance:.2g} {html.escape(unit)}, the figure's own error comes on top).")
        self.apply_button.setEnabled(True)
