"""What a 2-D model cannot tell (the "Limits of 2-D" section), and the verdict the summary
block shows right after a solve (:func:`caution_for`).

The user's part length is kept in the model's ``extras`` and the air conditions in the
project's ``air_conditions`` (both saved with the file). The verdict and its words are the
solver's (:func:`solver.judge_solution`); no physics here.
"""

from __future__ import annotations

from PySide6.QtWidgets import QFormLayout, QLabel, QLineEdit, QVBoxLayout, QWidget

import solver
from app import cautions, edits
from app.units import format_plain, format_si

PART_LENGTH_KEY = "part_length"


def caution_for(results, model):
    """The solver's verdict (:class:`solver.CautionVerdict`) on ``results`` in the project's air.

    ``model`` is the document's model, whose air conditions apply (they are project settings,
    not part of the drawing). None before a solve.
    """
    if results is None:
        return None
    return solver.judge_solution(results.solution, solver.air_conditions_of(model), voltage_basis=solver.voltage_basis_of(model))


def _length(text: str, model) -> float:
    """A typed part length ("2 m", "150 mm", or a bare number in the model's unit) in model units."""
    value_m = solver.parse_quantity(text, "m", "part length", default_unit=model.unit)
    return float(f"{value_m / model.metres_per_unit:.12g}")


class CaveatsView(QWidget):
    """The limits of a 2-D model, and how well they fit the user's part length."""

    def __init__(self, document, parent=None) -> None:
        super().__init__(parent)
        self.document = document
        layout = QVBoxLayout(self)
        form = QFormLayout()
        self.length_edit = QLineEdit()
        self.length_edit.setPlaceholderText("length of the real part")
        self.length_label = QLabel()
        form.addRow(self.length_label, self.length_edit)
        layout.addLayout(form)
        self.verdict = QLabel()
        self.verdict.setWordWrap(True)
        self.verdict.setStyleSheet("font-weight: bold;")
        layout.addWidget(self.verdict)
        self.totals = QLabel()
        self.totals.setWordWrap(True)
        layout.addWidget(self.totals)
        self.results = None
        limits = QLabel("What a 2-D electrostatic model cannot tell:\n\n" +
                        "\n\n".join(f"•  {t}" for t in cautions.TWO_D_LIMITS))
        limits.setWordWrap(True)
        layout.addWidget(limits)
        layout.addStretch(1)
        self.length_edit.editingFinished.connect(self._on_length_edited)
        document.events.connect("model_changed", self._on_model_changed)
        self._on_model_changed(document.model)

    def _on_model_changed(self, model) -> None:
        length = model.extras.get(PART_LENGTH_KEY)
        self.length_label.setText(f"part length ({model.unit})")
        self.length_edit.blockSignals(True)
        self.length_edit.setText("" if length is None else f"{length:g}")
        self.length_edit.blockSignals(False)
        self.verdict.setText(cautions.length_text(model, length))
        self._show_totals()

    def show_results(self, results) -> None:
        self.results = results
        self._show_totals()

    def _show_totals(self) -> None:
        """Per-metre self capacitances times the part length (2-D estimate, no end effects)."""
        model, r = self.document.model, self.results
        length = model.extras.get(PART_LENGTH_KEY)
        if r is None or not length or not r.solution.has_capacitance:
            self.totals.setText("")
            return
        length_m = length * model.metres_per_unit
        c = r.solution.capacitance_maxwell_F_per_m
        parts = [f"{name}: {format_si(c[i, i] * length_m, 'F')}" for i, name in enumerate(r.solution.signal_names)]
        self.totals.setText(f"Maxwell self capacitance C'ii times the part length ({format_plain(length, 10)} {model.unit}), "
                            "a 2-D estimate without end effects: " + "; ".join(parts) + ".")

    def _on_length_edited(self) -> None:
        text = self.length_edit.text().strip()
        try:
            value = _length(text, self.document.model) if text else None
        except solver.SolverError as exc:
            self.verdict.setText(f"Not applied: {exc}")
            return
        if value is not None and value <= 0:
            self.verdict.setText(f"Not applied: '{text}' is not a positive length.")
            return
        self.document.apply(edits.set_extra(self.document.model, PART_LENGTH_KEY, value), "Set part length")
