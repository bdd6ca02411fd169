"""Sweep and goal search from the window (Solve > Sweep and goal search...).

The user picks one number of the drawing (a dimension, a centre coordinate, a potential, a
permittivity: :func:`solver.studies.choices.sweepable_fields`), a range and a count, and the
figures to collect (:func:`solver.studies.choices.figure_choices`). *Run sweep* hands them to
the solver's study engine (:func:`solver.studies.sweep`) in a worker thread, with progress and
cancel; the table and a plot show the result, and *Export CSV...* writes the solver's own CSV
of the table. *Find* runs the solver's goal search (:func:`solver.studies.search`): the value
of the field, between the range's ends, that makes one figure equal a target (e.g. the trace
width for 50 ohm); *Use this value* puts it into the drawing as one undoable edit.

The dialog holds no physics: every number comes from ``solver.studies``.
"""

from __future__ import annotations

import functools
from pathlib import Path

import numpy as np
from PySide6.QtCore import Qt
from PySide6.QtWidgets import (
    QComboBox,
    QDialog,
    QFileDialog,
    QFormLayout,
    QHBoxLayout,
    QLabel,
    QLineEdit,
    QListWidget,
    QListWidgetItem,
    QProgressBar,
    QPushButton,
    QSpinBox,
    QSplitter,
    QVBoxLayout,
    QWidget,
)

import solver
from app.figure_names import figure_label
from app.jobs.study_runner import StudyRunner
from app.messages import show_message
from app.panels.goal_box import GoalBox
from app.panels.quantity_edit import display_number
from app.panels.study_views import CautionLine, StudyPlot, StudyTableView
from app.units import count_of
from solver import LENGTH_UNITS, SolverError, read_quantity
from solver.hot_spots.verdict import largest_potential_difference_V
from solver.studies import NOT_RUN, SearchResult, model_with_values, search, sweep
from solver.studies.choices import figure_choices, sweepable_fields

#: Figure words whose values bear on high-voltage work (the caution is shown with them).
HIGH_VOLTAGE_FIGURES = ("peak_field_V_per_m", "margin")


def _value(edit: QLineEdit, what: str, unit: str = "") -> float:
    """The number typed in ``edit``, in the field's own ``unit`` (the model's length unit, "V",
    or "" for a plain number); a value may carry its unit ("12 mil", "1.5 kV")."""
    try:
        if unit in LENGTH_UNITS:
            return read_quantity(edit.text(), "m", what, default_unit=unit).value_si / LENGTH_UNITS[unit]
        return read_quantity(edit.text(), "V" if unit == "V" else "", what).value_si
    except SolverError as e:
        raise ValueError(str(e)) from None


