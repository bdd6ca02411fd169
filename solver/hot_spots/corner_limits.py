"""The largest corner radius a conductor can take (geometry only).

:func:`solver.round_sharp_corners` refuses a radius that removes or splits part of a conductor
(a feature thinner than twice the radius). A hollow enclosure's wall is much thinner than its
bounding box, so a radius guessed from the box fails; :func:`largest_corner_radius_m` finds the
limit by bisection on the same test, so that a sweep can offer radii that all work.
"""

from __future__ import annotations

import math

from solver.errors import InvalidGeometryError
from solver.hot_spots.corner_rounding import round_sharp_corners
from solver.model.model import Model


def _accepted(model: Model, conductor: str, radius_m: float) -> bool:
    try:
        round_sharp_corners(model, radius_m, [conductor], replace_radius=True)
    except InvalidGeometryError:
        return False
    return True


def largest_corner_radius_m(model: Model, conductor: str, relative_tolerance: float = 0.01) -> float:
    """The largest corner radius (metres) :func:`solver.round_sharp_corners` accepts for ``conductor``.

    Parameters
    ----------
    model : Model
    conductor : str
        The conductor's name.
    relative_tolerance : float
        The answer is within this fraction below the true limit (bisection on a log scale).

    Returns
    -------
    float
        A radius in metres that rounding accepts; at most half the smaller side of the
        conductor's bounding box (a round conductor, which has no corner to change, gets that).

    Raises
    ------
    KeyError
        ``conductor`` is not in the model.

    Examples
    --------
    >>> from solver import Model, Conductor, Rectangle
    >>> m = Model(unit="mm", conductors=(Conductor("bar", (Rectangle((0, 0), 10, 2),)),))
    >>> round(largest_corner_radius_m(m, "bar") * 1e3, 6)  # half the 2 mm side
    1.0
    """
    boxes = [s.bounds() for s in model.conductor(conductor).shapes]
    width = max(b[2] for b in boxes) - min(b[0] for b in boxes)
    height = max(b[3] for b in boxes) - min(b[1] for b in boxes)
    high = 0.5 * (min(width, height) or max(width, height)) * model.metres_per_unit
    if high <= 0 or _accepted(model, conductor, high):
        return high
    low = high
    while not _accepted(model, conductor, low):  # a tenth at a time down to an accepted radius
        low *= 0.1
        if low < high * 1e-9:
            return low
    while high / low > 1.0 + relative_tolerance:
        middle = math.sqrt(low * high)
        low, high = (middle, high) if _accepted(model, conductor, middle) else (low, middle)
    return low
