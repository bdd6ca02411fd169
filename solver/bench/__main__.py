"""Benchmark: ``python -m solver.bench``.

For a ladder of mesh resolutions on a few models, prints the number of unknowns, the time to
mesh, assemble and factorise/solve, and the capacitance error (against the closed form where
one exists, else against the finest level). Wall-clock times on a shared machine are noisy:
compare ratios, and run twice before believing a change.
"""

from __future__ import annotations

import argparse
import math
import time
from collections.abc import Callable

import numpy as np
from scipy.special import ellipk

from solver.bem.solve import solve_system
from solver.bem.system import build_system
from solver.constants import EPSILON_0_F_PER_M
from solver.mesh.panels import MeshSettings, discretize_boundary
from solver.model.model import Circle, Conductor, Model, Rectangle, Ring, Strip

BenchCase = tuple[str, Model, float | None]


def _coax() -> BenchCase:
    model = Model(
        unit="mm",
        conductors=(
            Conductor("inner", (Circle((0.0, 0.0), 1.0),), potential_V=1.0),
            Conductor("shield", (Ring((0.0, 0.0), 3.5, 4.0),), role="reference"),
        ),
    )
    return "coaxial line, b/a = 3.5", model, 2 * math.pi * EPSILON_0_F_PER_M / math.log(3.5)


def _stripline() -> BenchCase:
    w, b = 1.0, 1.0
    wide = w + 12 * b
    model = Model(
        unit="mm",
        conductors=(
            Conductor("strip", (Strip(((-w / 2, 0.0), (w / 2, 0.0))),), potential_V=1.0),
            Conductor("upper", (Strip(((-wide / 2, b / 2), (wide / 2, b / 2))),), role="reference"),
            Conductor("lower", (Strip(((-wide / 2, -b / 2), (wide / 2, -b / 2))),), role="reference"),
        ),
    )
    k = 1 / math.cosh(math.pi * w / (2 * b))
    return "zero-thickness stripline w = b", model, 4 * EPSILON_0_F_PER_M * ellipk(1 - k * k) / ellipk(k * k)


def _busbars() -> BenchCase:
    model = Model(
        unit="mm",
        conductors=(
            Conductor("L1", (Rectangle((-30.0, 0.0), 10.0, 60.0, 2.0),), potential_V=1.0),
            Conductor("L2", (Rectangle((0.0, 0.0), 10.0, 60.0, 2.0),), potential_V=0.0),
            Conductor("L3", (Rectangle((30.0, 0.0), 10.0, 60.0, 2.0),), potential_V=0.0),
            Conductor("enclosure", (Ring((0.0, 0.0), 80.0, 84.0),), role="reference"),
        ),
    )
    return "three busbars in a round enclosure (4 conductors)", model, None


def _sample(file_name: str) -> Callable[[], BenchCase]:
    """A bundled sample (compared against its own finest level)."""

    def make() -> BenchCase:
        from solver.io.project_file import load_project
        from solver.samples import sample_path

        return f"sample {file_name}", load_project(sample_path(file_name)), None

    return make


CASES: list[Callable[[], BenchCase]] = [
    _coax,
    _stripline,
    _busbars,
    _sample("busbar_enclosure.json"),
    _sample("three_traces_over_ground.json"),
]


def _time_one(model: Model, level: float) -> tuple[int, float, float, float, np.ndarray]:
    t0 = time.perf_counter()
    mesh = discretize_boundary(model, MeshSettings(level))
    t1 = time.perf_counter()
    system = build_system(model, mesh)
    t2 = time.perf_counter()
    c = solve_system(system).capacitance_maxwell_F_per_m
    t3 = time.perf_counter()
    return system.layout.size, t1 - t0, t2 - t1, t3 - t2, c


def run(levels: list[float]) -> None:
    """Print one table per benchmark case."""
    for make in CASES:
        title, model, exact = make()
        print(f"\n{title}")
        print(f"{'level':>6} {'unknowns':>9} {'mesh s':>8} {'assemble s':>11} {'factor+solve s':>15} {'rel. error C':>13}")
        rows = [(level, *_time_one(model, level)) for level in levels]
        reference = exact if exact is not None else rows[-1][-1]
        for level, n, t_mesh, t_asm, t_solve, c in rows:
            err = float(np.abs(c - reference).max() / np.abs(reference).max())
            label = f"{err:13.2e}" if (exact is not None or level != levels[-1]) else f"{'(reference)':>13}"
            print(f"{level:6.2f} {n:9d} {t_mesh:8.3f} {t_asm:11.3f} {t_solve:15.3f} {label}")
    from solver.bench import dielectric as bench_dielectric

    bench_dielectric.run(levels)
    __import__("solver.bench.accuracy", fromlist=["run"]).run()
    __import__("solver.bench.speed", fromlist=["run"]).run()


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(prog="python -m solver.bench", description=__doc__.splitlines()[0])
    parser.add_argument("--levels", type=float, nargs="+", default=[0.5, 1.0, 2.0, 4.0],
                        help="mesh resolution levels (normal = 1)")
    args = parser.parse_args(argv)
    run(args.levels)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
