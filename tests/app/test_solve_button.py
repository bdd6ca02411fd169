"""The Solve button stands out and shows the state of the results (not solved, solving, up to
date, out of date, cannot solve), always agreeing with the summary block."""

import pytest
from app_helpers import wait_for_solve

from app import colours, edits
from app.files import project_files as files


@pytest.mark.parametrize("state", sorted(colours.SOLVE_BUTTON))
def test_every_state_of_the_button_is_legible(state):
    _, text, fill, _ = colours.SOLVE_BUTTON[state]
    assert colours.contrast_ratio(text, fill) >= 4.5  # WCAG 2.1 minimum for text (common practice)


def test_the_button_follows_the_results_through_a_day_of_work(window, qtbot):
    button = window.commands.solve_button
    assert button.isVisible() or not window.isVisible()
    assert button.state == "none" and button.text().startswith("\u25b6 Solve")
    window.auto_solve = False
    window.commands.open(files.SAMPLES_DIR / "coaxial_feeder.json")
    assert button.state in ("solving", "fresh")
    wait_for_solve(qtbot, window)
    assert button.state == "fresh" and button.text() == "\u2713 Up to date"
    assert button.state == window.results_panel.summary.state
    window.document.apply(edits.update_conductor(window.document.model, 0, potential_V=2.0), "Potential")
    assert button.state == "stale" and "out of date" in button.text()
    # Strongly filled when a solve is wanted, tinted when the results are up to date.
    assert colours.SOLVE_BUTTON["stale"][2] in button.styleSheet()
    with qtbot.waitSignal(window.runner.busy_changed, timeout=5000):
        button.click()
    assert button.state in ("solving", "fresh")
    wait_for_solve(qtbot, window)
    assert button.state == "fresh" and colours.SOLVE_FRESH_FILL in button.styleSheet()


def test_a_drawing_that_cannot_be_solved_says_so_on_the_button(window):
    window.solve()  # an empty drawing: nothing to solve
    assert window.commands.solve_button.state == "failed"
    assert "retry" in window.commands.solve_button.text()


@pytest.mark.parametrize("state", sorted(colours.SOLVE_BUTTON))
def test_the_button_is_filled_in_every_state_never_white_like_the_tools(state):
    _, text, fill, outline = colours.SOLVE_BUTTON[state]
    assert fill.lower() != colours.PAGE.lower()
    assert colours.contrast_ratio(outline, colours.PAGE) >= 3.0  # its edge stands out from the bar (WCAG 2.1 non-text)


def test_solve_is_the_one_primary_action_of_the_window(window, qtbot):
    from PySide6.QtWidgets import QAbstractButton, QToolBar

    button = window.commands.solve_button
    tools = [b for bar in window.findChildren(QToolBar) for b in bar.findChildren(QAbstractButton)
             if b is not button and b.isVisible()]
    assert len(tools) >= 8  # the drawing tools beside it
    # the only filled button with larger, bold text in the window's bars ...
    assert button.font().bold() and all(not b.font().bold() for b in tools)
    assert button.font().pointSizeF() > max(b.font().pointSizeF() for b in tools)
    assert all("background" not in b.styleSheet() for b in tools)
    # ... standing taller than the tools, and one width whatever the state says
    assert button.height() >= max(b.height() for b in tools)
    widths = set()
    for state in colours.SOLVE_BUTTON:
        button.set_state(state)
        qtbot.wait(1)
        widths.add(button.width())
        assert button.width() >= button.sizeHint().width() - 1, state
    assert len(widths) == 1
    # at the smallest window the layout walk covers, the button stays on the bar (not in its overflow menu)
    window.resize(1024, 640)
    qtbot.wait(20)
    bar = button.parentWidget()
    assert button.isVisible() and bar.rect().contains(button.geometry())
