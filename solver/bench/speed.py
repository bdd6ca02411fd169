"""Interactive timings (run by ``python -m solver.bench``, or alone as ``python -m solver.bench.speed``).

* the busbar sample (sample_geometries/busbar_enclosure.json, normal density): a full solve,
  a potential-only re-solve (:meth:`Solution.with_potentials`), a geometry edit re-solved
  (L1 moved 1 mm) afresh and by :class:`GeometryEditSolver` (first edit, unprepared and after
  :meth:`GeometryEditSolver.prepare` as the desktop program runs it in idle time, then drag steps
  with low-rank blocks and, for the ratio, with the closed-form blocks of the earlier code),
  the 512 x 512 potential-and-field map (grid sums, :mod:`solver.bem.grid_sums`, and the
  point-by-point sums it replaced, for the ratio), and the solver's part of click-to-drawn in
  the desktop program: the first edit after a fresh solve and a drag step, each re-solved
  plus its 120 x 120 map (what the window draws first), the same after an edit solved
  afresh, then the figures that follow (error estimate, field lines, equivalent radii).

The 100-conductor bus is in :mod:`solver.bench.bus`. Click-to-drawn in the desktop program
itself (the real window driven offscreen, the drawing timed too) is ``python -m app.bench_window``
(the solver does not import Qt).

Wall-clock times on a shared machine are noisy: compare ratios and run twice.
"""

from __future__ import annotations

import argparse
import time
from pathlib import Path

import numpy as np

from solver.bem.geometry_update import GeometryEditSolver
from solver.bem.solve import solve, with_error_estimate
from solver.figures.equilibrium import equivalent_radius_m
from solver.figures.field_lines import evaluate_on_grid, trace_field_lines
from solver.io.project_file import load_project
from solver.model.model import Rectangle

SAMPLE = Path(__file__).resolve().parents[2] / "sample_geometries" / "busbar_enclosure.json"


def _best(f, repeat: int) -> float:
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        f()
        times.append(time.perf_counter() - t0)
    return min(times)


def _best_with_cpu(f, repeat: int) -> tuple[float, float]:
    """Least wall-clock and least process CPU seconds of ``repeat`` calls of ``f``."""
    walls, cpus = [], []
    for _ in range(repeat):
        t0, c0 = time.perf_counter(), time.process_time()
        f()
        walls.append(time.perf_counter() - t0)
        cpus.append(time.process_time() - c0)
    return min(walls), min(cpus)


