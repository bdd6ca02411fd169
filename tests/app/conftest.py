"""Fixtures for the desktop-program tests: offscreen Qt, a private recovery folder and settings."""

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import pytest  # noqa: E402


@pytest.fixture(autouse=True)
def private_recovery(tmp_path, monkeypatch):
    """Keep recovery files of the tests away from the user's."""
    folder = tmp_path / "recovery"
    monkeypatch.setenv("EDGEWISE_RECOVERY_DIR", str(folder))
    return folder


@pytest.fixture
def settings(tmp_path):
    from PySide6.QtCore import QSettings

    return QSettings(str(tmp_path / "settings.ini"), QSettings.IniFormat)


@pytest.fixture
def window(qtbot, settings):
    """A main window with an empty drawing, coarse figures and no automatic re-solve."""
    from app.main_window import MainWindow

    w = MainWindow(settings, grid_points=24, n_field_lines=6)
    w.auto_solve = False
    w.show()
    qtbot.waitExposed(w)
    w.canvas.plotItem.vb.setRange(xRange=(-50, 50), yRange=(-10, 60), padding=0)
    qtbot.wait(10)
    yield w
    w.runner.cancel()
    w.runner.wait()
    w.document.mark_saved(w.document.path or (settings.fileName() + ".json"))
    w.close()
    w.deleteLater()
    qtbot.wait(1)


class ShownMessages(list):
    """Message boxes shown through QMessageBox.exec: (icon, title, text, text format) each."""

    answer = None  # the button exec() returns (None: Ok)


@pytest.fixture
def shown_messages(monkeypatch):
    """Record every modal message box instead of showing it; set ``.answer`` to reply."""
    from PySide6.QtWidgets import QMessageBox

    shown = ShownMessages()

    def fake_exec(box):
        shown.append((box.icon(), box.windowTitle(), box.text(), box.textFormat()))
        return int((shown.answer or QMessageBox.Ok).value)

    monkeypatch.setattr(QMessageBox, "exec", fake_exec)
    return shown