class SweepDialog(QDialog):
    """Sweep one field of the drawing and search for a goal value (see the module notes)."""

    def __init__(self, document, parent=None) -> None:
        super().__init__(parent)
        self.setWindowTitle("Sweep and goal search")
        self.document = document
        self.model = document.model
        self.table = None
        self.found = None
        self.runner = StudyRunner(self)
        self.runner.progressed.connect(self._on_progress)
        self.runner.finished.connect(self._on_finished)
        self.runner.failed.connect(self._on_failed)
        self.runner.busy_changed.connect(self._on_busy)
        self.runner.cancelled.connect(lambda: self.goal_result.setText("Search cancelled.") if self._searching else None)
        self._searching = False
        self._build()
        self.fields = sweepable_fields(self.model)
        for f in self.fields:
            self.field_combo.addItem(f"{f.label} ({f.unit})" if f.unit else f.label, f.path)
        for choice in figure_choices(self.model):
            item = QListWidgetItem(figure_label(choice.name, length_unit=self.model.unit))
            item.setData(Qt.UserRole, choice.name)
            item.setToolTip(choice.label)
            item.setFlags(item.flags() | Qt.ItemIsUserCheckable)
            item.setCheckState(Qt.Checked if len(self.checked_figures()) < 1 else Qt.Unchecked)
            self.figure_list.addItem(item)
            self.goal_box.add_figure(choice.name)
        self.field_combo.currentIndexChanged.connect(self._on_field_changed)
        self._on_field_changed()
        self.resize(1060, 660)

    # ---- layout ----------------------------------------------------------------------------
    def _build(self) -> None:
        self.field_combo = QComboBox()
        self.start_edit, self.stop_edit = QLineEdit(), QLineEdit()
        self.unit_label = QLabel()
        self.count_spin = QSpinBox(minimum=2, maximum=500, value=7)
        span = QHBoxLayout()
        for w in (self.start_edit, QLabel("to"), self.stop_edit, self.unit_label):
            span.addWidget(w)
        self.figure_list = QListWidget()
        self.run_button = QPushButton("Run sweep")
        self.run_button.clicked.connect(self.run_sweep)
        self.cancel_button = QPushButton("Cancel")
        self.cancel_button.clicked.connect(self.runner.cancel)
        self.cancel_button.setEnabled(False)
        self.progress = QProgressBar()
        self.progress.setRange(0, 1)
        self.status = QLabel("")
        self.status.setWordWrap(True)
        form = QFormLayout()
        form.addRow("Vary", self.field_combo)
        form.addRow("From", span)
        form.addRow("Cases", self.count_spin)
        form.addRow("Figures", self.figure_list)
        buttons = QHBoxLayout()
        buttons.addWidget(self.run_button)
        buttons.addWidget(self.cancel_button)

        goal = GoalBox(length_unit=self.model.unit)
        self.goal_figure, self.goal_target, self.goal_result = goal.figure, goal.target, goal.result
        self.find_button, self.apply_button = goal.find_button, goal.apply_button
        self.find_button.clicked.connect(self.run_search)
        self.apply_button.clicked.connect(self.apply_found)
        self.goal_box = goal

        left = QWidget()
        left_column = QVBoxLayout(left)
        left_column.addLayout(form, 1)
        left_column.addLayout(buttons)
        left_column.addWidget(self.progress)
        left_column.addWidget(self.status)
        left_column.addWidget(goal)

        self.plot = StudyPlot()
        self.table_view = StudyTableView()
        self.export_button = QPushButton("Export CSV...")
        self.export_button.setEnabled(False)
        self.export_button.clicked.connect(lambda: self.export_csv())
        self.caution = CautionLine(solver.HIGH_VOLTAGE_CAUTION)
        right = QSplitter(Qt.Vertical)
        right.addWidget(self.plot)
        lower = QWidget()
        lower_column = QVBoxLayout(lower)
        lower_column.setContentsMargins(0, 0, 0, 0)
        lower_column.addWidget(self.table_view, 1)
        lower_column.addWidget(self.caution)
        lower_column.addWidget(self.export_button, 0, Qt.AlignRight)
        right.addWidget(lower)
        right.setSizes([360, 300])
        whole = QSplitter(Qt.Horizontal)
        whole.addWidget(left)
        whole.addWidget(right)
        whole.setSizes([380, 680])
        QVBoxLayout(self).addWidget(whole)

    # ---- choices ---------------------------------------------------------------------------
    def field(self):
        return self.fields[self.field_combo.currentIndex()]

    def select_field(self, path: str) -> None:
        self.field_combo.setCurrentIndex(self.field_combo.findData(path))

    def checked_figures(self) -> list[str]:
        items = (self.figure_list.item(i) for i in range(self.figure_list.count()))
        return [it.data(Qt.UserRole) for it in items if it.checkState() == Qt.Checked]

    def set_figures(self, names) -> None:
        for i in range(self.figure_list.count()):
            item = self.figure_list.item(i)
            item.setCheckState(Qt.Checked if item.data(Qt.UserRole) in names else Qt.Unchecked)

    def _on_field_changed(self) -> None:
        f = self.field()
        low, high = (0.5 * f.value, 1.5 * f.value) if f.value else (0.0, 1.0)
        self.start_edit.setText(display_number(min(low, high), ""))  # as the unit-aware fields show values
        self.stop_edit.setText(display_number(max(low, high), ""))
        self.unit_label.setText(f.unit)

    def _x_label(self) -> str:
        f = self.field()
        return f"{f.label} ({f.unit})" if f.unit else f.label

    # ---- running ---------------------------------------------------------------------------
    def run_sweep(self) -> bool:
        """Start the sweep; False (with a message) when the input is not usable."""
        try:
            unit = self.field().unit
            start, stop = _value(self.start_edit, "From", unit), _value(self.stop_edit, "To", unit)
        except ValueError as e:
            self.status.setText(str(e))
            return False
        figures = self.checked_figures()
        if not figures:
            self.status.setText("Tick at least one figure to collect.")
            return False
        values = np.linspace(start, stop, self.count_spin.value())
        job = functools.partial(_sweep_job, self.document.model, {self.field().path: values}, figures)
        self.found = None
        self._searching = False
        self.status.setText(f"Running {count_of(len(values), 'case')}...")
        self.runner.start(job)
        return True

    def run_search(self) -> bool:
        """Start the goal search; False (with a message) when the input is not usable."""
        try:
            unit = self.field().unit
            start, stop = _value(self.start_edit, "From", unit), _value(self.stop_edit, "To", unit)
            target = self.goal_box.target_si()
        except (ValueError, SolverError) as e:
            self.goal_result.setText(str(e))
            return False
        job = functools.partial(_search_job, self.document.model, self.field().path, self.goal_box.figure_name(),
                                target, (start, stop))
        self.goal_result.setText("Searching...")
        self._searching = True
        self.runner.start(job)
        return True

    def _on_busy(self, busy: bool) -> None:
        self.run_button.setEnabled(not busy)
        self.find_button.setEnabled(not busy)
        self.cancel_button.setEnabled(busy)
        if busy:
            self.progress.setRange(0, 0)  # busy until the first case reports
            self.progress.setFormat("")

    def _on_progress(self, done: int, total: int) -> None:
        self.progress.setRange(0, max(total, 1))
        self.progress.setValue(done)
        self.progress.setFormat(f"{done} / {count_of(total, 'case')}")

    def _on_finished(self, result) -> None:
        if isinstance(result, SearchResult):
            self.found = result
            self.goal_box.show_found(result, self.field().label, self.field().unit)
            self.plot.show_study(self.table, self._x_label(), result)
            self._show_caution([result.figure])
            return
        self.table = result
        not_run = sum(1 for r in result.rows if r.get("error") == NOT_RUN)
        failed = len(result.failed) - not_run
        text = f"{len(result) - not_run} of {count_of(len(result), 'case')} run"
        text += ", cancelled." if not_run else "."
        if failed:
            text += f" {failed} without figures (see the note column)."
        self.status.setText(text)
        self.table_view.show_table(result, self._x_label())
        self.plot.show_study(result, self._x_label())
        self.export_button.setEnabled(True)
        self._show_caution(result.figures)

    def _on_failed(self, message: str) -> None:
        (self.goal_result if self._searching else self.status).setText(message)

    def _show_caution(self, figures) -> None:
        """The standing high-voltage caution beside peak fields and margins of a high-voltage model
        (potentials, as drawn or as swept, 300 V or more apart: the solver's one rule)."""
        model = self.document.model
        potentials = [c.potential_V for c in model.conductors if c.role == "fixed"]
        if self.field().unit == "V":
            potentials += [_value(self.start_edit, "From", "V"), _value(self.stop_edit, "To", "V")]
        difference = largest_potential_difference_V(potentials, model.has_return_path)
        hv = difference >= solver.LOW_VOLTAGE_THRESHOLD_V and any(
            f.split(".")[0] in HIGH_VOLTAGE_FIGURES for f in figures)
        self.caution.set_full(False)
        self.caution.setVisible(hv)

    # ---- results ---------------------------------------------------------------------------
    def apply_found(self) -> bool:
        """Put the value found into the drawing (one undoable edit)."""
        if self.found is None:
            return False
        model = model_with_values(self.document.model, {self.found.parameter: self.found.value})
        return self.document.apply(model, f"set {self.field().label} to {self.found.value:.10g}")

    def export_csv(self, path: str | Path | None = None) -> bool:
        """Write the sweep table as the solver's CSV (asks for a file without ``path``)."""
        if self.table is None:
            return False
        if path is None:
            chosen, _ = QFileDialog.getSaveFileName(self, "Export the sweep table", "sweep.csv", "CSV (*.csv)")
            if not chosen:
                return False
            path = chosen
        try:
            self.table.to_csv(path)
        except OSError as e:
            show_message(self, "critical", "Cannot write the table", f"{path}: {e.strerror or e}")
            return False
        self.status.setText(f"Table written to {path}.")
        return True

    def closeEvent(self, event) -> None:
        self.runner.cancel()
        self.runner.wait()
        super().closeEvent(event)


def _sweep_job(model, vary, figures, progress, cancel):
    return sweep(model, vary, figures, progress=progress, cancel=cancel)


def _search_job(model, parameter, figure, target, bracket, progress, cancel):
    return search(model, parameter, figure, target, bracket, scan=4, progress=progress, cancel=cancel)
