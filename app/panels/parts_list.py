"""The parts list: conductors with their shapes, dielectric regions and the ground plane.

Selecting a row selects the part on the drawing and the other way round.
"""

from __future__ import annotations

from PySide6.QtGui import QColor, QIcon, QPixmap
from PySide6.QtWidgets import QTreeWidget, QTreeWidgetItem

from app import colours
from app.document import PartRef
from app.units import format_measured, format_plain

#: Figures of a typed value shown back: enough to show what was typed, not the round-off of a
#: unit conversion (0.30479999999999996 reads 0.3048).
TYPED_DIGITS = 10


#: Figures of a potential or charge in the list: a value as typed ("9.8 kV") reads as typed, a
#: computed one (400 kV x sqrt(2/3) = 326598.632 V) reads "326.599 kV", not ten figures.
LISTED_DIGITS = 6


def role_text(conductor) -> str:
    """A conductor's role and value, e.g. "9.8 kV", "floating, 2 nC/m", "reference, 0 V"."""
    if conductor.role == "fixed":
        return format_measured(conductor.potential_V, "V", digits=LISTED_DIGITS)
    if conductor.role == "floating":
        return f"floating, {format_measured(conductor.charge_C_per_m, 'C/m', digits=LISTED_DIGITS)}"
    return "reference, 0 V"


def shape_text(shape, unit: str) -> str:
    """A shape's one-line description with its dimensions through the shared formatter
    (no exponent for ordinary sizes, true minus, no round-off of a unit conversion)."""
    return shape.describe(unit, lambda v: format_plain(v, TYPED_DIGITS))


def swatch(colour: str) -> QIcon:
    """A small square of a conductor's identity colour (coloured text would be too faint to read)."""
    pixmap = QPixmap(12, 12)
    pixmap.fill(QColor(colour))
    return QIcon(pixmap)


class PartsList(QTreeWidget):
    def __init__(self, document, parent=None) -> None:
        super().__init__(parent)
        self.document = document
        self.setHeaderLabels(["part", "role / value"])
        self.setColumnWidth(0, 170)
        self._refs: dict[int, PartRef] = {}
        self._updating = False
        self.itemSelectionChanged.connect(self._on_item_selection_changed)
        document.events.connect("model_changed", self._on_model_changed)
        document.events.connect("selection_changed", self._on_selection_changed)
        self._on_model_changed(document.model)

    def _on_model_changed(self, model) -> None:
        self._updating = True
        self.clear()
        self._items: dict[PartRef, QTreeWidgetItem] = {}
        for i, c in enumerate(model.conductors):
            value = role_text(c)
            top = QTreeWidgetItem([c.name, value])
            top.setIcon(0, swatch(colours.display_colour(c, i)))
            self.addTopLevelItem(top)
            self._items[PartRef("conductor", i, 0)] = top
            if len(c.shapes) > 1:
                for j, s in enumerate(c.shapes):
                    child = QTreeWidgetItem([shape_text(s, model.unit), ""])
                    top.addChild(child)
                    self._items[PartRef("conductor", i, j)] = child
                top.setExpanded(True)
            else:
                top.setText(1, f"{value}  ({shape_text(c.shapes[0], model.unit)})")
        for i, d in enumerate(model.dielectrics):
            item = QTreeWidgetItem([d.name, f"εr = {format_plain(d.eps_r, TYPED_DIGITS)}"])
            self.addTopLevelItem(item)
            self._items[PartRef("dielectric", i, 0)] = item
        if model.ground_plane is not None:
            y = format_plain(model.ground_plane.y, TYPED_DIGITS)
            item = QTreeWidgetItem(["ground plane", f"y = {y} {model.unit}, 0 V"])
            self.addTopLevelItem(item)
            self._items[PartRef("plane")] = item
        self._updating = False
        self._on_selection_changed(self.document.selection)

    def _on_selection_changed(self, ref) -> None:
        self._updating = True
        self.clearSelection()
        item = self._items.get(ref) if ref is not None else None
        if item is not None:
            item.setSelected(True)
            self.scrollToItem(item)
        self._updating = False

    def _on_item_selection_changed(self) -> None:
        if self._updating:
            return
        chosen = self.selectedItems()
        if not chosen:
            self.document.select(None)
            return
        target = chosen[0].child(0) if chosen[0].childCount() else chosen[0]
        for ref, item in self._items.items():
            if item is target:
                self.document.select(ref)
                return

    def ref_of(self, item) -> PartRef | None:
        for ref, it in self._items.items():
            if it is item:
                return ref
        return None
