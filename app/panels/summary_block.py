"""The answer first: a fixed block above the results with C', Z0 and eps_eff (for signal
lines), the peak |E| with its margin and status, the solve state, and the caution as one
graded line.

:func:`summary_rows` gives the block's rows as plain (label, text) pairs, so the PDF report
can head its first page with the same figures. Every figure is the solver's: the verdict is
:func:`solver.judge_solution` (solve mesh) until the High voltage section has refined the
peaks (:func:`solver.assess_margins`); both apply :func:`solver.judge_peak`. No physics here.
"""

from __future__ import annotations

import math

from PySide6.QtCore import Qt, Signal
from PySide6.QtWidgets import (
    QFormLayout,
    QFrame,
    QHBoxLayout,
    QLabel,
    QPushButton,
    QScrollArea,
    QSizePolicy,
    QVBoxLayout,
    QWidget,
)

import solver
from app import colours
from app.jobs.figure_jobs import FigureJobRunner
from app.units import digits_for, format_field, format_measured, format_plain, keep_units

#: Freshness states of the results shown (keys of :data:`app.colours.FRESHNESS`).
STATES = ("none", "fresh", "stale", "solving", "failed")

#: The short form of the standing statement, shown beside every high-voltage verdict.
SHORT_STATEMENT = "An aid to design, not a clearance: local codes and qualified practice prevail (details)."

#: Tallest the expanded caution text grows before it scrolls, px.
DETAILS_MAX_HEIGHT = 170


def capacitance_text(solution) -> str:
    """C' per signal conductor: the diagonal of the Maxwell matrix, F/m, in one SI prefix."""
    if not solution.has_capacitance:
        return "no return path: no capacitance per metre"
    c = solution.capacitance_maxwell_F_per_m
    names = solution.signal_names
    err = solution.estimated_relative_error  # the digits it supports (4 while it is being estimated)
    if len(names) == 1:
        return f"{format_measured(float(c[0, 0]), 'F/m', err)} ('{names[0]}' to its return)"
    shown = ", ".join(f"'{n}' {format_measured(float(c[i, i]), 'F/m', err)}" for i, n in enumerate(names[:4]))
    more = f" and {len(names) - 4} more" if len(names) > 4 else ""
    return f"Maxwell diagonal C'ii: {shown}{more}"


def line_text(figures) -> str | None:
    """Z0 and eps_eff of one signal line, or the pair's impedances; None when neither applies."""
    if figures is None:
        return None
    err = figures.estimated_relative_error
    if figures.characteristic_impedance_ohm is not None:
        return (f"Z0 {format_measured(figures.characteristic_impedance_ohm, 'Ω', err)}, "
                f"εeff {format_plain(figures.effective_permittivity, digits_for(err))}")
    if figures.differential_impedance_ohm is not None:
        return (f"Zdiff {format_measured(figures.differential_impedance_ohm, 'Ω', err)}, "
                f"Zodd {format_measured(figures.odd_mode_impedance_ohm, 'Ω', err)}, "
                f"Zeven {format_measured(figures.even_mode_impedance_ohm, 'Ω', err)}")
    return None


def _margin_text(margin: float | None, deciding: str | None = None) -> str:
    if margin is None:
        return "no margin"
    by = f" ({deciding})" if deciding else ""
    return f"margin ∞{by}" if not math.isfinite(margin) else f"margin {format_plain(margin, 3)}{by}"


def peak_text(verdict) -> str | None:
    """The largest peak |E| and where, with the margin and status of the peak that decides the
    verdict; when that is another peak (a smaller field with a smaller margin), it is named too.
    Peaks that are not graded (no margin) are never shown in place of a larger field. None
    without a verdict."""
    if verdict is None or not verdict.verdicts:
        return None
    largest = max(verdict.verdicts, key=lambda v: v.peak_field_V_per_m)
    deciding = next((v for v in verdict.verdicts if v.status == verdict.status and v.headline == verdict.headline),
                    largest)
    if deciding.margin is None and largest.status == deciding.status:
        deciding = largest  # nothing graded: the largest field says the most

    def field(v) -> str:
        # a corner's peak grows with every refinement: never shown as if it were a real figure
        return format_field(v.peak_field_V_per_m) + (" (mesh value at a sharp corner)" if v.at_sharp_corner else "")

    text = f"{field(largest)} on {largest.where}"
    if deciding is not largest:
        text += f"; deciding: {field(deciding)} on {deciding.where}"
    return f"{text}, {_margin_text(deciding.margin, deciding.deciding)}, {colours.SEVERITY[deciding.status].word}"


