"""Transmission-line figures (quasi-TEM) from per-unit-length capacitance matrices.

With C the Maxwell capacitance matrix of the cross-section with its dielectrics and C0 the
same with every relative permittivity set to 1 (F/m, over the signal conductors):

    L = mu0 eps0 inv(C0)                      inductance matrix, H/m
    one signal conductor:  Z0 = sqrt(L / C) = 1 / (c sqrt(C C0)),  eps_eff = C / C0,
                           delay = sqrt(L C) = sqrt(eps_eff) / c  (s/m)
    symmetric pair:        even mode V = (1, 1), odd mode V = (1, -1):
                           C_even = C11 + C12, C_odd = C11 - C12 (likewise C0, per line),
                           Z_even/odd = 1 / (c sqrt(C_mode C0_mode)), eps_eff = C_mode / C0_mode,
                           differential impedance 2 Z_odd, common-mode impedance Z_even / 2
    N conductors:          modes are the eigenvectors t_k of L C, with L C t_k = t_k / v_k^2,
                           found as the generalised symmetric problem C t = eps_eff C0 t
                           (scipy.linalg.eigh; see :mod:`solver.figures.modes` for modes
                           that share a velocity, as in a homogeneous medium);
                           modal current i_k = inv(L) t_k / v_k; modal impedance
                           Z_k = (t_k . t_k) / (t_k . i_k), which is Z_even / Z_odd for a
                           symmetric pair and Z0 for one line.
    coupling coefficients: k_C,ij = -C_ij / sqrt(C_ii C_jj), k_L,ij = L_ij / sqrt(L_ii L_jj).

These are the textbook quasi-TEM relations (e.g. C. R. Paul, Analysis of Multiconductor
Transmission Lines, Wiley, 1994, ch. 3-5). :func:`figures_from_solution` takes a solved
model (and solves it in vacuum only when a region's permittivity differs from the
background's); :func:`figures_from_matrices` is the pure function.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from solver.bem.solution import Solution
from solver.bem.solve import CancelCallback, ProgressCallback
from solver.constants import SPEED_OF_LIGHT_M_PER_S
from solver.errors import NoReferenceError
from solver.figures.modes import modes_of
from solver.mesh.panels import MeshSettings
from solver.model.model import Model

#: Relative mismatch of C11/C22 (and C0) below which a two-line model counts as a symmetric pair.
SYMMETRY_TOLERANCE = 1e-3


@dataclass(frozen=True)
class TransmissionLineFigures:
    """Quasi-TEM figures of a cross-section (SI units; None where a figure does not apply).

    Attributes
    ----------
    signal_names : names of the signal (fixed-potential) conductors: rows of the matrices.
    capacitance_F_per_m : (N, N) Maxwell capacitance matrix with dielectrics, F/m.
    capacitance_vacuum_F_per_m : (N, N) the same with every eps_r = 1, F/m.
    inductance_H_per_m : (N, N) inductance matrix, H/m.
    characteristic_impedance_ohm, effective_permittivity, delay_s_per_m, velocity_m_per_s :
        for one signal conductor.
    even_mode_impedance_ohm, odd_mode_impedance_ohm,
    even_mode_effective_permittivity, odd_mode_effective_permittivity,
    differential_impedance_ohm, common_mode_impedance_ohm : for a symmetric pair.
    modal_velocities_m_per_s, modal_effective_permittivities, modal_impedances_ohm : (N,)
        per mode, slowest first.
    modal_voltages : (N, N) voltage eigenvectors as columns (largest entry +1).
    modes_defined : False when modes share a velocity and their voltage vectors are not
        fixed by the matrices (see :func:`solver.figures.modes.modes_of`); the modal voltages and
        impedances of such modes are then one choice among many.
    modal_note : how the modes were chosen, in words.
    capacitive_coupling, inductive_coupling : (N, N) coupling coefficients (zero diagonal).
    estimated_relative_error : of C (the larger of the two solves' estimates), or None.
    truncation_relative_error : change of C when the truncated layers (wide substrate
        rectangles, see :mod:`solver.layers`) are drawn twice as wide, or None.
    """

    signal_names: tuple[str, ...]
    capacitance_F_per_m: np.ndarray
    capacitance_vacuum_F_per_m: np.ndarray
    inductance_H_per_m: np.ndarray
    modal_velocities_m_per_s: np.ndarray
    modal_effective_permittivities: np.ndarray
    modal_impedances_ohm: np.ndarray
    modal_voltages: np.ndarray
    capacitive_coupling: np.ndarray
    inductive_coupling: np.ndarray
    modes_defined: bool = True
    modal_note: str = ""
    characteristic_impedance_ohm: float | None = None
    effective_permittivity: float | None = None
    delay_s_per_m: float | None = None
    velocity_m_per_s: float | None = None
    even_mode_impedance_ohm: float | None = None
    odd_mode_impedance_ohm: float | None = None
    even_mode_effective_permittivity: float | None = None
    odd_mode_effective_permittivity: float | None = None
    differential_impedance_ohm: float | None = None
    common_mode_impedance_ohm: float | None = None
    estimated_relative_error: float | None = None
    truncation_relative_error: float | None = None

    @property
    def is_symmetric_pair(self) -> bool:
        return self.even_mode_impedance_ohm is not None

    def as_dict(self) -> dict:
        """JSON-ready dictionary (matrices as nested lists, SI units in the keys)."""
        out: dict = {}
        for name in self.__dataclass_fields__:
            value = getattr(self, name)
            out[name] = value.tolist() if isinstance(value, np.ndarray) else (
                list(value) if isinstance(value, tuple) else value
            )
        return out


def _pair_is_symmetric(c: np.ndarray, c0: np.ndarray) -> bool:
    return all(abs(m[0, 0] - m[1, 1]) <= SYMMETRY_TOLERANCE * abs(m[0, 0]) for m in (c, c0))


def _coupling(m: np.ndarray, sign: float) -> np.ndarray:
    d = np.sqrt(np.diag(m))
    k = sign * m / np.outer(d, d)
    np.fill_diagonal(k, 0.0)
    return k


def figures_from_matrices(
    capacitance_F_per_m: np.ndarray,
    capacitance_vacuum_F_per_m: np.ndarray,
    signal_names: tuple[str, ...] | None = None,
    estimated_relative_error: float | None = None,
) -> TransmissionLineFigures:
    """Transmission-line figures from C (with dielectrics) and C0 (all eps_r = 1), both (N, N) F/m.

    Examples
    --------
    >>> import numpy as np
    >>> f = figures_from_matrices(np.array([[2.0 * 66.7e-12]]), np.array([[66.7e-12]]))
    >>> round(f.effective_permittivity, 3), round(f.characteristic_impedance_ohm, 1)
    (2.0, 35.4)
    """
    c = np.atleast_2d(np.asarray(capacitance_F_per_m, dtype=float))
    c0 = np.atleast_2d(np.asarray(capacitance_vacuum_F_per_m, dtype=float))
    if c.shape != c0.shape or c.shape[0] != c.shape[1] or c.shape[0] == 0:
        raise ValueError(f"C and C0 must be the same non-empty square shape; got {c.shape} and {c0.shape}.")
    n = c.shape[0]
    names = tuple(signal_names) if signal_names is not None else tuple(f"line {i + 1}" for i in range(n))
    light = SPEED_OF_LIGHT_M_PER_S
    inductance = np.linalg.inv(c0) / light**2
    modes = modes_of(c, c0)
    velocities = light / np.sqrt(modes.effective_permittivities)
    vecs = modes.voltages
    currents = np.linalg.solve(inductance, vecs) / velocities[None, :]
    impedances = np.einsum("ik,ik->k", vecs, vecs) / np.einsum("ik,ik->k", vecs, currents)
    figures = TransmissionLineFigures(
        signal_names=names,
        capacitance_F_per_m=c,
        capacitance_vacuum_F_per_m=c0,
        inductance_H_per_m=inductance,
        modal_velocities_m_per_s=velocities,
        modal_effective_permittivities=(light / velocities) ** 2,
        modal_impedances_ohm=impedances,
        modal_voltages=vecs,
        modes_defined=modes.defined,
        modal_note=modes.note,
        capacitive_coupling=_coupling(c, -1.0),
        inductive_coupling=_coupling(inductance, 1.0),
        estimated_relative_error=estimated_relative_error,
    )
    if n == 1:
        eps_eff = float(c[0, 0] / c0[0, 0])
        return replace(
            figures,
            characteristic_impedance_ohm=float(1.0 / (light * math.sqrt(c[0, 0] * c0[0, 0]))),
            effective_permittivity=eps_eff,
            delay_s_per_m=math.sqrt(eps_eff) / light,
            velocity_m_per_s=light / math.sqrt(eps_eff),
        )
    if n == 2 and _pair_is_symmetric(c, c0):
        c_self, c0_self = 0.5 * (c[0, 0] + c[1, 1]), 0.5 * (c0[0, 0] + c0[1, 1])
        c_m, c0_m = 0.5 * (c[0, 1] + c[1, 0]), 0.5 * (c0[0, 1] + c0[1, 0])
        c_even, c0_even = c_self + c_m, c0_self + c0_m
        c_odd, c0_odd = c_self - c_m, c0_self - c0_m
        z_even = 1.0 / (light * math.sqrt(c_even * c0_even))
        z_odd = 1.0 / (light * math.sqrt(c_odd * c0_odd))
        return replace(
            figures,
            even_mode_impedance_ohm=float(z_even),
            odd_mode_impedance_ohm=float(z_odd),
            even_mode_effective_permittivity=float(c_even / c0_even),
            odd_mode_effective_permittivity=float(c_odd / c0_odd),
            differential_impedance_ohm=float(2.0 * z_odd),
            common_mode_impedance_ohm=float(0.5 * z_even),
        )
    return figures


def vacuum_model(model: Model) -> Model:
    """The same cross-section with every relative permittivity 1 (no dielectric regions)."""
    return replace(model, dielectrics=(), background_eps_r=1.0)


def figures_from_solution(
    solution: Solution,
    *,
    estimate_error: bool = False,
    estimate_truncation: bool = False,
    progress: ProgressCallback | None = None,
    cancel: CancelCallback | None = None,
) -> TransmissionLineFigures:
    """Transmission-line figures of a solved model, reusing its capacitance matrix C.

    C0 (every eps_r = 1) is C / eps_r of the background when no region's permittivity differs
    from the background's; otherwise the cross-section is solved once more in vacuum at the
    solution's mesh resolution (``estimate_error`` also at half of it).
    ``estimate_truncation`` solves with the truncated layers twice as wide (see
    :mod:`solver.layers`). The error of the figures is the larger of the two solves' estimates.
    ``progress`` and ``cancel`` are passed to that solve (see :func:`solver.solve`).

    Raises NoReferenceError when the model has no return path or no signal conductor.
    """
    from solver.bem.solve import has_permittivity_contrast, progress_reporter, solve

    model = solution.model
    report = progress_reporter(progress, cancel)
    if not model.has_return_path or not model.signal_names:
        raise NoReferenceError(
            "No transmission-line figures: they need a return path (a reference conductor or a "
            "ground plane) and at least one conductor with a fixed potential."
        )
    c = solution.capacitance_maxwell_F_per_m
    settings = MeshSettings(solution.mesh.settings.level)
    errors = [solution.estimated_relative_error]
    if has_permittivity_contrast(model):
        in_vacuum = solve(vacuum_model(model), estimate_error=estimate_error, settings=settings,
                          progress=lambda f, m: report(0.9 * f, f"In vacuum: {m}"), cancel=cancel)
        c0 = in_vacuum.capacitance_maxwell_F_per_m
        errors.append(in_vacuum.estimated_relative_error)
    else:
        c0 = c / model.background_eps_r
    known = [e for e in errors if e is not None]
    figures = figures_from_matrices(c, c0, model.signal_names, max(known) if known else None)
    if estimate_truncation:
        from solver.figures.layers import truncation_error

        report(0.9, "Truncation error of the layers")
        figures = replace(
            figures, truncation_relative_error=truncation_error(model, settings=settings, capacitance_F_per_m=c)
        )
    report(1.0, "Done")
    return figures


def transmission_line_figures(
    source: Solution | Model,
    *,
    estimate_error: bool = False,
    estimate_truncation: bool = False,
    settings: MeshSettings | None = None,
    progress: ProgressCallback | None = None,
    cancel: CancelCallback | None = None,
) -> TransmissionLineFigures:
    """Transmission-line figures of a solution, or of a model solved here first.

    A Solution is used as it is (see :func:`figures_from_solution`; ``settings`` is then
    ignored). A Model is solved at ``settings`` (default: its mesh density), with the error
    estimate when ``estimate_error`` is set.

    Raises NoReferenceError when the model has no return path or no signal conductor.

    Examples
    --------
    >>> from solver import load_project, solve
    >>> f = transmission_line_figures(solve(load_project("sample_geometries/microstrip_on_substrate.json")))
    >>> round(f.characteristic_impedance_ohm)  # doctest: +SKIP
    50
    """
    from solver.bem.solve import solve

    if isinstance(source, Solution):
        solution = source
    else:
        if not source.has_return_path or not source.signal_names:
            raise NoReferenceError(
                "No transmission-line figures: they need a return path (a reference conductor or a "
                "ground plane) and at least one conductor with a fixed potential."
            )
        solution = solve(source, estimate_error=estimate_error, settings=settings, cancel=cancel)
    return figures_from_solution(solution, estimate_error=estimate_error, estimate_truncation=estimate_truncation,
                                 progress=progress, cancel=cancel)
