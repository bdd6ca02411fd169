"""Equivalent radius of conductors tied together: a part of the "Hot spots" section.

Tick the conductors to tie together; :func:`solver.compare_bundle` runs in the background and
gives their equivalent radius (logarithmic capacity) and, for a regular bundle, the usual
bundle formula (n r A^(n-1))^(1/n) and the difference. No physics here.
"""

from __future__ import annotations

from PySide6.QtCore import Qt
from PySide6.QtWidgets import QHBoxLayout, QLabel, QListWidget, QListWidgetItem, QPushButton, QVBoxLayout, QWidget

import solver
from app import colours
from app.jobs.figure_jobs import FigureJobRunner, JobProgress
from app.units import digits_for, format_percent, format_plain, keep_units


def default_group(model) -> list[str]:
    """The first group of two or more fixed conductors at one potential, else the first conductor."""
    groups: dict[float, list[str]] = {}
    for c in model.conductors:
        if c.role == "fixed":
            groups.setdefault(float(c.potential_V), []).append(c.name)
    for names in groups.values():
        if len(names) >= 2:
            return names
    return list(model.conductor_names[:1])


class EquivalentRadiusPart(QWidget):
    """Equivalent radius of a checked group of conductors, against the bundle formula."""

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self.results = None
        self.comparison: solver.BundleComparison | None = None
        self.runner = FigureJobRunner(self)
        self.runner.result_ready.connect(self._on_comparison_ready)
        self.runner.job_failed.connect(lambda m: self._set_result(f"No equivalent radius: {m}", error=True))
        self.runner.busy_changed.connect(lambda busy: self.compute_button.setEnabled(not busy))

        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        head = QLabel("<b>Equivalent radius</b> (logarithmic capacity) of conductors tied together: the radius of "
                      "the one round wire that looks the same from far away, as used for bundled line conductors "
                      "and flat bars.")
        head.setWordWrap(True)
        layout.addWidget(head)
        row = QHBoxLayout()
        self.conductor_list = QListWidget()
        self.conductor_list.setMaximumHeight(80)
        row.addWidget(self.conductor_list, 1)
        self.compute_button = QPushButton("Tie together and compute")
        self.compute_button.setEnabled(False)
        row.addWidget(self.compute_button, 0, Qt.AlignTop)
        layout.addLayout(row)
        self.result = QLabel("Solve first.")
        self.result.setWordWrap(True)
        self.result.setTextInteractionFlags(Qt.TextSelectableByMouse)
        layout.addWidget(self.result)
        self.progress = JobProgress(self.runner)
        layout.addWidget(self.progress)
        self.runner.job_cancelled.connect(self._on_job_cancelled)
        self.compute_button.clicked.connect(self.compute)

    def set_results(self, results) -> None:
        self.results = results
        self.comparison = None
        self.runner.cancel()
        chosen = set(default_group(results.model))
        self.conductor_list.clear()
        for name in results.model.conductor_names:
            item = QListWidgetItem(name)
            item.setFlags(item.flags() | Qt.ItemIsUserCheckable)
            item.setCheckState(Qt.Checked if name in chosen else Qt.Unchecked)
            self.conductor_list.addItem(item)
        self.compute_button.setEnabled(True)
        self._set_result("Tick the conductors to tie together and press the button.")

    def mark_stale(self, stale: bool) -> None:
        if stale:
            self.runner.cancel()
            self._set_result("OUT OF DATE: the drawing changed after this solve. Solve again (F5).", stale=True)
        self.compute_button.setEnabled(not stale and self.results is not None)

    def checked_names(self) -> list[str]:
        items = (self.conductor_list.item(i) for i in range(self.conductor_list.count()))
        return [it.text() for it in items if it.checkState() == Qt.Checked]

    def compute(self) -> None:
        names = self.checked_names()
        if self.results is None:
            return
        if not names:
            self._set_result("Tick at least one conductor.", error=True)
            return
        self._set_result(f"Computing the equivalent radius of {', '.join(names)}…")
        self.runner.start_with_progress(solver.compare_bundle, self.results.solution, names)

    def _on_job_cancelled(self) -> None:
        self._set_result("Cancelled: press the button to compute again.")

    def _set_result(self, text: str, *, error: bool = False, stale: bool = False) -> None:
        self.result.setText(keep_units(text))
        self.result.setStyleSheet(colours.status_style(error=error, stale=stale))

    def _on_comparison_ready(self, b) -> None:
        self.comparison = b
        model = self.results.model
        unit, scale = model.unit, model.metres_per_unit
        tied = "'" + "', '".join(b.conductors) + "'" + (" tied together" if len(b.conductors) > 1 else "")
        digits = digits_for(b.estimated_relative_error)
        text = (f"Equivalent radius of {tied}: {format_plain(b.equivalent_radius_m / scale, digits)} {unit} "
                f"(estimated error {format_percent(b.estimated_relative_error)}).")
        if b.is_regular_bundle and b.n_subconductors and b.n_subconductors > 1:
            text += (f"\nRegular bundle of n = {b.n_subconductors} round subconductors of radius r = "
                     f"{format_plain(b.subconductor_radius_m / scale)} {unit} on a circle of radius A = "
                     f"{format_plain(b.bundle_radius_m / scale)} {unit}: the bundle formula (n r A^(n−1))^(1/n) gives "
                     f"{format_plain(b.formula_equivalent_radius_m / scale, digits)} {unit}; the solver's value differs "
                     f"by {_signed_percent(b.relative_difference)} (the formula ignores the crowding of charge toward "
                     "the outside of the bundle, so it is exact only for r much smaller than A).")
        elif len(b.conductors) > 1:
            text += ("\nThese conductors are not a regular bundle (equal circles evenly spaced on a circle), "
                     "so the bundle formula does not apply.")
        self._set_result(text)


def _signed_percent(fraction: float) -> str:
    """A signed percentage without exponent, e.g. "+1.3 %" or "−0.25 %"."""
    text = format_percent(fraction, 3)
    return text if text.startswith(("\u2212", "n/a")) else "+" + text
