"""The properties area: exact numbers for the model, the selected conductor and its shape.

Fields follow the document both ways: typing a value and pressing Enter (or leaving the
field) makes one edit; any change of the model or selection refreshes the fields with their
signals blocked. A bad value is refused with the reason shown in red under the fields.
"""

from __future__ import annotations

from PySide6.QtCore import Signal
from PySide6.QtGui import QColor
from PySide6.QtWidgets import (
    QColorDialog,
    QComboBox,
    QFormLayout,
    QGroupBox,
    QLabel,
    QLineEdit,
    QPushButton,
    QVBoxLayout,
    QWidget,
)

from app import edits
from solver import LENGTH_UNITS, MESH_DENSITIES, Shape, SolverError, material, material_names

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


def _label(name: str) -> str:
    return name.replace("_", " ").replace("center", "centre")


def shape_fields(shape: Shape) -> tuple[tuple[str, str], ...]:
    """(label, key) of each editable field of ``shape``, from its project-file form.

    A number is one field; a point is two (``cx``/``cy`` for ``center``); a vertex list is one
    text field "x, y; x, y; ..." (key ``points``). Lists of vertex lists (holes) are kept as they are.
    """
    out: list[tuple[str, str]] = []
    for name, value in shape.to_dict().items():
        if name == "kind":
            continue
        if isinstance(value, (int, float)):
            out.append((_label(name), name))
        elif _is_point(value):
            out += [(f"{_label(name)} x", f"{name[0]}x"), (f"{_label(name)} y", f"{name[0]}y")]
        elif value and all(_is_point(p) for p in value):
            out.append(("vertices x, y; ..." if shape.is_solid else "points x, y; ...", "points"))
    return tuple(out)


def _is_point(value) -> bool:
    return isinstance(value, list) and len(value) == 2 and all(isinstance(v, (int, float)) for v in value)


def shape_values(shape: Shape) -> dict[str, str]:
    """Field texts of ``shape`` by key (see :func:`shape_fields`)."""
    out: dict[str, str] = {}
    for name, value in shape.to_dict().items():
        if isinstance(value, (int, float)) and name != "kind":
            out[name] = f"{value:g}"
        elif _is_point(value):
            out[f"{name[0]}x"], out[f"{name[0]}y"] = f"{value[0]:g}", f"{value[1]:g}"
        elif isinstance(value, list) and value and all(_is_point(p) for p in value):
            out["points"] = _points_text(value)
    return out


def shape_from_values(values: dict[str, str], old: Shape) -> Shape:
    """A shape of ``old``'s kind with the typed field texts (ValueError on a bad number, the
    solver's message when the result is not a valid shape)."""
    data = old.to_dict()
    for name, value in list(data.items()):
        if isinstance(value, (int, float)) and name in values:
            data[name] = float(values[name])
        elif _is_point(value) and f"{name[0]}x" in values:
            data[name] = [float(values[f"{name[0]}x"]), float(values[f"{name[0]}y"])]
        elif isinstance(value, list) and value and all(_is_point(p) for p in value) and "points" in values:
            data[name] = [list(p) for p in _parse_points(values["points"])]
    shape = Shape.from_dict(data)
    problem = shape.problem(f"The {shape.kind}")
    if problem is not None:
        raise ValueError(problem)
    return shape


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
        self._show_shape_problem()

    def _on_selection_changed(self, ref) -> None:
        self.show_problem("")
        self._refresh_part()
        self._show_shape_problem()

    def _show_shape_problem(self) -> None:
        """An invalid selected shape is shown with the solver's reason (it is never repaired)."""
        ref, model = self.document.selection, self.document.model
        if ref is None or ref.kind == "plane":
            return
        part = (model.conductors if ref.kind == "conductor" else model.dielectrics)[ref.index]
        shape = edits.shape_of(model, ref)
        problem = shape.problem(f"{ref.kind.capitalize()} '{part.name}', shape {ref.shape + 1} ({shape.kind})")
        if problem is not None:
            self.show_problem(problem)

    def _refresh_part(self) -> None:
        ref, model = self.document.selection, self.document.model
        shape = None if ref is None or ref.kind == "plane" else edits.shape_of(model, ref)
        key = None if ref is None else (ref.kind, None if shape is None else (shape.kind, shape_fields(shape)))
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
        kind, shape_key = key
        if kind == "plane":
            self.part_box.setTitle("Ground plane (0 V)")
            self._add_field("plane_y", f"height y ({unit})", self._on_plane_edited)
            return
        self.part_box.setTitle(f"Selected {kind}: {shape_key[0]}")
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
        for label, field in shape_key[1]:
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
        values = {key: self.fields[key].text() for _, key in shape_fields(old)}
        self._apply(lambda: edits.replace_shape(self.document.model, ref, shape_from_values(values, old)),
                    "Change shape")
