"""Product integration of the log and Cauchy kernels on one high-order panel.

For a target x near a panel y(t), t in [-1, 1] (a straight segment or a circular arc, see
:mod:`solver.mesh.curved_panels`), let z be the complex preimage of x, y(z) = x, in the
analytic continuation of the panel map (closed form for both kinds). Then

    y(t) - x = (t - z) s(t),   s analytic and non-zero near [-1, 1],

so log|x - y(t)| = log|t - z| + log|s(t)| and 1 / (x - y(t)) = 1 / ((z - t) s(t)). The
density (times |y'|) is the polynomial interpolating its values at the ``p`` Gauss-Legendre
nodes, written in Legendre polynomials P_k; the singular parts are integrated exactly:

    int P_k(t) / (z - t) dt = 2 Q_k(z),
    int P_k(t) log|t - z| dt = 2 Re(Q_{k+1}(z) - Q_{k-1}(z)) / (2k + 1)   (k >= 1),

with Q_k the Legendre functions of the second kind (Neumann's integral; Abramowitz & Stegun,
"Handbook of Mathematical Functions", 1964, 8.8 and 8.5), and the smooth part log|s| by the
Gauss-Legendre rule. On the panel itself (z real in (-1, 1)) the Ferrers functions give the
log integral and the Cauchy principal value. This is panel product integration in the
spirit of Helsing & Ojala, "On the evaluation of layer potentials close to their sources",
J. Comput. Phys. 227 (2008), written here in the panel parameter with Legendre functions
instead of monomials in the complex coordinate.

Q_k is computed by forward recurrence close to the panel (|z + sqrt(z^2 - 1)| < 1.3, where
it is stable enough) and by Miller's backward recurrence normalised by Q_0 farther out
(Gautschi, "Computational aspects of three-term recurrence relations", SIAM Review 9, 1967).
"""

from __future__ import annotations

import math

import numpy as np

from solver.mesh.curved_panels import CurvedPanels, gauss_legendre

#: Beyond this Bernstein-ellipse parameter the plain Gauss-Legendre rule is used.
FORWARD_RHO = 1.3


def near_rho(order: int) -> float:
    """Bernstein-ellipse parameter beyond which ``order``-point Gauss-Legendre meets 1e-16
    on the log kernel (error about rho^(-2 order))."""
    return 10.0 ** (16.0 / (2.0 * order))


def preimages(targets: np.ndarray, panels: CurvedPanels, which: np.ndarray | None = None) -> np.ndarray:
    """(m, k) complex preimages z of (m, 2) targets in the panels ``which`` (all by default)."""
    which = np.arange(panels.n_panels) if which is None else which
    x = targets[:, 0] + 1j * targets[:, 1]
    a, b = panels.ends
    a_c, b_c = (a[which, 0] + 1j * a[which, 1]), (b[which, 0] + 1j * b[which, 1])
    arc = panels.is_arc[which]
    z = np.empty((len(x), len(which)), dtype=complex)
    if (~arc).any():
        aa, bb = a_c[~arc], b_c[~arc]
        z[:, ~arc] = (2.0 * x[:, None] - (aa + bb)[None, :]) / (bb - aa)[None, :]
    if arc.any():
        c = panels.centres[which][arc]
        r = panels.radii[which][arc]
        w = (x[:, None] - (c[:, 0] + 1j * c[:, 1])[None, :]) / r[None, :]
        phi = np.angle(w * np.exp(-1j * panels.theta_mid[which][arc])[None, :])
        with np.errstate(divide="ignore"):
            z[:, arc] = (phi - 1j * np.log(np.abs(w))) / panels.half_sweep[which][arc][None, :]
    return z


def bernstein_rho(z: np.ndarray) -> np.ndarray:
    """|z + sqrt(z^2 - 1)| >= 1: the Bernstein ellipse of [-1, 1] through z."""
    s = np.sqrt(z - 1.0) * np.sqrt(z + 1.0)
    rho = np.abs(z + s)
    with np.errstate(divide="ignore"):
        return np.where(np.isfinite(rho), np.maximum(rho, 1.0 / np.maximum(rho, 1e-300)), np.inf)


def _on_cut(z: np.ndarray) -> np.ndarray:
    return (np.abs(z.imag) <= 1e-13) & (np.abs(z.real) < 1.0)


