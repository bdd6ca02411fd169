"""Number formatting for the desktop program: the solver's one formatter (Qt-free).

Every view, the PDF report and the command line show numbers through
:mod:`solver.cli.formatting`, so a figure reads the same everywhere: the digits its error
estimate supports, round-off shown as 0, true minus signs.
"""

from __future__ import annotations

import math
import re

from solver.cli.formatting import (
    NEGLIGIBLE_SHARE,
    digits_for,
    format_measured,
    format_percent,
    format_plain,
    format_point,
    true_minus,
)

__all__ = ["FIELD_FIGURES", "NBSP", "NEGLIGIBLE_SHARE", "field_figures", "count_of", "digits_for", "format_field", "format_length", "format_measured", "format_percent", "format_plain",
           "format_point", "format_potential", "format_si", "keep_units", "si_scale", "true_minus"]

_PREFIXES = ((1e12, "T"), (1e9, "G"), (1e6, "M"), (1e3, "k"), (1.0, ""), (1e-3, "m"), (1e-6, "µ"),
             (1e-9, "n"), (1e-12, "p"), (1e-15, "f"))


def si_scale(magnitude: float) -> tuple[float, str]:
    """(factor, prefix) so that ``magnitude / factor`` lies in [1, 1000), for plot axes."""
    m = abs(float(magnitude))
    if not math.isfinite(m) or m == 0:
        return 1.0, ""
    for factor, prefix in _PREFIXES:
        if m >= factor * 0.9995:
            return factor, prefix
    return _PREFIXES[-1]


def format_si(value: float | None, unit: str, digits: int = 4, largest: float | None = None) -> str:
    """``value`` with an SI prefix, e.g. format_si(1.2e6, "V/m") -> "1.2 MV/m"."""
    return format_measured(value, unit, digits=digits, largest=largest)


#: Most significant figures a field strength is shown with anywhere in the window (fewer where
#: its error estimate supports fewer): the summary, status bar, drawing and tables agree.
FIELD_FIGURES = 3


def field_figures(relative_error: float | None) -> int:
    """The figures a field strength with this estimated relative error is shown to."""
    return min(FIELD_FIGURES, digits_for(relative_error))


def format_field(value_V_per_m: float | None, largest: float | None = None) -> str:
    return format_measured(value_V_per_m, "V/m", digits=FIELD_FIGURES, largest=largest)


def format_potential(value_V: float | None) -> str:
    return format_measured(value_V, "V", digits=4)


def format_length(value_m: float, unit: str, metres_per_unit: float) -> str:
    """A length in metres shown in the model's unit, without exponent ("1010 mm")."""
    return f"{format_plain(value_m / metres_per_unit, 4)} {unit}"


def count_of(n: int, noun: str, plural: str | None = None) -> str:
    """``n`` things with the noun agreeing: count_of(1, "conductor") -> "1 conductor",
    count_of(2, "conductor") -> "2 conductors"."""
    return f"{n} {noun if n == 1 else (plural or noun + 's')}"


#: No-break space: a number and its unit stay on one line of a wrapping label.
NBSP = "\u00a0"

_NUMBER_THEN_UNIT = re.compile(
    r"(?<=\d) (?=(?:%|°C|[TGMkmµunpf]?(?:V/mm|V/m|V|F/m|F|Ω|s/m|s|Hz|m)|ohm|mil|in|cm)(?![\w/]))")


def keep_units(text: str) -> str:
    """``text`` with a no-break space between each number and the unit after it, so that a
    wrapping label never breaks "0.029 %" or "120.8 pF/m" across two lines.

    >>> keep_units("error 0.029 %, C 120.8 pF/m") == "error 0.029\u00a0%, C 120.8\u00a0pF/m"
    True
    """
    return _NUMBER_THEN_UNIT.sub(NBSP, text)
