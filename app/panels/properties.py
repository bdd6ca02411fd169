"""The properties area: exact numbers for the model, the selected conductor and its shape.

Fields follow the document both ways: typing a value and pressing Enter (or leaving the
field) makes one edit; any change of the model or selection refreshes the fields with their
signals blocked. A bad value is refused with the reason shown in red under the fields.
Every number may be typed with a unit ("150 kV", "12 mil", "0.5 mm"); its unit is shown beside
the field, and what was typed is shown back while the model holds that value.
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

from app import colours, edits
from app.panels.quantity_edit import QuantityEdit, TypedTexts
from app.panels.shape_fields import parse_points, points_text, shape_fields, shape_from_values, shape_lengths
from solver import LENGTH_UNITS, MESH_DENSITIES, SolverError, material, material_names

ROLE_LABELS = {"fixed": "fixed potential", "floating": "floating (net charge)", "reference": "reference (0 V)"}

#: The potential field says how a typed voltage is taken (an rms value is turned into its crest).
POTENTIAL_UNIT_NOTE = "V crest"


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
        self.eps_edit = QuantityEdit("", "background relative permittivity εr")
        form.addRow("title", self.title_edit)
        form.addRow("length unit (converts)", self.unit_combo)
        form.addRow("mesh density", self.density_combo)
        form.addRow("background εr", self.eps_edit.with_unit())
        layout.addWidget(self.model_box)

        self.part_box = QGroupBox("Selected part")
        self.part_form = QFormLayout(self.part_box)
        layout.addWidget(self.part_box)
        self.problem_label = QLabel()
        self.problem_label.setWordWrap(True)
        self.problem_label.setStyleSheet(f"color: {colours.FRESHNESS['failed'].text};")
        layout.addWidget(self.problem_label)
        self.note_label = QLabel()  # how a typed value was taken, e.g. an rms voltage as its crest
        self.note_label.setWordWrap(True)
        layout.addWidget(self.note_label)
        layout.addStretch(1)

        self.title_edit.editingFinished.connect(lambda: self._edit_model(title=self.title_edit.text()))
        self.unit_combo.activated.connect(self._on_unit_chosen)
        self.density_combo.activated.connect(lambda _: self._edit_model(mesh_density=self.density_combo.currentText()))
        self.eps_edit.editingFinished.connect(self._on_eps_edited)
        self._form_key = None
        self.fields: dict[str, QLineEdit] = {}
        self.typed = TypedTexts()
        document.events.connect("model_changed", self._on_model_changed)
        document.events.connect("selection_changed", self._on_selection_changed)
        self._on_model_changed(document.model)

    # ---- document -> widgets ---------------------------------------------------------------
    def _on_model_changed(self, model) -> None:
        self.title_edit.blockSignals(True)
        self.title_edit.setText(model.title)
        self.title_edit.setCursorPosition(0)  # a long title shows its start, not its end
        self.title_edit.blockSignals(False)
        self.eps_edit.show_value(model.background_eps_r, self.typed.text_for("background_eps_r", model.background_eps_r))
        for combo, text in ((self.unit_combo, model.unit), (self.density_combo, model.mesh_density)):
            combo.blockSignals(True)
            combo.setCurrentText(text)
            combo.blockSignals(False)
        self._refresh_part()
        self._show_shape_problem()

    def _on_selection_changed(self, ref) -> None:
        self.show_problem("")
        self.note_label.setText("")
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
        numbers: dict[str, float] = {}  # by field key, SI for potential and charge, model units for lengths
        texts: dict[str, str] = {}
        if ref.kind == "plane":
            numbers["plane_y"] = model.ground_plane.y
        else:
            shape = edits.shape_of(model, ref)
            numbers.update(shape_lengths(shape))
            points = points_text(shape, model.unit)
            if points is not None:
                texts["points"] = points
        if ref.kind == "conductor":
            c = model.conductors[ref.index]
            texts["name"] = c.name
            numbers.update(potential=c.potential_V, charge=c.charge_C_per_m)
            self._set_combo(self.role_combo, ROLE_LABELS[c.role])
            self.member_combo.blockSignals(True)
            self.member_combo.clear()
            self.member_combo.addItems(list(model.conductor_names) + ["(a new conductor)"])
            self.member_combo.setCurrentText(c.name)
            self.member_combo.blockSignals(False)
            self.color_button.setStyleSheet(f"background: {colours.display_colour(c, ref.index)};")
            self.fields["potential"].setEnabled(c.role == "fixed")
            self.fields["charge"].setEnabled(c.role == "floating")
        if ref.kind == "dielectric":
            d = model.dielectrics[ref.index]
            texts["name"] = d.name
            numbers["eps_r"] = d.eps_r
            self._set_combo(self.material_combo, d.material if d.material in material_names() else "(own value)")
        scale = model.metres_per_unit
        for key, number in numbers.items():
            edit = self.fields.get(key)
            if isinstance(edit, QuantityEdit):
                if edit.unit == "m":
                    edit.set_display_unit(model.unit)  # a unit conversion keeps the form
                value_si = number * scale if edit.unit == "m" else number
                edit.show_value(value_si, self.typed.text_for(self._typed_key(key), value_si))
        for key, text in texts.items():
            if key in self.fields:
                kept = self.typed.text_for(self._typed_key(key), hash(text)) if key == "points" else None
                # (a typed vertex list is remembered against the text the model gives back for it)
                self.fields[key].blockSignals(True)
                self.fields[key].setText(kept or text)
                self.fields[key].setCursorPosition(0)
                self.fields[key].blockSignals(False)

    def _typed_key(self, key: str):
        """Where a typed text is remembered: the selected part and the field."""
        ref = self.document.selection
        return (None if ref is None else (ref.kind, ref.index, ref.shape), key)

    def _part_name(self) -> str:
        ref, model = self.document.selection, self.document.model
        if ref is None or ref.kind == "plane":
            return "ground plane"
        return (model.conductors if ref.kind == "conductor" else model.dielectrics)[ref.index].name

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
            self._add_field("plane_y", "height y", self._on_plane_edited, "m", unit)
            return
        self.part_box.setTitle(f"Selected {kind}: {shape_key[0]}")
        if kind == "conductor":
            self._add_field("name", "conductor name", lambda: self._edit_conductor(name=self.fields["name"].text()))
            self.role_combo = QComboBox()
            self.role_combo.addItems(list(ROLE_LABELS.values()))
            self.role_combo.activated.connect(self._on_role_chosen)
            self.part_form.addRow("role", self.role_combo)
            self._add_field("potential", "potential", self._on_potential_edited, "V", "V")
            self.fields["potential"].unit_label.setText(POTENTIAL_UNIT_NOTE)
            self.fields["potential"].unit_label.setToolTip(
                "Potentials are crest (peak) values. Type '12 kV rms' to give an rms value: it is taken as its "
                "crest, √2 × rms for a sine wave, and the note under the fields says so.")
            self._add_field("charge", "net charge", self._on_charge_edited, "C/m", "C/m")
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
            self._add_field("eps_r", "relative permittivity εr", self._on_eps_r_edited, "", "")
        for label, field in shape_key[1]:
            if field == "points":
                self._add_field(field, f"{label} ({unit})", self._on_shape_edited)
            else:
                self._add_field(field, label, self._on_shape_edited, "m", unit)

    def _add_field(self, key: str, label: str, handler, unit: str | None = None, display_unit: str = "") -> None:
        """A row of the part's form: a text field, or a value with a unit when ``unit`` is given."""
        if unit is None:
            edit = QLineEdit()
            row: QWidget = edit
        else:
            edit = QuantityEdit(unit, f"{label} of {self._part_name()}", display_unit)
            row = edit.with_unit()
        edit.setObjectName(f"field_{key}")
        edit.editingFinished.connect(handler)
        self.fields[key] = edit
        self.part_form.addRow(label, row)

    # ---- widgets -> document ---------------------------------------------------------------
    def show_problem(self, message: str) -> None:
        self.problem_label.setText(message)
        self.problem_changed.emit(message)
        if message:
            self.note_label.setText("")

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
        self._typed_edit(self.eps_edit, "background_eps_r",
                         lambda v: self._edit_model(background_eps_r=v))

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
        edit = self.fields[key]
        assert isinstance(edit, QuantityEdit)
        self._typed_edit(edit, self._typed_key(key), then)

    def _typed_edit(self, edit: QuantityEdit, typed_key, then) -> None:
        """Read ``edit`` (value and unit), remember the text, and pass the SI value on."""
        try:
            quantity = edit.quantity()
        except SolverError as exc:
            self.show_problem(f"Not applied: {exc}")
            return
        self.typed.remember(typed_key, edit.text().strip(), quantity.value_si)
        then(quantity.value_si)
        if not self.problem_label.text():
            self.note_label.setText(quantity.note)

    def _on_role_chosen(self, index: int) -> None:
        self._edit_conductor(role=list(ROLE_LABELS)[index])

    def _on_color_clicked(self) -> None:
        ref = self.document.selection
        color = QColorDialog.getColor(QColor(colours.display_colour(self.document.model.conductors[ref.index], ref.index)), self)
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
        scale = self.document.model.metres_per_unit
        self._number_edit("plane_y", lambda v: self._apply(
            lambda: edits.set_ground_plane(self.document.model, float(f"{v / scale:.12g}")), "Move ground plane"))

    def _on_shape_edited(self) -> None:
        ref, model = self.document.selection, self.document.model
        if ref is None or ref.kind == "plane":
            return
        old = edits.shape_of(model, ref)
        keys = [key for _, key in shape_fields(old)]
        values = {key: self.fields[key].text() for key in keys}
        for key in keys:  # remember what was typed, once it reads
            edit = self.fields[key]
            try:
                if isinstance(edit, QuantityEdit):
                    self.typed.remember(self._typed_key(key), edit.text().strip(), edit.value_si())
                else:
                    parse_points(edit.text(), model.unit, model.metres_per_unit)
            except (SolverError, ValueError):
                continue
        self._apply(lambda: edits.replace_shape(model, ref, shape_from_values(
            values, old, model.unit, model.metres_per_unit, self._part_name())), "Change shape")
        new_points = points_text(edits.shape_of(self.document.model, ref), model.unit) if "points" in keys else None
        if new_points is not None and not self.problem_label.text():
            self.typed.remember(self._typed_key("points"), values["points"].strip(), hash(new_points))
            self._refresh_part()
