"""The memory budget of a solve, checked before anything large is built.

The boundary-element system is a dense n x n matrix of float64 (8 n^2 bytes) and its LU
factorisation is a second copy, so a solve of n unknowns needs about 16 n^2 bytes. Nearly
touching parts make the mesher shrink panels to a fraction of the gap and n grows without
bound; the mesher therefore counts the panels it is about to make and refuses, naming the
gap or part responsible, when the system would not fit the budget.

The budget is :data:`DEFAULT_MAX_SYSTEM_BYTES`, or ``EDGEWISE_MAX_SYSTEM_MB`` (megabytes) from
the environment for machines with more or less memory.
"""

from __future__ import annotations

import math
import os

from solver.errors import MeshTooLargeError

#: Memory allowed for the system matrix and its LU copy, bytes (4 GiB: about 16,000 unknowns).
DEFAULT_MAX_SYSTEM_BYTES = 4 * 1024**3

#: Bytes per unknown squared: the float64 matrix and its LU copy.
BYTES_PER_UNKNOWN_SQUARED = 16


def max_system_bytes() -> int:
    """The memory budget in bytes (``EDGEWISE_MAX_SYSTEM_MB`` overrides the default)."""
    text = os.environ.get("EDGEWISE_MAX_SYSTEM_MB", "").strip()
    try:
        value = float(text) * 1024**2 if text else DEFAULT_MAX_SYSTEM_BYTES
    except ValueError:
        value = DEFAULT_MAX_SYSTEM_BYTES
    return int(value) if math.isfinite(value) and value > 0 else DEFAULT_MAX_SYSTEM_BYTES


def system_bytes(n_unknowns: float) -> float:
    """Memory of a dense system of ``n_unknowns`` and its LU copy, bytes."""
    return BYTES_PER_UNKNOWN_SQUARED * float(n_unknowns) ** 2


def max_panels() -> int:
    """Most panels (conductor and interface together) the budget allows."""
    return int(math.sqrt(max_system_bytes() / BYTES_PER_UNKNOWN_SQUARED))


def check_panel_budget(n_panels: float, responsible: str, what: str = "panels") -> None:
    """Refuse a mesh of ``n_panels`` that would not fit the memory budget.

    Parameters
    ----------
    n_panels : float
        Estimated (or counted) number of panels, before the system is built.
    responsible : str
        The gap or part that drives the count, in words, with a way out, e.g.
        "the gap of 1e-06 mm between 'a' and 'b'; move them apart".
    what : str
        What is counted, for the message.

    Raises
    ------
    MeshTooLargeError
    """
    if n_panels <= max_panels():
        return
    need = system_bytes(n_panels)
    raise MeshTooLargeError(
        f"The mesh would need about {n_panels:.3g} {what} and {_bytes(need)} of memory for its "
        f"system (the budget is {_bytes(max_system_bytes())}, about {max_panels()} panels). "
        f"Responsible: {responsible}. Or choose a coarser mesh."
    )


def _bytes(n: float) -> str:
    for unit, size in (("TB", 1e12), ("GB", 1e9), ("MB", 1e6)):
        if n >= size:
            return f"{n / size:.3g} {unit}"
    return f"{n:.3g} bytes"
