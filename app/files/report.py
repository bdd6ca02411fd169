"""The one-page PDF report: drawing, matrices, hot spots, error estimate, caveats and cautions."""

from __future__ import annotations

import datetime as dt
import html
from pathlib import Path

from PySide6.QtCore import QMarginsF, QUrl
from PySide6.QtGui import QPageLayout, QPageSize, QPainter, QPdfWriter, QTextDocument

import solver
from app import cautions
from app.panels.safety_views import PART_LENGTH_KEY, caution_for
from app.units import format_field, format_si

PF = 1e-12


def _matrix_html(title: str, names, matrix) -> str:
    head = "".join(f"<th>{html.escape(n)}</th>" for n in names)
    rows = "".join(
        f"<tr><th>{html.escape(n)}</th>" + "".join(f"<td align='right'>{v / PF:.5g}</td>" for v in row) + "</tr>"
        for n, row in zip(names, matrix)
    )
    return f"<p><b>{title}</b></p><table border='1' cellspacing='0' cellpadding='2'><tr><th></th>{head}</tr>{rows}</table>"


def report_html(results, document_name: str, image_name: str = "drawing", settings_model=None) -> str:
    """The report body as HTML (the drawing is the resource ``image_name``).

    ``settings_model`` supplies the user's part length and the project's air conditions
    (default: the solved model). The verdict and its words are the solver's (one caution rule).
    """
    sol, model = results.solution, results.model
    settings_model = settings_model or model
    scale = model.metres_per_unit
    parts = [f"<h2>Edgewise report: {html.escape(model.title or document_name)}</h2>",
             f"<p>File: {html.escape(document_name)} &nbsp; Date: {dt.date.today().isoformat()} &nbsp; "
             f"Unit: {model.unit} &nbsp; Panels: {sol.mesh.n_panels} &nbsp; Background εr = {model.background_eps_r:g}</p>",
             f"<p><img src='{image_name}' width='640'></p>"]
    if sol.has_capacitance:
        names = list(sol.signal_names)
        parts.append("<table><tr><td valign='top'>"
                     + _matrix_html("Capacitance matrix, Maxwell form (pF/m)", names, sol.capacitance_maxwell_F_per_m)
                     + "</td><td width='20'></td><td valign='top'>"
                     + _matrix_html("Capacitance matrix, mutual form (pF/m)", names, sol.capacitance_mutual_F_per_m)
                     + "</td></tr></table>")
    else:
        parts.append("<p><b>No capacitance matrix:</b> the model has no return path (reference conductor or ground plane).</p>")
    rows = "".join(
        f"<tr><td>{html.escape(c.name)}</td><td>{c.role}</td><td align='right'>{format_si(float(sol.conductor_potentials_V[k]), 'V')}</td>"
        f"<td align='right'>{format_si(float(sol.conductor_charges_C_per_m[k]), 'C/m')}</td>"
        f"<td align='right'>{format_field(p.field_V_per_m)}</td>"
        f"<td>({p.location_m[0] / scale:.4g}, {p.location_m[1] / scale:.4g}) {model.unit}{' — sharp corner, mesh-dependent' if p.at_sharp_corner else ''}</td></tr>"
        for k, (c, p) in enumerate(zip(model.conductors, sol.peak_surface_fields))
    )
    parts.append("<p><b>Hot spots (peak surface field per conductor)</b></p><table border='1' cellspacing='0' cellpadding='2'>"
                 "<tr><th>conductor</th><th>role</th><th>potential</th><th>charge per length</th><th>peak |E|</th><th>where</th></tr>"
                 f"{rows}</table>")
    err = sol.estimated_relative_error
    parts.append(f"<p><b>Estimated relative error:</b> {'n/a' if err is None else f'{err:.2g} (against a mesh at half the resolution)'}</p>")
    try:
        verdict = caution_for(results, settings_model)
        air = solver.air_conditions_of(settings_model)
    except solver.SolverError as exc:
        verdict = None
        parts.append(f"<p><b>No high-voltage verdict:</b> {html.escape(str(exc))}</p>")
    if verdict is not None:
        colour, _ = cautions.STATUS_COLOURS[verdict.status]
        statuses = "; ".join(f"{v.where}: {v.status}" + ("" if v.margin is None else f", margin {v.margin:.3g}")
                             for v in verdict.verdicts)
        body = cautions.caution_body(verdict).replace(cautions.STANDING_STATEMENT, "").strip()
        parts.append(f"<p style='color:{colour}'><b>High-voltage verdict: {html.escape(verdict.status)}. "
                     f"{html.escape(verdict.headline)}</b> {html.escape(body)} ({html.escape(statuses)}; air: "
                     f"{html.escape(air.description)}, relative density {air.relative_air_density:.3f}, surface "
                     f"factor {air.surface_factor:g}; voltage basis: "
                     f"{html.escape(solver.voltage_basis_of(settings_model).describe())})</p>")
    length = settings_model.extras.get(PART_LENGTH_KEY)
    parts.append("<p><b>What 2-D cannot tell.</b> "
                 + html.escape(cautions.length_text(model, length)) + " "
                 + " ".join(html.escape(t) for t in cautions.TWO_D_LIMITS) + "</p>")
    parts.append(f"<p style='border:1px solid #8a6d00'><b>{html.escape(cautions.STANDING_STATEMENT)}</b></p>")
    return "<html><body style='font-size:7pt'>" + "".join(parts) + "</body></html>"


def paint_report(painter: QPainter, page_width: float, page_height: float, results, drawing_image,
                 document_name: str, settings_model=None) -> None:
    """Paint the report onto ``painter`` within a page of the given size (device pixels)."""
    doc = QTextDocument()
    doc.addResource(QTextDocument.ImageResource, QUrl("drawing"), drawing_image)
    doc.setHtml(report_html(results, document_name, settings_model=settings_model))
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


def write_report_pdf(results, drawing_image, path: Path, document_name: str, settings_model=None) -> None:
    """Write the one-page A4 report to ``path``; ``drawing_image`` is a QImage of the drawing."""
    writer = QPdfWriter(str(path))
    writer.setPageLayout(QPageLayout(QPageSize(QPageSize.A4), QPageLayout.Portrait, QMarginsF(12, 12, 12, 12)))
    writer.setResolution(150)
    writer.setTitle("Edgewise report")
    painter = QPainter(writer)
    try:
        page = writer.pageLayout().paintRectPixels(writer.resolution())
        paint_report(painter, page.width(), page.height(), results, drawing_image, document_name, settings_model)
    finally:
        painter.end()


def report_preview(results, drawing_image, document_name: str, width_px: int = 1240, settings_model=None):
    """A QImage of the report page (A4 proportions), for a look without a PDF viewer."""
    from PySide6.QtGui import QColor, QImage

    height_px = int(width_px * 297 / 210)
    image = QImage(width_px, height_px, QImage.Format_RGB32)
    image.fill(QColor("white"))
    painter = QPainter(image)
    try:
        margin = width_px * 12 / 210
        painter.translate(margin, margin)
        paint_report(painter, width_px - 2 * margin, height_px - 2 * margin, results, drawing_image, document_name,
                     settings_model)
    finally:
        painter.end()
    return image
