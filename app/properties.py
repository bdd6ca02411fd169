"""The properties area: exact numbers for the model, the selected conductor and its shape.

Fields follow the document both ways: typing a value and pressing Enter (or leaving the
field) makes one edit; any change of the model or selection refreshes the fields with their
signals blocked. A bad value is refused with the reason shown in red under the fields.
"""

from __future__ import annotations

from PySide6.QtCore import Signal
from PySide6.QtGui import QColor
from PySide6.QtWidgets import (QColorDialog, QComboBox, QFormLayout, QGroupBox, QLabel, QLineEdit,
                               QPushButton, QVBoxLayout, QWidget)

from solver import LENGTH_UNITS, MESH_DENSITIES, Circle, Polygon, Rectangle, Ring, SolverError, Strip, material, material_names

from . import edits

SHAPE_FIELDS = {
    Circle: (("centre x", "cx"), ("centre y", "cy"), ("radius", "radius")),
    Ring: (("centre x", "cx"), ("centre y", "cy"), ("inner radius", "inner_radius"), ("outer radius", "outer_radius")),
    Rectangle: (("centre x", "cx"), ("centre y", "cy"), ("width", "width"), ("height", "height"),
                ("corner radius", "corner_radius")),
    Polygon: (("vertices x, y; ...", "points"),),
    Strip: (("points x, y; ...", "points"),),
}
ROLE_LABELS = {"fixed": "fixed potential", "floating": "floating (net charge)", "reference": "reference (0 V)"}


def _points_text(points) -> str:
    return "; ".join(f"{x:g}, {y:g}" for x, y in points)


def _parse_points(text: str):
    pts = []
    for chunk in text.split(";"):
        if chunk.strip():
            x, y = chunk.split(",")
            pts.append((float(x), float(y)))
    return tuple(pts)


def shape_values(shape) -> dict[str, str]:
    if isinstance(shape, (Polygon, Strip)):
        return {"points": _points_text(shape.exterior if isinstance(shape, Polygon) else shape.points)}
    values = {"cx": shape.center[0], "cy": shape.center[1]}
    for _, key in SHAPE_FIELDS[type(shape)][2:]:
        values[key] = getattr(shape, key)
    return {k: f"{v:g}" for k, v in values.items()}


def shape_from_values(kind, values: dict[str, str], old):
    """Build a shape of class ``kind`` from field texts (ValueError on a bad number)."""
    if kind is Polygon:
        return Polygon(_parse_points(values["points"]), old.holes)
    if kind is Strip:
        return Strip(_parse_points(values["points"]))
    nums = {k: float(v) for k, v in values.items()}
    for key, v in nums.items():
        if key not in ("cx", "cy", "corner_radius") and not v > 0:
            raise ValueError(f"{key.replace('_', ' ')} is {v:g}; it must be greater than 0.")
    if nums.get("corner_radius", 0.0) < 0:
        raise ValueError("corner radius must not be negative.")
    center = (nums.pop("cx"), nums.pop("cy"))
    return kind(center, **nums)


