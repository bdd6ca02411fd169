"""The "High voltage" section: peak surface fields you can trust, and their margins in air.

When shown after a solve, :func:`solver.analyse_hot_spots` runs in the background (refining
each conductor's peak field to 1 %); :func:`solver.assess_margins` turns the peaks into margins
to air breakdown and Peek's corona onset in the project's air conditions (one set per project,
saved in the file, shared with the summary block and the report). Each status, reason and
caution is the solver's verdict (:func:`solver.judge_peak`, the one caution rule); the verdict
on the refined peaks goes to the summary block's caution line (``verdict_ready``), its one
home, where the full caution and the standing statement are one click away. Sharp corners
are reported as singular with their exponent; a corner radius re-runs the analysis with the
corners rounded. The corner-radius sweep and the equivalent radius are parts of this
section. No physics here.
"""

from __future__ import annotations

import math

from PySide6.QtCore import Signal
from PySide6.QtGui import QColor
from PySide6.QtWidgets import QHBoxLayout, QLabel, QLineEdit, QPushButton, QVBoxLayout, QWidget

import solver
from app import colours
from app.jobs.figure_jobs import FigureJobRunner, JobProgress
from app.panels.air_conditions_box import AirConditionsBox
from app.panels.corner_radius_view import CornerRadiusPart, field_unit
from app.panels.equivalent_radius_view import EquivalentRadiusPart
from app.panels.matrices_view import CopyableTable, drawing_size, format_coordinate
from app.panels.status_text import NOT_SOLVED, failure_text
from app.units import NEGLIGIBLE_SHARE, field_figures, format_percent, format_plain, keep_units
from solver import THIN_MARGIN

STALE_TEXT = "Out of date: the drawing changed after this solve. Solve again (F5)."
TARGET = 0.01

#: Rows of the table: a short heading with its unit ({field}: the peak's unit, {length}: the
#: model's) and what it stands for, shown as the heading's tooltip.
ROW_HEADINGS = (
    ("peak |E| ({field})", "Peak surface field strength |E|, refined to the error target; a crest value at the "
                           "model's potentials."),
    ("error (%)", "Estimated relative error of the peak, from the refinement (Richardson estimate); '—' where the "
                  "field is singular."),
    ("x ({length})", "Where the peak lies: x."),
    ("y ({length})", "Where the peak lies: y."),
    ("sharp corner", "Whether the peak sits at a sharp corner. There the field is singular (σ ~ r^exponent): it "
                     "grows as the mesh is refined, and the value shown is the mesh's. Give the corner a radius."),
    ("enhancement", "Enhancement factor: peak / (potential difference / gap) to the nearest conductor at another "
                    "potential."),
    ("breakdown (MV/m)", "Air-breakdown field: the uniform-field strength of air for the peak's gap in the "
                         "project's air conditions, times the surface factor."),
    ("breakdown margin", "Air-breakdown margin: air-breakdown field / peak (at the voltage basis)."),
    ("corona (MV/m)", "Corona-onset field of a round conductor of this radius by Peek's formula, in the project's "
                      "air conditions ('—' where it does not apply)."),
    ("corona margin", "Corona-onset margin: corona-onset field / peak (at the voltage basis)."),
    ("decided by", "The margin that decides the status (the smaller one)."),
    ("status", f"The verdict: exceeded (margin below 1), approaching (below {format_plain(THIN_MARGIN, 3)}), "
               "ample, or not assessed (no threshold applies)."),
)


def _margin(value: float | None) -> str:
    """A margin or a factor to 3 figures, without exponent ("1520", not "1.52e+03")."""
    if value is None:
        return "—"
    return "∞" if not math.isfinite(value) else format_plain(value, 3)


def _peak(value: float, relative_error: float | None, largest: float | None = None) -> str:
    """A peak field (already in the row's unit) to the figures its error estimate supports, at
    most :data:`app.units.FIELD_FIGURES` (as on the drawing, the summary and the status bar);
    "≈ 0" when it is below :data:`NEGLIGIBLE_SHARE` of ``largest`` (same unit)."""
    if largest is not None and abs(value) < NEGLIGIBLE_SHARE * abs(largest):
        return "≈ 0"
    return format_plain(value, field_figures(relative_error))


