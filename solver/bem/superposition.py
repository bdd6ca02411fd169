"""New conductor potentials and charges without a solve: superposition of stored unit solutions.

The boundary-element system is linear and its right-hand side is linear in the fixed
conductors' potentials V_k and the floating conductors' free charges Q_f. A solve therefore
also stores one *unit solution* per such conductor ("driver"): the solution with V_k = 1 V
(every other driver 0), and the solution with Q_f / (2 pi eps0) = 1 V on a floating
conductor. Any operating point is then

    x = sum_k V_k x_k + sum_f Q_f / (2 pi eps0) x_f

for every quantity linear in the unknowns: total and free strengths, phi_inf, the potentials
of floating conductors, and the principal-value normal fields on strips and interfaces.
Reference conductors and the ground plane are at 0 V and drive nothing. Capacitance matrices
do not depend on the operating point and are kept as they are.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from solver.constants import EPSILON_0_F_PER_M
from solver.model.model import Model


@dataclass(frozen=True)
class UnitSolutions:
    """One column per driver: fixed conductors (1 V each), then floating ones (unit charge).

    Attributes
    ----------
    fixed, floating : conductor indices (model order) of the driver columns.
    total_strengths : (n_panels, n_drivers) scaled total strengths (conductor and interface panels).
    free_strengths : (n_conductor_panels, n_drivers) scaled free strengths.
    phi_inf_V : (n_drivers,) potential at infinity (0 with a ground plane).
    floating_potentials_V : (n_floating, n_drivers) potentials of floating conductors (``floating`` order).
    conductor_normal_pv : (n_conductor_panels, n_drivers) scaled principal-value normal field on strips.
    interface_normal_pv : (n_interface_panels, n_drivers) same on interface panels.
    """

    fixed: tuple[int, ...]
    floating: tuple[int, ...]
    total_strengths: np.ndarray
    free_strengths: np.ndarray
    phi_inf_V: np.ndarray
    floating_potentials_V: np.ndarray
    conductor_normal_pv: np.ndarray
    interface_normal_pv: np.ndarray

    def matches(self, model: Model) -> bool:
        """True when ``model`` has the same fixed and floating conductors as the solved one."""
        roles = [c.role for c in model.conductors]
        fixed = tuple(k for k, r in enumerate(roles) if r == "fixed")
        floating = tuple(k for k, r in enumerate(roles) if r == "floating")
        return fixed == self.fixed and floating == self.floating

    def superposed(self, model: Model) -> dict[str, Any]:
        """The operating point of ``model`` (same geometry and roles) by superposition.

        Returns
        -------
        dict
            ``strengths``, ``total_strengths``, ``phi_inf_V``, ``conductor_potentials_V``,
            ``conductor_normal_pv`` and ``interface_normal_pv``, as the Solution fields.
        """
        w = driver_weights(model, self.fixed, self.floating)
        potentials = np.array([c.potential_V if c.role == "fixed" else 0.0 for c in model.conductors])
        if self.floating:
            potentials[list(self.floating)] = self.floating_potentials_V @ w
        return {
            "strengths": self.free_strengths @ w,
            "total_strengths": self.total_strengths @ w,
            "phi_inf_V": float(self.phi_inf_V @ w),
            "conductor_potentials_V": potentials,
            "conductor_normal_pv": self.conductor_normal_pv @ w,
            "interface_normal_pv": self.interface_normal_pv @ w,
        }


def driver_columns(model: Model) -> tuple[tuple[int, ...], tuple[int, ...], np.ndarray, np.ndarray]:
    """Right-hand-side drivers of ``model``: one column per fixed and per floating conductor.

    Returns
    -------
    fixed, floating : conductor indices of the columns, in that order.
    potentials_V : (n_conductors, n_drivers) 1 V on each fixed driver's conductor.
    charges_scaled : (n_conductors, n_drivers) Q / (2 pi eps0) = 1 V on each floating driver's conductor.
    """
    roles = [c.role for c in model.conductors]
    fixed = tuple(k for k, r in enumerate(roles) if r == "fixed")
    floating = tuple(k for k, r in enumerate(roles) if r == "floating")
    n_cond, n_drv = len(roles), len(fixed) + len(floating)
    potentials, charges = np.zeros((n_cond, n_drv)), np.zeros((n_cond, n_drv))
    for col, k in enumerate(fixed):
        potentials[k, col] = 1.0
    for col, k in enumerate(floating, start=len(fixed)):
        charges[k, col] = 1.0
    return fixed, floating, potentials, charges


def solve_columns(model: Model) -> tuple[tuple[int, ...], tuple[int, ...], np.ndarray, np.ndarray]:
    """The columns one solve answers: the operating point of ``model`` first, then the drivers
    of :func:`driver_columns`.

    Returns
    -------
    fixed, floating : conductor indices of the driver columns.
    potentials_V : (n_conductors, 1 + n_drivers) column 0 the fixed conductors' potentials.
    charges_scaled : (n_conductors, 1 + n_drivers) column 0 each floating conductor's charge
        as Q / (2 pi eps0), V.
    """
    fixed, floating, unit_potentials, unit_charges = driver_columns(model)
    scale = 2 * math.pi * EPSILON_0_F_PER_M
    potentials = np.array([[c.potential_V if c.role == "fixed" else 0.0] for c in model.conductors])
    charges = np.array([[c.charge_C_per_m / scale if c.role == "floating" else 0.0] for c in model.conductors])
    return (fixed, floating, np.hstack([potentials.reshape(-1, 1), unit_potentials]),
            np.hstack([charges.reshape(-1, 1), unit_charges]))


def driver_weights(model: Model, fixed: tuple[int, ...], floating: tuple[int, ...]) -> np.ndarray:
    """(n_drivers,) weights of the unit solutions for ``model``'s potentials (V) and charges."""
    scale = 2 * math.pi * EPSILON_0_F_PER_M
    return np.array(
        [model.conductors[k].potential_V for k in fixed]
        + [model.conductors[k].charge_C_per_m / scale for k in floating]
    )
