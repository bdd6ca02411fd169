"""AC lines: phasor potentials, complex charges, the field ellipse and the field near the ground.

The electrostatic problem is linear, so a line energised with phasor potentials
V_k = |V_k| exp(j phase_k) (rms values, volts) is the sum of real solves: solve once with
conductor k at 1 V and the others at 0 V (earth wires and other reference conductors stay at
0 V), for each energised conductor k, and combine

    Q = C V  (complex charges per metre, C the Maxwell matrix),  E(x) = sum_k V_k E_k(x).

At a point the field phasor E = (Ex, Ey) traces an ellipse in time. With the real 2 x 2
matrix M = [[Re Ex, Im Ex], [Re Ey, Im Ey]], the singular values of M are the semi-major and
semi-minor axes of the ellipse (rms scale) and the resultant rms field is
sqrt(|Ex|^2 + |Ey|^2) = sqrt(semi_major^2 + semi_minor^2).

Phasors are read from ``model.extras["ac_phasors"]`` (``{"L1": {"magnitude_V": ...,
"phase_deg": ...}, ...}``) or given directly. Exposure reference levels are the user's
choice; ICNIRP (2010) gives 5 kV/m (rms, unperturbed field) for the general public at 50 Hz
— local rules differ, and they govern.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np

from solver.errors import InvalidModelError
from solver.model.model import Model

EXPOSURE_CAUTION = (
    "Reference levels differ between countries and between the public and workers; the levels of "
    "the rules that apply where the line is (and the judgement of a qualified engineer) govern, not "
    "this comparison. The 2-D model gives the unperturbed field of an infinitely long, straight line "
    "over flat, perfectly conducting ground, without sag, terrain, vegetation, buildings or people."
)


@dataclass(frozen=True)
class ExposureReference:
    """An exposure reference level chosen by the user: rms electric field, V/m, with its source."""

    name: str
    field_V_per_m: float


#: ICNIRP 2010 guidelines (1 Hz - 100 kHz), general public reference level at 50 Hz: 5 kV/m rms.
ICNIRP_2010_PUBLIC_50HZ = ExposureReference("ICNIRP (2010), general public, 50 Hz", 5000.0)


@dataclass(frozen=True)
class AcFieldProfile:
    """Field of an AC line along a horizontal line at ``height_m`` above the ground plane.

    Attributes
    ----------
    x_m : (n,) positions across the corridor, metres.
    height_m : height above the ground plane, metres.
    field_phasors_V_per_m : (n, 2) complex rms phasors (Ex, Ey), V/m.
    rms_field_V_per_m : (n,) resultant rms field, V/m.
    semi_major_V_per_m, semi_minor_V_per_m : (n,) field-ellipse axes (rms scale), V/m.
    max_rms_field_V_per_m, x_at_max_m : largest rms field and where it is.
    charges_C_per_m : dict conductor -> complex rms charge per metre, C/m.
    reference : ExposureReference or None; ``ratio_to_reference`` = max / reference level.
    caution : text to show with any comparison.
    """

    x_m: np.ndarray
    height_m: float
    field_phasors_V_per_m: np.ndarray
    rms_field_V_per_m: np.ndarray
    semi_major_V_per_m: np.ndarray
    semi_minor_V_per_m: np.ndarray
    max_rms_field_V_per_m: float
    x_at_max_m: float
    charges_C_per_m: dict
    reference: ExposureReference | None = None
    ratio_to_reference: float | None = None
    caution: str = EXPOSURE_CAUTION


def phasors_of(model: Model, phasors: Mapping[str, tuple[float, float]] | None = None) -> dict[str, complex]:
    """Complex rms potentials (V) of the fixed conductors, from ``phasors`` {name: (magnitude_V,
    phase_deg)} or from ``model.extras["ac_phasors"]``; fixed conductors not named are at 0 V."""
    if phasors is None:
        stored = model.extras.get("ac_phasors")
        if not stored:
            raise InvalidModelError("The model has no phasor potentials; give phasors={name: (magnitude_V, phase_deg)} "
                                    "or store them under extras['ac_phasors'].")
        phasors = {k: (float(v["magnitude_V"]), float(v["phase_deg"])) for k, v in stored.items()}
    out = {}
    for name, (magnitude, phase_deg) in phasors.items():
        if name not in model.signal_names:
            raise InvalidModelError(f"Phasor for '{name}': not a fixed-potential conductor; the energised conductors "
                                    f"are {', '.join(model.signal_names)}.")
        out[name] = magnitude * complex(math.cos(math.radians(phase_deg)), math.sin(math.radians(phase_deg)))
    if any(c.role == "floating" for c in model.conductors):
        raise InvalidModelError("Floating conductors are not supported with phasor potentials; make them reference "
                                "(earthed) or fixed.")
    return out


def field_ellipse(phasors_V_per_m: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Semi-major, semi-minor axes and resultant rms of field phasors (n, 2) complex, V/m."""
    e = np.asarray(phasors_V_per_m, dtype=complex).reshape(-1, 2)
    m = np.stack([np.stack([e[:, 0].real, e[:, 0].imag], -1), np.stack([e[:, 1].real, e[:, 1].imag], -1)], 1)
    s = np.linalg.svd(m, compute_uv=False)
    return s[:, 0], s[:, 1], np.sqrt(np.sum(np.abs(e) ** 2, axis=1))