class HotSpotsView(QWidget):
    """Per-conductor peak fields, margins, the radius sweep and the equivalent radius; the
    verdict on the refined peaks goes out by ``verdict_ready(solver.CautionVerdict)``."""

    verdict_ready = Signal(object)
    #: {conductor: figures} of each refined peak (those its error estimate supports), for the
    #: drawing's peak labels to show the table's number.
    peak_digits_ready = Signal(dict)

    def __init__(self, document=None, parent=None) -> None:
        super().__init__(parent)
        self.document = document
        self.results = None
        self.report: solver.HotSpotReport | None = None
        self.margins: solver.MarginReport | None = None
        self._pending = False
        self._stale = False
        self._last_status = ("", "")
        self._corner_radius_m: float | None = None
        self.runner = FigureJobRunner(self)
        self.runner.result_ready.connect(self._on_report_ready)
        self.runner.job_failed.connect(lambda m: self._set_status(f"No hot-spot analysis: {m}", error=True))

        layout = QVBoxLayout(self)
        self.status = QLabel(NOT_SOLVED)
        self.status.setWordWrap(True)
        layout.addWidget(self.status)
        self.progress = JobProgress(self.runner)  # progress and Cancel while the peaks are refined
        layout.addWidget(self.progress)
        self.runner.job_cancelled.connect(
            lambda: None if self._stale else self._set_status("Hot-spot analysis cancelled; solve again to restart it."))
        self.table_label = QLabel("Peak surface field per conductor (crest values; margin = threshold / peak, "
                                  f"below {format_plain(THIN_MARGIN, 3)} is thin)")
        self.table_label.setWordWrap(True)
        layout.addWidget(self.table_label)
        self.table = CopyableTable()
        self.table.fill([], [], [])
        layout.addWidget(self.table)
        self.notes = QLabel()
        self.notes.setWordWrap(True)
        layout.addWidget(self.notes)
        layout.addLayout(self._build_corner_row())
        self.air_box = AirConditionsBox()
        self.air_box.applied.connect(self._on_air_applied)
        layout.addWidget(self.air_box)
        if document is not None:
            document.events.connect("model_changed", self._on_model_changed)
            self.air_box.show_project_air(document.model)
        self.sweep_part = CornerRadiusPart()
        self.radius_part = EquivalentRadiusPart()
        layout.addWidget(self.sweep_part)
        layout.addWidget(self.radius_part)
        layout.addStretch(1)

    def _build_corner_row(self) -> QVBoxLayout:
        """The corner radius and its two buttons, on two rows so that a narrow panel fits them."""
        rows = QVBoxLayout()
        row, buttons = QHBoxLayout(), QHBoxLayout()
        self.corner_label = QLabel("corner radius")
        self.corner_edit = QLineEdit()
        self.corner_edit.setPlaceholderText("round sharp corners to")
        self.corner_button = QPushButton("Analyse with sharp corners rounded")
        self.drawn_button = QPushButton("As drawn")
        row.addWidget(self.corner_label)
        row.addWidget(self.corner_edit, 1)
        buttons.addWidget(self.corner_button)
        buttons.addWidget(self.drawn_button)
        buttons.addStretch(1)
        rows.addLayout(row)
        rows.addLayout(buttons)
        self.corner_button.clicked.connect(self._on_corner_radius_applied)
        self.drawn_button.clicked.connect(lambda: self._start(None))
        return rows

    # ---- feeding -----------------------------------------------------------------------------
    def show_results(self, results) -> None:
        self.results = results
        self.report = self.margins = None
        self._stale = False
        self.runner.cancel()
        self.table.fill([], [], [])
        self.table.setEnabled(True)
        self.notes.setText("")
        model = results.model
        self.corner_label.setText(f"corner radius ({model.unit})")
        self.air_box.show_project_air(self._project_model())
        self.sweep_part.set_results(results)
        self.radius_part.set_results(results)
        self._corner_radius_m = None
        self._pending = True
        self._set_status("The peak fields are refined when this tab is shown.")
        if self.isVisible():
            self._start(None)

    def mark_stale(self, stale: bool) -> None:
        self._stale = stale
        self.sweep_part.mark_stale(stale)
        self.radius_part.mark_stale(stale)
        self.table.setEnabled(not stale)
        self._paint_statuses()
        if stale:
            if self.runner.is_busy:
                self._pending = True
                self.runner.cancel()
            self.status.setText(STALE_TEXT)
            self.status.setStyleSheet(colours.style_sheet(colours.FRESHNESS["stale"], bold=True))
        elif self.results is not None:
            self._set_status(*self._last_status)
            if self._pending and self.isVisible():
                self._start(self._corner_radius_m)

    def _paint_statuses(self) -> None:
        """Each status cell in its severity colours; in the stale colours while the drawing has
        changed, so no verdict speaks at full strength for a drawing it was not made for."""
        row = self.table.rowCount() - 1
        for j, status in enumerate(getattr(self, "_statuses", [])):
            cell = self.table.item(row, j)
            if cell is None:
                continue
            badge = colours.SEVERITY.get(status, colours.SEVERITY["not assessed"])
            text, background = ((colours.STALE_TEXT, colours.FRESHNESS["stale"].background) if self._stale
                                else (badge.text, badge.background))
            cell.setBackground(QColor(background))
            cell.setForeground(QColor(text))

    def showEvent(self, event) -> None:
        super().showEvent(event)
        if self._pending and not self._stale and not self.runner.is_busy and self.results is not None:
            self._start(self._corner_radius_m)

    def _start(self, corner_radius_m: float | None) -> None:
        if self.results is None:
            return
        self._pending = False
        self._corner_radius_m = corner_radius_m
        rounded = "" if corner_radius_m is None else " with sharp corners rounded"
        self._set_status(f"Refining the peak surface fields{rounded} to {format_percent(TARGET)}…")
        self.runner.start_with_progress(solver.analyse_hot_spots, self.results.solution, TARGET, corner_radius_m)

    def _on_corner_radius_applied(self) -> None:
        if self.results is None:
            return
        text = self.corner_edit.text().strip()
        model = self.results.model
        try:  # a length with a unit ("0.5 mm", "20 mil") or a bare number in the model's unit
            radius = solver.parse_quantity(text, "m", "corner radius", default_unit=model.unit) / model.metres_per_unit
        except solver.SolverError:
            radius = -1.0
        if not (radius > 0 and math.isfinite(radius)):
            self._set_status(f"Corner radius '{text}': give a positive length in {self.results.model.unit}.",
                             error=True)
            return
        self._start(radius * self.results.model.metres_per_unit)

    # ---- air ---------------------------------------------------------------------------------
    def _project_model(self):
        """The model whose project settings (air conditions) apply: the document's, else the solved one."""
        if self.document is not None:
            return self.document.model
        return None if self.results is None else self.results.model

    def _on_air_applied(self) -> None:
        air = self.air_box.conditions()
        if air is None:
            return
        if self.document is not None:
            updated = self.air_box.applied_to(self.document.model)
            if updated is not None:
                self.document.apply(updated, "Set air conditions and voltage basis")
        elif self.report is not None:
            self._assess()

    def _on_model_changed(self, model) -> None:
        self.air_box.show_project_air(model)
        if self.report is not None and not self._stale:
            self._assess()

    def show_failure(self, message: str) -> None:
        """No results to show: the solve failed, and ``message`` says why (and what to change)."""
        if self.results is None:
            self._set_status(failure_text(message), error=True)

    # ---- display -----------------------------------------------------------------------------
    def _set_status(self, text: str, style: str = "", *, error: bool = False) -> None:
        style = colours.style_sheet(colours.FRESHNESS["failed"], bold=True) if error else style
        self._last_status = (text, style)
        if self._stale:
            return
        self.status.setText(keep_units(text))
        self.status.setStyleSheet(style)

    def _on_report_ready(self, report) -> None:
        self.report = report
        self.peak_digits_ready.emit({s.conductor: field_figures(s.estimated_relative_error) for s in report.hot_spots})
        rounded = ("" if report.corner_radius_m is None else
                   f", sharp corners rounded to {format_plain(report.corner_radius_m / self.results.model.metres_per_unit, 4)} "
                   f"{self.results.model.unit}")
        self._set_status(f"Peak fields refined to an error target of {format_percent(report.target_relative_error)} "
                         f"({report.n_panels[-1]} panels on the finest mesh{rounded}).")
        self._assess()

    def _assess(self) -> None:
        air, basis = self.air_box.conditions(), self.air_box.voltage_basis()
        if air is None or basis is None or self.report is None:
            return
        r = self.report
        self.margins = solver.assess_margins(r.solved_model, r.hot_spots, air, THIN_MARGIN, r.air_region,
                                             solver.solution_potential_difference_V(r.solution), basis)
        self._fill()

    def _fill(self) -> None:
        r, m, model = self.report, self.margins, self.results.model
        scale, unit = model.metres_per_unit, model.unit
        size = drawing_size(self.results.solution) / scale
        factor, label = field_unit([s.field_V_per_m for s in r.hot_spots] or [0.0])
        rows, cells, statuses, notes = [], [], [], []
        for spot, margin in zip(r.hot_spots, m.margins):
            rows.append(spot.conductor)
            if spot.singular:
                corner = "yes" if spot.corner_exponent is None else f"yes,\nσ ~ r^{format_plain(spot.corner_exponent, 3)}"
                notes.append(f"'{spot.conductor}': {spot.note}")
            else:
                corner = "no"
                if not spot.converged:
                    notes.append(f"'{spot.conductor}': {spot.note}")
            if margin.corona_radius_basis and margin.corona_radius_basis != "round conductor":
                notes.append(f"'{spot.conductor}': corona onset uses the {margin.corona_radius_basis} "
                             f"({format_plain(margin.corona_radius_m / scale, 3)} {unit}).")
            err = spot.estimated_relative_error
            cells.append([
                _peak(spot.field_V_per_m / factor, err) + ("\n(mesh value)" if spot.singular else ""),
                "—\n(singular)" if err is None else format_plain(100 * err, 2),
                format_coordinate(spot.location_m[0] / scale, size), format_coordinate(spot.location_m[1] / scale, size),
                corner, _margin(spot.enhancement_factor),
                format_plain(margin.air_breakdown_field_V_per_m / 1e6, 3), _margin(margin.air_breakdown_margin),
                "—" if margin.corona_onset_field_V_per_m is None else format_plain(margin.corona_onset_field_V_per_m / 1e6, 3),
                _margin(margin.corona_onset_margin), margin.deciding_margin or "—", margin.status])
            statuses.append(margin.status)
        if r.air_region is not None:
            ar = r.air_region
            place = "outer surface of insulation" if ar.where == "interface" else ar.where.replace("conductor", "bare")
            rows.append(f"in air ({place}{', negligible' if ar.negligible else ''})")
            breakdown = m.air_region_breakdown_field_V_per_m
            error = ar.estimated_relative_error
            top = max((s.field_V_per_m for s in r.hot_spots), default=None)
            cells.append([_peak(ar.field_V_per_m / factor, error, None if top is None else top / factor), "—" if error is None else format_plain(100 * error, 2),
                          format_coordinate(ar.location_m[0] / scale, size), format_coordinate(ar.location_m[1] / scale, size),
                          "yes" if ar.at_sharp_corner else "no", "—",
                          "n/a" if breakdown is None else format_plain(breakdown / 1e6, 3),
                          _margin(m.air_region_margin), "—", "—",
                          "air breakdown" if m.air_region_margin is not None else "—", m.air_region_status or "—"])
            statuses.append(m.air_region_status or "not assessed")
        quantities = [heading.format(field=label, length=unit) for heading, _ in ROW_HEADINGS]
        # one column per conductor, so that every figure stays in view in a narrow panel; short
        # headings with units (what each stands for in its tooltip) that wrap rather than push
        # the table past the panel's edge
        self.table.fill(quantities, rows, [list(col) for col in zip(*cells)] if cells else [], wrap=14,
                        row_tips=[tip for _, tip in ROW_HEADINGS],
                        column_tips=[f"Conductor '{name}'" if k < len(r.hot_spots) else
                                     "The largest field in the air around the conductors (a bare conductor's surface "
                                     "or the outer surface of its insulation)" for k, name in enumerate(rows)])
        self._statuses = statuses
        self._paint_statuses()
        notes.append("Enhancement = peak / (potential difference / gap) to the nearest conductor at another "
                     "potential. Fields are crest values at the model's potentials. Voltage basis: "
                     f"{m.voltage_basis.describe()}"
                     + (f"; the margins compare the thresholds with these peaks × {format_plain(m.voltage_basis.field_factor, 4)}."
                        if m.voltage_basis.field_factor != 1.0 else "."))
        self.notes.setText(keep_units("\n".join(notes)))
        self._show_caution()

    def _show_caution(self) -> None:
        """Hand the verdict on the refined peaks to the caution line (its one home)."""
        self.verdict_ready.emit(self.margins.verdict)
