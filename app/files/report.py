"""The one-page PDF report: drawing, matrices, hot spots, refined margins, insulation stress,
air conditions, error estimate, caveats and cautions; headed by the program's version, the date
and the SHA-256 of the project file, so a printed page can be traced to the file it came from.

Figures go through the one formatter (:mod:`app.units`). The drawing is taken without the
selection handles, the probe line and the picked-point marker (:func:`drawing_for_report`).
"""

from __future__ import annotations

import datetime as dt
import hashlib
import html
from pathlib import Path

import numpy as np
from PySide6.QtCore import QMarginsF, QUrl
from PySide6.QtGui import QPageLayout, QPageSize, QPainter, QPdfWriter, QTextDocument

import solver
from app import cautions, colours
from app.help_menu import program_version
from app.panels.matrices_view import drawing_size, matrix_cells
from app.panels.safety_views import PART_LENGTH_KEY, caution_for
from app.units import format_measured, format_percent, format_plain, format_point

PF = 1e-12
TABLE = "<table border='1' cellspacing='0' cellpadding='2'>"


def voltage_basis_text(settings_model) -> str | None:
    """The project's voltage basis (operating crest / withstand / impulse / factor) in words, as
    the solver describes it; None when there is no model or its saved basis is not valid."""
    if settings_model is None:
        return None
    try:
        return solver.voltage_basis_of(settings_model).describe()
    except solver.SolverError:
        return None


def project_file_line(project_path: Path | None, modified: bool) -> str:
    """The project file and the SHA-256 of its bytes, or why there is none."""
    if project_path is None:
        return "Project file: none (the drawing was never saved)"
    try:
        digest = hashlib.sha256(Path(project_path).read_bytes()).hexdigest()
    except OSError as exc:
        return f"Project file: {html.escape(str(project_path))} (cannot be read: {html.escape(str(exc))})"
    note = " — the drawing has unsaved changes, so this file is not exactly what is shown" if modified else ""
    return f"Project file: {html.escape(Path(project_path).name)}, SHA-256 {digest}{note}"


def drawing_for_report(canvas):
    """A QImage of the drawing without selection handles, the probe line or the picked-point marker."""
    items = [getattr(canvas, "_handles", None), getattr(canvas, "_probe", None),
             getattr(getattr(canvas, "overlays", None), "_marker", None)]
    items = [item for item in items if item is not None and item.isVisible()]
    for item in items:
        item.setVisible(False)
    try:
        return canvas.grab().toImage()
    finally:
        for item in items:
            item.setVisible(True)


def drawing_width(aspect: float | None, width: int = 640, max_height: int = 440) -> int:
    """Width of the drawing on the page (of 720 px), so that it is at most ``max_height`` tall."""
    if not aspect or aspect <= 0:
        return width
    return int(min(width, max_height / aspect))


def _matrix_html(title: str, names, matrix, relative_error) -> str:
    head = "".join(f"<th>{html.escape(n)}</th>" for n in names)
    rows = "".join(
        f"<tr><th>{html.escape(n)}</th>" + "".join(f"<td align='right'>{v}</td>" for v in row) + "</tr>"
        for n, row in zip(names, matrix_cells(matrix, relative_error))
    )
    return f"<p><b>{title}</b></p>{TABLE}<tr><th></th>{head}</tr>{rows}</table>"


def _margins_html(margins) -> str:
    """The refined margins of the Hot spots section (peaks refined to 1 %), when computed."""
    if margins is None:
        return ("<p><b>Refined margins:</b> not computed for this solve (open the Hot spots section to refine "
                "the peak fields); the verdict below uses the solve's own peaks.</p>")
    rows = "".join(
        f"<tr><td>{html.escape(m.conductor)}</td>"
        f"<td align='right'>{format_measured(m.peak_field_V_per_m, 'V/m', digits=3)}</td>"
        f"<td align='right'>{format_percent(m.peak_field_estimated_relative_error)}</td>"
        f"<td align='right'>{format_measured(m.air_breakdown_field_V_per_m, 'V/m', digits=3)}</td>"
        f"<td align='right'>{'—' if m.air_breakdown_margin is None else format_plain(m.air_breakdown_margin, 3)}</td>"
        f"<td align='right'>{format_measured(m.corona_onset_field_V_per_m, 'V/m', digits=3)}</td>"
        f"<td align='right'>{'—' if m.corona_onset_margin is None else format_plain(m.corona_onset_margin, 3)}</td>"
        f"<td>{html.escape(m.deciding_margin or '—')}</td><td>{html.escape(m.status)}</td></tr>"
        for m in margins.margins)
    return ("<p><b>Refined margins</b> (peak fields refined to 1 %; margin = threshold / peak)</p>" + TABLE +
            "<tr><th>conductor</th><th>peak |E|</th><th>error</th><th>air breakdown</th><th>margin</th>"
            f"<th>corona onset</th><th>margin</th><th>decided by</th><th>status</th></tr>{rows}</table>")


