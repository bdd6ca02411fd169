"""The 100-conductor bus: 10 x 10 rounded bars in an earthed box (a large-model test case),
and its benchmark runs (each solve in a child process, so that its peak memory is its own).

Invented geometry for benchmarks and tests (not a real product): bars 8 mm x 24 mm with 2 mm
edge radii on a 30 mm x 45 mm pitch, three phases at the peak of L1 (1, -1/2, -1/2 of 10 kV),
inside a 5 mm steel box with 25 mm clearance.
"""

from __future__ import annotations

from solver.mesh.curved_panels import CurvedPanels
from solver.model.model import Conductor, Model, Polygon, Rectangle


def hundred_conductor_bus(columns: int = 10, rows: int = 10) -> Model:
    """``columns`` x ``rows`` rounded bars (mm) in an earthed rectangular box."""
    pitch_x, pitch_y, w, h, r = 30.0, 45.0, 8.0, 24.0, 2.0
    phases = (10e3, -5e3, -5e3)
    bars = []
    for i in range(columns):
        for j in range(rows):
            x = (i - (columns - 1) / 2) * pitch_x
            y = (j - (rows - 1) / 2) * pitch_y
            bars.append(Conductor(f"B{i + 1}.{j + 1}", (Rectangle((x, y), w, h, r),),
                                  potential_V=phases[(i + j) % 3]))
    half_w = (columns - 1) / 2 * pitch_x + w / 2 + 25.0
    half_h = (rows - 1) / 2 * pitch_y + h / 2 + 25.0
    inner = ((-half_w, -half_h), (half_w, -half_h), (half_w, half_h), (-half_w, half_h))
    t = 5.0
    outer = ((-half_w - t, -half_h - t), (half_w + t, -half_h - t), (half_w + t, half_h + t), (-half_w - t, half_h + t))
    box = Conductor("box", (Polygon(outer, (inner,)),), role="reference")
    return Model(unit="mm", title=f"{columns * rows}-conductor bus", conductors=tuple(bars) + (box,))


# ---- benchmark: the bus on coarse high-order panels ---------------------------------------------

def peak_resident_MB() -> float:
    """Peak resident memory of this process, MB: ``VmHWM`` of /proc/self/status where there is
    one (the high-water mark of this program's own memory), else ``ru_maxrss``. On Linux
    ``ru_maxrss`` carries over the parent's peak through fork and exec, so a child started by a
    large parent would report the parent's figure."""
    import resource

    try:
        with open("/proc/self/status", encoding="ascii") as status:
            for line in status:
                if line.startswith("VmHWM:"):
                    return float(line.split()[1]) / 1024.0
    except OSError:
        pass
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0


def _solve_child(columns: int, rows: int, reference: bool) -> dict:
    """Solve the bus in this process (through :func:`solver.solve` when it counts as large, else
    by :func:`~solver.bem.high_order.large_models.solve_large` directly); wall and CPU seconds, peak
    resident memory and the capacitance figures (and, with ``reference``, the same bus on twice
    the panels with 16 nodes each)."""
    import time

    import numpy as np

    from solver import solve
    from solver.bem.high_order.large_models import is_large, solve_large
    from solver.bem.high_order.nystrom import NodalSolve
    from solver.bem.high_order.solution import HighOrderSolution

    model = hundred_conductor_bus(columns, rows)
    wall, cpu = time.perf_counter(), time.process_time()
    sol = solve(model) if is_large(model) else solve_large(model)
    assert isinstance(sol, HighOrderSolution)
    out = {
        "bars": columns * rows,
        "unknowns": int(sol.n_unknowns),
        "wall_s": time.perf_counter() - wall,
        "cpu_s": time.process_time() - cpu,
        "stages_s": dict(getattr(sol, "stage_seconds", ())),
        "estimated_relative_error": sol.estimated_relative_error,
        "c11_pF_per_m": float(sol.capacitance_maxwell_F_per_m[0, 0] * 1e12),
        "peak_MB": peak_resident_MB(),
    }
    if reference:
        panels = sol.panels
        assert panels is not None
        fine = CurvedPanels(panels.pieces, panels.piece_index, panels.s0, panels.s1, 16)
        fine = fine.split(np.ones(fine.n_panels, dtype=bool))
        c_fine = NodalSolve(model, fine).capacitance_maxwell_F_per_m()
        c = sol.capacitance_maxwell_F_per_m
        out["reference_unknowns"] = fine.n_nodes
        out["true_relative_error"] = float(np.abs(c - c_fine).max() / np.abs(c_fine).max())
    return out


