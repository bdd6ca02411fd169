"""Panel sizes along one straight edge, graded geometrically from both ends.

:func:`graded_panels` always ends: it refuses sizes that are not positive and finite and
edges that would need more than :data:`MAX_PANELS_PER_EDGE` panels.
"""

from __future__ import annotations

import math

import numpy as np

from solver.errors import MeshTooLargeError

#: Most panels one straight edge may get. Far above any sensible mesh; a guard so that grading
#: always ends (the dense system of this many panels alone would need 320 GB).
MAX_PANELS_PER_EDGE = 200_000


def graded_panel_count(length, h_start, h_end, h_max, ratio):
    """About how many panels :func:`graded_panels` makes (works on arrays; within a few).

    Each end grows geometrically from its size h by ``ratio``: reaching ``h_max`` takes
    log(h_max / h) / log(ratio) panels covering (h_max - h) / (ratio - 1); the rest is filled
    with ``h_max``. When the two runs meet first, a run covering L/2 has
    log(1 + L (ratio - 1) / (2 h)) / log(ratio) panels. Returns floats (inf when a size is
    not positive).
    """
    length, h_start, h_end, h_max = (np.asarray(a, dtype=float) for a in (length, h_start, h_end, h_max))
    log_r = math.log(ratio)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        lo_s, lo_e = np.minimum(h_start, h_max), np.minimum(h_end, h_max)
        runs = np.log(h_max / lo_s) / log_r + np.log(h_max / lo_e) / log_r
        run_length = (h_max - lo_s) / (ratio - 1.0) + (h_max - lo_e) / (ratio - 1.0)
        reach = runs + (length - run_length) / h_max
        meet = (np.log1p(0.5 * length * (ratio - 1.0) / lo_s) + np.log1p(0.5 * length * (ratio - 1.0) / lo_e)) / log_r
        count = np.maximum(1.0, np.ceil(np.where(run_length <= length, reach, meet) - 0.1))
    bad = ~((lo_s > 0) & (lo_e > 0) & (h_max > 0) & np.isfinite(count))
    return np.where(bad, np.inf, count)


def graded_panels(length: float, h_start: float, h_end: float, h_max: float, ratio: float) -> np.ndarray:
    """Break points (ascending, 0 to ``length``) of panels graded from both ends.

    Panels start at ``h_start`` and ``h_end`` at the two ends, grow by ``ratio`` per panel
    and are at most ``h_max`` in between. Sizes are finally scaled to fit ``length`` exactly.

    Raises
    ------
    MeshTooLargeError
        When a size or the length is not a positive finite number, ``ratio`` is not above 1,
        or the edge would need more than :data:`MAX_PANELS_PER_EDGE` panels (so grading
        always ends).
    """
    values = (length, h_start, h_end, h_max)
    if not (all(math.isfinite(v) and v > 0 for v in values) and math.isfinite(ratio) and ratio > 1.0):
        raise MeshTooLargeError(
            f"Cannot grade panels on an edge of length {length:.3g} m with panel sizes "
            f"{h_start:.3g}, {h_end:.3g}, {h_max:.3g} m (ratio {ratio:.3g}); an outline has a "
            "zero-length edge or parts touch. Remove repeated vertices and separate the parts."
        )
    expected = float(graded_panel_count(length, h_start, h_end, h_max, ratio))
    if expected > MAX_PANELS_PER_EDGE:
        raise MeshTooLargeError(
            f"An edge of length {length:.3g} m would need about {expected:.3g} panels of at most "
            f"{h_max:.3g} m (more than {MAX_PANELS_PER_EDGE}); parts are nearly touching. "
            "Move them apart or choose a coarser mesh."
        )
    h_start, h_end = min(h_start, h_max), min(h_end, h_max)
    left, right = [h_start], [h_end]
    while left[-1] * ratio < h_max:
        left.append(left[-1] * ratio)
    while right[-1] * ratio < h_max:
        right.append(right[-1] * ratio)
    if sum(left) + sum(right) <= length:
        n_mid = max(0, round((length - sum(left) - sum(right)) / h_max))
        sizes = left + [h_max] * n_mid + right[::-1]
    else:
        # The two graded runs meet before reaching h_max: take the smaller next size each time.
        left, right, total = [], [], 0.0
        a, b = h_start, h_end
        last = left
        for _ in range(int(expected) + 2):  # bounded: sizes grow geometrically from > 0
            if total >= length:
                break
            if a <= b:
                left.append(a)
                total, a, last = total + a, a * ratio, left
            else:
                right.append(b)
                total, b, last = total + b, b * ratio, right
        if total - length > 0.5 * last[-1] and len(left) + len(right) > 1:
            last.pop()
        sizes = left + right[::-1]
    sizes_arr = np.asarray(sizes, dtype=float)
    sizes_arr *= length / sizes_arr.sum()
    return np.concatenate([[0.0], np.cumsum(sizes_arr)])
