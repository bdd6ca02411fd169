"""A line edit for values with units ("150 kV", "12 mil", "2.2 pF/m"), its unit shown beside it.

Reading the text is the solver's :func:`solver.read_quantity` (pure unit handling); this
module only holds the widget and remembers what was typed, so a field shows "12 mil" back
as long as the model still holds that value, and a plain number in the field's display unit
once the value changed by other means (drag, undo, unit conversion).
"""

from __future__ import annotations

import math

from PySide6.QtWidgets import QHBoxLayout, QLabel, QLineEdit, QWidget

from solver import LENGTH_UNITS, TypedQuantity, read_quantity, unit_choices

#: Size in SI of the display units a bare number may mean (other than the SI unit itself).
DISPLAY_UNIT_SIZES = {**{u: s for u, s in LENGTH_UNITS.items()}, "kPa": 1e3, "°C": 1.0}
DISPLAY_UNIT_OFFSETS = {"°C": 273.15}


def display_number(value_si: float, display_unit: str) -> str:
    """``value_si`` as a plain number in ``display_unit``, without round-off noise
    (10 significant figures at most, e.g. 0.3048 rather than 0.30479999999999996)."""
    size = DISPLAY_UNIT_SIZES.get(display_unit, 1.0)
    number = (value_si - DISPLAY_UNIT_OFFSETS.get(display_unit, 0.0)) / size
    return f"{number:.10g}".replace("-", "−") if number < 0 else f"{number:.10g}"


def same_value(a: float, b: float) -> bool:
    """True when two SI values agree to round-off (what a file or a unit conversion adds)."""
    return a == b or math.isclose(a, b, rel_tol=1e-9, abs_tol=0.0)


class TypedTexts:
    """What was last typed in each field, kept while the model holds the value it meant."""

    def __init__(self) -> None:
        self._texts: dict[object, tuple[str, float]] = {}

    def remember(self, key: object, text: str, value_si: float) -> None:
        self._texts[key] = (text, value_si)

    def text_for(self, key: object, value_si: float) -> str | None:
        """The typed text for ``key`` when it still means ``value_si``, else None."""
        kept = self._texts.get(key)
        if kept is None or not same_value(kept[1], value_si):
            return None
        return kept[0]


class QuantityEdit(QLineEdit):
    """A line edit that reads a value with an optional unit.

    Parameters
    ----------
    unit : str
        SI unit the field holds ("m", "V", "C/m", "F/m", "Pa", "K", "" for a plain number).
    field : str
        The field's name in messages ("potential of bar A").
    display_unit : str, optional
        Unit of a bare number and of values shown back (e.g. the model's "mm"); default ``unit``.
    """

    def __init__(self, unit: str, field: str, display_unit: str | None = None, parent=None) -> None:
        super().__init__(parent)
        self.unit = unit
        self.field = field
        self.unit_label = QLabel()
        self.set_display_unit(display_unit if display_unit is not None else unit)

    def set_display_unit(self, display_unit: str) -> None:
        self.display_unit = display_unit
        self.unit_label.setText(display_unit)
        self.setToolTip(f"A number in {display_unit or 'plain figures'}"
                        + (f", or with a unit: {unit_choices(self.unit)}" if self.unit else "")
                        + ". SI prefixes are accepted (k, M, m, u, n, p).")

    def quantity(self) -> TypedQuantity:
        """The typed value in SI (raises :class:`solver.QuantityError` naming the field)."""
        default = self.display_unit if self.display_unit in DISPLAY_UNIT_SIZES else None
        return read_quantity(self.text(), self.unit, self.field, default_unit=default)

    def value_si(self) -> float:
        return self.quantity().value_si

    def show_value(self, value_si: float, typed: str | None = None) -> None:
        """Show ``typed`` when given (what the user typed for this value), else the number
        in the display unit; the field's signals stay quiet."""
        self.blockSignals(True)
        self.setText(typed if typed is not None else display_number(value_si, self.display_unit))
        self.setCursorPosition(0)
        self.blockSignals(False)

    def with_unit(self, parent=None) -> QWidget:
        """The edit and its unit label side by side, for a form row."""
        box = QWidget(parent)
        row = QHBoxLayout(box)
        row.setContentsMargins(0, 0, 0, 0)
        row.addWidget(self, 1)
        row.addWidget(self.unit_label)
        return box
