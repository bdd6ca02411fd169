"""Reading typed values with units: "150 kV", "12 mil", "0.5 mm", "2.2 pF/m", "12 kV rms".

Pure unit handling, no physics: a typed text becomes a value in SI units, checked against
the unit the field expects. The desktop program, the command line and project files share it.

A unit is a prefixed symbol, or two joined by "/" ("pF/m", "kV/mm"). SI prefixes from
atto to tera are accepted (micro as "u", "µ" or "μ"); ohms as "Ω", "ohm" or "ohms" (for
impedance targets: "50 ohm"), seconds as "s" (delays: "6 ns/m"); a few trade units carry their own
size (mil, thou, inch, ft, bar, atm, °C). Case matters: "kv" is refused, because "mV" and
"MV" differ by a factor of 10^9.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

from solver.errors import InvalidModelError

__all__ = ["QuantityError", "TypedQuantity", "parse_quantity", "read_quantity", "unit_choices"]

#: SI prefixes and their factors.
PREFIXES: dict[str, float] = {
    "T": 1e12, "G": 1e9, "M": 1e6, "k": 1e3, "": 1.0, "c": 1e-2, "m": 1e-3,
    "u": 1e-6, "µ": 1e-6, "μ": 1e-6, "n": 1e-9, "p": 1e-12, "f": 1e-15, "a": 1e-18,
}

#: Symbols that take SI prefixes, with the dimension they measure.
PREFIXED_SYMBOLS: dict[str, str] = {"m": "length", "V": "potential", "C": "charge", "F": "capacitance",
                                    "Pa": "pressure", "K": "temperature", "s": "time",
                                    "\u03a9": "resistance", "ohm": "resistance", "ohms": "resistance"}

#: Trade units (no prefixes): (dimension, size in SI, offset in SI) — value_SI = x * size + offset.
PLAIN_SYMBOLS: dict[str, tuple[str, float, float]] = {
    "mil": ("length", 25.4e-6, 0.0),
    "thou": ("length", 25.4e-6, 0.0),
    "in": ("length", 25.4e-3, 0.0),
    "inch": ("length", 25.4e-3, 0.0),
    "ft": ("length", 0.3048, 0.0),
    "bar": ("pressure", 1e5, 0.0),
    "mbar": ("pressure", 1e2, 0.0),
    "atm": ("pressure", 101325.0, 0.0),
    "°C": ("temperature", 1.0, 273.15),
    "degC": ("temperature", 1.0, 273.15),
}

#: What to suggest in an error, by the SI unit a field expects.
SUGGESTIONS: dict[str, str] = {
    "m": "m, mm, um, mil, inch",
    "V": "V, kV, MV",
    "C/m": "C/m, uC/m, nC/m, pC/m",
    "F/m": "F/m, nF/m, pF/m",
    "V/m": "V/m, kV/m, kV/mm, MV/m",
    "Pa": "Pa, kPa, bar, mbar, atm",
    "K": "K, °C",
    "\u03a9": "ohm, \u03a9, kohm",
    "s/m": "s/m, ns/m, ps/m",
    "": "a plain number",
}

#: Words after a potential that say how an alternating voltage was given.
BASIS_WORDS = {"rms": "rms", "crest": "crest", "peak": "crest", "pk": "crest"}

_NUMBER = re.compile(r"^\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*(.*?)\s*$")


class QuantityError(InvalidModelError):
    """A typed value cannot be read: not a number, an unknown unit, or a unit of another kind."""


@dataclass(frozen=True)
class TypedQuantity:
    """A typed value read into SI units.

    Attributes
    ----------
    value_si : float
        The value in SI units (for a potential given as rms: the crest value, √2 times larger).
    text : str
        Exactly what was typed.
    unit : str
        The SI unit of ``value_si`` ("m", "V", "F/m", "" for a plain number...).
    basis : str or None
        For potentials: "rms" or "crest" when the text said so, else None.
    note : str
        A plain sentence on any conversion the reader should know about ("" when none).
    """

    value_si: float
    text: str
    unit: str
    basis: str | None = None
    note: str = ""


def _symbol(part: str) -> tuple[str, float, float] | None:
    """(dimension, factor, offset) of one prefixed or trade symbol, or None when unknown."""
    if part in PLAIN_SYMBOLS:
        return PLAIN_SYMBOLS[part]
    for symbol, dimension in PREFIXED_SYMBOLS.items():
        if part.endswith(symbol) and part[: len(part) - len(symbol)] in PREFIXES:
            return dimension, PREFIXES[part[: len(part) - len(symbol)]], 0.0
    return None


def _unit(unit_text: str) -> tuple[tuple[str, ...], float, float] | None:
    """(dimensions, factor, offset) of a unit such as "pF/m"; None when a piece is unknown."""
    pieces = unit_text.replace(" ", "").split("/")
    if len(pieces) > 2 or not all(pieces):
        return None
    read = [_symbol(p) for p in pieces]
    if any(r is None for r in read):
        return None
    dims = tuple(r[0] for r in read if r is not None)
    factors = [r[1] for r in read if r is not None]
    offset = read[0][2] if len(read) == 1 and read[0] is not None else 0.0
    return dims, factors[0] / (factors[1] if len(factors) == 2 else 1.0), offset


def unit_choices(unit: str) -> str:
    """The units a field of SI unit ``unit`` accepts, for messages and tooltips."""
    return SUGGESTIONS.get(unit, unit)


def read_quantity(text: str, unit: str, field: str = "value", default_unit: str | None = None) -> TypedQuantity:
    """Read a typed value with an optional unit into SI.

    Parameters
    ----------
    text : str
        What was typed, e.g. "150 kV", "12 mil", "2.2 pF/m", "1e-3 m", "12 kV rms".
    unit : str
        The SI unit the field holds: "m", "V", "C/m", "F/m", "V/m", "Pa", "K", or "" for a
        plain number (relative permittivity).
    field : str
        The field's name for messages, e.g. "potential of bar A".
    default_unit : str, optional
        The unit of a bare number (e.g. the model's "mm"); default ``unit`` itself.

    Returns
    -------
    TypedQuantity
        The value in SI units with the typed text. A potential followed by "rms" is returned
        as its crest value (√2 times the rms value of a sine wave), with a note saying so.

    Raises
    ------
    QuantityError
        Not a number, an unknown unit, or a unit of another kind; the message names the text,
        the field and the units that would do.

    Examples
    --------
    >>> read_quantity("150 kV", "V", "potential of bar A").value_si
    150000.0
    >>> round(read_quantity("12 mil", "m").value_si, 9)
    0.0003048
    """
    clean = text.replace("\u2212", "-").replace("\u00a0", " ").strip()
    where = f"'{text}' in '{field}'"
    if not clean:
        raise QuantityError(f"{where}: nothing typed; type a number, e.g. 1.5 or 1.5 {unit_choices(unit).split(',')[0]}.")
    if re.match(r"^[+-]?\d+,\d", clean):
        raise QuantityError(f"{where}: a comma in a number; use a point for decimals (0.5, not 0,5).")
    match = _NUMBER.match(clean)
    if match is None:
        raise QuantityError(f"{where}: not a number; type e.g. 1.5 or 1.5 {unit_choices(unit).split(',')[0]}.")
    number, unit_text = float(match.group(1)), match.group(2)
    basis = None
    words = unit_text.split()
    if unit == "V" and words and words[-1].lower() in BASIS_WORDS:
        basis = BASIS_WORDS[words[-1].lower()]
        unit_text = " ".join(words[:-1])
    if unit_text == "" and default_unit is not None and default_unit != unit:
        unit_text = default_unit
    if unit == "K" and unit_text == "C":
        unit_text = "°C"  # a temperature field: "20 C" can only mean degrees Celsius
    if unit_text == "" or (unit == "" and unit_text == ""):
        value = number
    else:
        if unit == "":
            raise QuantityError(f"{where}: takes a plain number without a unit; remove '{unit_text}'.")
        read, wanted = _unit(unit_text), _unit(unit)
        if read is None:
            raise QuantityError(f"{where}: unknown unit '{unit_text}'; use {unit_choices(unit)}.")
        if wanted is None or read[0] != wanted[0]:
            raise QuantityError(f"{where}: '{unit_text}' is not a unit of {' per '.join(wanted[0]) if wanted else unit}; "
                                f"use {unit_choices(unit)}.")
        value = number * read[1] + read[2]
    if not math.isfinite(value):
        raise QuantityError(f"{where}: the value is not finite; type an ordinary number.")
    note = ""
    if basis == "rms":
        crest = value * math.sqrt(2.0)
        size, prefix = next(((f, p) for f, p in ((1e6, "M"), (1e3, "k")) if abs(crest) >= f), (1.0, ""))
        note = f"{text.strip()} is taken as {crest / size:.4g} {prefix}V crest (√2 × rms, a sine wave)."
        value = crest
    return TypedQuantity(value, text, unit, basis, note)


def parse_quantity(text: str, unit: str, field: str = "value", default_unit: str | None = None) -> float:
    """The value of ``text`` in SI units (see :func:`read_quantity`); an rms potential
    comes back as its crest value.

    Examples
    --------
    >>> parse_quantity("3 kV/mm", "V/m")
    3000000.0
    """
    return read_quantity(text, unit, field, default_unit).value_si
