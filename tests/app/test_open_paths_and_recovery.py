"""Every way of opening a file shows a dialog on bad input and keeps the previous document;
names are shown as plain text; recovery files are per instance, bounded in wait, and a
failing write is told once; saving through a symbolic link keeps the link."""

from __future__ import annotations

import json
import os
import subprocess
import sys

import pytest
from PySide6.QtCore import Qt
from PySide6.QtWidgets import QMessageBox

from app import edits
from app.files import project_files as files
from solver import Circle, Conductor, Model

COAX = files.SAMPLES_DIR / "coaxial_feeder.json"
GONE = "999999999-0a0b0c0d"  # the recovery-file owner of an instance that is not running


def _bad_files(tmp_path):
    good = json.loads(COAX.read_text())
    big = "1" + "0" * 400
    out = {
        "deep": "[" * 100_000 + "]" * 100_000,
        "huge int": json.dumps(good).replace('"radius": 1.0', f'"radius": {big}', 1),
        "tiny radius": json.dumps(good).replace('"radius": 1.0', '"radius": 1e-300', 1),
        "not json": "{",
        "binary": "\x00\xff",
    }
    paths = {}
    for name, text in out.items():
        p = tmp_path / f"{name.replace(' ', '_')}.json"
        p.write_text(text, encoding="utf-8", errors="surrogateescape") if name != "binary" else p.write_bytes(b"\xff\xfe\x00")
        paths[name] = p
    return paths


def test_bad_files_through_file_open_and_recent_keep_the_document(window, tmp_path, shown_messages, monkeypatch):
    monkeypatch.setattr(QMessageBox, "question", lambda *a, **k: QMessageBox.Discard)  # "unsaved changes?"
    assert window.commands.open(COAX)
    window.document.apply(edits.update_conductor(window.document.model, 0, potential_V=7.0), "Potential")
    before, path, undo = window.document.model, window.document.path, window.document.can_undo
    for name, bad in _bad_files(tmp_path).items():
        assert not window.commands.open(bad), name
        assert window.document.model == before and window.document.path == path
        assert shown_messages[-1][0] == QMessageBox.Critical and bad.name in shown_messages[-1][2]
    # recent files go through the same command
    window.commands._remember(_bad_files(tmp_path)["deep"])
    action = window.commands.recent_menu.actions()[0]
    action.trigger()
    assert window.document.model == before and window.document.can_undo == undo


def test_view_settings_of_the_wrong_type_are_ignored_with_a_note(window, tmp_path, caplog):
    data = json.loads(COAX.read_text())
    data["extras"] = {"part_length": "long", "relative_air_density": {"x": 1}, "altitude_m": [1], "other": 3}
    path = tmp_path / "odd_extras.json"
    path.write_text(json.dumps(data))
    assert window.commands.open(path)
    assert window.document.model.extras == {"other": 3}
    assert "view setting 'part_length' ignored" in caplog.text


def test_a_model_the_views_cannot_show_keeps_the_previous_document(window, monkeypatch, shown_messages):
    assert window.commands.open(COAX)
    before = window.document.model

    def broken(*args, **kwargs):
        raise ValueError("a view failed")

    monkeypatch.setattr(window.canvas, "fit_view", broken)
    other = Model(conductors=(Conductor("x", (Circle((0, 0), 1.0),)),))
    assert not window.load_or_keep(other, None)
    assert window.document.model == before and window.document.path == COAX
    assert "a view failed" in shown_messages[-1][2]


def test_names_are_shown_as_plain_text(window, tmp_path, shown_messages):
    data = json.loads(COAX.read_text())
    data["conductors"][0]["name"] = "<b>x</b>"
    data["conductors"][0]["role"] = "sideways"
    path = tmp_path / "rich.json"
    path.write_text(json.dumps(data))
    assert not window.commands.open(path)
    fmt = shown_messages[-1][3]
    assert fmt == Qt.PlainText
    window._show_error("Conductors '<b>x</b>' and '<i>y</i>' touch", [])
    assert "&lt;b&gt;x&lt;/b&gt;" in window.banner.text()  # escaped, so shown literally
    from app.messages import message_box

    box = message_box(window, "critical", "t", "Conductor '<b>x</b>'")
    assert box.textFormat() == Qt.PlainText and box.text() == "Conductor '<b>x</b>'"
    box.deleteLater()


def test_command_line_argument_with_a_bad_file_shows_a_dialog(qtbot, settings, tmp_path, shown_messages):
    from app.__main__ import build_window

    bad = _bad_files(tmp_path)["deep"]
    window = build_window(bad, settings, ask_recovery=False)
    try:
        assert shown_messages and "nested too deeply" in shown_messages[-1][2]
        assert window.document.model.conductors == ()
    finally:
        window.close()


def test_command_line_start_with_a_bad_file_does_not_end_in_a_traceback(tmp_path):
    bad = _bad_files(tmp_path)["huge int"]
    code = (
        "import sys; from unittest import mock; from PySide6.QtWidgets import QMessageBox, QApplication;"
        "from PySide6.QtCore import QTimer;"
        "shown = [];"
        "QMessageBox.exec = lambda box: shown.append(box.text()) or 1024;"
        "QApplication.exec = lambda *a: 0;"
        "import app.__main__ as m; rc = m.main([sys.argv[1]]);"
        "print('SHOWN', shown); sys.exit(rc)"
    )
    env = dict(os.environ, QT_QPA_PLATFORM="offscreen", EDGEWISE_RECOVERY_DIR=str(tmp_path / "rec"))
    run = subprocess.run([sys.executable, "-c", code, str(bad)], capture_output=True, text=True, env=env, timeout=120, check=False,
                         cwd=files.SAMPLES_DIR.parent)
    assert run.returncode == 0, run.stderr
    assert "Traceback" not in run.stderr
    assert "401 digits" in run.stdout


