"""Dielectric cases of the benchmark (``python -m solver.bench`` runs them after the others).

A zero-thickness microstrip on a truncated substrate (w = h, eps_r 4.4, substrate 20 h wide)
and the two-layer coaxial cable: per mesh level, the unknowns (conductor + interface panels),
the time to mesh, assemble and factorise/solve, the time of the full transmission-line figures
(solve with dielectrics and in vacuum), and the relative error of the capacitance against the
exact value (coax) or the finest level (microstrip; the difference to Hammerstad & Jensen's
closed form, IEEE MTT-S Digest 1980, stated accuracy 0.2 %, is printed for information).
"""

from __future__ import annotations

import math
import time

from solver.bem.solve import solve_system
from solver.bem.system import build_system
from solver.constants import EPSILON_0_F_PER_M
from solver.figures.transmission_line import transmission_line_figures
from solver.mesh.panels import MeshSettings, discretize_boundary
from solver.model.model import Circle, Conductor, Dielectric, GroundPlane, Model, Rectangle, Ring, Strip


def _microstrip() -> tuple[str, Model, float | None]:
    h, w = 1.0, 1.0
    model = Model(
        unit="mm",
        ground_plane=GroundPlane(0.0),
        conductors=(Conductor("trace", (Strip(((-w / 2, h), (w / 2, h))),), potential_V=1.0),),
        dielectrics=(Dielectric("substrate", (Rectangle((0.0, h / 2), 20 * h, h),), 4.4),),
    )
    return "microstrip w = h, eps_r 4.4, substrate 20 h wide", model, None


def _two_layer_coax() -> tuple[str, Model, float | None]:
    a, c, b, e1, e2 = 1.0, 2.0, 3.0, 4.0, 2.0
    model = Model(
        unit="mm",
        conductors=(
            Conductor("core", (Circle((0.0, 0.0), a),), potential_V=1.0),
            Conductor("screen", (Ring((0.0, 0.0), b, b + 0.4),), role="reference"),
        ),
        dielectrics=(Dielectric("in", (Ring((0.0, 0.0), a, c),), e1), Dielectric("out", (Ring((0.0, 0.0), c, b),), e2)),
    )
    exact = 2 * math.pi * EPSILON_0_F_PER_M / (math.log(c / a) / e1 + math.log(b / c) / e2)
    return "coax with two concentric layers (curved interface)", model, exact


def _hammerstad_jensen_eps_eff(u: float, eps_r: float) -> float:
    a = 1 + math.log((u**4 + (u / 52) ** 2) / (u**4 + 0.432)) / 49 + math.log(1 + (u / 18.1) ** 3) / 18.7
    b = 0.564 * ((eps_r - 0.9) / (eps_r + 3)) ** 0.053
    return (eps_r + 1) / 2 + (eps_r - 1) / 2 * (1 + 10 / u) ** (-a * b)


def _time_one(model: Model, level: float) -> tuple[int, float, float, float, float, float]:
    settings = MeshSettings(level)
    t0 = time.perf_counter()
    mesh = discretize_boundary(model, settings)
    t1 = time.perf_counter()
    system = build_system(model, mesh)
    t2 = time.perf_counter()
    solve_system(system)
    t3 = time.perf_counter()
    figures = transmission_line_figures(model, settings=settings)
    t4 = time.perf_counter()
    return system.layout.size, t1 - t0, t2 - t1, t3 - t2, t4 - t3, float(figures.capacitance_F_per_m[0, 0])


def run(levels: list[float]) -> None:
    """Print one table per dielectric case."""
    for make in (_microstrip, _two_layer_coax):
        title, model, exact = make()
        print(f"\n{title}")
        print(f"{'level':>6} {'unknowns':>9} {'mesh s':>8} {'assemble s':>11} {'factor+solve s':>15} "
              f"{'C and C0 s':>11} {'rel. error C':>13}")
        rows = [(level, *_time_one(model, level)) for level in levels]
        reference = exact if exact is not None else rows[-1][-1]
        for level, n, t_mesh, t_asm, t_solve, t_tl, c in rows:
            err = abs(c / reference - 1)
            label = f"{err:13.2e}" if (exact is not None or level != levels[-1]) else f"{'(reference)':>13}"
            print(f"{level:6.2f} {n:9d} {t_mesh:8.3f} {t_asm:11.3f} {t_solve:15.3f} {t_tl:11.3f} {label}")
        if exact is None:
            eps_eff = transmission_line_figures(model, settings=MeshSettings(levels[-1])).effective_permittivity
            assert eps_eff is not None  # the microstrip has one signal conductor
            hj = _hammerstad_jensen_eps_eff(1.0, 4.4)
            print(f"  eps_eff {eps_eff:.5f} at the finest level; Hammerstad & Jensen (1980): {hj:.5f} "
                  f"({eps_eff / hj - 1:+.2e}; their stated accuracy is 0.2 %: "
                  f"{'within' if abs(eps_eff / hj - 1) <= 2e-3 else 'OUTSIDE'})")
