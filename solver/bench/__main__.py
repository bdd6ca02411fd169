"""Benchmark: ``python -m solver.bench [--json] [--quick]``, one run, side by side.

1. Accuracy per unknown (:mod:`solver.bench.accuracy`): the coaxial line, the two-wire line,
   the unit square and the equilateral triangle against their closed forms, by the high-order
   solver at a ladder of tolerances and by the plain low-order solver (straight panels, one
   dense LU) at a ladder of mesh levels.
2. Dielectric cases (:mod:`solver.bench.dielectric`): microstrip and two-layer coax by the
   low-order solver (the high-order one declines regions of other permittivity).
3. Interactive timings on the busbar sample, with the 512 x 512 potential-and-field map
   (:func:`solver.bench.speed.interactive`).
4. The 100-conductor bus (:mod:`solver.bench.bus`) through :func:`solver.solve` (coarse
   high-order panels): wall and CPU seconds and peak memory of a child process. As the
   baseline, a smaller bus by both that path and the plain low-order dense LU, measured alike,
   and for the full bus what the plain dense LU would need (it does not fit).

``--json`` prints one JSON document of all of it instead of the tables; ``--quick`` skips the
bus and shortens the accuracy ladders. Times on a shared machine are noisy: compare ratios and
run twice before believing a change. Performance is measured here, never in timed tests.
"""

from __future__ import annotations

import argparse
import contextlib
import io
import json
import os
import time
from collections.abc import Callable

from solver.bench import accuracy, bus

PARTS = ("accuracy", "dielectric", "interactive", "bus")
DIELECTRIC_LEVELS = (0.5, 1.0, 2.0)
QUICK_TOLERANCES = (1e-6, 1e-10)
QUICK_LEVELS = (1.0,)


def accuracy_part(tolerances: tuple[float, ...], levels: tuple[float, ...]) -> dict:
    """Accuracy rows of both solvers on the four closed-form cases."""
    return {"tolerances": list(tolerances), "levels": list(levels),
            "rows": accuracy.accuracy_rows(tolerances, levels)}


def dielectric_part(levels: tuple[float, ...]) -> dict:
    """The dielectric cases (:mod:`solver.bench.dielectric`; the high-order solver declines them,
    so these are the low-order solver's figures) as the lines it prints."""
    from solver.bench import dielectric

    text = io.StringIO()
    with contextlib.redirect_stdout(text):
        dielectric.run(list(levels))
    return {"levels": list(levels), "lines": [line for line in text.getvalue().splitlines() if line.strip()]}


def interactive_part() -> dict:
    """The interactive timings: what :func:`solver.bench.speed.interactive` prints (``lines``)
    and, when it returns them, its figures (``figures``)."""
    from solver.bench.speed import interactive

    timings: Callable[[], object] = interactive  # prints its table; may also return its figures
    text = io.StringIO()
    with contextlib.redirect_stdout(text):
        figures = timings()
    return {"lines": [line for line in text.getvalue().splitlines() if line.strip()],
            "figures": figures if isinstance(figures, dict) else None}


def bus_part(size: int, small: int) -> dict:
    """The bus through :func:`solver.solve`, and the plain dense LU as the baseline."""
    large = bus.run_in_child(size, size, "solve")
    small_solve = bus.run_in_child(small, small, "solve")
    small_need = bus.dense_estimate(small, small)
    small_dense = bus.run_in_child(small, small, "dense") if small_need["fits"] else None
    large_need = bus.dense_estimate(size, size)
    large_dense = bus.run_in_child(size, size, "dense") if large_need["fits"] else None
    ratio = None if small_dense is None else small_dense["wall_s"] / small_solve["wall_s"]
    return {"bus": large, "small_bus": small_solve, "small_bus_dense_lu": small_dense,
            "small_bus_dense_lu_needs": small_need, "bus_dense_lu": large_dense, "bus_dense_lu_needs": large_need,
            "small_bus_dense_over_high_order_wall": ratio}


def _row(label: str, r: dict) -> str:
    est = r.get("estimated_relative_error")
    return (f"{label:>30} {r['unknowns']:9d} {r['wall_s']:8.1f} {r['cpu_s']:8.1f} {r['peak_MB']:8.0f} "
            f"{r['c11_pF_per_m']:10.4f} {'' if est is None else format(est, '.1e'):>10}")


