"""File > Import drawing...: map the layers of a DXF or SVG drawing to parts and add them.

The dialog lists the layers the solver finds in the drawing (:func:`solver.io.drawing_layers`)
with their entity counts. Each layer becomes a conductor at a fixed potential, the reference
conductor, a floating conductor, a dielectric region, or is ignored; the part's name defaults
to the layer's. The preview shows what the solver's importer reads with the mapping as it
stands, or its message (which names the entity and layer of a bad outline). *Add to drawing*
puts the parts into the document as one undoable edit, converted to the document's length
unit, with names that clash made unique.
"""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

from PySide6.QtCore import Qt
from PySide6.QtWidgets import (
    QComboBox,
    QDialog,
    QDialogButtonBox,
    QFileDialog,
    QHBoxLayout,
    QLabel,
    QLineEdit,
    QSplitter,
    QTableWidget,
    QTableWidgetItem,
    QVBoxLayout,
    QWidget,
)

from app import colours
from app.canvas.drawing import dielectric_item, plot_widget, shape_item
from app.edits import PALETTE
from solver import LENGTH_UNITS, Model, SolverError
from solver.cli.drawing_input import parse_voltage
from solver.io.drawing_layers import drawing_kind, drawing_layers, read_drawing
from solver.io.dxf import LayerTarget

#: What a layer can become, as offered in the dialog.
BECOMES = ("conductor at a potential", "reference conductor", "floating conductor", "dielectric region", "ignore")
_ROLES = {"conductor at a potential": "fixed", "reference conductor": "reference", "floating conductor": "floating"}
FROM_DRAWING = "as in the drawing"


def ask_drawing_path(parent) -> Path | None:
    chosen, _ = QFileDialog.getOpenFileName(parent, "Import a drawing", "", "Drawings (*.dxf *.svg);;All files (*)")
    return Path(chosen) if chosen else None


def _free_name(name: str, taken: set[str]) -> str:
    if name not in taken:
        return name
    n = 2
    while f"{name} {n}" in taken:
        n += 1
    return f"{name} {n}"


def merge_drawing(model: Model, drawn: Model) -> Model:
    """``model`` with the parts of ``drawn`` added (Qt-free).

    An empty ``model`` takes the drawing's unit; otherwise the drawn parts are converted to the
    model's unit. Names already used get " 2", " 3"...; conductors without a colour get one.
    """
    if not model.conductors and not model.dielectrics:
        model = replace(model, unit=drawn.unit)
    elif drawn.unit != model.unit:
        drawn = drawn.converted_to(model.unit)
    taken_c = set(model.conductor_names)
    conductors = list(model.conductors)
    for c in drawn.conductors:
        name = _free_name(c.name, taken_c)
        taken_c.add(name)
        conductors.append(replace(c, name=name, color=c.color or PALETTE[len(conductors) % len(PALETTE)]))
    taken_d = {d.name for d in model.dielectrics}
    dielectrics = list(model.dielectrics)
    for d in drawn.dielectrics:
        name = _free_name(d.name, taken_d)
        taken_d.add(name)
        dielectrics.append(replace(d, name=name))
    return replace(model, conductors=tuple(conductors), dielectrics=tuple(dielectrics))


