"""Message boxes that show their text as plain text.

Qt guesses whether a message is rich text; a conductor named ``<b>x</b>`` would then be
shown bold and a name with ``<`` could swallow the rest of the message. Every message that
may hold a user's name goes through here.
"""

from __future__ import annotations

from PySide6.QtCore import Qt
from PySide6.QtWidgets import QMessageBox, QWidget

_ICONS = {
    "critical": QMessageBox.Critical,
    "warning": QMessageBox.Warning,
    "information": QMessageBox.Information,
    "question": QMessageBox.Question,
}


def message_box(parent: QWidget | None, kind: str, title: str, text: str, buttons=QMessageBox.Ok) -> QMessageBox:
    """A modal message box with ``text`` as plain text (not yet shown)."""
    box = QMessageBox(_ICONS[kind], title, text, buttons, parent)
    box.setTextFormat(Qt.PlainText)
    return box


def show_message(parent: QWidget | None, kind: str, title: str, text: str) -> None:
    """Show ``text`` (plain) in a modal box of ``kind``: critical, warning or information."""
    message_box(parent, kind, title, text).exec()


def ask(parent: QWidget | None, title: str, text: str, buttons, default) -> QMessageBox.StandardButton:
    """Ask a question with plain ``text``; returns the button pressed."""
    box = message_box(parent, "question", title, text, buttons)
    box.setDefaultButton(default)
    return QMessageBox.StandardButton(box.exec())