def bus_lines(part: dict) -> list[str]:
    """The bus table."""
    lines = ["", "Bus of rounded bars in an earthed box (each solve in its own process; peak = its resident memory)",
             f"{'case':>30} {'unknowns':>9} {'wall s':>8} {'CPU s':>8} {'peak MB':>8} {'C11 pF/m':>10} {'est. error':>10}"]
    for key, how in (("small_bus", "solve()"), ("small_bus_dense_lu", "plain dense LU"),
                     ("bus", "solve()"), ("bus_dense_lu", "plain dense LU")):
        r = part[key]
        if r is not None:
            lines.append(_row(f"{r['bars']} bars, {how}", r))
        else:
            need = part[key + "_needs"]
            lines.append(f"{need['bars']:>7} bars, plain dense LU: not run; would need {need['would_need_GB']:.1f} GB "
                         f"for {need['panels']} panels (over the memory budget)")
    if part["small_bus_dense_over_high_order_wall"] is not None:
        lines.append(f"  {part['small_bus']['bars']} bars: plain dense LU / solve() wall time "
                     f"{part['small_bus_dense_over_high_order_wall']:.1f}")
    stages = part["bus"].get("stages_s") or {}
    if stages:
        lines.append(f"  stages of the {part['bus']['bars']}-bar solve (s): "
                     + ", ".join(f"{k} {v:.1f}" for k, v in stages.items()))
    return lines


def machine() -> dict:
    """What the figures were measured on (the machine may be shared)."""
    load = os.getloadavg() if hasattr(os, "getloadavg") else None
    return {"cpu_count": os.cpu_count(), "load_average_1_5_15_min": None if load is None else list(load),
            "started_utc": time.strftime("%Y-%m-%dT%H:%M:%SZ", time.gmtime())}


def run(parts: tuple[str, ...], tolerances: tuple[float, ...], levels: tuple[float, ...],
        dielectric_levels: tuple[float, ...], size: int, small: int, as_json: bool) -> dict:
    """Run the asked parts; print the tables as they finish (unless ``as_json``); return the document."""
    doc: dict = {"machine": machine()}
    for name in PARTS:
        if name not in parts:
            doc[name] = {"skipped": "not asked for (--quick skips the bus; --only picks parts)"}
            continue
        if name == "accuracy":
            doc[name] = accuracy_part(tolerances, levels)
            lines = accuracy.table_lines(doc[name]["rows"])
            lines.insert(1, "(high-order: the adaptive solver to each tolerance; low-order: straight panels and one "
                            "plain dense LU at each mesh level)")
        elif name == "dielectric":
            doc[name] = dielectric_part(dielectric_levels)
            lines = ["", *doc[name]["lines"]]
        elif name == "interactive":
            doc[name] = interactive_part()
            lines = ["", *doc[name]["lines"]]
        else:
            doc[name] = bus_part(size, small)
            lines = bus_lines(doc[name])
        if not as_json:
            print("\n".join(lines), flush=True)
    return doc


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(prog="python -m solver.bench", description=__doc__.splitlines()[0])
    parser.add_argument("--json", action="store_true", help="print one JSON document of every figure")
    parser.add_argument("--quick", action="store_true", help="skip the bus and shorten the accuracy ladders")
    parser.add_argument("--only", choices=PARTS, action="append", help="run only this part (repeatable)")
    parser.add_argument("--tolerances", type=float, nargs="+", help="high-order tolerances of the accuracy part")
    parser.add_argument("--levels", type=float, nargs="+",
                        help="low-order mesh levels of the accuracy and dielectric parts (normal = 1)")
    parser.add_argument("--bus-size", type=int, default=10, help="bars per row and column of the large bus")
    parser.add_argument("--small-bus-size", type=int, default=3, help="bars per row and column of the baseline bus")
    args = parser.parse_args(argv)
    parts = tuple(args.only) if args.only else tuple(p for p in PARTS if not (args.quick and p == "bus"))
    tolerances = tuple(args.tolerances or (QUICK_TOLERANCES if args.quick else accuracy.TOLERANCES))
    levels = tuple(args.levels or (QUICK_LEVELS if args.quick else accuracy.LEVELS))
    dielectric_levels = tuple(args.levels or (QUICK_LEVELS if args.quick else DIELECTRIC_LEVELS))
    doc = run(parts, tolerances, levels, dielectric_levels, args.bus_size, args.small_bus_size, args.json)
    if args.json:
        print(json.dumps(doc, indent=2, allow_nan=False))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
