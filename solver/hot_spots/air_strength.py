"""Strength of air in a uniform field as a function of the gap, corrected for air density.

Relation used
-------------
E. Kuffel, W. S. Zaengl & J. Kuffel, High Voltage Engineering Fundamentals, 2nd ed., 2000,
give an empirical relation for the breakdown voltage of a uniform-field gap in air at 20 degC
(values from memory of that book):

    U_b = 6.72 sqrt(p d) + 24.36 (p d)   kV,   p in bar, d in cm,

with a stated range of roughly 1e-2 <= p d <= 10 bar cm (from memory), i.e. gaps of about
0.1 mm to 10 cm at sea level. The strength of the gap is U_b / d: 3.14 MV/m at 1 cm, 4.6 MV/m
at 1 mm, 2.65 MV/m at 10 cm, falling toward 24.36 kV/(cm bar) = 2.47 MV/m at 1 atm for long
gaps. The familiar 3 MV/m is the value near 1 cm; for longer gaps it is not conservative.

Air density: the relation depends on the gas density, which p stands for at 20 degC; for
other conditions p is replaced by delta x 1.01325 bar with delta the relative air density
(:mod:`solver.hot_spots.margins`; common practice).

Outside the range: for a gap shorter than the range the strength at the shortest gap of the
range is used (a lower, safer value; the true one rises toward the Paschen region); for a
gap longer than the range the relation is extrapolated (it is then within a few per cent of
its long-gap limit); when there is no opposite electrode (no gap known) the long-gap limit
24.36 kV/(cm bar) x p is used, the lowest value the relation gives.

Surface: the strength is multiplied by the surface factor m of the project's air conditions
(Peek's roughness factor, 1 smooth and polished) on every surface -- flat, hollow or round --
since a rough or stranded surface lowers the breakdown of any gap, not only the corona onset
of a wire (common practice).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from solver.errors import InvalidModelError

#: Coefficients of U_b = A sqrt(p d) + B (p d) kV, p in bar, d in cm (Kuffel, Zaengl & Kuffel, 2000).
KUFFEL_SQRT_COEFFICIENT_KV = 6.72
KUFFEL_LINEAR_COEFFICIENT_KV_PER_BAR_CM = 24.36
#: Range of p d (bar cm) the relation is stated for (from memory of the same book).
PD_RANGE_BAR_CM = (1e-2, 10.0)
#: Pressure that relative air density 1 stands for, bar (101.325 kPa).
REFERENCE_PRESSURE_BAR = 1.01325


@dataclass(frozen=True)
class AirStrength:
    """The uniform-field strength of air for one gap (crest, V/m) and how it was found.

    Attributes
    ----------
    field_V_per_m : strength, V/m (surface factor included).
    gap_m : the gap used, metres (None when none was known).
    pd_bar_cm : p d of that gap (None without a gap).
    basis : in words: the relation, the gap and whether it lay in the relation's range.
    """

    field_V_per_m: float
    gap_m: float | None
    pd_bar_cm: float | None
    basis: str


def uniform_field_breakdown_voltage_V(gap_m: float, relative_air_density: float = 1.0) -> float:
    """Breakdown voltage of a uniform-field air gap, V crest (Kuffel, Zaengl & Kuffel, 2000).

    >>> round(uniform_field_breakdown_voltage_V(0.01) / 1e3, 2)  # 1 cm at 1 atm, 20 degC
    31.45
    """
    if not (math.isfinite(gap_m) and gap_m > 0):
        raise InvalidModelError(f"Air gap is {gap_m} m; it must be a positive length.")
    if not (math.isfinite(relative_air_density) and relative_air_density > 0):
        raise InvalidModelError(f"Relative air density is {relative_air_density}; it must be positive.")
    pd = REFERENCE_PRESSURE_BAR * relative_air_density * gap_m * 100.0
    return (KUFFEL_SQRT_COEFFICIENT_KV * math.sqrt(pd) + KUFFEL_LINEAR_COEFFICIENT_KV_PER_BAR_CM * pd) * 1e3


def long_gap_limit_V_per_m(relative_air_density: float = 1.0) -> float:
    """The long-gap limit of the relation, 24.36 kV/(cm bar) x p, V/m (2.47 MV/m at delta = 1)."""
    return KUFFEL_LINEAR_COEFFICIENT_KV_PER_BAR_CM * REFERENCE_PRESSURE_BAR * relative_air_density * 1e5


def air_strength(gap_m: float | None, relative_air_density: float = 1.0, surface_factor: float = 1.0) -> AirStrength:
    """Uniform-field strength of air across ``gap_m`` at the given density and surface factor.

    Parameters
    ----------
    gap_m : float or None
        Distance from the peak's conductor to the nearest conductor (or earth) at another
        potential, metres; None when there is none.
    relative_air_density : float
        delta, 1 at 101.325 kPa and 20 degC.
    surface_factor : float
        Peek's m, 0 < m <= 1 (1 smooth).

    Returns
    -------
    AirStrength

    Examples
    --------
    >>> round(air_strength(0.01).field_V_per_m / 1e6, 3)
    3.145
    >>> round(air_strength(None).field_V_per_m / 1e6, 3)
    2.468
    """
    if not (math.isfinite(surface_factor) and 0 < surface_factor <= 1):
        raise InvalidModelError(f"Surface factor is {surface_factor}; it lies between 0 and 1 (1 = smooth).")
    delta = relative_air_density
    limit = long_gap_limit_V_per_m(delta)
    if gap_m is None or not (math.isfinite(gap_m) and gap_m > 0):
        return AirStrength(surface_factor * limit, None, None,
                           "no opposite electrode: long-gap limit of the uniform-field relation of air "
                           "(Kuffel, Zaengl & Kuffel, 2000)")
    low, high = PD_RANGE_BAR_CM
    pd = REFERENCE_PRESSURE_BAR * delta * gap_m * 100.0
    used = max(gap_m, low / (REFERENCE_PRESSURE_BAR * delta * 100.0))
    field = uniform_field_breakdown_voltage_V(used, delta) / used
    if pd < low:
        where = "shorter than the relation's range: the strength at its shortest gap is used"
    elif pd > high:
        where = "longer than the relation's range: extrapolated, close to its long-gap limit"
    else:
        where = "within the relation's range"
    return AirStrength(surface_factor * field, float(gap_m), pd,
                       f"uniform-field strength of air for a {gap_m * 1e3:.3g} mm gap (Kuffel, Zaengl & Kuffel, "
                       f"2000; {where})")