class PropertiesPanel(QWidget):
    """Exact values for the model and the selected part."""

    problem_changed = Signal(str)

    def __init__(self, document, parent=None) -> None:
        super().__init__(parent)
        self.document = document
        layout = QVBoxLayout(self)
        self.model_box = QGroupBox("Cross-section")
        form = QFormLayout(self.model_box)
        self.title_edit = QLineEdit()
        self.unit_combo = QComboBox()
        self.unit_combo.addItems(list(LENGTH_UNITS))
        self.density_combo = QComboBox()
        self.density_combo.addItems(list(MESH_DENSITIES))
        self.eps_edit = QLineEdit()
        form.addRow("title", self.title_edit)
        form.addRow("length unit (converts)", self.unit_combo)
        form.addRow("mesh density", self.density_combo)
        form.addRow("background εr", self.eps_edit)
        layout.addWidget(self.model_box)

        self.part_box = QGroupBox("Selected part")
        self.part_form = QFormLayout(self.part_box)
        layout.addWidget(self.part_box)
        self.problem_label = QLabel()
        self.problem_label.setWordWrap(True)
        self.problem_label.setStyleSheet("color: #b00000;")
        layout.addWidget(self.problem_label)
        layout.addStretch(1)

        self.title_edit.editingFinished.connect(lambda: self._edit_model(title=self.title_edit.text()))
        self.unit_combo.activated.connect(self._on_unit_chosen)
        self.density_combo.activated.connect(lambda _: self._edit_model(mesh_density=self.density_combo.currentText()))
        self.eps_edit.editingFinished.connect(self._on_eps_edited)
        self._form_key = None
        self.fields: dict[str, QLineEdit] = {}
        document.events.connect("model_changed", self._on_model_changed)
        document.events.connect("selection_changed", self._on_selection_changed)
        self._on_model_changed(document.model)

    # ---- document -> widgets ---------------------------------------------------------------
    def _on_model_changed(self, model) -> None:
        for w, text in ((self.title_edit, model.title), (self.eps_edit, f"{model.background_eps_r:g}")):
            w.blockSignals(True)
            w.setText(text)
            w.blockSignals(False)
        for combo, text in ((self.unit_combo, model.unit), (self.density_combo, model.mesh_density)):
            combo.blockSignals(True)
            combo.setCurrentText(text)
            combo.blockSignals(False)
        self._refresh_part()

    def _on_selection_changed(self, ref) -> None:
        self.show_problem("")
        self._refresh_part()

    def _refresh_part(self) -> None:
        ref, model = self.document.selection, self.document.model
        key = None if ref is None else (ref.kind, type(edits.shape_of(model, ref)) if ref.kind != "plane" else None)
        if key != self._form_key:
            self._build_form(key)
        if ref is None:
            return
        values: dict[str, str] = {}
        if ref.kind == "plane":
            values["plane_y"] = f"{model.ground_plane.y:g}"
        else:
            values.update(shape_values(edits.shape_of(model, ref)))
        if ref.kind == "conductor":
            c = model.conductors[ref.index]
            values.update(name=c.name, potential=f"{c.potential_V:g}", charge=f"{c.charge_C_per_m:g}")
            self._set_combo(self.role_combo, ROLE_LABELS[c.role])
            self.member_combo.blockSignals(True)
            self.member_combo.clear()
            self.member_combo.addItems(list(model.conductor_names) + ["(a new conductor)"])
            self.member_combo.setCurrentText(c.name)
            self.member_combo.blockSignals(False)
            self.color_button.setStyleSheet(f"background: {c.color or '#808080'};")
            self.fields["potential"].setEnabled(c.role == "fixed")
            self.fields["charge"].setEnabled(c.role == "floating")
        if ref.kind == "dielectric":
            d = model.dielectrics[ref.index]
            values.update(name=d.name, eps_r=f"{d.eps_r:g}")
            self._set_combo(self.material_combo, d.material if d.material in material_names() else "(own value)")
        for key, text in values.items():
            if key in self.fields:
                self.fields[key].blockSignals(True)
                self.fields[key].setText(text)
                self.fields[key].setCursorPosition(0)
                self.fields[key].blockSignals(False)

    @staticmethod
    def _set_combo(combo, text) -> None:
        combo.blockSignals(True)
        combo.setCurrentText(text)
        combo.blockSignals(False)

    def _build_form(self, key) -> None:
        while self.part_form.rowCount():
            self.part_form.removeRow(0)
        self.fields = {}
        self._form_key = key
        unit = self.document.model.unit
        if key is None:
            self.part_box.setTitle("Selected part (click a part on the drawing)")
            return
        kind, shape_cls = key
        if kind == "plane":
            self.part_box.setTitle("Ground plane (0 V)")
            self._add_field("plane_y", f"height y ({unit})", self._on_plane_edited)
            return
        self.part_box.setTitle(f"Selected {kind}: {shape_cls.kind}")
        if kind == "conductor":
            self._add_field("name", "conductor name", lambda: self._edit_conductor(name=self.fields["name"].text()))
            self.role_combo = QComboBox()
            self.role_combo.addItems(list(ROLE_LABELS.values()))
            self.role_combo.activated.connect(self._on_role_chosen)
            self.part_form.addRow("role", self.role_combo)
            self._add_field("potential", "potential (V)", self._on_potential_edited)
            self._add_field("charge", "net charge (C/m)", self._on_charge_edited)
            self.color_button = QPushButton("colour…")
            self.color_button.clicked.connect(self._on_color_clicked)
            self.part_form.addRow("display colour", self.color_button)
            self.member_combo = QComboBox()
            self.member_combo.activated.connect(self._on_member_chosen)
            self.part_form.addRow("shape belongs to", self.member_combo)
        if kind == "dielectric":
            self._add_field("name", "region name", lambda: self._edit_dielectric(name=self.fields["name"].text().strip()))
            self.material_combo = QComboBox()
            self.material_combo.addItems(list(material_names()) + ["(own value)"])
            self.material_combo.activated.connect(self._on_material_chosen)
            self.part_form.addRow("material", self.material_combo)
            self._add_field("eps_r", "relative permittivity εr", self._on_eps_r_edited)
        for label, field in SHAPE_FIELDS[shape_cls]:
            self._add_field(field, f"{label} ({unit})", self._on_shape_edited)

    def _add_field(self, key: str, label: str, handler) -> None:
        edit = QLineEdit()
        edit.setObjectName(f"field_{key}")
        edit.editingFinished.connect(handler)
        self.fields[key] = edit
        self.part_form.addRow(label, edit)

    # ---- widgets -> document ---------------------------------------------------------------
    def show_problem(self, message: str) -> None:
        self.problem_label.setText(message)
        self.problem_changed.emit(message)

    def _apply(self, make, description: str) -> None:
        try:
            model = make()
        except (SolverError, ValueError, KeyError, TypeError) as exc:
            self.show_problem(f"Not applied: {exc}")
            self._refresh_part()
            return
        self.show_problem("")
        ref = self.document.selection
        self.document.apply(model, description)
        self.document.select(ref)

    def _edit_model(self, **changes) -> None:
        self._apply(lambda: edits.update_model(self.document.model, **changes), "Change cross-section settings")

    def _on_unit_chosen(self, _index: int) -> None:
        """A new unit converts every length, so the drawing keeps its physical size."""
        unit = self.unit_combo.currentText()
        self._apply(lambda: edits.convert_unit(self.document.model, unit), f"Convert to {unit}")

    def _on_eps_edited(self) -> None:
        self._apply(lambda: edits.update_model(self.document.model, background_eps_r=float(self.eps_edit.text())),
                    "Change background permittivity")

    def _edit_conductor(self, **changes) -> None:
        ref = self.document.selection
        if ref is None or ref.kind != "conductor":
            return
        self._apply(lambda: edits.update_conductor(self.document.model, ref.index, **changes), "Change conductor")

    def _on_potential_edited(self) -> None:
        self._number_edit("potential", lambda v: self._edit_conductor(potential_V=v))

    def _on_charge_edited(self) -> None:
        self._number_edit("charge", lambda v: self._edit_conductor(charge_C_per_m=v))

    def _number_edit(self, key: str, then) -> None:
        try:
            value = float(self.fields[key].text())
        except ValueError:
            self.show_problem(f"Not applied: '{self.fields[key].text()}' is not a number.")
            return
        then(value)

    def _on_role_chosen(self, index: int) -> None:
        self._edit_conductor(role=list(ROLE_LABELS)[index])

    def _on_color_clicked(self) -> None:
        ref = self.document.selection
        color = QColorDialog.getColor(QColor(self.document.model.conductors[ref.index].color or "#808080"), self)
        if color.isValid():
            self._edit_conductor(color=color.name())

    def _on_member_chosen(self, index: int) -> None:
        ref = self.document.selection
        names = self.document.model.conductor_names
        target = names[index] if index < len(names) else None
        model, new_ref = edits.move_shape_to(self.document.model, ref, target)
        if self.document.apply(model, "Move shape to another conductor"):
            self.document.select(new_ref)

    def _edit_dielectric(self, **changes) -> None:
        ref = self.document.selection
        if ref is None or ref.kind != "dielectric":
            return
        self._apply(lambda: edits.update_dielectric(self.document.model, ref.index, **changes), "Change dielectric region")

    def _on_material_chosen(self, index: int) -> None:
        names = material_names()
        if index < len(names):
            m = material(names[index])
            self._edit_dielectric(material=m.name, eps_r=m.eps_r)

    def _on_eps_r_edited(self) -> None:
        self._number_edit("eps_r", lambda v: self._edit_dielectric(eps_r=v, material=None))

    def _on_plane_edited(self) -> None:
        self._apply(lambda: edits.set_ground_plane(self.document.model, float(self.fields["plane_y"].text())),
                    "Move ground plane")

    def _on_shape_edited(self) -> None:
        ref = self.document.selection
        if ref is None or ref.kind == "plane":
            return
        old = edits.shape_of(self.document.model, ref)
        values = {key: self.fields[key].text() for _, key in SHAPE_FIELDS[type(old)]}
        self._apply(lambda: edits.replace_shape(self.document.model, ref, shape_from_values(type(old), values, old)),
                    "Change shape")
