"""The mouse wheel over a numeric field of a panel steps its value, as an edit.

A text field holding one number (optionally followed by a unit, "12.5" or "150 kV") steps by
one unit of its last typed digit per wheel notch ("12.5" steps by 0.1, "60" by 1), ten times
that with Ctrl held; the field's ``editingFinished`` is then emitted, so the panel applies the
value exactly as if it had been typed (one undoable edit per notch) and ``stepped`` is
emitted for the window to solve at once. Fields holding anything else (points, names) keep
the wheel for scrolling.
"""

from __future__ import annotations

import re

from PySide6.QtCore import QEvent, QObject, Qt, Signal
from PySide6.QtWidgets import QLineEdit, QWidget

_NUMBER = re.compile(r"^\s*([+-]?)(\d+)(?:\.(\d*))?(\s*[^\d\s,;.+eE-].*)?\s*$")


def stepped_text(text: str, notches: int, coarse: bool = False) -> str | None:
    """``text`` with its number moved by ``notches`` units of its last typed digit (x10 when
    ``coarse``), keeping the digits after the point and any unit; None when ``text`` is not
    one plain decimal number (exponents and lists are left alone)."""
    match = _NUMBER.match(text)
    if match is None:
        return None
    sign, whole, frac, unit = match.group(1), match.group(2), match.group(3), match.group(4) or ""
    places = len(frac) if frac else 0
    scaled = int(whole + (frac or "")) * (-1 if sign == "-" else 1)
    scaled += notches * (10 if coarse else 1)
    out = f"{scaled / 10**places:.{places}f}" if places else str(scaled)
    return out + unit


class WheelSteps(QObject):
    """Event filter for a panel: the wheel over a numeric QLineEdit inside it steps the value."""

    stepped = Signal(QLineEdit)

    def __init__(self, panel: QWidget) -> None:
        super().__init__(panel)
        self.panel = panel
        panel.installEventFilter(self)
        for edit in panel.findChildren(QLineEdit):
            edit.installEventFilter(self)
        self._watch_new_children(panel)

    def _watch_new_children(self, widget: QWidget) -> None:
        for child in widget.findChildren(QWidget):
            child.installEventFilter(self)

    def eventFilter(self, watched: QObject, event: QEvent) -> bool:  # noqa: N802 (Qt name)
        kind = event.type()
        if kind == QEvent.ChildAdded:
            child = event.child()
            if isinstance(child, QWidget):
                # a field may arrive inside a container (a value with its unit label)
                child.installEventFilter(self)
                self._watch_new_children(child)
            return False
        if kind != QEvent.Wheel or not isinstance(watched, QLineEdit) or not watched.isEnabled():
            return False
        if watched.isReadOnly():
            return False
        notches = int(event.angleDelta().y() / 120)
        if notches == 0:
            return False
        new = stepped_text(watched.text(), notches, bool(event.modifiers() & Qt.ControlModifier))
        if new is None:
            return False
        watched.setText(new)
        watched.editingFinished.emit()
        self.stepped.emit(watched)
        return True