class ImportDrawingDialog(QDialog):
    """Map the layers of one drawing and add its parts to ``document`` (see the module notes)."""

    COLUMNS = ("Layer", "Entities", "Becomes", "Name", "Potential / eps_r")

    def __init__(self, document, path: Path, parent=None) -> None:
        super().__init__(parent)
        self.setWindowTitle(f"Import drawing — {path.name}")
        self.document = document
        self.path = path
        self.drawn: Model | None = None
        self.census_error = ""
        try:
            self.layers = drawing_layers(path)
        except SolverError as e:
            self.layers = ()
            self.census_error = str(e)
        self._build()
        for row, layer in enumerate(self.layers):
            self._add_row(row, layer)
        self.unit_combo.currentTextChanged.connect(lambda _: self.update_preview())
        self.update_preview()
        self.resize(1040, 600)

    def _build(self) -> None:
        self.table = QTableWidget(0, len(self.COLUMNS))
        self.table.setHorizontalHeaderLabels(list(self.COLUMNS))
        self.table.verticalHeader().setVisible(False)
        self.unit_combo = QComboBox()
        kind = drawing_kind(self.path) if not self.census_error else "DXF"
        self.unit_combo.addItems(([FROM_DRAWING] if kind == "DXF" else []) + list(LENGTH_UNITS))
        if kind == "SVG":
            self.unit_combo.setCurrentText("mm")
        unit_row = QHBoxLayout()
        unit_row.addWidget(QLabel("Length unit of the drawing:"))
        unit_row.addWidget(self.unit_combo)
        unit_row.addStretch(1)
        self.preview = plot_widget(grid_alpha=None)
        self.preview.setAspectLocked(True)
        self.preview.hideAxis("left")
        self.preview.hideAxis("bottom")
        self.message = QLabel()
        self.message.setWordWrap(True)
        self.buttons = QDialogButtonBox(QDialogButtonBox.Cancel)
        self.add_button = self.buttons.addButton("Add to drawing", QDialogButtonBox.AcceptRole)
        self.buttons.accepted.connect(self.add_to_drawing)
        self.buttons.rejected.connect(self.reject)
        left = QWidget()
        column = QVBoxLayout(left)
        column.setContentsMargins(0, 0, 0, 0)
        column.addWidget(QLabel(f"Layers found in {self.path.name}; choose what each becomes:"))
        column.addWidget(self.table, 1)
        column.addLayout(unit_row)
        right = QWidget()
        right_column = QVBoxLayout(right)
        right_column.setContentsMargins(0, 0, 0, 0)
        right_column.addWidget(QLabel("Preview"))
        right_column.addWidget(self.preview, 1)
        right_column.addWidget(self.message)
        split = QSplitter(Qt.Horizontal)
        split.addWidget(left)
        split.addWidget(right)
        split.setSizes([600, 440])
        whole = QVBoxLayout(self)
        whole.addWidget(split, 1)
        whole.addWidget(self.buttons)

    def _add_row(self, row: int, layer) -> None:
        self.table.insertRow(row)
        for col, text in enumerate((layer.name, ", ".join(f"{n} {k}" for k, n in layer.counts))):
            item = QTableWidgetItem(text)
            item.setFlags(item.flags() & ~Qt.ItemIsEditable)
            self.table.setItem(row, col, item)
        becomes = QComboBox()
        becomes.addItems(BECOMES)
        becomes.setCurrentText("conductor at a potential" if layer.holds_outlines else "ignore")
        becomes.setEnabled(layer.holds_outlines)
        name, value = QLineEdit(layer.name), QLineEdit("0 V")
        self.table.setCellWidget(row, 2, becomes)
        self.table.setCellWidget(row, 3, name)
        self.table.setCellWidget(row, 4, value)
        becomes.currentTextChanged.connect(lambda text, v=value: self._on_becomes(text, v))
        name.editingFinished.connect(self.update_preview)
        value.editingFinished.connect(self.update_preview)
        self._on_becomes(becomes.currentText(), value, preview=False)
        self.table.resizeColumnsToContents()

    def _on_becomes(self, text: str, value: QLineEdit, preview: bool = True) -> None:
        value.setEnabled(text in ("conductor at a potential", "dielectric region"))
        if text == "dielectric region" and value.text().endswith("V"):
            value.setText("4.4")
        elif text == "conductor at a potential" and not value.text().endswith("V"):
            value.setText("0 V")
        if preview:
            self.update_preview()

    # ---- mapping ---------------------------------------------------------------------------
    def set_layer(self, layer: str, becomes: str, value: str | None = None, name: str | None = None) -> None:
        """Map ``layer`` (as a user would in the table; used by tests and scripts)."""
        row = next(i for i, lay in enumerate(self.layers) if lay.name == layer)
        self.table.cellWidget(row, 2).setCurrentText(becomes)
        if name is not None:
            self.table.cellWidget(row, 3).setText(name)
        if value is not None:
            self.table.cellWidget(row, 4).setText(value)
        self.update_preview()

    def layer_map(self) -> dict[str, LayerTarget]:
        """The mapping as it stands; raises ValueError naming the layer of a value not understood."""
        mapping = {}
        for row, layer in enumerate(self.layers):
            becomes = self.table.cellWidget(row, 2).currentText()
            name = self.table.cellWidget(row, 3).text().strip() or layer.name
            value = self.table.cellWidget(row, 4).text().strip()
            if becomes == "ignore":
                mapping[layer.name] = LayerTarget("ignore")
            elif becomes == "dielectric region":
                try:
                    mapping[layer.name] = LayerTarget("dielectric", name, eps_r=float(value))
                except ValueError:
                    raise ValueError(f"Layer '{layer.name}': the relative permittivity '{value}' is not a number.") from None
            else:
                volts = parse_voltage(value) if becomes == "conductor at a potential" else 0.0
                if volts is None:
                    raise ValueError(f"Layer '{layer.name}': the potential '{value}' is not a voltage (e.g. 10 kV).")
                mapping[layer.name] = LayerTarget("conductor", name, role=_ROLES[becomes], potential_V=volts)
        return mapping

    def update_preview(self) -> None:
        """Read the drawing with the mapping as it stands and draw it, or say why it cannot be read."""
        self.preview.clear()
        self.drawn = None
        problem = self.census_error
        if not problem:
            try:
                mapping = self.layer_map()
                if all(t.kind == "ignore" for t in mapping.values()):
                    raise ValueError("Every layer is ignored; map at least one to a part.")
                unit = self.unit_combo.currentText()
                self.drawn = read_drawing(self.path, mapping, unit=None if unit == FROM_DRAWING else unit)
            except (SolverError, ValueError) as e:
                problem = str(e)
        self.add_button.setEnabled(self.drawn is not None)
        if self.drawn is None:
            self.message.setText(problem)
            self.message.setStyleSheet(colours.status_style(error=True))
            return
        for d in self.drawn.dielectrics:
            for shape in d.shapes:
                self.preview.addItem(dielectric_item(shape, d.eps_r))
        for k, c in enumerate(self.drawn.conductors):
            for shape in c.shapes:
                self.preview.addItem(shape_item(shape, colours.display_colour(c, k)))
        self.preview.autoRange()
        parts = [f"{c.name} ({c.role}{f', {c.potential_V:g} V' if c.role == 'fixed' else ''})"
                 for c in self.drawn.conductors] + [f"{d.name} (eps_r {d.eps_r:g})" for d in self.drawn.dielectrics]
        self.message.setText(f"Reads as {', '.join(parts)}; unit {self.drawn.unit}.")
        self.message.setStyleSheet(f"color: {colours.TEXT};")

    def add_to_drawing(self) -> bool:
        """Add the parts read to the document (one undoable edit) and close."""
        self.update_preview()
        if self.drawn is None:
            return False
        self.document.apply(merge_drawing(self.document.model, self.drawn), f"import {self.path.name}")
        self.accept()
        return True