def legendre_q(z: np.ndarray, n: int) -> np.ndarray:
    """(k, n + 1) Legendre functions of the second kind Q_0..Q_n at (k,) complex ``z``.

    Points on the cut (-1, 1) get the Ferrers functions (the mean of the two sides).
    """
    z = np.asarray(z, dtype=complex).copy()
    out = np.empty((len(z), n + 1), dtype=complex)
    cut = _on_cut(z)
    z[cut] = z[cut].real
    q0 = np.empty(len(z), dtype=complex)
    x = z[cut].real
    q0[cut] = 0.5 * np.log((1.0 + x) / (1.0 - x))
    q0[~cut] = 0.5 * np.log1p(2.0 / (z[~cut] - 1.0))
    rho = np.where(cut, 1.0, bernstein_rho(z))
    fwd = rho < FORWARD_RHO
    if fwd.any():
        zf, q = z[fwd], out[fwd]
        q[:, 0] = q0[fwd]
        if n >= 1:
            q[:, 1] = zf * q[:, 0] - 1.0
        for k in range(1, n):
            q[:, k + 1] = ((2 * k + 1) * zf * q[:, k] - k * q[:, k - 1]) / (k + 1)
        out[fwd] = q
    back = ~fwd
    if back.any():
        zb = z[back]
        top = n + int(math.ceil(19.6 / math.log(float(rho[back].min())))) + 5
        q_next = np.zeros(len(zb), dtype=complex)
        q_here = np.ones(len(zb), dtype=complex)
        kept = np.empty((len(zb), n + 1), dtype=complex)
        for k in range(top, 0, -1):
            q_prev = ((2 * k + 1) * zb * q_here - (k + 1) * q_next) / k
            q_next, q_here = q_here, q_prev
            if k - 1 <= n:
                kept[:, k - 1] = q_here
            big = np.abs(q_here) > 1e200
            if big.any():  # rescale to stay in range (only the ratios matter)
                q_here[big] *= 1e-200
                q_next[big] *= 1e-200
                kept[big] *= 1e-200
        out[back] = kept * (q0[back] / kept[:, 0])[:, None]
    return out


def _legendre_at_nodes(order: int) -> np.ndarray:
    """(order, order) P_k(t_i), rows nodes, columns k."""
    t = gauss_legendre(order)[0]
    return np.polynomial.legendre.legvander(t, order - 1)


def _shape_factor(z: np.ndarray, panels: CurvedPanels, which: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """log|s(t_i)| (k, p) and s(t_i) (k, p) for pairs (z[j], panel which[j])."""
    t = gauss_legendre(panels.order)[0]
    a, b = panels.ends
    half = 0.5 * ((b - a)[which, 0] + 1j * (b - a)[which, 1])
    s = np.repeat(half[:, None], panels.order, axis=1)
    log_s = np.log(np.abs(s))
    arc = panels.is_arc[which]
    if arc.any():
        za = z[arc][:, None]
        r = panels.radii[which][arc][:, None]
        alpha = panels.half_sweep[which][arc][:, None]
        theta = panels.theta_mid[which][arc][:, None]
        w = alpha * (t[None, :] - za)
        sinc = np.sinc(w / (2.0 * math.pi))
        log_s[arc] = np.log(r * np.abs(alpha)) - 0.5 * alpha * za.imag + np.log(np.abs(sinc))
        s[arc] = r * np.exp(1j * theta) * np.exp(1j * alpha * za) * alpha * 1j * np.exp(0.5j * w) * sinc
    return log_s, s


def log_weights(z: np.ndarray, panels: CurvedPanels, which: np.ndarray) -> np.ndarray:
    """(k, p) weights W with int log|x - y(t)| f(t) dt = sum_i W_i f(t_i) for polynomial f
    of degree < p, for the pairs (preimage z[j], panel which[j])."""
    p = panels.order
    q = legendre_q(z, p)
    m = np.empty((len(z), p))
    zc = np.where(_on_cut(z), z.real + 0j, z)
    m[:, 0] = ((1.0 - zc) * np.log(1.0 - zc) + (1.0 + zc) * np.log(-1.0 - zc)).real - 2.0
    k = np.arange(1, p)
    m[:, 1:] = (2.0 / (2 * k + 1))[None, :] * (q[:, 2:] - q[:, :-2]).real
    w = gauss_legendre(p)[1]
    legendre = _legendre_at_nodes(p)
    scale = (2 * np.arange(p) + 1) / 2.0
    log_s, _ = _shape_factor(z, panels, which)
    return w[None, :] * ((m * scale[None, :]) @ legendre.T + log_s)


def cauchy_weights(z: np.ndarray, panels: CurvedPanels, which: np.ndarray) -> np.ndarray:
    """(k, p) complex weights C with int f(t) / (x - y(t)) dt = sum_i C_i f(t_i) (principal
    value on the panel itself), x and y as complex numbers."""
    p = panels.order
    q = legendre_q(z, p - 1)
    w = gauss_legendre(p)[1]
    legendre = _legendre_at_nodes(p)
    _, s = _shape_factor(z, panels, which)
    return (w[None, :] / s) * ((q * (2 * np.arange(p) + 1)[None, :]) @ legendre.T)


__all__ = ["preimages", "bernstein_rho", "legendre_q", "log_weights", "cauchy_weights", "near_rho"]
