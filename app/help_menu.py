"""The Help menu's About and Safety windows, and the first-run hint on an empty drawing.

"Mouse and keys" stays with the other commands (:meth:`app.commands.Commands.show_keys`);
:func:`install_help` adds the rest to the window's Help menu and puts the hint on the canvas.
"""

from __future__ import annotations

import html
import importlib.metadata
import platform
import tomllib
from pathlib import Path

from PySide6.QtCore import QEvent, QObject, Qt
from PySide6.QtGui import QAction
from PySide6.QtWidgets import QDialog, QDialogButtonBox, QLabel, QMenu, QTextBrowser, QVBoxLayout

from app import cautions, colours

ROOT = Path(__file__).resolve().parents[1]
SAFETY_FILE = ROOT / "SAFETY.md"
#: The libraries named in Help > About, in the order a reader looks for them.
LIBRARIES = ("numpy", "scipy", "shapely", "PySide6-Essentials", "pyqtgraph", "ezdxf", "svgelements", "pyfmmlib")

FIRST_RUN_HINT = (
    "<b>An empty drawing.</b><br>"
    "Open a sample: <i>File › Open a sample</i>, or draw:<br>"
    "R rectangle, C circle, U tube, P polygon, G ground plane, I dielectric;<br>"
    "type exact values with units in Properties (\u201c150 kV\u201d, \u201c12 mil\u201d).<br>"
    "F5 solves. <i>Help › Mouse and keys</i> lists the rest.")


def program_version() -> str:
    """The program's version: from the installed package, else from pyproject.toml."""
    try:
        with open(ROOT / "pyproject.toml", "rb") as f:
            return str(tomllib.load(f)["project"]["version"])
    except (OSError, KeyError, tomllib.TOMLDecodeError):
        pass
    try:
        return importlib.metadata.version("edgewise")
    except importlib.metadata.PackageNotFoundError:
        return "unknown"


def program_licence() -> str:
    try:
        with open(ROOT / "pyproject.toml", "rb") as f:
            licence = tomllib.load(f)["project"]["license"]
        return str(licence.get("text", licence) if isinstance(licence, dict) else licence)
    except (OSError, KeyError, tomllib.TOMLDecodeError):
        return "see the project's licence file"


def library_versions() -> list[tuple[str, str]]:
    """(library, version) of Python and each library the program uses; "not installed" when absent."""
    out = [("Python", platform.python_version())]
    for name in LIBRARIES:
        try:
            out.append((name, importlib.metadata.version(name)))
        except importlib.metadata.PackageNotFoundError:
            out.append((name, "not installed"))
    try:
        from PySide6.QtCore import qVersion

        out.append(("Qt", qVersion()))
    except ImportError:
        pass
    return out


def about_html() -> str:
    rows = "".join(f"<li>{html.escape(n)} {html.escape(v)}</li>" for n, v in library_versions())
    return (f"<h3>Edgewise {html.escape(program_version())}</h3>"
            "<p>A workbench for the 2-D electrostatics of conductor cross-sections: capacitance matrices, "
            "surface and insulation fields, hot spots, by the boundary-element method.</p>"
            f"<p>Licence: {html.escape(program_licence())}.</p>"
            f"<p><b>Libraries</b></p><ul>{rows}</ul>"
            f"<p><small>{html.escape(cautions.STANDING_STATEMENT)}</small></p>")


def safety_markdown() -> str:
    """SAFETY.md as Markdown; when the file is not shipped, the standing statement it holds."""
    try:
        return SAFETY_FILE.read_text(encoding="utf-8")
    except OSError:
        return ("# Safety\n\n(SAFETY.md was not found next to the program; this is its standing statement.)\n\n"
                + cautions.STANDING_STATEMENT)


def _text_dialog(parent, title: str, *, markdown: str | None = None, rich: str | None = None) -> QDialog:
    dialog = QDialog(parent)
    dialog.setWindowTitle(title)
    layout = QVBoxLayout(dialog)
    text = QTextBrowser()
    text.setOpenExternalLinks(True)
    if markdown is not None:
        text.setMarkdown(markdown)
    else:
        text.setHtml(rich or "")
    layout.addWidget(text)
    buttons = QDialogButtonBox(QDialogButtonBox.Close)
    buttons.rejected.connect(dialog.reject)
    layout.addWidget(buttons)
    dialog.text = text  # for tests and screenshots
    dialog.resize(720, 560)
    return dialog


def about_dialog(parent=None) -> QDialog:
    return _text_dialog(parent, "About Edgewise", rich=about_html())


def safety_dialog(parent=None) -> QDialog:
    return _text_dialog(parent, "Safety — using Edgewise near high voltage", markdown=safety_markdown())


class EmptyCanvasHint(QObject):
    """A centred hint over the drawing while the model is empty (no parts, no ground plane)."""

    def __init__(self, canvas, document) -> None:
        super().__init__(canvas)
        self.canvas = canvas
        self.label = QLabel(FIRST_RUN_HINT, canvas)
        self.label.setObjectName("first_run_hint")
        self.label.setTextFormat(Qt.RichText)
        self.label.setAlignment(Qt.AlignCenter)
        self.label.setWordWrap(True)
        self.label.setAttribute(Qt.WA_TransparentForMouseEvents)
        self.label.setStyleSheet(f"background: {colours.rgba(colours.HINT_FILL)}; color: {colours.TEXT}; padding: 14px; "
                                 f"border: 1px solid {colours.HINT_BORDER}; border-radius: 6px;")
        canvas.installEventFilter(self)
        document.events.connect("model_changed", self._on_model_changed)
        self._on_model_changed(document.model)

    def _on_model_changed(self, model) -> None:
        empty = not (model.conductors or model.dielectrics or model.ground_plane is not None)
        self.label.setVisible(empty)
        if empty:
            self._place()

    def eventFilter(self, watched, event) -> bool:  # noqa: N802 (Qt's name)
        if watched is self.canvas and event.type() == QEvent.Resize:
            self._place()
        return False

    def _place(self) -> None:
        self.label.setFixedWidth(max(120, min(480, self.canvas.width() - 24)))  # wraps in a narrow canvas
        self.label.setFixedHeight(self.label.heightForWidth(self.label.width()))
        x = max(0, (self.canvas.width() - self.label.width()) // 2)
        y = max(0, (self.canvas.height() - self.label.height()) // 3)
        self.label.move(x, y)
        self.label.raise_()


def _help_menu(window) -> QMenu:
    for action in window.menuBar().actions():
        if action.menu() is not None and action.text().replace("&", "") == "Help":
            return action.menu()
    return window.menuBar().addMenu("&Help")


def install_help(window) -> None:
    """Add Help > Safety and Help > About to ``window``'s Help menu (after "Mouse and keys") and
    the first-run hint to its canvas."""
    menu = _help_menu(window)
    menu.addSeparator()
    for text, make in (("Safety (high voltage)…", safety_dialog), ("About Edgewise…", about_dialog)):
        action = QAction(text, window)
        action.triggered.connect(lambda checked=False, m=make: m(window).exec())
        menu.addAction(action)
    window.help_actions = {a.text(): a for a in menu.actions() if a.text()}
    window.first_run_hint = EmptyCanvasHint(window.canvas, window.document)
