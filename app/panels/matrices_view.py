"""The numbers tab: capacitance matrices (pF/m), per-conductor figures and the error estimate.

Every figure goes through the one formatter (:mod:`app.units`): the matrices carry the digits
their estimated error supports, round-off shows as 0, minus signs are true minus signs.
"""

from __future__ import annotations

import textwrap

import numpy as np
from PySide6.QtCore import QSize, Qt, QTimer
from PySide6.QtGui import QGuiApplication, QKeySequence, QShortcut
from PySide6.QtWidgets import (
    QAbstractItemView,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QPushButton,
    QTableWidget,
    QTableWidgetItem,
    QVBoxLayout,
    QWidget,
)

from app import colours
from app.panels.status_text import FAILED, NOT_SOLVED, failure_text
from app.units import count_of, digits_for, format_percent, format_plain, format_point, keep_units, si_scale
from solver import NoReferenceError
from solver.cli.formatting import ROUND_OFF

PF = 1e-12

#: Two quantities that are both called "self capacitance" in the trade, named apart here.
MAXWELL_DIAGONAL_TIP = (
    "Maxwell diagonal C_ii: the charge per metre on conductor i per volt on it, with every other "
    "conductor held at 0 V. It counts the capacitance to earth and to all the other conductors.")
TO_EARTH_TIP = (
    "Capacitance to earth C_i0: the capacitance between conductor i and the reference (earthed "
    "conductors and the ground plane) alone, the row sum of the Maxwell matrix. It is the diagonal "
    "of the mutual form; the off-diagonal entries there are the capacitances between pairs.")


#: A table that does not fit its place wraps its headings down to lines this many characters long.
NARROWEST_WRAP = 6

#: Room a row heading takes beside its text (the header's margins), pixels.
HEADING_PADDING_PX = 12


def _wrap_words(text: str, width: int) -> str:
    """A cell's text with its worded lines wrapped to ``width`` characters (numbers never break)."""
    return "\n".join(wrap_heading(line, width) if " " in line and len(line) > width else line
                     for line in text.split("\n"))


def wrap_heading(text: str, width: int) -> str:
    """``text`` broken between words into lines of at most ``width`` characters (a longer word
    keeps its own line), e.g. "air-breakdown field (MV/m)" -> "air-breakdown\\nfield (MV/m)"."""
    return "\n".join(textwrap.wrap(text, width, break_long_words=False, break_on_hyphens=False)) or text


