"""Work-around for a reference-count leak in PySide6 6.12.0 on Python 3.11.

Measured on this project's environment: many void QPainter methods (setPen, drawLine,
setClipRect, ...) called from Python drop one reference to ``None`` (and some calls one to
``True``) each time. On Python >= 3.12 these objects are immortal and nothing happens; on
3.11 their count falls with every repaint until the interpreter aborts with
"deallocating None". pyqtgraph paints through exactly these calls.

:func:`top_up` raises the reference counts of None, True and False (CPython's ``ob_refcnt``,
the first field of every object) back above a large reserve, so the leak can never reach
zero; it costs no memory. The program calls it twice a second; the tests call it around each
test. Remove this module once PySide6 is fixed.
"""

from __future__ import annotations

import ctypes
import sys

#: Keep at least this many references to each singleton.
RESERVE = 2_000_000



def needed() -> bool:
    """True on Pythons whose None/True/False are not immortal."""
    return sys.version_info < (3, 12)


def top_up(reserve: int = RESERVE) -> None:
    """Bring the reference counts of None, True and False back above ``reserve``."""
    if not needed() or sys.implementation.name != "cpython":
        return
    for obj in (None, True, False):
        if sys.getrefcount(obj) < reserve:
            ctypes.c_ssize_t.from_address(id(obj)).value += reserve