def summary_rows(state: str, solution=None, verdict=None, line_figures=None,
                 verdict_basis: str = "solve mesh") -> list[tuple[str, str]]:
    """The summary block's rows as (label, text), in the order shown.

    Parameters
    ----------
    state : one of :data:`STATES` (the results' freshness).
    solution : solver.Solution or None (not solved).
    verdict : solver.CautionVerdict or None.
    line_figures : solver.TransmissionLineFigures or None.
    verdict_basis : which peaks were judged ("solve mesh" or "refined peaks").
    """
    rows = [("Results", colours.FRESHNESS[state].word)]
    if solution is None:
        return rows
    rows.append(("C' per metre", capacitance_text(solution)))
    line = line_text(line_figures)
    if line is not None:
        rows.append(("Line", line))
    peak = peak_text(verdict)
    if peak is not None:
        rows.append((f"Peak |E| ({verdict_basis})", peak))
        if verdict.caution:
            rows.append(("High voltage", f"{colours.SEVERITY[verdict.status].word}: {verdict.headline}"))
        else:  # a low-voltage model: no breakdown caution applies, say so in a few words
            rows.append(("High voltage", f"{colours.SEVERITY[verdict.status].word}: {verdict.reason.split(':')[0]}"))
    return rows


class CautionLine(QFrame):
    """One graded line: symbol, word and headline in the severity colour, "show where" and
    "details" (the full caution, with the standing statement, shown once)."""

    show_where = Signal()

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self.setObjectName("caution_line")
        layout = QVBoxLayout(self)
        layout.setContentsMargins(6, 3, 6, 3)
        layout.setSpacing(2)
        self.headline = QLabel()
        self.headline.setTextFormat(Qt.PlainText)
        self.headline.setWordWrap(True)
        layout.addWidget(self.headline)  # the whole width: a long headline wraps, never clipped
        row = QHBoxLayout()
        self.short = QLabel(SHORT_STATEMENT)
        self.short.setWordWrap(True)
        self.where_button = QPushButton("show where")
        self.where_button.clicked.connect(self.show_where)
        self.details_button = QPushButton("details")
        self.details_button.setCheckable(True)
        self.details_button.toggled.connect(self._on_details_toggled)
        row.addWidget(self.short, 1)
        row.addWidget(self.where_button, 0, Qt.AlignTop)
        row.addWidget(self.details_button, 0, Qt.AlignTop)
        layout.addLayout(row)
        self.details = QLabel()
        self.details.setTextFormat(Qt.PlainText)
        self.details.setWordWrap(True)
        self.details_area = QScrollArea()
        self.details_area.setWidgetResizable(True)
        self.details_area.setWidget(self.details)
        self.details_area.setFrameShape(QFrame.NoFrame)
        self.details_area.setMaximumHeight(DETAILS_MAX_HEIGHT)
        self.details_area.setVisible(False)
        layout.addWidget(self.details_area)
        self.verdict = None
        self.stale = False
        self.setVisible(False)

    def show_verdict(self, verdict) -> None:
        """Show ``verdict`` (a solver.CautionVerdict); hidden for None or a low-voltage model."""
        self.verdict = verdict
        if verdict is None or not verdict.caution:
            self.setVisible(False)
            return
        self.details.setText(keep_units(verdict.caution))
        self._paint()
        self.setVisible(True)

    def set_stale(self, stale: bool) -> None:
        """Grey the line out (and say so) while the drawing has changed since the verdict."""
        if stale != self.stale:
            self.stale = stale
            if self.verdict is not None:
                self._paint()

    def _paint(self) -> None:
        badge = colours.SEVERITY[self.verdict.status]
        text, background = (colours.STALE_TEXT, colours.FRESHNESS["stale"].background) if self.stale \
            else (badge.text, badge.background)
        before = "out of date: " if self.stale else ""
        self.headline.setText(f"{badge.symbol}  {before}{badge.word.upper()} — {self.verdict.headline}")
        self.setStyleSheet(f"#caution_line {{ background: {background}; border-left: 6px solid {text}; }}"
                           f" QLabel {{ color: {text}; background: {background}; }}")
        self.headline.setStyleSheet("font-weight: bold;")

    def _on_details_toggled(self, on: bool) -> None:
        self.details_area.setVisible(on)
        self.short.setVisible(not on)


