"""The "Line figures" section: quasi-TEM transmission-line figures of the solved cross-section.

After each solve the section (when shown) runs :func:`solver.transmission_line_figures` in the
background — it needs a second solve with every eps_r = 1 — and shows the inductance matrix,
the single-line figures (Z0, eps_eff, delay, velocity), the even/odd-mode figures of a
symmetric pair, the modal table and the coupling coefficients. No physics here: every number
comes from the solver's TransmissionLineFigures.
"""

from __future__ import annotations

import math

import numpy as np
from PySide6.QtWidgets import QLabel, QVBoxLayout, QWidget

import solver
from app import colours
from app.jobs.figure_jobs import FigureJobRunner, JobProgress
from app.panels.matrices_view import CopyableTable
from app.panels.status_text import NOT_SOLVED, failure_text
from app.units import digits_for, format_percent, format_plain, keep_units
from solver.cli.formatting import ROUND_OFF

MODES_CAPTION = ("Modes (slowest first, one column each): effective permittivity, velocity, modal impedance "
                 "and the modal voltages on each line (largest +1)")
QUASI_TEM_NOTE = ("Quasi-TEM figures: they hold while the cross-section is small against the wavelength; "
                  "skin effect, conductor and dielectric loss and dispersion are not modelled.")
NO_RETURN_PATH = ("No line figures: a transmission line needs a return path. Add a reference conductor "
                  "or a ground plane (and at least one conductor at a fixed potential), then solve again.")
STALE_TEXT = "OUT OF DATE: the drawing changed after this solve. Solve again (F5)."

LIGHT = solver.SPEED_OF_LIGHT_M_PER_S


def inductance_unit(matrix_H_per_m: np.ndarray) -> tuple[float, str]:
    """(factor, label) for an inductance matrix: µH/m from 1 µH/m up, else nH/m."""
    return (1e-6, "µH/m") if np.max(np.abs(matrix_H_per_m)) >= 1e-6 else (1e-9, "nH/m")


def plain_cells(values, relative_error: float | None, digits: int | None = None) -> list[str]:
    """Numbers of one table to the figures ``relative_error`` supports (or ``digits``), entries
    below round-off of the largest shown as 0, true minus signs."""
    values = np.asarray(values, dtype=float)
    largest = float(np.max(np.abs(values))) if values.size else 0.0
    n = digits or digits_for(relative_error)
    return ["0" if abs(v) <= ROUND_OFF * largest else format_plain(float(v), n) for v in values.ravel()]