def _stress_html(sol, model) -> str:
    """The largest field in each dielectric region (insulation stress), as in the Numbers section."""
    peaks = tuple(getattr(sol, "peak_region_fields", ()))
    if not peaks:
        return ""
    scale, size = model.metres_per_unit, drawing_size(sol) / model.metres_per_unit
    largest = max((p.field_V_per_m for p in peaks if np.isfinite(p.field_V_per_m)), default=None)
    rows = "".join(
        f"<tr><td>{html.escape(p.region)}</td><td align='right'>{format_plain(p.eps_r, 3)}</td>"
        f"<td align='right'>{format_measured(p.field_V_per_m, 'V/m', digits=3, largest=largest)}</td>"
        f"<td>{format_point(p.location_m[0] / scale, p.location_m[1] / scale, model.unit, size)}</td>"
        f"<td>{html.escape(p.where)}{' (sharp corner: mesh value)' if p.at_sharp_corner else ''}</td></tr>"
        for p in peaks)
    return ("<p><b>Insulation stress</b> (largest field in each dielectric region)</p>" + TABLE +
            f"<tr><th>region</th><th>εr</th><th>largest |E|</th><th>at</th><th>on</th></tr>{rows}</table>")


def report_html(results, document_name: str, image_name: str = "drawing", settings_model=None, *,
                margins=None, project_path: Path | None = None, modified: bool = False,
                image_aspect: float | None = None) -> str:
    """The report body as HTML (the drawing is the resource ``image_name``).

    ``settings_model`` supplies the user's part length and the project's air conditions
    (default: the solved model). The verdict and its words are the solver's (one caution rule).
    ``margins`` is the Hot spots section's :class:`solver.MarginReport` for this solve, if computed;
    ``project_path`` the saved project file, whose SHA-256 heads the page. ``image_aspect``
    (height / width of the drawing) keeps a tall drawing from filling the page.
    """
    sol, model = results.solution, results.model
    settings_model = settings_model or model
    scale, size = model.metres_per_unit, drawing_size(sol) / model.metres_per_unit
    err = sol.estimated_relative_error
    parts = [f"<h2>Edgewise report: {html.escape(model.title or document_name)}</h2>",
             f"<p>Edgewise {html.escape(program_version())} &nbsp; Date: {dt.datetime.now().isoformat(' ', 'minutes')}"
             f" &nbsp; Unit: {model.unit} &nbsp; Panels: {sol.mesh.n_panels} &nbsp; Background εr = "
             f"{format_plain(model.background_eps_r, 6)}<br>{project_file_line(project_path, modified)}</p>",
             f"<p align='center'><img src='{image_name}' width='{drawing_width(image_aspect)}'></p>"]
    if sol.has_capacitance:
        names = list(sol.signal_names)
        parts.append("<table><tr><td valign='top'>"
                     + _matrix_html("Capacitance matrix, Maxwell form (pF/m): Maxwell diagonal C_ii", names,
                                    sol.capacitance_maxwell_F_per_m, err)
                     + "</td><td width='20'></td><td valign='top'>"
                     + _matrix_html("Mutual form (pF/m): capacitance to earth C_i0 on the diagonal", names,
                                    sol.capacitance_mutual_F_per_m, err)
                     + "</td></tr></table>")
    else:
        parts.append("<p><b>No capacitance matrix:</b> the model has no return path (reference conductor or ground plane).</p>")
    largest = max((p.field_V_per_m for p in sol.peak_surface_fields if np.isfinite(p.field_V_per_m)), default=None)
    charges = np.abs(np.asarray(sol.conductor_charges_C_per_m))
    rows = "".join(
        f"<tr><td>{html.escape(c.name)}</td><td>{c.role}</td>"
        f"<td align='right'>{format_measured(float(sol.conductor_potentials_V[k]), 'V', digits=6)}</td>"
        f"<td align='right'>{format_measured(float(sol.conductor_charges_C_per_m[k]), 'C/m', err, largest=charges.max())}</td>"
        f"<td align='right'>{format_measured(p.field_V_per_m, 'V/m', digits=3, largest=largest)}</td>"
        f"<td>{format_point(p.location_m[0] / scale, p.location_m[1] / scale, model.unit, size)}"
        f"{' — sharp corner, mesh-dependent' if p.at_sharp_corner else ''}</td></tr>"
        for k, (c, p) in enumerate(zip(model.conductors, sol.peak_surface_fields))
    )
    parts.append(f"<p><b>Hot spots (peak surface field per conductor)</b></p>{TABLE}"
                 "<tr><th>conductor</th><th>role</th><th>potential</th><th>charge per length</th><th>peak |E|</th><th>where</th></tr>"
                 f"{rows}</table>")
    parts.append(_margins_html(margins))
    parts.append(_stress_html(sol, model))
    parts.append(f"<p><b>Estimated relative error:</b> {format_percent(err)} (against a mesh at half the resolution)</p>")
    try:
        verdict = caution_for(results, settings_model)
        air = solver.air_conditions_of(settings_model)
    except solver.SolverError as exc:
        verdict = None
        parts.append(f"<p><b>No high-voltage verdict:</b> {html.escape(str(exc))}</p>")
    basis = voltage_basis_text(settings_model)
    parts.append(f"<p><b>Voltage basis:</b> {html.escape(basis)}</p>" if basis else
                 "<p><b>Voltage basis:</b> potentials are crest values (an rms value typed with 'rms' is "
                 "taken as √2 × rms).</p>")
    if verdict is not None:
        parts.append(f"<p><b>Air conditions:</b> {html.escape(air.description)}, relative air density "
                     f"{format_plain(air.relative_air_density, 3)}, surface factor {format_plain(air.surface_factor, 3)}</p>")
        colour, _ = cautions.STATUS_COLOURS[verdict.status]
        statuses = "; ".join(f"{v.where}: {v.status}" + ("" if v.margin is None else f", margin {v.margin:.3g}")
                             for v in verdict.verdicts)
        body = cautions.caution_body(verdict).replace(cautions.STANDING_STATEMENT, "").strip()
        parts.append(f"<p style='color:{colour}'><b>High-voltage verdict: {html.escape(solver.STATUS_WORDS[verdict.status])}. "
                     f"{html.escape(verdict.headline)}</b> {html.escape(body)} ({html.escape(statuses)})</p>")
    length = settings_model.extras.get(PART_LENGTH_KEY)
    parts.append("<p><b>What 2-D cannot tell.</b> "
                 + html.escape(cautions.length_text(model, length)) + " "
                 + " ".join(html.escape(t) for t in cautions.TWO_D_LIMITS) + "</p>")
    parts.append(f"<p style='border:1px solid {colours.TEXT_MUTED}'><b>{html.escape(cautions.STANDING_STATEMENT)}</b></p>")
    return "<html><body style='font-size:7pt'>" + "".join(parts) + "</body></html>"


