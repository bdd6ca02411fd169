"""Limits of the Fekete and Chebyshev sequences as N grows, fitted from their known asymptotics.

N-th diameter. For a circle of radius r the Fekete points are equally spaced and
delta_N = r N^(1/(N-1)) exactly, so ln delta_N = ln r + ln N / (N - 1). The ln N / (N - 1) term
comes from the spacing of neighbouring points (each point's nearest neighbours sit ~1/N away)
and has the same coefficient on any outline: on a segment, whose Fekete points are the end
points and the zeros of a Jacobi polynomial (Fejer 1932; Stieltjes 1885), the remainder
ln delta_N - ln(L/4) - ln N / (N - 1) falls like 1/N. So we subtract ln N / (N - 1) and fit
the rest against 1/N and 1/N^2; a plain fit against 1/N would be biased by the ln N term.

Chebyshev estimate. For a circle the Fekete polynomial is z^N - r^N e^(i a), of norm 2 r^N, so
||F_N||^(1/N) = r 2^(1/N) and ln of it falls like 1/N without a ln N term; the fit is against
1/N alone (a second term chases the wobble that corners add at small N).

The uncertainty of a limit is the larger of the change when the smallest N is left out and
the root-mean-square residual of the fit, both as relative (logarithmic) amounts.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np


@dataclass(frozen=True)
class Extrapolation:
    """A limit fitted from estimates at several N.

    Attributes
    ----------
    limit_m : the fitted limit, metres.
    relative_uncertainty : its relative uncertainty (see module docstring).
    description : how it was fitted, in words.
    """

    limit_m: float
    relative_uncertainty: float
    description: str


FEKETE_FIT = "ln delta_N - ln N/(N-1) fitted against 1/N and 1/N^2"
CHEBYSHEV_FIT = "ln ||F_N||^(1/N) fitted against 1/N"


def _fit(n: np.ndarray, y: np.ndarray, powers: int) -> tuple[float, float]:
    """Intercept and rms residual of y against 1, 1/n, ..., 1/n^powers (powers cut to fit the data)."""
    powers = max(1, min(powers, len(n) - 2))
    a = np.column_stack([n ** -float(p) for p in range(powers + 1)])
    coef, *_ = np.linalg.lstsq(a, y, rcond=None)
    residual = y - a @ coef
    return float(coef[0]), float(np.sqrt(np.mean(residual**2)))


def _extrapolate(n_points, values_m, subtract, powers: int, description: str) -> Extrapolation:
    n = np.asarray(n_points, dtype=float)
    values = np.asarray(values_m, dtype=float)
    if len(n) < 3:
        raise ValueError(f"Extrapolation needs estimates at 3 or more N, got {len(n)}.")
    order = np.argsort(n)
    n, values = n[order], values[order]
    y = np.log(values) - subtract(n)
    intercept, rms = _fit(n, y, powers)
    change = abs(intercept - _fit(n[1:], y[1:], powers)[0]) if len(n) >= 4 else rms
    return Extrapolation(math.exp(intercept), max(change, rms), description)


def extrapolate_nth_diameter(n_points, diameters_m) -> Extrapolation:
    """Limit of the N-th diameters ``diameters_m`` (metres) at ``n_points`` (see module docstring)."""
    return _extrapolate(n_points, diameters_m, lambda n: np.log(n) / (n - 1.0), 2, FEKETE_FIT)


def extrapolate_chebyshev(n_points, norm_roots_m) -> Extrapolation:
    """Limit of the Fekete-polynomial estimates ``norm_roots_m`` (metres) at ``n_points``."""
    return _extrapolate(n_points, norm_roots_m, lambda n: 0.0 * n, 1, CHEBYSHEV_FIT)