def _dense_child(columns: int, rows: int) -> dict:
    """Solve the bus in this process the plain way: the low-order mesh at the model's density and
    one dense LU (no fast path, no error estimate); wall and CPU seconds, peak resident memory."""
    import time

    from solver.bem.solve import solve_system
    from solver.bem.system import build_system
    from solver.mesh.panels import MeshSettings, discretize_boundary

    model = hundred_conductor_bus(columns, rows)
    wall, cpu = time.perf_counter(), time.process_time()
    mesh = discretize_boundary(model, MeshSettings.for_density(model.mesh_density))
    sol = solve_system(build_system(model, mesh))
    return {
        "bars": columns * rows,
        "unknowns": int(sol.n_unknowns),
        "wall_s": time.perf_counter() - wall,
        "cpu_s": time.process_time() - cpu,
        "c11_pF_per_m": float(sol.capacitance_maxwell_F_per_m[0, 0] * 1e12),
        "peak_MB": peak_resident_MB(),
    }


def dense_estimate(columns: int, rows: int) -> dict:
    """What the plain dense LU on the low-order mesh (model's density) would need for this bus:
    panels (an upper bound, counted without meshing), peak memory in GB, and whether that fits
    the memory budget (:mod:`solver.mesh.budget`)."""
    from solver.bem.fast_solve import dense_memory_bytes
    from solver.mesh.budget import max_panels
    from solver.mesh.panels import estimate_conductor_panels

    model = hundred_conductor_bus(columns, rows)
    panels, _ = estimate_conductor_panels(model)
    n_rhs = 1 + sum(c.role != "reference" for c in model.conductors)
    return {"bars": columns * rows, "panels": int(panels),
            "would_need_GB": dense_memory_bytes(int(panels) + 1, n_rhs) / 1e9,
            "fits": panels <= max_panels()}


def run_in_child(columns: int, rows: int, mode: str = "solve") -> dict:
    """One bus solve in a fresh Python process (so that its peak memory is its own): ``mode``
    "solve" (:func:`solver.solve`, coarse high-order panels), "reference" (the same and a finer
    solve for the true error) or "dense" (low-order mesh, plain dense LU)."""
    import json
    import subprocess
    import sys

    args = [sys.executable, "-m", "solver.bench.bus", "--child", mode, str(columns), str(rows)]
    return json.loads(subprocess.run(args, check=True, capture_output=True, text=True).stdout)


def _run_child(columns: int, rows: int, reference: bool) -> dict:
    return run_in_child(columns, rows, "reference" if reference else "solve")


def main(argv: list[str] | None = None) -> int:
    """``python -m solver.bench.bus``: the 10 x 10 bus through :func:`solver.solve` (coarse
    high-order panels, one dense in-place solve) with wall and CPU time and peak memory, and
    the 3 x 3 bus against a finer solve (twice the panels, 16 nodes each) for its error."""
    import argparse
    import json

    parser = argparse.ArgumentParser(prog="python -m solver.bench.bus", description=(main.__doc__ or "").splitlines()[0])
    parser.add_argument("--size", type=int, default=10, help="bars per row and column of the large bus")
    parser.add_argument("--small", type=int, default=3, help="bars per row and column of the accuracy check")
    parser.add_argument("--json", action="store_true", help="print the figures as JSON")
    parser.add_argument("--write", metavar="FILE", help="write the large bus as a project file and stop")
    parser.add_argument("--child", nargs=3, help=argparse.SUPPRESS)
    args = parser.parse_args(argv)
    if args.child:
        mode, columns, rows = args.child[0], int(args.child[1]), int(args.child[2])
        result = _dense_child(columns, rows) if mode == "dense" else _solve_child(columns, rows, mode == "reference")
        print(json.dumps(result))
        return 0
    if args.write:
        from solver.io.project_file import save_project

        save_project(hundred_conductor_bus(args.size, args.size), args.write)
        return 0
    small = _run_child(args.small, args.small, True)
    large = _run_child(args.size, args.size, False)
    if args.json:
        print(json.dumps({"small": small, "large": large}, indent=2))
        return 0
    print("Bus of rounded bars in an earthed box, through solver.solve (coarse high-order panels)")
    print(f"{'bars':>5} {'unknowns':>8} {'wall s':>7} {'CPU s':>7} {'peak MB':>8} {'C11 pF/m':>10} {'est. error':>10}")
    for r in (small, large):
        print(f"{r['bars']:5d} {r['unknowns']:8d} {r['wall_s']:7.1f} {r['cpu_s']:7.1f} {r['peak_MB']:8.0f} "
              f"{r['c11_pF_per_m']:10.4f} {r['estimated_relative_error']:10.1e}")
    print(f"  {small['bars']} bars against {small['reference_unknowns']} unknowns (16 nodes, panels halved): "
          f"max relative difference of the capacitance matrix {small['true_relative_error']:.1e}")
    print(f"  stages of the {large['bars']}-bar solve (s): "
          + ", ".join(f"{k} {v:.1f}" for k, v in large["stages_s"].items()))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
