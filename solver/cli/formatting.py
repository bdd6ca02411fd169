"""Plain-text formatting shared by the command line's renderers: SI prefixes and tables."""

from __future__ import annotations

import math
from collections.abc import Sequence

from solver.model.model import Model

_PREFIXES = [(1e12, "T"), (1e9, "G"), (1e6, "M"), (1e3, "k"), (1.0, ""), (1e-3, "m"), (1e-6, "u"),
             (1e-9, "n"), (1e-12, "p")]


def format_engineering(value: float, unit: str, digits: int = 3) -> str:
    """``value`` with an SI prefix and ``digits`` significant figures, e.g. "2.31 MV/m"."""
    if not math.isfinite(value):
        return f"{value} {unit}"
    if value == 0:
        return f"0 {unit}"
    factor, prefix = next(((f, p) for f, p in _PREFIXES if abs(value) >= f * (1 - 0.5 * 10.0 ** (1 - digits))),
                          _PREFIXES[-1])
    return f"{value / factor:.{digits}g} {prefix}{unit}"


def format_optional(value: float | None, unit: str = "", digits: int = 3) -> str:
    """Like :func:`format_engineering`, with "-" for None and "inf" for an infinite value;
    without a unit, the plain number to ``digits`` significant figures."""
    if value is None:
        return "-"
    if not math.isfinite(value):
        return "inf"
    return format_engineering(value, unit, digits) if unit else f"{value:.{digits}g}"


def text_table(headers: Sequence[str], rows: Sequence[Sequence[str]], indent: str = "  ") -> list[str]:
    """Right-aligned text table (first column left-aligned)."""
    widths = [max(len(str(r[i])) for r in [headers, *rows]) for i in range(len(headers))]

    def line(cells: Sequence[str]) -> str:
        first = str(cells[0]).ljust(widths[0])
        rest = [str(c).rjust(w) for c, w in zip(cells[1:], widths[1:])]
        return (indent + "  ".join([first, *rest])).rstrip()

    return [line(headers), *(line(r) for r in rows)]


def length_in_unit(model: Model, length_m: float) -> str:
    """A length in metres written in the model's unit, 4 significant figures (no unit name)."""
    return f"{length_m / model.metres_per_unit:.4g}"