def paint_report(painter: QPainter, page_width: float, page_height: float, results, drawing_image,
                 document_name: str, settings_model=None, **about) -> None:
    """Paint the report onto ``painter`` within a page of the given size (device pixels);
    ``about`` passes ``margins``, ``project_path`` and ``modified`` on to :func:`report_html`."""
    doc = QTextDocument()
    doc.addResource(QTextDocument.ImageResource, QUrl("drawing"), drawing_image)
    aspect = drawing_image.height() / drawing_image.width() if drawing_image.width() else None
    doc.setHtml(report_html(results, document_name, settings_model=settings_model, image_aspect=aspect, **about))
    # Lay the text out at screen-like size and scale it onto the page, shrinking to one page.
    width_px = 720.0
    doc.setTextWidth(width_px)
    factor = page_width / width_px
    height = doc.size().height() * factor
    if height > page_height:
        factor *= page_height / height
    painter.save()
    painter.scale(factor, factor)
    doc.drawContents(painter)
    painter.restore()


def write_report_pdf(results, drawing_image, path: Path, document_name: str, settings_model=None, **about) -> None:
    """Write the one-page A4 report to ``path``; ``drawing_image`` is a QImage of the drawing."""
    writer = QPdfWriter(str(path))
    writer.setPageLayout(QPageLayout(QPageSize(QPageSize.A4), QPageLayout.Portrait, QMarginsF(12, 12, 12, 12)))
    writer.setResolution(150)
    writer.setTitle("Edgewise report")
    painter = QPainter(writer)
    try:
        page = writer.pageLayout().paintRectPixels(writer.resolution())
        paint_report(painter, page.width(), page.height(), results, drawing_image, document_name, settings_model,
                     **about)
    finally:
        painter.end()


def report_preview(results, drawing_image, document_name: str, width_px: int = 1240, settings_model=None, **about):
    """A QImage of the report page (A4 proportions), for a look without a PDF viewer."""
    from PySide6.QtGui import QColor, QImage

    height_px = int(width_px * 297 / 210)
    image = QImage(width_px, height_px, QImage.Format_RGB32)
    image.fill(QColor(colours.PAGE))
    painter = QPainter(image)
    try:
        margin = width_px * 12 / 210
        painter.translate(margin, margin)
        paint_report(painter, width_px - 2 * margin, height_px - 2 * margin, results, drawing_image, document_name,
                     settings_model, **about)
    finally:
        painter.end()
    return image