def interactive() -> None:
    """Print the busbar-sample timings (wall clock and process CPU; least of a few runs)."""
    model = load_project(SAMPLE)
    t0 = time.perf_counter()
    sol = solve(model, estimate_error=False)
    t_solve = time.perf_counter() - t0
    t_pot = _best(lambda: sol.with_potentials({"L1": 12e3, "L2": -6e3}), 20)
    moved = _with_l1_at(model, -39.0)
    t_edit = _best(lambda: solve(moved, estimate_error=False), 2)
    (t_first_edit, c_first_edit), drag_low, drag_dense, bordered, first_dense = _drag_steps(model)
    t_prepare, (t_prepared, c_prepared) = _prepared_first_edit(model)
    near_first, near_long, near_short = _steps_past_l2(model)
    x = np.linspace(-0.16, 0.16, 512)
    y = np.linspace(-0.11, 0.11, 512)
    t0, c0 = time.perf_counter(), time.process_time()
    grid = evaluate_on_grid(sol, x, y)
    t_map, c_map = time.perf_counter() - t0, time.process_time() - c0
    t_map_again, c_map_again = _best_with_cpu(lambda: evaluate_on_grid(sol, x + 1e-4, y), 3)  # kernels cached
    xx, yy = np.meshgrid(x, y)
    t0 = time.perf_counter()
    sol.potential_and_field(np.column_stack([xx.ravel(), yy.ravel()]))
    t_map_points = time.perf_counter() - t0
    t_first, t_rest = _click_to_drawn(moved)
    (t_click_one, c_click_one), (t_click_drag, c_click_drag) = _click_while_dragging(model)
    print(f"\nbusbar sample, normal density ({sol.mesh.n_panels} panels, {sol.n_unknowns} unknowns); "
          "wall clock, CPU of this process in brackets")
    print(f"  full solve (no error estimate)      {t_solve:9.3f} s")
    print(f"  potential-only re-solve             {t_pot * 1e3:9.3f} ms  (goal < 10 ms)")
    print(f"  geometry edit re-solved (L1 +1 mm)  {t_edit:9.3f} s   (goal < 0.1 s; a fresh solve)")
    how = "solves with the others' block from the fresh solve's factors" if bordered else "factorises the others' block"
    print(f"    first edit of L1, GeometryEdit    {t_first_edit:9.3f} s   [{c_first_edit:.3f}] ({how})")
    print(f"      made ready in idle time first   {t_prepared:9.3f} s   [{c_prepared:.3f}] (goal < 0.1 s; "
          f"GeometryEditSolver.prepare after the fresh solve took {t_prepare:.3f} s, as the desktop program "
          "does while the results are looked at)")
    print(f"      same edit, closed-form blocks   {first_dense[0]:9.3f} s   [{first_dense[1]:.3f}] (factorises "
          f"the others' block; CPU ratio {first_dense[1] / c_first_edit:.1f})")
    print(f"    a further drag step of L1         {drag_low[0]:9.3f} s   [{drag_low[1]:.3f}] (goal < 0.1 s; "
          "low-rank blocks, own block reused)")
    print(f"      same step, closed-form blocks   {drag_dense[0]:9.3f} s   [{drag_dense[1]:.3f}] (the earlier "
          f"code; CPU ratio {drag_dense[1] / drag_low[1]:.1f})")
    print(f"    drag steps past L2 (20 mm snap)   {near_first:9.3f} s   (the first to reach it: its panels exact, "
          f"their columns of A_PP^-1 solved); {near_long:.3f} s a further 20 mm (a new disc); "
          f"{near_short:.3f} s a 1 mm step (the same disc)")
    print(f"  512 x 512 potential and field map   {t_map:9.3f} s   [{c_map:.3f}] (goal < 0.3 s; "
          f"{np.isfinite(grid.potential_V).sum()} points outside metal)")
    print(f"    again, grid shifted (same steps)  {t_map_again:9.3f} s   [{c_map_again:.3f}] (the lattice "
          "kernels are reused)")
    print(f"    same nodes point by point         {t_map_points:9.3f} s   (FMM above a size; ratio "
          f"{t_map_points / t_map:.1f})")
    print(f"  click-to-drawn, solver part         {t_click_one:9.3f} s   [{c_click_one:.3f}] (goal < 0.3 s: "
          "first edit of L1 after a fresh solve and its 120 x 120 map, as the desktop program does)")
    print(f"    a drag step and its map           {t_click_drag:9.3f} s   [{c_click_drag:.3f}]")
    print(f"    after an edit solved afresh       {t_first:9.3f} s   (edited model solved, 120 x 120 map)")
    print(f"  figures after the drawing           {t_rest:9.3f} s   (error estimate, field lines, "
          "equivalent radii)")
    print("  click-to-drawn in the desktop program itself (the window driven offscreen, solver part and "
          "drawing apart): python -m app.bench_window")


def _drag_steps(model):
    """(wall, CPU) seconds of the first edit of L1 by :class:`GeometryEditSolver`, and of a
    further 1 mm step of a drag with low-rank blocks and with closed-form blocks (least of
    three steps each; the solves with the block of L2 and the enclosure are set up at the
    first step and reused after), whether the first edit was bordered, and (wall, CPU) of
    the first edit with closed-form blocks."""
    out = []
    bordered = False
    for low_rank in (True, False):
        edits = GeometryEditSolver(low_rank=low_rank)
        edits.solve(model)
        t0, c0 = time.perf_counter(), time.process_time()
        edits.solve(_with_l1_at(model, -39.0))
        first = (time.perf_counter() - t0, time.process_time() - c0)
        bordered = bordered or edits.bordered
        steps = []
        for k in range(2, 6):
            t0, c0 = time.perf_counter(), time.process_time()
            edits.solve(_with_l1_at(model, -40.0 + k))
            steps.append((time.perf_counter() - t0, time.process_time() - c0))
            assert edits.reused_factor and edits.far_blocks == low_rank
        out.append((first, (min(w for w, _ in steps[1:]), min(c for _, c in steps[1:]))))
    return out[0][0], out[0][1], out[1][1], bordered, out[1][0]