class LineFiguresView(QWidget):
    """Transmission-line figures after each solve, computed in the background."""

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self.results = None
        self.figures: solver.TransmissionLineFigures | None = None
        self._pending = False
        self._stale = False
        self._last_status = ("", "")
        self.runner = FigureJobRunner(self)
        self.runner.result_ready.connect(self._on_figures_ready)
        self.runner.job_failed.connect(self._on_job_failed)

        layout = QVBoxLayout(self)
        self.status = QLabel(NOT_SOLVED)
        self.status.setWordWrap(True)
        layout.addWidget(self.status)
        self.progress = JobProgress(self.runner)
        layout.addWidget(self.progress)
        self.runner.job_cancelled.connect(self._on_job_cancelled)
        self.note = QLabel(QUASI_TEM_NOTE)
        self.note.setWordWrap(True)
        self.note.setStyleSheet(f"color: {colours.TEXT_MUTED};")
        layout.addWidget(self.note)
        self.line_label = QLabel()
        self.line_table = CopyableTable()
        self.inductance_label = QLabel()
        self.inductance = CopyableTable()
        self.modes_label = QLabel(MODES_CAPTION)
        self.modes = CopyableTable()
        self.coupling_label = QLabel("Coupling coefficients between lines: capacitive k_C = −C_ij / √(C_ii C_jj), "
                                     "inductive k_L = L_ij / √(L_ii L_jj)")
        self.coupling = CopyableTable()
        self.error_label = QLabel()
        for w in (self.line_label, self.line_table, self.inductance_label, self.inductance, self.modes_label,
                  self.modes, self.coupling_label, self.coupling, self.error_label):
            if isinstance(w, QLabel):
                w.setWordWrap(True)
            layout.addWidget(w)
        layout.addStretch(1)
        self._clear()

    # ---- feeding -----------------------------------------------------------------------------
    def show_results(self, results) -> None:
        self.results = results
        self.figures = None
        self._stale = False
        self._grey_out(False)
        self.runner.cancel()
        self._clear()
        model = results.model
        if not model.has_return_path or not model.signal_names:
            self._pending = False
            self._set_status(NO_RETURN_PATH, colours.status_style(error=True))
            return
        self._pending = True
        self._set_status("Line figures are computed when this tab is shown.")
        if self.isVisible():
            self._start()

    def mark_stale(self, stale: bool) -> None:
        self._stale = stale
        self._grey_out(stale)
        if stale:
            if self.runner.is_busy:
                self._pending = True  # started again if the drawing returns to the solved state
                self.runner.cancel()
            self.status.setText(STALE_TEXT)
            self.status.setStyleSheet(colours.status_style(stale=True))
            return
        self._set_status(*self._last_status)
        if self._pending and self.isVisible():
            self._start()

    def _grey_out(self, stale: bool) -> None:
        """Out-of-date figures stay readable but greyed."""
        for table in (self.line_table, self.inductance, self.modes, self.coupling):
            table.setEnabled(not stale)

    def showEvent(self, event) -> None:
        super().showEvent(event)
        if self._pending and not self._stale and not self.runner.is_busy:
            self._start()

    def _start(self) -> None:
        self._pending = False
        self._set_status("Computing the line figures from the solution (and, with dielectric regions, a "
                         "second solve with every relative permittivity 1)…")
        self.runner.start_with_progress(solver.transmission_line_figures, self.results.solution, estimate_error=True)

    def _on_job_cancelled(self) -> None:
        self._pending = True  # computed again when the tab is shown next
        self._set_status("Line figures cancelled; they are computed again when this tab is shown.")

    def _on_job_failed(self, message: str) -> None:
        self._set_status(f"No line figures: {message}", colours.status_style(error=True))

    def _on_figures_ready(self, figures) -> None:
        self.figures = figures
        self._show_figures_status()
        self._fill(figures)

    def show_failure(self, message: str) -> None:
        """No results to show: the solve failed, and ``message`` says why (and what to change)."""
        if self.results is None:
            self._set_status(failure_text(message), colours.status_style(error=True))

    # ---- display -----------------------------------------------------------------------------
    def _set_status(self, text: str, style: str = "") -> None:
        self._last_status = (text, style)
        if self._stale:
            return
        self.status.setText(keep_units(text))
        self.status.setStyleSheet(style)

    def _show_figures_status(self) -> None:
        names = ", ".join(self.figures.signal_names)
        self._set_status(f"Line figures of {len(self.figures.signal_names)} signal line(s): {names}.")

    def _clear(self) -> None:
        for label, table in ((self.line_label, self.line_table), (self.inductance_label, self.inductance),
                             (self.modes_label, self.modes), (self.coupling_label, self.coupling)):
            table.fill([], [], [])
            label.setVisible(False)
            table.setVisible(False)
        self.error_label.setText("")

    def _show(self, label: QLabel, table: CopyableTable) -> None:
        label.setVisible(True)
        table.setVisible(True)

    def _fill(self, f) -> None:
        names = list(f.signal_names)
        err = f.estimated_relative_error
        scale, unit = inductance_unit(f.inductance_H_per_m)
        self.inductance_label.setText(f"Inductance matrix L = μ₀ε₀ C₀⁻¹ ({unit}), from the capacitance with every "
                                      "relative permittivity set to 1")
        n = len(names)
        entries = plain_cells(np.asarray(f.inductance_H_per_m) / scale, err)
        self.inductance.fill(names, names, [entries[i * n:(i + 1) * n] for i in range(n)], wrap=14)
        self._show(self.inductance_label, self.inductance)
        # units in the row headings (one quantity and one unit per row), numbers only in the cells
        digits = digits_for(err)
        if f.characteristic_impedance_ohm is not None:
            self.line_label.setText(f"Single line '{names[0]}'")
            rows = ["characteristic impedance Z₀ (Ω)", "effective permittivity ε_eff", "propagation delay (ns/m)",
                    "phase velocity (10⁸ m/s)", "phase velocity / c (%)"]
            cells = [[format_plain(f.characteristic_impedance_ohm, digits)], plain_cells([f.effective_permittivity], err),
                     [format_plain(f.delay_s_per_m * 1e9, digits)], [format_plain(f.velocity_m_per_s / 1e8, digits)],
                     [format_plain(100 * f.velocity_m_per_s / LIGHT, digits)]]
            self.line_table.fill(rows, ["value"], cells, wrap=18, row_tips=[
                "", "", "Delay per metre of line; 1 ns/m is 1 ps/mm.", "", "The phase velocity as a share of the "
                "speed of light in vacuum (1 / √ε_eff)."])
            self._show(self.line_label, self.line_table)
        elif f.is_symmetric_pair:
            self.line_label.setText(f"Symmetric pair '{names[0]}' and '{names[1]}'")
            rows = ["even-mode impedance Z_even (Ω)", "odd-mode impedance Z_odd (Ω)", "even-mode ε_eff", "odd-mode ε_eff",
                    "differential impedance 2 Z_odd (Ω)", "common-mode impedance Z_even / 2 (Ω)"]
            ohms = [f.even_mode_impedance_ohm, f.odd_mode_impedance_ohm, None, None, f.differential_impedance_ohm,
                    f.common_mode_impedance_ohm]
            eps = plain_cells([f.even_mode_effective_permittivity, f.odd_mode_effective_permittivity], err)
            cells = [[format_plain(z, digits)] if z is not None else [eps.pop(0)] for z in ohms]
            self.line_table.fill(rows, ["value"], cells, wrap=18)
            self._show(self.line_label, self.line_table)
        if len(names) > 1:
            quantities = ["ε_eff", "velocity (10⁸ m/s)", "delay (ns/m)", "impedance (Ω)"] + [f"V on {n}" for n in names]
            modes = []
            for k in range(len(names)):
                v = float(f.modal_velocities_m_per_s[k])
                modes.append(plain_cells([f.modal_effective_permittivities[k], v / 1e8, 1e9 / v,
                                          f.modal_impedances_ohm[k]], err)
                             + plain_cells(f.modal_voltages[:, k], None, digits=3))
            # one column per mode: the quantities and each line's voltage read down the column
            self.modes.fill(quantities, [f"mode {k + 1}" for k in range(len(names))],
                            [list(row) for row in zip(*modes)], wrap=16)
            self.modes_label.setText(MODES_CAPTION + (f" — note: {f.modal_note}." if f.modal_note else ""))
            self._show(self.modes_label, self.modes)
            pairs = [(i, j) for i in range(len(names)) for j in range(i + 1, len(names))]
            self.coupling.fill([f"{names[i]} – {names[j]}" for i, j in pairs], ["capacitive k_C", "inductive k_L"],
                               [plain_cells([f.capacitive_coupling[i, j], f.inductive_coupling[i, j]], err)
                                for i, j in pairs], wrap=14)
            self._show(self.coupling_label, self.coupling)
        err = f.estimated_relative_error
        self.error_label.setText(keep_units(
            "" if err is None or not math.isfinite(err) else
            f"Estimated relative error of the capacitances behind these figures: {format_percent(err)} "
            "(change against meshes at half the resolution)."))
