"""The "Air at the site" inputs: altitude, or pressure and temperature, Peek's surface factor,
and the voltage basis of the check (what the potentials stand for; :class:`solver.VoltageBasis`).

The project has one set of air conditions (saved in the project file, read by
:func:`solver.air_conditions_of`); the High voltage and Hot spots tabs each show this box for
it. :meth:`AirConditionsBox.show_project_air` fills the inputs from the project;
:meth:`AirConditionsBox.conditions` turns the inputs (values with units: "3 km", "95 kPa", "293 K") into a :class:`solver.AirConditions` (as the
command line's --altitude-m / --pressure-kPa / --temperature-C / --surface-factor do) and
describes them in words; :meth:`AirConditionsBox.voltage_basis` does the same for the basis and
:meth:`AirConditionsBox.applied_to` gives the model carrying both; ``applied`` fires when the
user presses the button (the owner then saves them in the project). No physics here.
"""

from __future__ import annotations

from PySide6.QtCore import Signal
from PySide6.QtWidgets import QCheckBox, QComboBox, QFormLayout, QGroupBox, QLabel, QPushButton, QVBoxLayout

import solver
from app import colours
from app.panels.quantity_edit import QuantityEdit
from app.units import format_measured, format_plain
from solver import AirConditions, VoltageBasis


def _edit(text: str, unit: str, field: str, display_unit: str) -> QuantityEdit:
    """A field that takes a value with a unit ("3 km", "95 kPa", "293 K"), showing ``display_unit``."""
    edit = QuantityEdit(unit, field, display_unit)
    edit.setText(text)
    return edit


