"""Low-rank forms of the system blocks between a compact group of panels and panels far from it.

For a group Q of panels inside the disc |z - c| <= R and other panels P whose nearest point
is at least D from c (ratio rho = R / D < 1), the log-kernel integrals between the two
separate into sums over powers (the multipole and local expansions of ln|x - z|, e.g.
Greengard & Rokhlin, "A fast algorithm for particle simulations", J. Comput. Phys. 73, 1987):

* potential at a far target x of a Q panel, with u = (z - c) / R and w = (x - c) / R:
      integral of ln|x - z| ds = L ln R + L ln|w| - Re sum_k  mu_k / (k w^k),
      mu_k = integral of u^k ds (exact for a straight panel: conj(tau) [u^(k+1)] / (k + 1));
* potential at a target x near c (v = (x - c) / R) of a far P panel, with s = (z - c) / R:
      integral of ln|x - z| ds = G(c) - Re sum_k v^k lambda_k / k,
      lambda_k = integral of s^-k ds (exact: conj(tau) [log s] for k = 1, [s^(1-k) / (1-k)] after),
      G(c) the closed-form panel integral at the centre.

The series are truncated where rho^K / (1 - rho) falls below :data:`TRUNCATION` (so the
blocks equal the closed-form integrals to about 1e-15 of a panel's length times its
logarithm); a ground plane adds the image terms (the same expansions at mirrored targets).
Each block is then U @ V with K about 40 on well-separated parts, which makes a geometry
edit of one conductor cheap (:mod:`solver.bem.geometry_update`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import scipy.linalg

from solver.bem.assembly import mirrored
from solver.bem.kernels import log_potential_integrals

#: Relative size of the first term left out of the expansions.
TRUNCATION = 1e-15

#: Singular values of the far terms U at the unchanged panels below this fraction of the
#: largest are dropped (:func:`compressed_far_evaluation`).
COMPRESSION = 1e-16

#: Largest ratio R / D for which the expansions are used (about 70 terms there); closer
#: groups are assembled in closed form.
MAX_RATIO = 0.6


@dataclass(frozen=True)
class Separation:
    """A disc around the group Q and how far the other panels keep from it.

    Attributes
    ----------
    centre : (2,) centre c of the disc (scaled coordinates).
    radius : R, the largest distance from c to a Q panel end.
    ratio : R / D, with D the least distance from c (and, with a plane, from its mirror
        image) to a P panel; inf when a P panel comes within R.
    terms : K, the number of expansion terms for :data:`TRUNCATION`.
    """

    centre: np.ndarray
    radius: float
    ratio: float
    terms: int

    @property
    def usable(self) -> bool:
        return self.ratio <= MAX_RATIO

    def holds(self, starts: np.ndarray, ends: np.ndarray) -> bool:
        """True when every panel (its ends; the disc is convex) lies inside the disc."""
        pts = np.vstack([starts, ends]) - self.centre
        return bool(np.max(np.hypot(*pts.T)) <= self.radius)


def _segment_distances(point: np.ndarray, starts: np.ndarray, ends: np.ndarray) -> np.ndarray:
    d = ends - starts
    dd = np.einsum("ij,ij->i", d, d)
    t = np.clip(np.einsum("ij,ij->i", point[None, :] - starts, d) / np.where(dd > 0, dd, 1.0), 0.0, 1.0)
    return np.hypot(*(starts + t[:, None] * d - point[None, :]).T)


def separation(q_starts: np.ndarray, q_ends: np.ndarray, p_starts: np.ndarray, p_ends: np.ndarray,
               plane: float | None, margin: float = 1.0) -> Separation:
    """The disc around panels Q (their bounding box's centre) and its distance ratio to panels P.

    ``margin`` > 1 widens the disc (room for the group to move inside it); a widened disc
    whose ratio would exceed :data:`MAX_RATIO` falls back to the tight one.
    """
    pts = np.vstack([q_starts, q_ends])
    centre = 0.5 * (pts.min(axis=0) + pts.max(axis=0))
    radius = float(np.max(np.hypot(*(pts - centre).T)))
    if margin != 1.0:
        wide = separation(q_starts, q_ends, p_starts, p_ends, plane)
        if wide.usable and wide.ratio * margin <= MAX_RATIO:
            radius *= margin
        else:
            return wide
    if len(p_starts) == 0 or radius == 0.0:
        return Separation(centre, radius, math.inf, 0)
    gap = float(np.min(_segment_distances(centre, p_starts, p_ends)))
    if plane is not None:
        image = mirrored(centre[None, :], plane)[0]
        gap = min(gap, float(np.min(_segment_distances(image, p_starts, p_ends))))
    ratio = radius / gap if gap > radius else math.inf
    if not ratio <= MAX_RATIO:
        return Separation(centre, radius, ratio, 0)
    terms = max(1, math.ceil(math.log(TRUNCATION * (1.0 - ratio)) / math.log(ratio)))
    return Separation(centre, radius, ratio, terms)


def split_separation(q_starts: np.ndarray, q_ends: np.ndarray, p_starts: np.ndarray, p_ends: np.ndarray,
                     plane: float | None, margin: float = 1.0) -> tuple[Separation, np.ndarray]:
    """The disc around panels Q (as :func:`separation`, widened by ``margin``) and which P
    panels keep far enough from it for the expansions: those at least R / :data:`MAX_RATIO`
    from the centre (and, with a plane, from its mirror image). The Separation's ratio and
    terms are those of the far panels alone (ratio inf and no terms when none is far); the
    others are for closed-form integrals.
    """
    pts = np.vstack([q_starts, q_ends])
    centre = 0.5 * (pts.min(axis=0) + pts.max(axis=0))
    radius = margin * float(np.max(np.hypot(*(pts - centre).T)))
    gaps = _segment_distances(centre, p_starts, p_ends)
    if plane is not None:
        gaps = np.minimum(gaps, _segment_distances(mirrored(centre[None, :], plane)[0], p_starts, p_ends))
    far = gaps * MAX_RATIO >= radius
    if radius == 0.0 or not far.any():
        return Separation(centre, radius, math.inf, 0), far
    ratio = radius / float(np.min(gaps[far]))
    terms = max(1, math.ceil(math.log(TRUNCATION * (1.0 - ratio)) / math.log(ratio)))
    return Separation(centre, radius, ratio, terms), far


def _complete_sums(a: np.ndarray, b: np.ndarray, k_max: int) -> np.ndarray:
    """h_k = sum_{j=0..k} a^j b^(k-j) for k = 0 ... k_max - 1, as (k_max, n): the quotient
    (b^(k+1) - a^(k+1)) / (b - a) without the cancellation of the difference on short panels."""
    h = np.empty((k_max, len(a)), dtype=complex)
    h[0] = 1.0
    b_power = np.ones(len(a), dtype=complex)
    for k in range(1, k_max):
        b_power = b_power * b
        h[k] = a * h[k - 1] + b_power
    return h


def _powers(w: np.ndarray, k_max: int) -> np.ndarray:
    """(n, k_max) w^k / k for k = 1 ... k_max, by repeated products."""
    out = np.empty((len(w), k_max), dtype=complex)
    out[:, 0] = w
    for k in range(1, k_max):
        out[:, k] = out[:, k - 1] * w
    return out / np.arange(1, k_max + 1)[None, :]


def _relative(points: np.ndarray, centre: np.ndarray, scale: float) -> np.ndarray:
    return ((points[:, 0] - centre[0]) + 1j * (points[:, 1] - centre[1])) / scale


def _real_pair(values: np.ndarray) -> np.ndarray:
    """[Re, Im] stacked along the first axis (complex (K, n) -> real (2K, n))."""
    return np.vstack([values.real, values.imag])


def far_potential_factors(sep: Separation, q_starts: np.ndarray, q_ends: np.ndarray,
                          targets: np.ndarray, plane: float | None) -> tuple[np.ndarray, np.ndarray]:
    """(U, V) with U @ V = single_layer_potential_matrix(targets, q_starts, q_ends, plane),
    for targets at least R / ratio from the centre (and their mirrors, with a plane).

    U is (n_targets, r), V is (r, n_q), r = 1 + 2 K (twice that with a plane).
    """
    return far_evaluation(sep, targets, plane), panel_moments(sep, q_starts, q_ends, plane)


def panel_moments(sep: Separation, q_starts: np.ndarray, q_ends: np.ndarray, plane: float | None) -> np.ndarray:
    """V of :func:`far_potential_factors`: the multipole moments of each panel in the disc."""
    c, big_r, k_max = sep.centre, sep.radius, sep.terms
    za, zb = _relative(q_starts, c, big_r), _relative(q_ends, c, big_r)
    length = np.hypot(*(q_ends - q_starts).T)  # not |zb - za| R: that difference loses digits on short panels
    # mu_k = integral of u^k ds = |panel| (zb^(k+1) - za^(k+1)) / ((k + 1) (zb - za))
    h = _complete_sums(za, zb, k_max + 1)[1:]
    mu = length[None, :] * h / np.arange(2, k_max + 2)[:, None]  # (K, n_q)
    v = np.vstack([length[None, :], _real_pair(mu)])
    return v if plane is None else np.vstack([v, v])


def far_evaluation(sep: Separation, targets: np.ndarray, plane: float | None) -> np.ndarray:
    """U of :func:`far_potential_factors`: the multipole terms at each far target."""
    c, big_r, k_max = sep.centre, sep.radius, sep.terms

    def evaluation(points: np.ndarray, sign: float) -> np.ndarray:
        w = _relative(points, c, big_r)
        inv = _powers(1.0 / w, k_max)  # w^-k / k
        # -(L ln R + L ln|w|) + Re sum mu_k w^-k / k, with Re(mu a) = Re mu Re a - Im mu Im a
        return sign * np.hstack([-(math.log(big_r) + np.log(np.abs(w)))[:, None], inv.real, -inv.imag])

    u = evaluation(targets, 1.0)
    if plane is None:
        return u
    return np.hstack([u, evaluation(mirrored(targets, plane), -1.0)])


def compressed_far_evaluation(sep: Separation, targets: np.ndarray, plane: float | None
                              ) -> tuple[np.ndarray, np.ndarray]:
    """(Q, C) with Q @ C = :func:`far_evaluation` to :data:`COMPRESSION` of its largest
    singular value, Q (n_targets, r) with orthonormal columns, C (r, 1 + 2 K [x 2]).

    The expansion terms seen from targets on one side of the disc are nearly dependent (on
    the busbar sample 105 terms have about 60 singular values above 1e-16 of the largest), so
    a block A_PE = U @ V of any panels in the disc is Q @ (C @ V) with fewer columns: fewer
    solves with A_PP. The SVD is LAPACK's (Golub & Van Loan, "Matrix Computations", 2013).
    """
    u = far_evaluation(sep, targets, plane)
    if u.shape[0] < u.shape[1]:
        return u, np.eye(u.shape[1])
    q, sigma, vt = scipy.linalg.svd(u, full_matrices=False, check_finite=False)
    rank = max(1, int(np.sum(sigma > COMPRESSION * sigma[0])))
    return q[:, :rank], sigma[:rank, None] * vt[:rank]


def near_potential_factors(sep: Separation, p_starts: np.ndarray, p_ends: np.ndarray,
                           targets: np.ndarray, plane: float | None) -> tuple[np.ndarray, np.ndarray]:
    """(U, V) with U @ V = single_layer_potential_matrix(targets, p_starts, p_ends, plane),
    for targets within R of the centre and panels P at least R / ratio from it (and from
    its mirror, with a plane).

    U is (n_targets, r), V is (r, n_p), r = 1 + 2 K (twice that with a plane).
    """
    return near_evaluation(sep, targets, plane), local_coefficients(sep, p_starts, p_ends, plane)


def _image_centre(sep: Separation, plane: float) -> np.ndarray:
    return mirrored(sep.centre[None, :], plane)[0]


def local_coefficients(sep: Separation, p_starts: np.ndarray, p_ends: np.ndarray, plane: float | None) -> np.ndarray:
    """V of :func:`near_potential_factors`: each far panel's local expansion about the centre."""
    k_max, big_r = sep.terms, sep.radius

    def coefficients(centre: np.ndarray) -> np.ndarray:
        sa, sb = _relative(p_starts, centre, big_r), _relative(p_ends, centre, big_r)
        step = p_ends - p_starts  # taken before the shift to the centre, which would lose digits
        length = np.hypot(*step.T)
        dz = (step[:, 0] + 1j * step[:, 1]) / big_r  # sb - sa
        rot = np.conj(dz) / np.where(length > 0, length / big_r, 1.0)  # conj of the unit tangent
        lam = np.empty((k_max, len(sa)), dtype=complex)
        # lambda_1 = conj(tau) R log(sb / sa), with log(1 + d) taken without cancellation
        d = dz / sa
        lam[0] = rot * big_r * (0.5 * np.log1p(2.0 * d.real + (d * np.conj(d)).real)
                                + 1j * np.arctan2(d.imag, 1.0 + d.real))
        if k_max > 1:
            # lambda_k = |panel| (sb^(1-k) - sa^(1-k)) / ((1 - k)(sb - sa)) = |panel| h_(k-2)(1/sa, 1/sb) / ((k-1) sa sb)
            h = _complete_sums(1.0 / sa, 1.0 / sb, k_max - 1)
            lam[1:] = length[None, :] * h / (np.arange(1, k_max)[:, None] * (sa * sb)[None, :])
        g0 = log_potential_integrals(centre[None, :], p_starts, p_ends)  # (1, n_p)
        return np.vstack([g0, _real_pair(lam)])

    v = coefficients(sep.centre)
    return v if plane is None else np.vstack([v, coefficients(_image_centre(sep, plane))])


def near_evaluation(sep: Separation, targets: np.ndarray, plane: float | None) -> np.ndarray:
    """U of :func:`near_potential_factors`: the local terms at each target in the disc."""

    def evaluation(centre: np.ndarray, points: np.ndarray, sign: float) -> np.ndarray:
        pw = _powers(_relative(points, centre, sep.radius), sep.terms)  # v^k / k
        # -(G(c) - Re sum v^k lambda_k / k)
        return sign * np.hstack([-np.ones((len(points), 1)), pw.real, -pw.imag])

    u = evaluation(sep.centre, targets, 1.0)
    if plane is None:
        return u
    return np.hstack([u, evaluation(_image_centre(sep, plane), mirrored(targets, plane), -1.0)])