class CopyableTable(QTableWidget):
    """A read-only table; Ctrl+C copies the selection (or everything) as tab-separated text."""

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self._texts = None
        self._fitted_width = -1
        self._fit_timer = QTimer(self)  # the fit runs once the view's own changes after a fill are in
        self._fit_timer.setSingleShot(True)
        self._fit_timer.timeout.connect(self._fit_width)
        self.setEditTriggers(QAbstractItemView.NoEditTriggers)
        self.setStyleSheet(f"QTableWidget {{ selection-background-color: {colours.TABLE_SELECTION};"
                           f" selection-color: {colours.TEXT}; }}")
        self.setSelectionMode(QAbstractItemView.ExtendedSelection)
        QShortcut(QKeySequence.Copy, self, activated=self.copy_to_clipboard)

    def fill(self, rows: list[str], columns: list[str], cells: list[list[str]], *, wrap: int | None = None,
             row_tips: list[str] | None = None, column_tips: list[str] | None = None) -> None:
        """Show ``cells`` under ``columns`` beside ``rows``; with ``wrap``, headings longer than
        ``wrap`` characters break onto lines between words, so that a narrow panel shows them
        whole without scrolling sideways (cells may hold line breaks too); when the table is
        still wider than its place, headings and worded cells wrap narrower (down to
        :data:`NARROWEST_WRAP` characters) as the table is filled and resized. With no ``rows``
        the table has no row headings (its first column says what each row is). ``row_tips``
        and ``column_tips`` are the headings' tooltips: what a short heading stands for."""
        self._texts = (list(rows), list(columns), [list(r) for r in cells], wrap) if wrap else None
        self._fitted_width = -1
        if wrap:
            rows, columns = [wrap_heading(r, wrap) for r in rows], [wrap_heading(c, wrap) for c in columns]
        self.clear()
        self.setRowCount(len(rows) or len(cells))
        self.setColumnCount(len(columns))
        self.setHorizontalHeaderLabels(columns)
        self.setVerticalHeaderLabels(rows)
        self.verticalHeader().setVisible(bool(rows) or not cells)
        for header_item, tips in ((self.verticalHeaderItem, row_tips), (self.horizontalHeaderItem, column_tips)):
            for k, tip in enumerate(tips or []):
                if header_item(k) is not None and tip:
                    header_item(k).setToolTip(tip)
        for i, row in enumerate(cells):
            for j, text in enumerate(row):
                item = QTableWidgetItem(text)
                item.setTextAlignment(Qt.AlignRight | Qt.AlignVCenter)
                self.setItem(i, j, item)
        self._fit_height()
        self._fit_timer.start(0)

    def _fit_height(self) -> None:
        self.resizeColumnsToContents()
        self.resizeRowsToContents()
        self.horizontalHeader().resizeSections(QHeaderView.ResizeToContents)
        self._set_height()

    def _set_height(self) -> None:
        """Rows and headings in full; room for a sideways scroll bar only while the table is wider
        than its place (an empty strip under every table otherwise)."""
        height = self.horizontalHeader().sizeHint().height() + sum(self.rowHeight(i) for i in range(self.rowCount()))
        too_wide = self._needed_width() > self.width() - 2 * self.frameWidth() or not self.isVisible()
        bar = self.horizontalScrollBar().sizeHint().height() if too_wide else 0
        self.setFixedHeight(height + 2 * self.frameWidth() + bar + 2)

    def _needed_width(self) -> int:
        header = self.verticalHeader()
        heading = 0
        if not header.isHidden():  # its size hint may lag behind new texts: measure them too
            metrics = header.fontMetrics()
            texts = [self.verticalHeaderItem(i).text() for i in range(self.rowCount()) if self.verticalHeaderItem(i)]
            widest = max((metrics.horizontalAdvance(line) for t in texts for line in t.split("\n")), default=0)
            heading = max(header.sizeHint().width(), widest + HEADING_PADDING_PX)
        return heading + sum(self.columnWidth(j) for j in range(self.columnCount()))

    def _fit_width(self) -> None:
        """Wrap headings and worded cells narrower until the table fits its width (or the
        narrowest wrap is reached); item colours set by a view are kept."""
        if self.isVisible():
            self._set_height()
        if self._texts is None or not self.isVisible() or self.width() == self._fitted_width:
            return
        self._fitted_width = self.width()
        rows, columns, cells, wrap = self._texts
        room = self.width() - 2 * self.frameWidth()
        for width in range(wrap, NARROWEST_WRAP - 1, -2):
            for i, text in enumerate(rows):
                if self.verticalHeaderItem(i) is not None:
                    self.verticalHeaderItem(i).setText(wrap_heading(text, width))
            for j, text in enumerate(columns):
                if self.horizontalHeaderItem(j) is not None:
                    self.horizontalHeaderItem(j).setText(wrap_heading(text, width))
            for i, row in enumerate(cells):
                for j, text in enumerate(row):
                    item = self.item(i, j)
                    if item is not None and width < wrap:
                        item.setText(_wrap_words(text, width))
            self._fit_height()
            if self._needed_width() <= room:
                break

    def resizeEvent(self, event) -> None:
        super().resizeEvent(event)
        self._fit_timer.start(0)

    def showEvent(self, event) -> None:
        super().showEvent(event)
        self._fit_timer.start(0)

    def minimumSizeHint(self) -> QSize:
        """As narrow as a scroll area may be: the panel, not the table, sets the width."""
        hint = super().minimumSizeHint()
        return QSize(min(hint.width(), 120), hint.height())

    def as_text(self) -> str:
        """The whole table with its headers as tab-separated lines (ASCII minus signs)."""
        cols = [self.horizontalHeaderItem(j).text() for j in range(self.columnCount())]
        headed = not self.verticalHeader().isHidden()
        lines = ["\t".join([""] * headed + cols)]
        for i in range(self.rowCount()):
            cells = [self.item(i, j).text() if self.item(i, j) else "" for j in range(self.columnCount())]
            head = self.verticalHeaderItem(i)
            lines.append("\t".join([head.text() if head is not None else ""] * headed + cells))
        lines = [line.replace("\n", " ") for line in lines]  # headings wrapped on screen are one cell
        return "\n".join(lines).replace("\u2212", "-")  # spreadsheets read an ASCII minus as a number

    def copy_to_clipboard(self) -> None:
        QGuiApplication.clipboard().setText(self.as_text())


