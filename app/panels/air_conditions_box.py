"""The "Air at the site" inputs: altitude, or pressure and temperature, and Peek's surface factor.

The project has one set of air conditions (saved in the project file, read by
:func:`solver.air_conditions_of`); the High voltage and Hot spots tabs each show this box for
it. :meth:`AirConditionsBox.show_project_air` fills the inputs from the project;
:meth:`AirConditionsBox.conditions` turns the inputs into a :class:`solver.AirConditions` (as the
command line's --altitude-m / --pressure-kPa / --temperature-C / --surface-factor do) and
describes them in words; ``applied`` fires when the user presses the button (the owner then
saves them in the project). No physics here.
"""

from __future__ import annotations

from PySide6.QtCore import Signal
from PySide6.QtWidgets import QComboBox, QFormLayout, QGroupBox, QLabel, QLineEdit, QPushButton

import solver
from solver import AirConditions

KELVIN_AT_0_C = 273.15


class AirConditionsBox(QGroupBox):
    """Altitude (standard atmosphere) or measured pressure and temperature, and Peek's surface factor."""

    applied = Signal()

    def __init__(self, parent=None) -> None:
        super().__init__("Air at the site", parent)
        form = QFormLayout(self)
        self.mode = QComboBox()
        self.mode.addItems(["altitude (standard-atmosphere pressure)", "measured pressure and temperature"])
        self.altitude_edit = QLineEdit("0")
        self.pressure_edit = QLineEdit("101.325")
        self.temperature_edit = QLineEdit("20")
        self.surface_edit = QLineEdit("1")
        self.peek_form = QComboBox()
        self.peek_form.addItems(["parallel wires", "coaxial"])
        self.apply_button = QPushButton("Apply air conditions")
        self.label = QLabel()
        self.label.setWordWrap(True)
        form.addRow("air given by", self.mode)
        form.addRow("altitude above sea level (m)", self.altitude_edit)
        form.addRow("pressure (kPa)", self.pressure_edit)
        form.addRow("temperature (°C)", self.temperature_edit)
        form.addRow("Peek surface factor m (1 smooth, ~0.85 stranded)", self.surface_edit)
        form.addRow("Peek form", self.peek_form)
        form.addRow(self.apply_button)
        form.addRow(self.label)
        self.apply_button.clicked.connect(self.applied)
        self.mode.currentIndexChanged.connect(self._on_mode_changed)
        self._on_mode_changed(0)

    def _on_mode_changed(self, index: int) -> None:
        self.altitude_edit.setEnabled(index == 0)
        self.pressure_edit.setEnabled(index == 1)

    def show_project_air(self, model) -> None:
        """Fill the inputs with the project's air conditions (as saved) and describe them."""
        try:
            settings = solver.air_conditions_of(model).as_settings()
        except solver.SolverError as exc:
            self.label.setText(f"The project's air conditions cannot be used: {exc}")
            return
        for widget in (self.mode, self.peek_form):
            widget.blockSignals(True)
        self.mode.setCurrentIndex(1 if "pressure_kPa" in settings else 0)
        self._on_mode_changed(self.mode.currentIndex())
        for edit, key in ((self.altitude_edit, "altitude_m"), (self.pressure_edit, "pressure_kPa"),
                          (self.temperature_edit, "temperature_C"), (self.surface_edit, "surface_factor")):
            if key in settings:  # otherwise the input keeps what it shows (the reference atmosphere at first)
                edit.setText(f"{settings[key]:g}")
        if "altitude_m" not in settings and "pressure_kPa" not in settings:
            self.altitude_edit.setText("0")
        self.peek_form.setCurrentIndex(1 if settings.get("peek_form") == "coaxial" else 0)
        for widget in (self.mode, self.peek_form):
            widget.blockSignals(False)
        self.conditions()

    def _read(self) -> AirConditions:
        temperature_K = float(self.temperature_edit.text()) + KELVIN_AT_0_C
        surface = float(self.surface_edit.text())
        form = "coaxial" if self.peek_form.currentIndex() == 1 else "parallel_wires"
        if self.mode.currentIndex() == 1:
            return AirConditions.at_pressure(float(self.pressure_edit.text()) * 1e3, temperature_K,
                                             surface_factor=surface, peek_form=form)
        return AirConditions.at_altitude(float(self.altitude_edit.text()), temperature_K,
                                         surface_factor=surface, peek_form=form)

    def conditions(self) -> AirConditions | None:
        """The air typed in, described below the inputs; None (with the reason shown) when invalid."""
        try:
            air = self._read()
            breakdown = solver.air_breakdown_field_V_per_m(air.relative_air_density)
        except (ValueError, solver.SolverError) as exc:
            self.label.setText(f"Air conditions not applied: {exc}")
            self.label.setStyleSheet("color: #7a0000; font-weight: bold;")
            return None
        self.label.setStyleSheet("")
        self.label.setText(
            f"Relative air density δ = {air.relative_air_density:.4f} ({air.description}). Air breakdown "
            f"{breakdown / 1e6:.3g} MV/m (uniform field, in proportion to δ, common practice); corona onset of round "
            f"conductors by Peek (1929), {self.peek_form.currentText()} form, surface factor {air.surface_factor:g}.")
        return air
