"""Robin constant and Green's function with pole at infinity, from the solver's equilibrium charge.

With nu the equilibrium charge of conductors taken alone (unit net charge, potential 0 at
infinity; :func:`solver.equilibrium_charge`), the Green's function of the field region with
pole at infinity is

    g(z) = integral of ln|z - t| d nu(t) - ln cap,

zero on the conductors, harmonic outside, and g(z) = ln|z - c| - ln cap + O(1/|z - c|^2) far away
when c is the centre of the equilibrium charge (T. Ransford, Potential Theory in the Complex
Plane, 1995, sec. 4.4 and 5.2). The Robin constant V = -ln(cap / unit) (G. Szego's and M. Tsuji's
convention: cap = exp(-V)) depends on the unit of length, so it is always given with its unit.

Physically, a conductor with charge Q (C/m) stands at (Q / (2 pi eps)) g(z) volts above the
point z: the same potential difference as for a round wire of radius cap at c, once |z - c| is
large enough. :func:`round_wire_distance_m` finds how large.
"""

from __future__ import annotations

import math

import numpy as np
import shapely

from solver.bem.kernels import log_potential_integrals
from solver.figures.equilibrium import EquilibriumCharge
from solver.model.geometry import conductor_geometries

#: Largest relative difference from the round wire accepted by :func:`round_wire_distance_m`.
ROUND_WIRE_TOLERANCE = 0.01


def robin_constant(equivalent_radius_m: float, metres_per_unit: float) -> float:
    """Robin constant V = -ln(cap / unit), dimensionless, for a unit of ``metres_per_unit`` metres.

    >>> round(robin_constant(0.5e-3, 1e-3), 6)  # cap = 0.5 mm in mm
    0.693147
    """
    return -math.log(equivalent_radius_m / metres_per_unit)


def charge_centre_m(equilibrium: EquilibriumCharge) -> np.ndarray:
    """(2,) centre of the equilibrium charge, metres: the far field has no dipole term about it."""
    mesh = equilibrium.mesh
    weights = equilibrium.density_per_coulomb * mesh.lengths
    return weights @ mesh.midpoints / weights.sum()


def green_function(equilibrium: EquilibriumCharge, points_m: np.ndarray) -> np.ndarray:
    """Green's function with pole at infinity, g(z), at ``points_m`` (m, 2) metres; dimensionless.

    g is 0 on the conductors (to the solver's accuracy) and ln(|z - c| / cap) + o(1) far away.
    Inside a solid conductor it is 0 as well (computed, not imposed).
    """
    mesh = equilibrium.mesh
    pts = np.asarray(points_m, dtype=float).reshape(-1, 2)
    p = log_potential_integrals(pts, mesh.starts, mesh.ends) @ equilibrium.density_per_coulomb
    return p - math.log(equilibrium.equivalent_radius_m)


def green_function_on_grid(equilibrium: EquilibriumCharge, x_m: np.ndarray, y_m: np.ndarray) -> np.ndarray:
    """g on the grid ``x_m`` (nx,) by ``y_m`` (ny,), row-major (ny, nx); NaN inside conductors (for drawing)."""
    xx, yy = np.meshgrid(np.asarray(x_m, dtype=float), np.asarray(y_m, dtype=float))
    values = green_function(equilibrium, np.column_stack([xx.ravel(), yy.ravel()])).reshape(xx.shape)
    model = equilibrium.mesh.model
    if model is not None:
        for geom in conductor_geometries(model, equilibrium.mesh.settings.arc_step_rad):
            values[shapely.contains_xy(geom, xx, yy)] = np.nan
    return values


def round_wire_difference(equilibrium: EquilibriumCharge, radius_m: float, n_angles: int = 128) -> float:
    """Largest |g(z) - ln(R / cap)| / ln(R / cap) on the circle |z - c| = R (``radius_m`` > cap)."""
    c = charge_centre_m(equilibrium)
    angles = 2 * math.pi * np.arange(n_angles) / n_angles
    ring = c + radius_m * np.column_stack([np.cos(angles), np.sin(angles)])
    wire = math.log(radius_m / equilibrium.equivalent_radius_m)
    return float(np.max(np.abs(green_function(equilibrium, ring) - wire)) / wire)


def round_wire_distance_m(
    equilibrium: EquilibriumCharge, tolerance: float = ROUND_WIRE_TOLERANCE, n_radii: int = 60
) -> float:
    """Distance from the charge centre beyond which the conductor looks like its round wire, metres.

    Beyond it, the potential difference between the conductor and any point differs from that of
    a round wire of the equivalent radius, centred at the charge centre, by less than
    ``tolerance`` (relative). The search starts at the outline's farthest point from the centre
    (a circle of that radius encloses the conductor) and steps out geometrically to 1000 times it,
    then bisects the last crossing.
    """
    c = charge_centre_m(equilibrium)
    mesh = equilibrium.mesh
    reach = float(np.max(np.hypot(*(np.vstack([mesh.starts, mesh.ends]) - c).T)))
    # a circle of radius r about c encloses the conductor, so cap <= reach; start a hair outside
    r0 = max(reach, equilibrium.equivalent_radius_m) * (1.0 + 1e-3)
    radii = r0 * np.geomspace(1.0, 1000.0, n_radii)
    worse = np.array([round_wire_difference(equilibrium, r) >= tolerance for r in radii])
    if not worse.any():
        return float(r0)
    last = int(np.flatnonzero(worse)[-1])
    if last == len(radii) - 1:
        return float("inf")
    lo, hi = radii[last], radii[last + 1]
    for _ in range(30):
        mid = math.sqrt(lo * hi)
        lo, hi = (mid, hi) if round_wire_difference(equilibrium, mid) >= tolerance else (lo, mid)
        if hi / lo < 1 + 1e-4:
            break
    return float(hi)
