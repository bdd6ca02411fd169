"""The two reading-aid tabs: what a 2-D model cannot tell, and the high-voltage caution.

The user's part length and air density are kept in the model's ``extras`` (saved with the
file). The words come from :mod:`app.cautions`, the same text as SAFETY.md.
"""

from __future__ import annotations

from PySide6.QtCore import Signal
from PySide6.QtWidgets import QFormLayout, QLabel, QLineEdit, QVBoxLayout, QWidget

from solver import SolverError

from . import cautions, edits
from .units import format_si

PART_LENGTH_KEY = "part_length"
AIR_DENSITY_KEY = "relative_air_density"
ALTITUDE_KEY = "altitude_m"


def medium_eps_r(solution, panel: int) -> float:
    """Relative permittivity of the medium next to a conductor panel (as the solution reports it)."""
    per_panel = getattr(solution, "conductor_eps_r_plus", None)
    if per_panel is not None and len(per_panel) == solution.mesh.n_panels:
        return float(per_panel[panel])
    return float(solution.model.background_eps_r)


def worst_peak(results, *, in_air: bool | None = None):
    """The PeakField with the largest surface field (only those in air, or not, if asked), or None."""
    peaks = results.solution.peak_surface_fields if results is not None else ()
    if in_air is not None:
        peaks = [p for p in peaks if (medium_eps_r(results.solution, p.panel_index) <= 1.001) == in_air]
    return max(peaks, key=lambda p: p.field_V_per_m) if peaks else None


def caution_for(results, model) -> cautions.Caution | None:
    """The caution for the largest peak field in air of ``results`` at the model's air density.

    When every peak sits in insulation, a note says that the strength of air does not apply.
    """
    if worst_peak(results) is None:
        return None
    peak = worst_peak(results, in_air=True)
    if peak is None:
        inner = worst_peak(results)
        return cautions.insulation_note(inner.field_V_per_m, medium_eps_r(results.solution, inner.panel_index),
                                        inner.conductor)
    density = float(model.extras.get(AIR_DENSITY_KEY, 1.0) or 1.0)
    return cautions.field_caution(peak.field_V_per_m, density, peak.at_sharp_corner, peak.conductor)


def _number(text: str) -> float | None:
    try:
        return float(text)
    except ValueError:
        return None


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
        self.verdict.setText(cautions.length_caveat(length, model.largest_dimension(), model.unit))
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
        self.totals.setText(f"Maxwell self capacitance C'ii times the part length ({length:g} {model.unit}), "
                            "a 2-D estimate without end effects: " + "; ".join(parts) + ".")

    def _on_length_edited(self) -> None:
        text = self.length_edit.text().strip()
        value = _number(text) if text else None
        if text and (value is None or value <= 0):
            self.verdict.setText(f"Not applied: '{text}' is not a positive length.")
            return
        self.document.apply(edits.set_extra(self.document.model, PART_LENGTH_KEY, value), "Set part length")


class HighVoltageView(QWidget):
    """Peak surface field against the breakdown strength of air, with the standing statement."""

    air_density_changed = Signal(float)

    def __init__(self, document, parent=None) -> None:
        super().__init__(parent)
        self.document = document
        self.results = None
        layout = QVBoxLayout(self)
        form = QFormLayout()
        self.altitude_edit = QLineEdit()
        self.altitude_edit.setPlaceholderText("e.g. 1500")
        self.density_edit = QLineEdit()
        form.addRow("site altitude above sea level (m), air at 20 °C", self.altitude_edit)
        form.addRow("relative air density (1 = sea level, 20 °C)", self.density_edit)
        layout.addLayout(form)
        self.headline = QLabel()
        self.headline.setWordWrap(True)
        self.detail = QLabel()
        self.detail.setWordWrap(True)
        layout.addWidget(self.headline)
        layout.addWidget(self.detail)
        self.statement = QLabel(cautions.STANDING_STATEMENT)
        self.statement.setWordWrap(True)
        self.statement.setStyleSheet("border: 1px solid #8a6d00; background: #fff7d6; padding: 6px;")
        layout.addWidget(self.statement)
        layout.addStretch(1)
        self.altitude_edit.editingFinished.connect(self._on_altitude_edited)
        self.density_edit.editingFinished.connect(self._on_density_edited)
        document.events.connect("model_changed", self._on_model_changed)
        self._on_model_changed(document.model)

    def _on_model_changed(self, model) -> None:
        for edit, key, default in ((self.altitude_edit, ALTITUDE_KEY, None), (self.density_edit, AIR_DENSITY_KEY, 1.0)):
            value = model.extras.get(key, default)
            edit.blockSignals(True)
            edit.setText("" if value is None else f"{value:.4g}")
            edit.blockSignals(False)
        self._refresh()

    def show_results(self, results) -> None:
        self.results = results
        self._refresh()

    def _refresh(self) -> None:
        caution = caution_for(self.results, self.document.model)
        if caution is None:
            self.headline.setText("Solve to compare the peak surface field with the strength of air.")
            self.detail.setText("")
            return
        colour = {"exceeded": "#b00000", "approaching": "#9a5b00", "none": "#1e6b30"}[caution.level]
        self.headline.setText(caution.headline)
        self.headline.setStyleSheet(f"color: {colour}; font-weight: bold; font-size: 13pt;")
        self.detail.setText(caution.detail.replace(cautions.STANDING_STATEMENT, "").strip())

    def _on_altitude_edited(self) -> None:
        text = self.altitude_edit.text().strip()
        altitude = _number(text) if text else None
        if text and altitude is None:
            self.detail.setText(f"Not applied: '{text}' is not a number of metres.")
            return
        model = edits.set_extra(self.document.model, ALTITUDE_KEY, altitude)
        if altitude is not None:
            try:
                density = cautions.relative_air_density_at(altitude)
            except SolverError as exc:
                self.detail.setText(f"Not applied: {exc}")
                return
            model = edits.set_extra(model, AIR_DENSITY_KEY, round(density, 4))
        self.document.apply(model, "Set site altitude")

    def _on_density_edited(self) -> None:
        value = _number(self.density_edit.text())
        if value is None or not 0 < value <= 1.5:
            self.detail.setText(f"Not applied: relative air density '{self.density_edit.text()}' must lie in (0, 1.5].")
            return
        self.document.apply(edits.set_extra(self.document.model, AIR_DENSITY_KEY, value), "Set air density")
