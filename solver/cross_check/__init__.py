"""Independent cross-checks of the equivalent radius (logarithmic capacity) of conductors.

Three classical routes of plane potential theory lead to the same number as the solver's
equilibrium charge: the Robin constant and Green's function with pole at infinity
(:mod:`.robin`), Fekete points and the N-th diameter (:mod:`.fekete`), and the Chebyshev
constant through the Fekete polynomial (:mod:`.chebyshev`). :func:`check_equivalent_radius` puts them side
by side with a plain verdict (:mod:`.report`).
"""

from solver.cross_check.chebyshev import fekete_polynomial_norm_root_m, log_abs_monic
from solver.cross_check.extrapolate import (
    Extrapolation,
    extrapolate_chebyshev,
    extrapolate_nth_diameter,
)
from solver.cross_check.fekete import FeketePoints, fekete_points, nth_diameter_m
from solver.cross_check.outline import Outline, OutlinePiece, outline_of
from solver.cross_check.report import (
    DEFAULT_N_POINTS,
    CrossCheck,
    RouteEstimate,
    check_each_equivalent_radius,
    check_equivalent_radius,
)
from solver.cross_check.robin import (
    charge_centre_m,
    green_function,
    green_function_on_grid,
    robin_constant,
    round_wire_distance_m,
)

__all__ = [
    "DEFAULT_N_POINTS",
    "CrossCheck",
    "Extrapolation",
    "FeketePoints",
    "Outline",
    "OutlinePiece",
    "RouteEstimate",
    "charge_centre_m",
    "check_each_equivalent_radius",
    "check_equivalent_radius",
    "extrapolate_chebyshev",
    "extrapolate_nth_diameter",
    "fekete_points",
    "fekete_polynomial_norm_root_m",
    "green_function",
    "green_function_on_grid",
    "log_abs_monic",
    "nth_diameter_m",
    "outline_of",
    "robin_constant",
    "round_wire_distance_m",
]