# ---- work lost ---------------------------------------------------------------------------------
def test_recovery_schedule_writes_at_least_every_ten_seconds_while_editing():
    now = [0.0]
    schedule = files.RecoverySchedule(clock=lambda: now[0])
    due = []
    for _ in range(60):  # an edit every 0.5 s for 30 s: never a quiet 1.5 s
        due.append(schedule.edited())
        if due[-1]:
            schedule.written()
        now[0] += 0.5
    writes = [0.5 * i for i, d in enumerate(due) if d]
    edits_made = [0.5 * i for i in range(60) if 0.5 * i <= writes[-1]]
    # every edit is in the recovery file within 10 s of being made
    assert max(min(w for w in writes if w >= t) - t for t in edits_made) <= 10.0
    assert files.RECOVERY_MAX_WAIT_S <= 10.0


def test_continuous_editing_in_the_window_writes_the_recovery_file(window, monkeypatch):
    now = [0.0]
    window._recovery_schedule = files.RecoverySchedule(clock=lambda: now[0])
    model = window.document.model
    for i in range(30):
        model, _ = edits.add_conductor(model, Circle((3.0 * i, 5.0), 1.0))
        window.document.apply(model, "Draw")
        now[0] += 0.5  # faster than the quiet interval
        if files.recovery_path().is_file():
            break
    assert files.recovery_path().is_file()
    assert now[0] <= 10.5


def test_two_instances_keep_their_own_recovery_files(tmp_path):
    model = Model(conductors=(Conductor("w", (Circle((0, 0), 1.0),)),))
    other_running = f"{os.getppid()}-00ff00ff"  # the parent process is alive
    files.write_recovery(model, None, instance=other_running)
    assert files.read_recovery() is None  # another running instance's work is not offered
    files.discard_recovery()
    assert files.recovery_path(other_running).is_file()  # and not deleted by this one
    files.write_recovery(model, tmp_path / "a.json", instance=GONE)
    recovered, original = files.read_recovery()  # an ended instance's work is claimed once
    assert recovered == model and original == tmp_path / "a.json"
    assert not files.recovery_path(GONE).exists() and files.recovery_path().is_file()


def test_a_failing_recovery_write_is_told_once(window, monkeypatch, shown_messages):
    def full_disk(*args, **kwargs):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(files, "write_recovery", full_disk)
    model = window.document.model
    for i in range(3):
        model, _ = edits.add_conductor(model, Circle((3.0 * i, 5.0), 1.0))
        window.document.apply(model, "Draw")
        window._write_recovery()
    warnings = [m for m in shown_messages if m[0] == QMessageBox.Warning]
    assert len(warnings) == 1 and "No space left on device" in warnings[0][2]


@pytest.mark.skipif(not hasattr(os, "symlink"), reason="needs symbolic links")
def test_saving_through_a_symbolic_link_updates_the_linked_file(tmp_path):
    real = tmp_path / "real" / "coax.json"
    real.parent.mkdir()
    real.write_text(COAX.read_text())
    link = tmp_path / "link.json"
    link.symlink_to(real)
    model = files.open_model(link)
    changed = edits.update_conductor(model, 0, potential_V=42.0)
    files.save_model(changed, link)
    assert link.is_symlink() and link.resolve() == real.resolve()
    assert files.open_model(real).conductors[0].potential_V == 42.0
    assert not [p for p in real.parent.iterdir() if p.name.endswith(".tmp")]


def test_a_bad_file_on_the_command_line_is_reported_over_the_shown_window(qtbot, settings, tmp_path, monkeypatch):
    """The message about a file that cannot be opened (here a circle without its radius) comes
    after the main window is on screen, with the window as its parent; the window stays empty."""
    from PySide6.QtWidgets import QMessageBox

    from app.__main__ import build_window

    bad = tmp_path / "missing_radius.json"
    bad.write_text(json.dumps({
        "format": "edgewise-project", "version": 1, "unit": "mm",
        "conductors": [{"name": "go", "role": "fixed", "potential_V": 1.0,
                        "shapes": [{"kind": "circle", "center": [-4.0, 0.0]}]},
                       {"name": "return", "role": "reference",
                        "shapes": [{"kind": "circle", "center": [4.0, 0.0], "radius": 0.65}]}]}), encoding="utf-8")
    seen = []

    def record(box):
        parent = box.parentWidget()
        seen.append((box.text(), parent, parent is not None and parent.isVisible()))
        return int(QMessageBox.Ok.value)

    monkeypatch.setattr(QMessageBox, "exec", record)
    window = build_window(bad, settings, ask_recovery=False)
    try:
        assert len(seen) == 1
        text, parent, parent_shown = seen[0]
        assert "radius" in text and "missing" in text
        assert parent is window and parent_shown
        assert window.document.model.conductors == ()
    finally:
        window.close()
