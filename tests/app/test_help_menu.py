"""Help > Mouse and keys, Safety and About; the first-run hint on an empty drawing."""

import importlib.metadata

from app_helpers import drag
from PySide6.QtWidgets import QDialog

from app import cautions
from app.help_menu import about_dialog, safety_dialog


def test_help_menu_has_mouse_and_keys_safety_and_about(window, monkeypatch):
    assert {"Mouse and keys", "Safety (high voltage)…", "About Edgewise…"} <= set(window.help_actions)
    opened = []
    monkeypatch.setattr(QDialog, "exec", lambda self: opened.append(self.windowTitle()) or 0)
    window.help_actions["About Edgewise…"].trigger()
    window.help_actions["Safety (high voltage)…"].trigger()
    assert opened == ["About Edgewise", "Safety — using Edgewise near high voltage"]


def test_about_names_version_licence_and_library_versions(qtbot):
    dialog = about_dialog()
    qtbot.addWidget(dialog)
    text = dialog.text.toPlainText()
    assert "Edgewise 0.1.0" in text and "Licence: MIT" in text
    for name in ("numpy", "scipy", "shapely", "pyqtgraph"):
        line = next(line for line in text.splitlines() if line.startswith(name))
        assert importlib.metadata.version(name) in line, line


def test_safety_renders_the_markdown_file(qtbot):
    dialog = safety_dialog()
    qtbot.addWidget(dialog)
    text = dialog.text.toPlainText()
    assert "# Safety" not in text  # rendered, not shown as source
    assert text.startswith("Safety: what Edgewise tells you")
    assert " ".join(cautions.STANDING_STATEMENT.split()[:6]) in " ".join(text.split())


def test_first_run_hint_shows_on_an_empty_drawing_only(window):
    hint = window.first_run_hint.label
    assert hint.isVisible() and "Open a sample" in hint.text()
    window.canvas.set_tool("rectangle")
    drag(window.canvas, (-20, 10), (0, 20))
    assert not hint.isVisible()
    window.document.undo()
    assert hint.isVisible()
    for width in (900, 360):  # the hint wraps inside a narrow canvas, never cut at its edge
        window.canvas.resize(width, 500)
        assert window.canvas.rect().contains(hint.geometry())
        assert hint.height() >= hint.heightForWidth(hint.width())