class AirConditionsBox(QGroupBox):
    """Altitude (standard atmosphere) or measured pressure and temperature, and Peek's surface factor."""

    applied = Signal()

    def __init__(self, parent=None) -> None:
        super().__init__("Air at the site", parent)
        outer = QVBoxLayout(self)
        form = QFormLayout()
        outer.addLayout(form)
        form.setRowWrapPolicy(QFormLayout.WrapLongRows)  # labels above their fields in a narrow panel
        self.mode = QComboBox()
        self.mode.addItems(["altitude (standard atmosphere)", "measured pressure, temperature"])
        self.mode.setToolTip("Altitude: the pressure of the standard atmosphere at that height, at the "
                             "temperature given. Measured: the pressure and temperature at the site.")
        self.altitude_edit = _edit("0", "m", "altitude above sea level", "m")
        self.pressure_edit = _edit("101.325", "Pa", "pressure", "kPa")
        self.temperature_edit = _edit("20", "K", "temperature", "°C")
        self.surface_edit = _edit("1", "", "Peek surface factor", "")
        self.peek_form = QComboBox()
        self.peek_form.addItems(["parallel wires", "coaxial"])
        self.basis = QComboBox()
        for key, name in solver.VOLTAGE_BASES.items():
            self.basis.addItem(name, key)
        self.factor_edit = _edit("1", "", "overvoltage factor", "")
        self.rms_box = QCheckBox("potentials are rms values")
        self.rms_box.setToolTip("Potentials typed as rms values are converted to crest (√2 × rms, a sine wave) for the check.")
        self.apply_button = QPushButton("Apply air conditions and voltage basis")
        for combo in (self.mode, self.peek_form, self.basis):  # long entries do not widen the panel
            combo.setSizeAdjustPolicy(QComboBox.AdjustToMinimumContentsLengthWithIcon)
            combo.setMinimumContentsLength(14)
        self.label = QLabel()
        self.label.setWordWrap(True)
        form.addRow("air given by", self.mode)
        form.addRow("altitude above sea level", self.altitude_edit.with_unit())
        form.addRow("pressure", self.pressure_edit.with_unit())
        form.addRow("temperature", self.temperature_edit.with_unit())
        form.addRow("Peek surface factor m", self.surface_edit.with_unit())
        self.surface_edit.setToolTip("Peek's surface factor m: 1 for a smooth surface, about 0.85 for a stranded "
                                     "conductor (common practice).")
        form.addRow("Peek form", self.peek_form)
        form.addRow("potentials stand for", self.basis)
        form.addRow("overvoltage factor", self.factor_edit.with_unit())
        form.addRow(self.rms_box)
        form.addRow(self.apply_button)
        # below the form, not in it: a form row gave the wrapped note less height than it needs
        # (its last lines were cut off at 1366 x 768); a box layout asks the label's height for its width
        outer.addWidget(self.label)
        self.apply_button.clicked.connect(self.applied)
        self.mode.currentIndexChanged.connect(self._on_mode_changed)
        self.basis.currentIndexChanged.connect(self._on_basis_changed)
        self._on_mode_changed(0)
        self._on_basis_changed(0)

    def _on_mode_changed(self, index: int) -> None:
        self.altitude_edit.setEnabled(index == 0)
        self.pressure_edit.setEnabled(index == 1)

    def _on_basis_changed(self, _index: int) -> None:
        self.factor_edit.setEnabled(self.basis.currentData() == "factor")

    def show_project_air(self, model) -> None:
        """Fill the inputs with the project's air conditions and voltage basis (as saved) and describe them."""
        try:
            settings = solver.air_conditions_of(model).as_settings()
            basis = solver.voltage_basis_of(model)
        except solver.SolverError as exc:
            self.label.setText(f"The project's air conditions cannot be used: {exc}")
            return
        self.basis.blockSignals(True)
        self.basis.setCurrentIndex(max(0, self.basis.findData(basis.basis)))
        self.basis.blockSignals(False)
        self._on_basis_changed(self.basis.currentIndex())
        self.factor_edit.setText(f"{basis.factor:g}")
        self.rms_box.setChecked(basis.potentials == "rms")
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
        temperature_K = self.temperature_edit.value_si()
        surface = self.surface_edit.value_si()
        form = "coaxial" if self.peek_form.currentIndex() == 1 else "parallel_wires"
        if self.mode.currentIndex() == 1:
            return AirConditions.at_pressure(self.pressure_edit.value_si(), temperature_K,
                                             surface_factor=surface, peek_form=form)
        return AirConditions.at_altitude(self.altitude_edit.value_si(), temperature_K,
                                         surface_factor=surface, peek_form=form)

    def _read_basis(self) -> VoltageBasis:
        key = str(self.basis.currentData())
        factor = self.factor_edit.value_si() if key == "factor" else 1.0
        return VoltageBasis(key, "rms" if self.rms_box.isChecked() else "crest", factor)

    def voltage_basis(self) -> VoltageBasis | None:
        """The voltage basis chosen; None (with the reason shown) when invalid."""
        return self._described()[1]

    def conditions(self) -> AirConditions | None:
        """The air typed in, described below the inputs; None (with the reason shown) when invalid."""
        return self._described()[0]

    def applied_to(self, model):
        """``model`` carrying the air conditions and voltage basis typed in (None when either is invalid)."""
        air, basis = self._described()
        if air is None or basis is None:
            return None
        return solver.with_voltage_basis(solver.with_air_conditions(model, air), basis)

    def _described(self) -> tuple[AirConditions | None, VoltageBasis | None]:
        try:
            air = self._read()
            basis = self._read_basis()
            at_1_cm = solver.air_strength(0.01, air.relative_air_density, air.surface_factor).field_V_per_m
            long_gap = solver.air_strength(None, air.relative_air_density, air.surface_factor).field_V_per_m
        except (ValueError, solver.SolverError) as exc:
            self.label.setText(f"Air conditions or voltage basis not applied: {exc}")
            self.label.setStyleSheet(colours.status_style(error=True))
            return None, None
        self.label.setStyleSheet("")
        self.label.setText(
            f"Relative air density δ = {format_plain(air.relative_air_density, 5)} ({air.description}). Strength of "
            f"air in a uniform field {format_measured(at_1_cm, 'V/m', digits=3)} across 1 cm, "
            f"{format_measured(long_gap, 'V/m', digits=3)} for long gaps (Kuffel, Zaengl & Kuffel 2000; each peak "
            f"uses its own gap; times the surface factor {format_plain(air.surface_factor, 4)}); "
            f"corona onset of round conductors by Peek (1929), {self.peek_form.currentText()} form. "
            f"Voltage basis: {basis.describe()}.")
        return air, basis
