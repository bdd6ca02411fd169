"""The autouse guard of tests/app/conftest.py: an unexpected modal dialog fails a test at once."""

import pytest
from app_helpers import UnexpectedDialog


def test_an_unexpected_message_box_raises_instead_of_waiting(qtbot, no_unexpected_dialogs):
    from PySide6.QtWidgets import QFileDialog, QMessageBox

    from app.messages import show_message

    with pytest.raises(UnexpectedDialog, match="'Oops': something"):
        show_message(None, "warning", "Oops", "something")
    with pytest.raises(UnexpectedDialog, match="QMessageBox.question"):
        QMessageBox.question(None, "Sure?", "Really?")
    with pytest.raises(UnexpectedDialog, match="QFileDialog.getOpenFileName"):
        QFileDialog.getOpenFileName(None, "Open", "", "*.json")
    assert len(no_unexpected_dialogs) == 3
    no_unexpected_dialogs.clear()  # seen and expected here, so the teardown check passes


def test_a_test_opts_in_with_the_shown_messages_fixture(qtbot, shown_messages):
    from app.messages import show_message

    show_message(None, "information", "Hello", "plain text")
    assert [m[1:3] for m in shown_messages] == [("Hello", "plain text")]


def test_a_dialog_inside_a_slot_still_fails_the_test(qtbot, no_unexpected_dialogs):
    from PySide6.QtWidgets import QPushButton

    from app.messages import show_message

    button = QPushButton()
    qtbot.addWidget(button)
    button.clicked.connect(lambda: show_message(button, "critical", "From a slot", "x"))
    with qtbot.capture_exceptions() as raised:
        button.click()
    assert raised and raised[0][0] is UnexpectedDialog
    assert no_unexpected_dialogs == ["QMessageBox.exec 'From a slot': x"]
    no_unexpected_dialogs.clear()