def ac_field_profile(
    model: Model,
    phasors: Mapping[str, tuple[float, float]] | None = None,
    *,
    height_m: float = 1.0,
    x_m: np.ndarray | None = None,
    reference: ExposureReference | None = None,
) -> AcFieldProfile:
    """rms field of an AC line along y = ground + ``height_m`` (see the module notes).

    Parameters
    ----------
    model : Model
        With a ground plane (the earth); energised conductors fixed, earth wires reference.
    phasors : {name: (magnitude_V, phase_deg)}, optional
        rms phasor potentials; default ``model.extras["ac_phasors"]``.
    height_m : float
        Height above the ground plane, metres (1 m is the usual height for exposure checks).
    x_m : (n,) array, optional
        Positions across the corridor, metres; default 401 points over the conductors' span
        plus 30 m either side.
    reference : ExposureReference, optional
        Level to compare the maximum with (e.g. :data:`ICNIRP_2010_PUBLIC_50HZ`).

    Examples
    --------
    >>> from solver import load_project
    >>> p = ac_field_profile(load_project("sample_geometries/three_phase_line.json"))  # doctest: +SKIP
    >>> round(p.max_rms_field_V_per_m)  # doctest: +SKIP
    """
    from solver.bem.solve import solve

    if model.ground_plane is None:
        raise InvalidModelError("The AC field profile needs a ground plane (the earth); add one at y = 0.")
    volts = phasors_of(model, phasors)
    scale = model.metres_per_unit
    y = (model.ground_plane.y * scale) + float(height_m)
    if x_m is None:
        xs = [s.center[0] * scale for c in model.conductors for s in c.shapes if hasattr(s, "center")] or [0.0]
        x_m = np.linspace(min(xs) - 30.0, max(xs) + 30.0, 401)
    x_m = np.asarray(x_m, dtype=float)
    points = np.column_stack([x_m, np.full_like(x_m, y)])
    signals = model.signal_names
    unit = {name: 0.0 for name in signals}
    field = np.zeros((len(x_m), 2), dtype=complex)
    c_matrix = None
    for name, v in volts.items():
        solution = solve(model.with_potentials({**unit, name: 1.0}), estimate_error=False)
        field += v * solution.field_V_per_m(points)
        c_matrix = solution.capacitance_maxwell_F_per_m
    v_vector = np.array([volts.get(n, 0.0) for n in signals])
    charges = dict(zip(signals, (c_matrix @ v_vector).tolist())) if c_matrix is not None else {}
    major, minor, rms = field_ellipse(field)
    k = int(np.argmax(rms))
    ratio = None if reference is None else float(rms[k] / reference.field_V_per_m)
    return AcFieldProfile(x_m, float(height_m), field, rms, major, minor, float(rms[k]), float(x_m[k]), charges,
                          reference, ratio)