class MatricesView(QWidget):
    """Capacitance matrices, per-conductor figures and the error estimate."""

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        layout = QVBoxLayout(self)
        self._status_text = NOT_SOLVED
        self.status = QLabel(self._status_text)
        self.status.setWordWrap(True)
        layout.addWidget(self.status)
        self.maxwell_label = QLabel("Capacitance matrix, Maxwell form (pF/m): Maxwell diagonal C_ii on the "
                                    "diagonal, minus the capacitance between pairs off it")
        self.maxwell_label.setWordWrap(True)
        self.maxwell_label.setToolTip(MAXWELL_DIAGONAL_TIP + "\n\n" + TO_EARTH_TIP)
        self.maxwell = CopyableTable()
        self.mutual_label = QLabel("Capacitance matrix, mutual form (pF/m): capacitance to earth C_i0 on the "
                                   "diagonal, capacitance between pairs off it")
        self.mutual_label.setToolTip(TO_EARTH_TIP + "\n\n" + MAXWELL_DIAGONAL_TIP)
        self.mutual_label.setWordWrap(True)
        self.mutual = CopyableTable()
        self.conductors_label = QLabel("Per conductor")
        self.conductors = CopyableTable()
        for w in (self.maxwell_label, self.maxwell, self.mutual_label, self.mutual, self.conductors_label, self.conductors):
            layout.addWidget(w)
        self.conductors_note = QLabel("Equivalent radius: the logarithmic capacity of the conductor on its own, "
                                      "i.e. the radius of the round wire that looks the same from far away. "
                                      "A peak at a sharp corner grows as the mesh is refined; give the corner a radius.")
        self.conductors_note.setWordWrap(True)
        layout.addWidget(self.conductors_note)
        self.regions_label = QLabel("Largest field in each dielectric region (insulation stress); fields include "
                                    "the bound charge of the dielectrics, charges above are free charge")
        self.regions_label.setWordWrap(True)
        self.regions = CopyableTable()
        layout.addWidget(self.regions_label)
        layout.addWidget(self.regions)
        buttons = QHBoxLayout()
        self.copy_buttons = []
        for text, table in (("Copy Maxwell", self.maxwell), ("Copy mutual", self.mutual), ("Copy per conductor", self.conductors)):
            b = QPushButton(text)
            b.clicked.connect(table.copy_to_clipboard)
            buttons.addWidget(b)
            self.copy_buttons.append(b)
        layout.addLayout(buttons)
        self.error_label = QLabel()
        self.error_label.setWordWrap(True)
        layout.addWidget(self.error_label)
        self.asymmetry_label = QLabel()
        self.asymmetry_label.setWordWrap(True)  # raw asymmetry of the computed matrix (Solution.capacitance_asymmetry)
        layout.addWidget(self.asymmetry_label)
        layout.addStretch(1)
        self.maxwell.setToolTip(MAXWELL_DIAGONAL_TIP)
        self.mutual.setToolTip(TO_EARTH_TIP)
        for table in (self.maxwell, self.mutual, self.conductors, self.regions):
            table.fill([], [], [])  # compact until there is something to show
        self.regions_label.setVisible(False)
        self.regions.setVisible(False)
        self._show_matrices(False, False)  # no empty frames before a solve

    def _show_matrices(self, solved: bool, has_capacitance: bool) -> None:
        """The matrices (with a capacitance) and the per-conductor table (after a solve) with their
        headings and copy buttons; nothing of them before there is something to show."""
        for w in (self.maxwell_label, self.maxwell, self.mutual_label, self.mutual, *self.copy_buttons[:2]):
            w.setVisible(has_capacitance)
        for w in (self.conductors_label, self.conductors, self.conductors_note, self.copy_buttons[2]):
            w.setVisible(solved)

    def show_results(self, results) -> None:
        sol, model = results.solution, results.model
        names = list(sol.signal_names)
        if sol.has_capacitance:
            self.maxwell.fill(names, names, matrix_cells(sol.capacitance_maxwell_F_per_m, sol.estimated_relative_error))
            self.mutual.fill(names, names, matrix_cells(sol.capacitance_mutual_F_per_m, sol.estimated_relative_error))
            self.status.setText(f"Solved: {count_of(len(model.conductors), 'conductor')}, {count_of(sol.mesh.n_panels, 'boundary panel')}.")
        else:
            self.maxwell.fill([], [], [])
            self.mutual.fill([], [], [])
            try:
                _ = sol.capacitance_maxwell_F_per_m  # raises NoReferenceError without a return path
                reason = "No capacitance matrix."
            except NoReferenceError as exc:
                reason = str(exc)
            self.status.setText(reason)
        self._status_text = self.status.text()
        self.asymmetry_label.setText(keep_units(
            f"Accuracy check: the computed matrix was asymmetric by {format_percent(sol.capacitance_asymmetry)} "
            "(largest |C_ij − C_ji| / largest |C_ij|) before it was symmetrised." if sol.has_capacitance else ""))
        self._fill_conductors(results)
        self._fill_regions(results)
        self._show_matrices(True, sol.has_capacitance)
        err = sol.estimated_relative_error
        self.error_label.setText(keep_units(
            "Estimated relative error of the matrix: n/a" if err is None else
            f"Estimated relative error: {format_percent(err)}, the change against a mesh at half the "
            f"resolution ({sol.coarse_mesh_panels} panels against {sol.mesh.n_panels}); figures are shown "
            f"to {digits_for(err)} significant digits."))

    def _fill_conductors(self, results) -> None:
        sol, model = results.solution, results.model
        scale, size = model.metres_per_unit, drawing_size(sol)
        err = sol.estimated_relative_error
        peaks = {p.conductor: p for p in sol.peak_surface_fields}
        largest_field = max((p.field_V_per_m for p in peaks.values() if np.isfinite(p.field_V_per_m)), default=None)
        largest_charge = float(np.max(np.abs(sol.conductor_charges_C_per_m))) if len(model.conductors) else None
        names, columns = [], []
        for c in model.conductors:
            p = peaks.get(c.name)
            radius = results.equivalent_radius_m.get(c.name)
            x, y = ("", "") if p is None else (format_coordinate(p.location_m[0] / scale, size / scale),
                                               format_coordinate(p.location_m[1] / scale, size / scale))
            names.append(c.name)
            columns.append([x, y, ("yes" if p.at_sharp_corner else "no") if p else "",
                            format_plain(radius / scale, digits_for(err)) if radius else "n/a"])
        # one unit per row, in its heading (cells hold numbers only: no row mixes kV and V)
        potential_unit, potentials = cells_in_one_unit(list(sol.conductor_potentials_V), "V", 6)
        charge_unit, charges = cells_in_one_unit(list(sol.conductor_charges_C_per_m), "C/m", digits_for(err),
                                                 largest_charge, err)
        field_unit, fields = cells_in_one_unit([peaks[c.name].field_V_per_m if c.name in peaks else None
                                                for c in model.conductors], "V/m", 3, largest_field)
        columns = [[a, b, c, *rest] for a, b, c, rest in zip(potentials, charges, fields, columns)]
        # one column per conductor (as in the High voltage section): every figure stays in view in a narrow panel
        quantities = [f"potential ({potential_unit})", f"charge/length ({charge_unit})",
                      f"peak |E| at surface ({field_unit})", f"peak at x ({model.unit})",
                      f"peak at y ({model.unit})", "peak at a sharp corner", f"equivalent radius ({model.unit})"]
        self.conductors.fill(quantities, names, [list(row) for row in zip(*columns)] if columns else [], wrap=14)

    def _fill_regions(self, results) -> None:
        sol, model = results.solution, results.model
        peaks = tuple(getattr(sol, "peak_region_fields", ()))
        self.regions_label.setVisible(bool(peaks))
        self.regions.setVisible(bool(peaks))
        scale, size = model.metres_per_unit, drawing_size(sol)
        largest = max((p.field_V_per_m for p in peaks if np.isfinite(p.field_V_per_m)), default=None)
        rows = [p.region for p in peaks]
        # one unit for the column, in its heading (no cell mixes kV/m and MV/m)
        field_unit, fields = cells_in_one_unit([p.field_V_per_m for p in peaks], "V/m", 3, largest)
        cells = [[format_plain(p.eps_r, 3), field,
                  format_point(p.location_m[0] / scale, p.location_m[1] / scale, "", size / scale).strip(),
                  wrap_heading(p.where + (" (sharp corner: mesh value)" if p.at_sharp_corner else ""), 22)]
                 for p, field in zip(peaks, fields)]
        self.regions.fill(rows, ["εr", f"largest |E| ({field_unit})", f"at ({model.unit})", "on"], cells, wrap=14)

    def show_failure(self, message: str) -> None:
        """No results to show: the solve failed, and ``message`` says why (and what to change)."""
        if not self.conductors.isVisibleTo(self):  # nothing solved shown (the table comes with results)
            self._status_text = failure_text(message)
            self.status.setText(self._status_text)
            self.status.setStyleSheet(colours.status_style(error=True))

    def mark_stale(self, stale: bool) -> None:
        if stale:
            self.status.setText("OUT OF DATE: the drawing changed after this solve. Solve again (F5).")
            self.status.setStyleSheet(colours.style_sheet(colours.FRESHNESS["stale"], bold=True))
        else:
            self.status.setText(self._status_text)
            self.status.setStyleSheet(colours.status_style(error=self._status_text.startswith(FAILED)))


