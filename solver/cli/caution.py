"""The command line's high-voltage caution section (the text itself is kept as it was written)."""

from __future__ import annotations

import numpy as np

from solver.bem.solution import Solution

#: Potential magnitude (V) from which the summary adds the high-voltage caution.
HIGH_VOLTAGE_V = 1000.0


def caution_section(solution: Solution) -> list[str]:
    """The high-voltage caution, when any conductor is at 1 kV or more."""
    if not np.any(np.abs(solution.conductor_potentials_V) >= HIGH_VOLTAGE_V):
        return []
    return [
        "High voltage: compare peak fields with the strength of air (about 3 MV/m in a uniform field at sea "
        "level, lower at altitude) with a generous margin. This tool does not determine clearances or creepage, "
        "is no substitute for the applicable codes and standards or for review by a qualified engineer, and work "
        "on energised equipment is for qualified persons only (see SAFETY.md).",
    ]