class SummaryBlock(QWidget):
    """The fixed summary above the results sections."""

    show_where = Signal()
    #: The freshness state after each change (one of :data:`STATES`), for the Solve button.
    state_changed = Signal(str)

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        policy = QSizePolicy(QSizePolicy.Preferred, QSizePolicy.Minimum)  # always whole: the sections give way
        policy.setHeightForWidth(True)
        self.setSizePolicy(policy)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(4, 4, 4, 4)
        layout.setSpacing(3)
        self.form = QFormLayout()
        self.form.setContentsMargins(0, 0, 0, 0)
        self.form.setVerticalSpacing(1)
        self.form.setRowWrapPolicy(QFormLayout.WrapLongRows)
        layout.addLayout(self.form)
        self.caution = CautionLine()
        self.caution.show_where.connect(self.show_where)
        layout.addWidget(self.caution)
        self.state = "none"
        self.solution = None
        self.verdict = None
        self.verdict_basis = "solve mesh"
        self.line_figures = None
        self.runner = FigureJobRunner(self)
        self.runner.result_ready.connect(self._on_line_figures)
        self.runner.job_failed.connect(lambda _m: None)  # the Line figures section says why
        self._refresh()

    # ---- feeding -------------------------------------------------------------------------------
    def set_state(self, state: str) -> None:
        if state not in STATES:
            raise ValueError(f"summary state {state!r}: expected one of {STATES}")
        self.state = state
        self._refresh()

    def show_results(self, results) -> None:
        """A new solve: its capacitance now, its line figures in the background."""
        self.solution = results.solution
        self.line_figures = None
        self.state = "fresh"
        self.runner.cancel()
        if results.solution.has_capacitance and len(results.solution.signal_names) <= 2:
            self.runner.start(solver.transmission_line_figures, results.solution)
        self._refresh()

    def show_verdict(self, verdict, basis: str = "solve mesh") -> None:
        self.verdict, self.verdict_basis = verdict, basis
        self.caution.show_verdict(verdict)
        self._refresh()

    def clear(self) -> None:
        self.runner.cancel()
        self.solution = self.verdict = self.line_figures = None
        self.caution.show_verdict(None)
        self.state = "none"
        self._refresh()

    def rows(self) -> list[tuple[str, str]]:
        """The rows shown now (see :func:`summary_rows`)."""
        return summary_rows(self.state, self.solution, self.verdict, self.line_figures, self.verdict_basis)

    def _on_line_figures(self, figures) -> None:
        self.line_figures = figures
        self._refresh()

    # ---- display -------------------------------------------------------------------------------
    def _refresh(self) -> None:
        while self.form.rowCount():
            self.form.removeRow(0)
        dim = self.state in ("stale", "failed")
        for label, text in self.rows():
            if label == "High voltage" and self.caution.isVisibleTo(self):
                continue  # the caution line says it, once
            name = QLabel(label)
            value = QLabel(keep_units(text))  # a number and its unit on one line
            value.setTextFormat(Qt.PlainText)
            value.setWordWrap(True)
            name.setStyleSheet(f"color: {colours.TEXT_MUTED};")
            if label == "Results":
                value.setStyleSheet(colours.style_sheet(colours.FRESHNESS[self.state], bold=True))
            elif dim:
                value.setStyleSheet(f"color: {colours.TEXT_MUTED};")
            else:
                value.setStyleSheet(f"color: {colours.TEXT}; font-weight: bold;")
            self.form.addRow(name, value)
        self.caution.set_stale(dim)
        self.state_changed.emit(self.state)
