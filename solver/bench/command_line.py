"""Cost of one command-line run against one solve: ``python -m solver.bench.command_line [MODEL.json]``.

Counts the dense factorisations (``scipy.linalg.lu_factor`` for the boundary-element systems
and ``scipy.linalg.solve`` for the isolated-conductor systems of the equivalent radii) and the
CPU time (``time.process_time``: every thread of this process, BLAS included) of
``python -m solver MODEL.json --json`` and of one :func:`solver.solve` call, and prints their
ratio. The machine may be shared: run it twice and compare ratios, not seconds.
"""

from __future__ import annotations

import argparse
import contextlib
import io
import time
from collections import Counter
from collections.abc import Callable, Iterator
from pathlib import Path

import scipy.linalg

from solver.bem.solve import solve
from solver.cli.command import main
from solver.io.project_file import load_project

DEFAULT_MODEL = Path(__file__).resolve().parents[2] / "sample_geometries" / "coaxial_feeder.json"


@contextlib.contextmanager
def counted_factorisations() -> Iterator[Counter]:
    """Count calls of ``scipy.linalg.lu_factor`` and ``scipy.linalg.solve`` inside the block."""
    counts: Counter = Counter()
    originals = {name: getattr(scipy.linalg, name) for name in ("lu_factor", "solve")}

    def counting(name: str, function: Callable) -> Callable:
        def wrapper(*args, **kwargs):
            counts[name] += 1
            return function(*args, **kwargs)
        return wrapper

    try:
        for name, function in originals.items():
            setattr(scipy.linalg, name, counting(name, function))
        yield counts
    finally:
        for name, function in originals.items():
            setattr(scipy.linalg, name, function)


def measure(path: Path) -> dict:
    """Factorisation counts and CPU seconds of the command line (``--json``) and of one solve."""
    with counted_factorisations() as cli_counts, contextlib.redirect_stdout(io.StringIO()):
        start = time.process_time()
        status = main([str(path), "--json"])
        cli_s = time.process_time() - start
    if status != 0:
        raise SystemExit(f"the command line failed on {path} (exit status {status})")
    model = load_project(path)
    with counted_factorisations() as solve_counts:
        start = time.process_time()
        solve(model)
        solve_s = time.process_time() - start
    return {"cli_counts": dict(cli_counts), "solve_counts": dict(solve_counts), "cli_cpu_s": cli_s,
            "solve_cpu_s": solve_s, "ratio": cli_s / solve_s}


def main_bench(argv: list[str] | None = None) -> None:
    parser = argparse.ArgumentParser(prog="python -m solver.bench.command_line", description=__doc__)
    parser.add_argument("model", nargs="?", default=str(DEFAULT_MODEL), help="project file (default: coaxial feeder)")
    args = parser.parse_args(argv)
    m = measure(Path(args.model))
    print(f"command line --json: {m['cli_counts']}, CPU {m['cli_cpu_s']:.2f} s")
    print(f"one solve():         {m['solve_counts']}, CPU {m['solve_cpu_s']:.2f} s")
    print(f"CPU ratio: {m['ratio']:.2f}")


if __name__ == "__main__":
    main_bench()
