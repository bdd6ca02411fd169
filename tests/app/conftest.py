"""Fixtures for the desktop-program tests: offscreen Qt, a private recovery folder and settings."""

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import pytest  # noqa: E402
from app_helpers import UnexpectedDialog  # noqa: E402


@pytest.fixture(autouse=True)
def private_recovery(tmp_path, monkeypatch):
    """Keep recovery files of the tests away from the user's."""
    folder = tmp_path / "recovery"
    monkeypatch.setenv("EDGEWISE_RECOVERY_DIR", str(folder))
    return folder


@pytest.fixture(autouse=True)
def gui_thread_gc(qapp):
    """Collect cyclic garbage on the GUI thread only, as the program does (app/gui_thread_gc.py);
    at teardown collect the test's garbage here, before any leftover thread could."""
    from app.gui_thread_gc import GuiThreadCollector

    collector = GuiThreadCollector(qapp)
    yield collector
    collector.stop()
    collector.deleteLater()


def pytest_configure(config):
    config.addinivalue_line("markers", "allow_dialogs: the test shows real modal dialogs (and closes them itself)")


#: Modal entry points that wait for the user: (class name, attribute) in PySide6.QtWidgets.
MODAL_ENTRY_POINTS = (
    ("QDialog", "exec"), ("QMessageBox", "exec"),
    ("QMessageBox", "information"), ("QMessageBox", "question"), ("QMessageBox", "warning"),
    ("QMessageBox", "critical"), ("QMessageBox", "about"),
    ("QFileDialog", "getOpenFileName"), ("QFileDialog", "getOpenFileNames"), ("QFileDialog", "getSaveFileName"),
    ("QFileDialog", "getExistingDirectory"), ("QColorDialog", "getColor"), ("QFontDialog", "getFont"),
    ("QInputDialog", "getText"), ("QInputDialog", "getInt"), ("QInputDialog", "getDouble"),
    ("QInputDialog", "getItem"),
)


def _describe_dialog(args) -> str:
    for a in args:
        title = getattr(a, "windowTitle", None)
        if callable(title):
            text = getattr(a, "text", None)
            return f"'{title()}'" + (f": {text()}" if callable(text) else "")
    return ", ".join(repr(a)[:80] for a in args if isinstance(a, str))


@pytest.fixture(autouse=True)
def no_unexpected_dialogs(request, monkeypatch):
    """Fail a test that opens a modal dialog it did not opt in to, instead of letting it stall.

    Every modal entry point (``exec`` of QDialog and QMessageBox, the static QMessageBox,
    QFileDialog, QColorDialog, QFontDialog and QInputDialog functions) raises
    :class:`UnexpectedDialog`. A test opts in by replacing the entry point itself (the
    ``shown_messages`` fixture, ``monkeypatch.setattr``, ``mock.patch.object``), or by the
    ``allow_dialogs`` marker. Raised inside a Qt slot the error may be swallowed, so the test
    also fails at teardown when any dialog was stopped.
    """
    if request.node.get_closest_marker("allow_dialogs"):
        yield []
        return
    from PySide6 import QtWidgets

    stopped: list[str] = []

    def guard(where: str):
        def refuse(*args, **kwargs):
            what = f"{where} {_describe_dialog(args)}".strip()
            stopped.append(what)
            raise UnexpectedDialog(f"unexpected modal dialog {what}; opt in with the shown_messages fixture, "
                                   "a monkeypatch of the call, or @pytest.mark.allow_dialogs")
        return refuse

    for cls_name, attr in MODAL_ENTRY_POINTS:
        cls = getattr(QtWidgets, cls_name)
        monkeypatch.setattr(cls, attr, guard(f"{cls_name}.{attr}"))
    yield stopped
    if stopped:
        pytest.fail("unexpected modal dialog(s): " + "; ".join(stopped), pytrace=False)


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
