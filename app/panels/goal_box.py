"""The goal-search box of the sweep dialog: a figure, a target, Find, and the value found.

Only widgets and wording; the search itself is the solver's (:func:`solver.studies.search`),
started by :class:`app.panels.sweep_dialog.SweepDialog`. The target is the program's unit-aware
entry (:class:`app.panels.quantity_edit.QuantityEdit`), read with the figure's unit ("50 ohm",
"110 pF/m", "6 ns/m", "2" for a margin), the unit shown beside it, and the outcome is written with the shared formatter: the value
found to the figures the root finder's tolerance supports, the figure with an SI prefix.
"""

from __future__ import annotations

import html
import math

from PySide6.QtWidgets import QComboBox, QFormLayout, QGroupBox, QHBoxLayout, QLabel, QPushButton

from app.figure_names import figure_label, figure_title
from app.panels.quantity_edit import QuantityEdit
from app.units import count_of, digits_for, format_measured, format_plain, keep_units
from solver import LENGTH_UNITS
from solver.studies.plot import figure_unit

#: What to show as an example target, by the figure's unit.
EXAMPLES = {"\u03a9": "50 ohm", "F/m": "110 pF/m", "V/m": "3 kV/mm", "s/m": "6 ns/m", "m": "2 mm", "": "2"}


class GoalBox(QGroupBox):
    """"Find the value that gives ...": ``figure``, ``target``, ``find_button``, ``apply_button``
    and ``result`` (a label with the outcome or the reason there is none).

    Parameters
    ----------
    length_unit : str
        The model's length unit: a bare number typed for a length figure means this unit.
    """

    def __init__(self, parent=None, length_unit: str = "m") -> None:
        super().__init__("Find the value that gives ...", parent)
        self.length_unit = length_unit
        self.figure = QComboBox()
        self.target = QuantityEdit("", "Target")  # the unit-aware entry of every other field
        self.target_unit = self.target.unit_label
        self.find_button = QPushButton("Find")
        self.apply_button = QPushButton("Use this value")
        self.apply_button.setEnabled(False)
        self.result = QLabel("Searches between the From and To values above.")
        self.result.setWordWrap(True)
        form = QFormLayout(self)
        form.addRow("Figure", self.figure)
        form.addRow("equal to", self.target.with_unit())
        buttons = QHBoxLayout()
        buttons.addWidget(self.find_button)
        buttons.addWidget(self.apply_button)
        form.addRow(buttons)
        form.addRow(self.result)
        self.figure.currentTextChanged.connect(self._on_figure_changed)
        self._on_figure_changed(self.figure.currentText())

    def add_figure(self, name: str) -> None:
        """Offer figure ``name`` (a study's figure name), shown by its plain name and unit."""
        self.figure.addItem(figure_label(name, length_unit=self.length_unit), name)

    def figure_name(self) -> str:
        """The study's name of the chosen figure ("" for none)."""
        return self.figure.currentData() or ""

    def choose_figure(self, name: str) -> None:
        """Choose figure ``name`` (a study's figure name)."""
        self.figure.setCurrentIndex(self.figure.findData(name))

    def _units(self) -> tuple[str, str | None]:
        """(SI unit of the chosen figure, unit of a bare number or None for the SI unit)."""
        unit = figure_unit(self.figure_name())
        return unit, (self.length_unit if unit == "m" else None)

    def _on_figure_changed(self, _text: str) -> None:
        unit, bare = self._units()
        self.target.unit = unit
        self.target.set_display_unit(bare or unit)  # the unit beside the field and its tooltip
        self.target.setPlaceholderText(f"e.g. {EXAMPLES.get(unit, '1')}")

    def target_si(self) -> float:
        """The target typed, in the figure's SI unit (raises :class:`solver.QuantityError`)."""
        return self.target.value_si()

    def show_found(self, found, label: str, unit: str) -> None:
        """Say what the search found: ``found`` is a SearchResult, ``label``/``unit`` the field's."""
        value = _parameter_text(found.value, found.parameter_tolerance, unit)
        tolerance = _parameter_text(found.parameter_tolerance, None, unit, digits=2)
        f_unit = figure_unit(found.figure)
        largest = max(abs(found.target), abs(found.figure_value))
        got = format_measured(found.figure_value, f_unit, largest=largest) if f_unit else format_plain(found.figure_value)
        wanted = format_measured(found.target, f_unit, largest=largest) if f_unit else format_plain(found.target)
        self.result.setText(keep_units(
            f"<b>{html.escape(label)} = {html.escape(value)}</b> gives "
            f"{html.escape(figure_title(found.figure))} = {html.escape(got)} (target {html.escape(wanted)}; "
            f"{count_of(found.n_solves, 'solve')}; root finder's tolerance {html.escape(tolerance)}, "
            "the figure's own error comes on top)."))
        self.apply_button.setEnabled(True)


def _parameter_text(value: float, tolerance: float | None, unit: str, digits: int | None = None) -> str:
    """A field value in its own unit (the model's length unit, "V" or none), to the figures
    ``tolerance`` (same unit) supports: a last figure the tolerance can change."""
    if digits is None:
        relative = tolerance / abs(value) if tolerance and value and math.isfinite(value) else None
        digits = digits_for(relative, default=6)
    if unit in LENGTH_UNITS or not unit:
        text = format_plain(value, digits)
        return f"{text} {unit}" if unit else text
    return format_measured(value, unit, digits=digits)
