"""Mouse and wait helpers for the desktop-program tests."""

from PySide6.QtCore import QPoint, QPointF, Qt
from PySide6.QtTest import QTest


def to_pixel(canvas, x: float, y: float) -> QPoint:
    """Viewport pixel of the model point (x, y)."""
    scene = canvas.plotItem.vb.mapViewToScene(QPointF(x, y))
    return canvas.mapFromScene(scene)


def drag(canvas, a, b, steps: int = 5) -> None:
    """Press at model point ``a``, move to ``b`` in steps, release there."""
    vp = canvas.viewport()
    QTest.mousePress(vp, Qt.LeftButton, Qt.NoModifier, to_pixel(canvas, *a))
    for k in range(1, steps + 1):
        t = k / steps
        QTest.mouseMove(vp, to_pixel(canvas, a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1])))
    QTest.mouseRelease(vp, Qt.LeftButton, Qt.NoModifier, to_pixel(canvas, *b))


def click(canvas, p) -> None:
    QTest.mouseClick(canvas.viewport(), Qt.LeftButton, Qt.NoModifier, to_pixel(canvas, *p))


def double_click(canvas, p) -> None:
    QTest.mouseDClick(canvas.viewport(), Qt.LeftButton, Qt.NoModifier, to_pixel(canvas, *p))


def wait_for_solve(qtbot, window, timeout_ms: int = 30000) -> None:
    """Start nothing; wait until the running solve has reported."""
    qtbot.waitUntil(lambda: not window.runner.is_busy, timeout=timeout_ms)


class UnexpectedDialog(AssertionError):
    """A test opened a modal dialog it did not ask for (it would wait for a click forever);
    raised by the autouse ``no_unexpected_dialogs`` fixture of tests/app/conftest.py."""
