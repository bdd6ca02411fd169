"""Writing results to files: matrices (CSV, JSON), probe profiles (CSV), widgets (PNG, SVG)."""

from __future__ import annotations

import csv
import json
import re
from contextlib import ExitStack
from pathlib import Path

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import QPoint, QRect, QSize
from PySide6.QtGui import QPainter
from PySide6.QtSvg import QSvgGenerator
from PySide6.QtWidgets import QWidget

from app.canvas.export_clip import clipped_to_plot_area
from solver.cli.csv_output import capacitance_csv_rows, write_capacitance_rows

PF = 1e-12


def suggested_path(document_path: Path | None, title: str, section: str, suffix: str) -> Path:
    """A file name for an export: the project's name and the section, in the project's folder,
    e.g. "busbar - drawing.svg" (characters that file systems refuse are replaced by "_")."""
    stem = Path(document_path).stem if document_path else (title.strip() or "untitled")
    name = re.sub(r'[\\/:*?"<>|]+', "_", f"{stem} - {section}").strip() + suffix
    folder = Path(document_path).parent if document_path else Path.home()
    return folder / name


def write_matrices_csv(results, path: Path) -> None:
    """Both capacitance matrices in pF/m, one block each, with conductor names: the layout the
    command line writes too (:mod:`solver.cli.csv_output`)."""
    sol = results.solution
    write_capacitance_rows(capacitance_csv_rows(list(sol.signal_names), sol.capacitance_maxwell_F_per_m,
                                                sol.capacitance_mutual_F_per_m), str(path))


def write_matrices_json(results, path: Path) -> None:
    """Matrices in F/m with names, the per-conductor figures and the error estimate."""
    sol, model = results.solution, results.model
    data = {
        "title": model.title,
        "unit": "F/m",
        "conductors": list(sol.signal_names),
        "capacitance_maxwell_F_per_m": np.asarray(sol.capacitance_maxwell_F_per_m).tolist(),
        "capacitance_mutual_F_per_m": np.asarray(sol.capacitance_mutual_F_per_m).tolist(),
        "estimated_relative_error": sol.estimated_relative_error,
        "per_conductor": [
            {
                "name": c.name,
                "role": c.role,
                "potential_V": float(sol.conductor_potentials_V[k]),
                "charge_C_per_m": float(sol.conductor_charges_C_per_m[k]),
                "peak_surface_field_V_per_m": sol.peak_surface_fields[k].field_V_per_m,
                "peak_at_sharp_corner": sol.peak_surface_fields[k].at_sharp_corner,
                "equivalent_radius_m": results.equivalent_radius_m.get(c.name),
            }
            for k, c in enumerate(model.conductors)
        ],
    }
    Path(path).write_text(json.dumps(data, indent=2), encoding="utf-8")


def write_profile_csv(distance, potential_V, field_V_per_m, unit: str, path: Path) -> None:
    """A probe profile: distance (model unit), potential (V), |E| (V/m); empty inside conductors."""
    with open(path, "w", newline="", encoding="utf-8") as f:
        w = csv.writer(f)
        w.writerow([f"distance ({unit})", "potential (V)", "field strength (V/m)"])
        for d, p, e in zip(distance, potential_V, field_V_per_m):
            w.writerow([f"{d:.9g}", "" if np.isnan(p) else f"{p:.9g}", "" if np.isnan(e) else f"{e:.9g}"])


def write_widget_png(widget, path: Path) -> None:
    """A picture of the widget as PNG."""
    if not widget.grab().save(str(path), "PNG"):
        raise OSError(f"Could not write the picture to {path}.")


def plot_items_in(widget) -> list:
    """Every plot (pyqtgraph PlotItem) shown in ``widget`` or its children."""
    views = ([widget] if isinstance(widget, pg.GraphicsView) else []) + widget.findChildren(pg.GraphicsView)
    return [item for view in views for item in view.scene().items() if isinstance(item, pg.PlotItem)]


def write_widget_svg(widget, path: Path, title: str = "Edgewise") -> None:
    """A picture of the widget as SVG: the widget as drawn on screen (children included), in
    vectors where Qt paints them so, at the widget's size and screen resolution so text, lines
    and plots keep the proportions seen on screen."""
    size = widget.size()
    if size.width() < 1 or size.height() < 1:
        raise OSError(f"Nothing to write to {path}: the view is not shown (open its section first).")
    gen = QSvgGenerator(QSvgGenerator.SvgVersion.Svg11)  # SVG 1.1 keeps clipping (plot areas)
    gen.setFileName(str(path))
    gen.setSize(QSize(size.width(), size.height()))
    gen.setViewBox(QRect(0, 0, size.width(), size.height()))
    gen.setResolution(widget.logicalDpiX())
    gen.setTitle(title)
    painter = QPainter()
    if not painter.begin(gen):
        raise OSError(f"Could not write the picture to {path}.")
    try:
        with ExitStack() as cut:
            # plot areas cut in geometry: readers that ignore clip paths show the screen too
            for plot in plot_items_in(widget):
                cut.enter_context(clipped_to_plot_area(plot))
            # QWidget.render, not a graphics view's own render(): the latter paints the scene
            # stretched to the page, without axes and labels in their places.
            QWidget.render(widget, painter, QPoint(0, 0))
    finally:
        painter.end()
    if not Path(path).is_file() or Path(path).stat().st_size == 0:
        raise OSError(f"The picture written to {path} is empty.")