def _prepared_first_edit(model) -> tuple[float, tuple[float, float]]:
    """Wall seconds of :meth:`GeometryEditSolver.prepare` after a fresh solve, and (wall, CPU)
    of the first edit of L1 (1 mm) after it (least of three fresh starts each)."""
    preps, walls, cpus = [], [], []
    for _ in range(3):
        edits = GeometryEditSolver()
        edits.solve(model)
        t0 = time.perf_counter()
        ready = edits.prepare()
        preps.append(time.perf_counter() - t0)
        assert "L1" in ready
        t0, c0 = time.perf_counter(), time.process_time()
        edits.solve(_with_l1_at(model, -39.0))
        walls.append(time.perf_counter() - t0)
        cpus.append(time.process_time() - c0)
        assert edits.prepared
    return min(preps), (min(walls), min(cpus))


def _steps_past_l2(model) -> tuple[float, float, float]:
    """Wall seconds of drag steps of L1 next to L2 (least of two drags): the first step to
    come within reach of L2 (L1 from -20 mm to 0), a further 20 mm step (to +20 mm, 10 mm from
    L2) and a 1 mm step after it."""
    runs = []
    for _ in range(2):
        edits = GeometryEditSolver()
        edits.solve(model)
        edits.solve(_with_l1_at(model, -20.0))
        times = []
        for x in (0.0, 20.0, 19.0):
            t0 = time.perf_counter()
            edits.solve(_with_l1_at(model, x))
            times.append(time.perf_counter() - t0)
            assert edits.far_blocks and edits._far is not None and len(edits._far.near)
        runs.append(times)
    first, long_step, short_step = (min(r[k] for r in runs) for k in range(3))
    return first, long_step, short_step


def _with_l1_at(model, x: float):
    return model.with_conductors(tuple(
        c if c.name != "L1" else type(c)(c.name, (Rectangle((x, 0.0), 10.0, 60.0, 3.0),), c.role, c.potential_V)
        for c in model.conductors
    ))


def _map_axes(model, n: int = 120) -> tuple[np.ndarray, np.ndarray]:
    """About n x n nodes over the model with a 35 % margin, metres (as the window's maps)."""
    assert model.bounds() is not None
    x0, y0, x1, y1 = model.bounds()
    pad = 0.35 * max(x1 - x0, y1 - y0)
    side = max(x1 - x0, y1 - y0) + 2 * pad
    cx, cy = 0.5 * (x0 + x1), 0.5 * (y0 + y1)
    axis = np.linspace(-0.5 * side, 0.5 * side, n) * model.metres_per_unit
    return cx * model.metres_per_unit + axis, cy * model.metres_per_unit + axis


def _click_while_dragging(model) -> tuple[tuple[float, float], tuple[float, float]]:
    """(wall, CPU) seconds of what the desktop program computes before it draws an edit
    (:class:`GeometryEditSolver` re-solve and the 120 x 120 map): the first edit of L1 after
    a fresh solve (least of three fresh starts), and a drag step (least of three steps)."""
    walls, cpus = [], []
    for _ in range(3):
        edits = GeometryEditSolver()
        edits.solve(model)
        step = _with_l1_at(model, -39.5)
        t0, c0 = time.perf_counter(), time.process_time()
        evaluate_on_grid(edits.solve(step), *_map_axes(step))
        walls.append(time.perf_counter() - t0)
        cpus.append(time.process_time() - c0)
    first = (min(walls), min(cpus))
    walls, cpus = [], []
    for k in range(3):
        step = _with_l1_at(model, -39.0 + 0.5 * k)
        t0, c0 = time.perf_counter(), time.process_time()
        evaluate_on_grid(edits.solve(step), *_map_axes(step))
        walls.append(time.perf_counter() - t0)
        cpus.append(time.process_time() - c0)
    return first, (min(walls), min(cpus))


def _click_to_drawn(model) -> tuple[float, float]:
    """Seconds for what the desktop program draws first after an edit solved afresh (solve
    without the error estimate, then the potential and field map on about 120 x 120 nodes
    over the model with a 35 % margin, as the window does), and for the figures it finishes after."""
    t0 = time.perf_counter()
    sol = solve(model, estimate_error=False)
    evaluate_on_grid(sol, *_map_axes(model))
    t_first = time.perf_counter() - t0
    t0 = time.perf_counter()
    sol = with_error_estimate(sol)
    trace_field_lines(sol, 48)
    for name in model.conductor_names:
        equivalent_radius_m(sol, [name])
    return t_first, time.perf_counter() - t0


def run() -> None:
    """The interactive timings (the 100-conductor bus is run by ``python -m solver.bench``, see
    :mod:`solver.bench.bus`)."""
    interactive()


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(prog="python -m solver.bench.speed", description=__doc__.splitlines()[0])
    parser.parse_args(argv)
    run()
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
