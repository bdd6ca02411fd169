"""Number formatting in one place, for the command line, the desktop program's views and the PDF.

* :func:`digits_for` — the significant figures an estimated relative error supports;
* :func:`format_measured` — a value with an SI prefix and those digits, round-off shown as 0;
* :func:`format_plain` — a plain number without exponent for ordinary sizes ("1010", not "1.01e+03");
* :func:`format_percent`, :func:`format_point` — percentages and coordinates likewise.

Displayed minus signs are true minus signs (U+2212); files for machines (CSV, JSON) keep ASCII.
"""

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


#: A value smaller than this fraction of the largest value it is shown with is round-off of
#: the solve (double precision through a dense solve), not data, and is shown as 0.
ROUND_OFF = 1e-9

#: A peak below this share of the largest shown beside it reads "≈ 0": negligible beside the
#: others, and where the field should vanish (behind an earthed screen) what the solver leaves
#: there is numerical (common practice for a display; the value is ours).
NEGLIGIBLE_SHARE = 1e-4

MINUS = "\u2212"


def digits_for(relative_error: float | None, default: int = 4) -> int:
    """Significant figures that an estimated relative error supports (2 to 6).

    The last figure shown is the first one the error can change: an error of 0.3 % gives 3
    figures, 2e-5 gives 5. ``None`` (no estimate) gives ``default``.

    Examples
    --------
    >>> digits_for(0.003), digits_for(2e-5), digits_for(None)
    (3, 5, 4)
    """
    if relative_error is None or not math.isfinite(relative_error) or relative_error <= 0:
        return default
    return int(min(6, max(2, math.floor(-math.log10(relative_error)) + 1)))


def true_minus(text: str) -> str:
    """``text`` with a leading ASCII hyphen-minus turned into a true minus sign."""
    return MINUS + text[1:] if text.startswith("-") else text


def format_plain(value: float, digits: int = 4) -> str:
    """``value`` to ``digits`` significant figures without an exponent for 1e-4 <= |value| < 1e7
    (e.g. 1010, 0.0025), trailing zeros dropped; a true minus sign.

    Examples
    --------
    >>> format_plain(1010.2, 3), format_plain(-0.5, 3), format_plain(200.0, 2)
    ('1010', '−0.5', '200')
    """
    if not math.isfinite(value):
        return "n/a"
    if value == 0:
        return "0"
    magnitude = abs(value)
    if not 1e-4 <= magnitude < 1e7:
        return true_minus(f"{value:.{digits}g}")
    rounded = float(f"{value:.{digits}g}")
    decimals = max(0, digits - 1 - math.floor(math.log10(abs(rounded) or magnitude)))
    text = f"{rounded:.{decimals}f}"
    if "." in text:
        text = text.rstrip("0").rstrip(".")
    return true_minus(text)


def format_measured(value: float | None, unit: str, relative_error: float | None = None, *,
                    largest: float | None = None, digits: int | None = None) -> str:
    """A computed value with an SI prefix and the figures its error supports, for display.

    Parameters
    ----------
    value : float or None
        The value in SI units (None: "n/a").
    unit : str
        Its SI unit ("V/m", "F/m"...).
    relative_error : float, optional
        Estimated relative error of the solve; sets the figures (see :func:`digits_for`).
    largest : float, optional
        The largest magnitude shown alongside (e.g. the peak field of the model): a value below
        ``ROUND_OFF`` times it is round-off and shown as 0.
    digits : int, optional
        Figures to show, overriding ``relative_error``.

    Examples
    --------
    >>> format_measured(3.67e-10, "V/m", largest=2.4e6)
    '0 V/m'
    >>> format_measured(-2.3456e-11, "F/m", 0.002)
    '−23.5 pF/m'
    """
    if value is None or not math.isfinite(value):
        return "n/a"
    if value == 0 or (largest is not None and abs(value) <= ROUND_OFF * abs(largest)):
        return f"0 {unit}"
    text = format_engineering(value, unit, digits or digits_for(relative_error))
    return true_minus(text.replace(f" u{unit}", f" \u00b5{unit}"))


def format_percent(fraction: float | None, digits: int = 2) -> str:
    """A fraction as a percentage without exponent, e.g. 2.0 -> "200 %", 1.2e-5 -> "0.0012 %"."""
    if fraction is None or not math.isfinite(fraction):
        return "n/a"
    return f"{format_plain(100.0 * fraction, digits)} %"


def format_point(x: float, y: float, unit: str, size: float, digits: int = 4) -> str:
    """A point in model units, e.g. "(0, 12.5) mm"; coordinates below ``ROUND_OFF`` times
    ``size`` (the drawing's extent, same unit) are round-off and shown as 0. A drawing far
    from the origin gets more digits, so a point is placed as finely within it as near 0.

    >>> format_point(10000.35, 2.0, "mm", 10.0)
    '(10000.35, 2) mm'
    """
    far = max(abs(x), abs(y))
    if size > 0 and far > size:  # a drawing far from the origin: as many digits within it as near it
        digits += math.ceil(math.log10(far / size))

    def one(v: float) -> str:
        return "0" if abs(v) <= ROUND_OFF * abs(size) else format_plain(v, digits)

    return f"({one(x)}, {one(y)}) {unit}"


def format_location(model: Model, x: float, y: float, digits: int = 4) -> str:
    """:func:`format_point` for a point of ``model`` (model units), its size from its bounds."""
    bounds = model.bounds()
    size = 1.0 if bounds is None else max(bounds[2] - bounds[0], bounds[3] - bounds[1])
    return format_point(x, y, model.unit, size, digits)


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
