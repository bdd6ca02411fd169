"""Number formatting with SI prefixes and units (Qt-free)."""

from __future__ import annotations

import math

_PREFIXES = ((1e12, "T"), (1e9, "G"), (1e6, "M"), (1e3, "k"), (1.0, ""), (1e-3, "m"), (1e-6, "µ"),
             (1e-9, "n"), (1e-12, "p"), (1e-15, "f"))


def si_scale(magnitude: float) -> tuple[float, str]:
    """(factor, prefix) so that ``magnitude / factor`` lies in [1, 1000)."""
    m = abs(float(magnitude))
    if not math.isfinite(m) or m == 0:
        return 1.0, ""
    for factor, prefix in _PREFIXES:
        if m >= factor * 0.9995:
            return factor, prefix
    return _PREFIXES[-1]


def format_si(value: float, unit: str, digits: int = 4) -> str:
    """``value`` with an SI prefix, e.g. format_si(1.2e6, "V/m") -> "1.2 MV/m"."""
    if value is None or not math.isfinite(value):
        return "n/a"
    factor, prefix = si_scale(value)
    return f"{value / factor:.{digits}g} {prefix}{unit}"


def format_field(value_V_per_m: float) -> str:
    return format_si(value_V_per_m, "V/m", 3)


def format_potential(value_V: float) -> str:
    return format_si(value_V, "V", 4)


def format_length(value_m: float, unit: str, metres_per_unit: float) -> str:
    """A length in metres shown in the model's unit."""
    return f"{value_m / metres_per_unit:.4g} {unit}"