def cells_in_one_unit(values, unit: str, digits: int, largest: float | None = None,
                      relative_error: float | None = None) -> tuple[str, list[str]]:
    """(prefixed unit, cells): ``values`` (SI; None for none) shown in one unit with the SI prefix
    of the largest of them, to ``digits`` figures; round-off below ``ROUND_OFF`` x ``largest``
    reads 0, and so does a value below ``relative_error`` x ``largest`` (the solve cannot tell it
    from 0). E.g. [5091.2, -2545.6, 0.0] V -> ("kV", ["5.0912", "−2.5456", "0"])."""
    finite = [abs(v) for v in values if v is not None and np.isfinite(v)]
    top = max(finite, default=0.0)
    factor, prefix = si_scale(top)
    cells = []
    for v in values:
        if v is None or not np.isfinite(v):
            cells.append("n/a")
        elif v == 0 or (largest is not None and abs(v) <= max(ROUND_OFF, relative_error or 0.0) * abs(largest)):
            cells.append("0")
        else:
            cells.append(format_plain(v / factor, digits))
    return prefix + unit, cells


def matrix_rows(results) -> tuple[list[str], np.ndarray, np.ndarray]:
    """(names, Maxwell, mutual) in F/m for exports."""
    sol = results.solution
    return list(sol.signal_names), sol.capacitance_maxwell_F_per_m, sol.capacitance_mutual_F_per_m


def drawing_size(solution) -> float:
    """The extent of the mesh in metres: coordinates far below it are round-off."""
    points = np.asarray(solution.mesh.midpoints)
    return float(np.max(np.ptp(points, axis=0))) if points.size else 1.0


def format_coordinate(value: float, size: float) -> str:
    """One coordinate in model units, round-off (below ``ROUND_OFF`` times the drawing's
    ``size``) shown as 0."""
    return "0" if abs(value) <= ROUND_OFF * abs(size) else format_plain(value, 4)


def matrix_cells(matrix_F_per_m, relative_error) -> list[list[str]]:
    """Matrix entries in pF/m to the digits the error supports; round-off entries as 0."""
    values = np.asarray(matrix_F_per_m) / PF
    largest = float(np.max(np.abs(values))) if values.size else 0.0
    digits = digits_for(relative_error)
    return [[format_plain(v, digits) if abs(v) > 1e-9 * largest else "0" for v in row] for row in values]
