"""Command line: solve a project file and print a summary, JSON or a CSV of the capacitance matrices.

    python -m solver MODEL.json [--json] [--csv FILE] [--density coarse|normal|fine]

The printed summary is built from :data:`SUMMARY_SECTIONS`, a list of functions that each take
a :class:`~solver.solution.Solution` and return lines; the JSON result is the union of the
dictionaries returned by :data:`JSON_PARTS`. Other modules extend the output by appending their
own section or part (for example transmission-line figures or hot-spot margins)::

    from solver import cli
    cli.SUMMARY_SECTIONS.append(my_section)       # my_section(solution) -> list[str]
    cli.JSON_PARTS.append(my_json_part)           # my_json_part(solution) -> dict

Exit status: 0 on success, 2 on bad input (unreadable project file, invalid geometry, any
solver error), with one line on standard error and no traceback.
"""

from __future__ import annotations

import argparse
import csv
import json
import math
import os
import sys
from typing import Callable, Sequence

import numpy as np

from solver.errors import NoReferenceError, SolverError
from solver.model.model import MESH_DENSITIES, Model
from solver.io.project_file import load_project
from solver.bem.solution import Solution
from solver.figures.equilibrium import equivalent_radius_m
from solver.bem.solve import solve
from solver.cli import hot_spots as hotspot_cli
from solver.cli import line_figures as transmission_line_cli

Section = Callable[[Solution], list[str]]
JsonPart = Callable[[Solution], dict]

#: Potential magnitude (V) from which the summary adds the high-voltage caution.
HIGH_VOLTAGE_V = 1000.0

NO_RETURN_PATH = (
    "No capacitance matrix: the model has neither a reference conductor nor a ground plane, and "
    "there is no 2-D capacitance without a return path. Set one conductor's role to 'reference' "
    "or add a ground plane."
)
NO_FIXED_CONDUCTOR = (
    "No capacitance matrix: no conductor has a fixed potential, so the matrix has no rows. "
    "Set at least one conductor's role to 'fixed'."
)

_PREFIXES = [(1e12, "T"), (1e9, "G"), (1e6, "M"), (1e3, "k"), (1.0, ""), (1e-3, "m"), (1e-6, "u"),
             (1e-9, "n"), (1e-12, "p")]


def format_engineering(value: float, unit: str, digits: int = 3) -> str:
    """``value`` with an SI prefix and ``digits`` significant figures, e.g. "2.31 MV/m"."""
    if not math.isfinite(value):
        return f"{value} {unit}"
    if value == 0:
        return f"0 {unit}"
    for factor, prefix in _PREFIXES:
        if abs(value) >= factor * (1 - 0.5 * 10.0 ** (1 - digits)):
            break
    return f"{value / factor:.{digits}g} {prefix}{unit}"


def capacitance_note(solution: Solution) -> str | None:
    """Why the solution has no capacitance matrix, or None when it has one."""
    if not solution.model.has_return_path:
        return NO_RETURN_PATH
    if not solution.signal_names:
        return NO_FIXED_CONDUCTOR
    return None


def _table(headers: Sequence[str], rows: Sequence[Sequence[str]], indent: str = "  ") -> list[str]:
    """Right-aligned text table (first column left-aligned)."""
    widths = [max(len(str(r[i])) for r in [headers, *rows]) for i in range(len(headers))]

    def line(cells: Sequence[str]) -> str:
        first = str(cells[0]).ljust(widths[0])
        rest = [str(c).rjust(w) for c, w in zip(cells[1:], widths[1:])]
        return (indent + "  ".join([first, *rest])).rstrip()

    return [line(headers), *(line(r) for r in rows)]


def _in_unit(model: Model, length_m: float) -> str:
    return f"{length_m / model.metres_per_unit:.4g}"


# ---- summary sections -----------------------------------------------------------------------
def header_section(solution: Solution) -> list[str]:
    """Title, description, unit, medium and mesh size."""
    m = solution.model
    lines = [m.title or "(untitled model)"]
    if m.description:
        lines.append(m.description)
    lines += [
        "",
        f"Unit of length: {m.unit}    background eps_r: {m.background_eps_r:g}    "
        f"mesh: {m.mesh_density}, {solution.mesh.n_panels} panels",
        f"Ground plane: y = {m.ground_plane.y:g} {m.unit}" if m.ground_plane is not None else "Ground plane: none",
        "Figures are per metre of a long, uniform cross-section (2-D electrostatics).",
    ]
    return lines


def conductors_section(solution: Solution) -> list[str]:
    """Each conductor's role, potential and net charge per unit length."""
    rows = [
        [c.name, c.role, f"{v:.6g}", f"{q * 1e12:.6g}"]
        for c, v, q in zip(solution.model.conductors, solution.conductor_potentials_V,
                           solution.conductor_charges_C_per_m)
    ]
    return ["Conductors", *_table(["name", "role", "potential (V)", "net charge (pC/m)"], rows)]


def _matrix_lines(title: str, names: Sequence[str], matrix_F_per_m: np.ndarray) -> list[str]:
    rows = [[name, *(f"{x * 1e12:.5g}" for x in row)] for name, row in zip(names, matrix_F_per_m)]
    return [title, *_table(["pF/m", *names], rows)]


def capacitance_section(solution: Solution) -> list[str]:
    """Maxwell and mutual capacitance matrices in pF/m, or why there are none."""
    note = capacitance_note(solution)
    if note is not None:
        return [note]
    names = solution.signal_names
    lines = _matrix_lines("Capacitance matrix, Maxwell form (pF/m)", names, solution.capacitance_maxwell_F_per_m)
    lines.append("")
    lines += _matrix_lines(
        "Capacitance matrix, mutual form (pF/m): diagonal to the reference, off-diagonal between conductors",
        names, solution.capacitance_mutual_F_per_m,
    )
    return lines


def peak_field_section(solution: Solution) -> list[str]:
    """Largest surface field of each conductor, where it sits, and a note at sharp corners."""
    m = solution.model
    rows, corner_exponents = [], {}
    for p in solution.peak_surface_fields:
        x, y = p.location_m
        mark = " *" if p.at_sharp_corner else ""
        rows.append([p.conductor, format_engineering(p.field_V_per_m, "V/m") + mark,
                     f"({_in_unit(m, x)}, {_in_unit(m, y)}) {m.unit}"])
        if p.at_sharp_corner:
            corner_exponents.setdefault(p.corner_exponent, []).append(p.conductor)
    notes = []
    for exponent, names in corner_exponents.items():
        law = "" if exponent is None else f" (charge density ~ r^{exponent:.2f})"
        notes.append(
            f"  * At a sharp corner or edge{law}: {', '.join(names)}. The 2-D field is singular there, so "
            "this value grows as the mesh is refined; round the corner to get a finite figure."
        )
    return ["Peak surface field (operating point)", *_table(["conductor", "|E| max", "at"], rows), *notes]


def error_section(solution: Solution) -> list[str]:
    """The estimated relative error from the solve on a mesh at half the resolution."""
    err = solution.estimated_relative_error
    if err is None:
        return ["Estimated relative error: not estimated."]
    what = "capacitance matrix" if solution.has_capacitance else "conductor charges"
    coarse = f", against {solution.coarse_mesh_panels} panels" if solution.coarse_mesh_panels else ""
    return [f"Estimated relative error of the {what}: {err:.2g} (change from a mesh at half the resolution{coarse})"]


def equivalent_radii_m(solution: Solution) -> list[float]:
    """Equivalent radius (logarithmic capacity) of each conductor alone, metres, model order."""
    return [equivalent_radius_m(solution.model, [name]) for name in solution.conductor_names]


def equivalent_radius_section(solution: Solution) -> list[str]:
    """Each conductor's equivalent radius, in the model's unit."""
    m = solution.model
    rows = [[name, f"{r / m.metres_per_unit:.5g} {m.unit}"]
            for name, r in zip(solution.conductor_names, equivalent_radii_m(solution))]
    return ["Equivalent radius (logarithmic capacity) of each conductor alone",
            *_table(["conductor", "radius"], rows)]


def caution_section(solution: Solution) -> list[str]:
    """The high-voltage caution, when any conductor is at 1 kV or more."""
    if not np.any(np.abs(solution.conductor_potentials_V) >= HIGH_VOLTAGE_V):
        return []
    return [
        "High voltage: compare peak fields with the strength of air (about 3 MV/m in a uniform field at sea "
        "level, lower at altitude) with a generous margin. This tool does not determine clearances or creepage, "
        "is no substitute for the applicable codes and standards or for review by a qualified engineer, and work "
        "on energised equipment is for qualified persons only (see SAFETY.md).",
    ]


#: Functions building the printed summary, in order; each returns lines (an empty list to skip).
SUMMARY_SECTIONS: list[Section] = [
    header_section,
    conductors_section,
    capacitance_section,
    peak_field_section,
    error_section,
    equivalent_radius_section,
    hotspot_cli.hot_spot_section,
    transmission_line_cli.dielectric_section,
    transmission_line_cli.transmission_line_section,
    caution_section,
]


def summary_lines(solution: Solution) -> list[str]:
    """The whole printed summary: every section of :data:`SUMMARY_SECTIONS`, blank-line separated."""
    lines: list[str] = []
    for section in SUMMARY_SECTIONS:
        part = section(solution)
        if part:
            if lines:
                lines.append("")
            lines += part
    return lines


# ---- JSON ------------------------------------------------------------------------------------
def _model_json(solution: Solution) -> dict:
    m = solution.model
    return {
        "title": m.title,
        "unit": m.unit,
        "mesh_density": m.mesh_density,
        "background_eps_r": m.background_eps_r,
        "ground_plane_y_m": None if m.ground_plane is None else m.ground_plane.y * m.metres_per_unit,
        "n_panels": solution.mesh.n_panels,
        "conductors": list(solution.conductor_names),
        "conductor_roles": [c.role for c in m.conductors],
        "signal_conductors": list(solution.signal_names),
    }


def _capacitance_json(solution: Solution) -> dict:
    note = capacitance_note(solution)
    if note is None:
        try:
            maxwell = solution.capacitance_maxwell_F_per_m.tolist()
            mutual = solution.capacitance_mutual_F_per_m.tolist()
        except NoReferenceError as e:  # the solution knows better than our note
            maxwell = mutual = None
            note = str(e)
    else:
        maxwell = mutual = None
    return {"capacitance_maxwell_F_per_m": maxwell, "capacitance_mutual_F_per_m": mutual, "capacitance_note": note}


def _operating_point_json(solution: Solution) -> dict:
    peaks = solution.peak_surface_fields
    return {
        "conductor_potentials_V": [float(v) for v in solution.conductor_potentials_V],
        "conductor_charges_C_per_m": [float(q) for q in solution.conductor_charges_C_per_m],
        "potential_at_infinity_V": float(solution.phi_inf_V),
        "peak_surface_field_V_per_m": [p.field_V_per_m for p in peaks],
        "peak_surface_field_location_m": [list(p.location_m) for p in peaks],
        "peak_at_sharp_corner": [p.at_sharp_corner for p in peaks],
        "peak_corner_exponent": [p.corner_exponent for p in peaks],
    }


def _figures_json(solution: Solution) -> dict:
    return {
        "equivalent_radius_m": equivalent_radii_m(solution),
        "estimated_relative_error": solution.estimated_relative_error,
        "coarse_mesh_panels": solution.coarse_mesh_panels,
    }


#: Functions building the JSON result; their dictionaries are merged in order.
JSON_PARTS: list[JsonPart] = [_model_json, _capacitance_json, _operating_point_json, _figures_json,
                              hotspot_cli.hot_spot_json, transmission_line_cli.transmission_line_json]


def result_to_json(solution: Solution) -> dict:
    """The full result as a JSON-ready dict; every key names its SI unit (see :data:`JSON_PARTS`)."""
    out: dict = {}
    for part in JSON_PARTS:
        out.update(part(solution))
    return out


# ---- CSV -------------------------------------------------------------------------------------
def write_capacitance_csv(solution: Solution, path: str) -> None:
    """Write both capacitance matrices (pF/m) to ``path``: columns "matrix (pF/m)", "conductor", names."""
    names = list(solution.signal_names)
    with open(path, "w", newline="", encoding="utf-8") as f:
        writer = csv.writer(f)
        writer.writerow(["matrix (pF/m)", "conductor", *names])
        for label, matrix in (("maxwell", solution.capacitance_maxwell_F_per_m),
                              ("mutual", solution.capacitance_mutual_F_per_m)):
            for name, row in zip(names, matrix):
                writer.writerow([label, name, *(f"{x * 1e12:.10g}" for x in row)])


# ---- entry point -----------------------------------------------------------------------------
def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="edgewise-solve" if sys.argv[0].endswith("edgewise-solve") else "python -m solver",
        description="Solve an Edgewise project file (2-D electrostatics of conductor cross-sections).",
    )
    parser.add_argument("model", metavar="MODEL.json", help="project file to solve")
    parser.add_argument("--json", action="store_true", help="print the full result as JSON (SI units)")
    parser.add_argument("--csv", metavar="FILE", help="write the capacitance matrices (pF/m) to FILE")
    parser.add_argument("--density", choices=MESH_DENSITIES, help="mesh density (default: as in the file)")
    hotspot_cli.add_arguments(parser)
    return parser


def run_solve(model: Model) -> Solution:
    """The solve the command line runs (one place to swap in another solver)."""
    return solve(model)


def _fail(message: str) -> int:
    print(f"error: {' '.join(message.split())}", file=sys.stderr)
    return 2


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line with ``argv`` (default ``sys.argv[1:]``); returns the exit status."""
    try:
        args = build_parser().parse_args(argv)
    except SystemExit as e:
        return int(e.code or 0)
    try:
        hotspot_cli.configure(args)
        model = load_project(args.model)
        if args.density:
            model = model.with_mesh_density(args.density)
        if args.csv and not (model.has_return_path and model.signal_names):
            return _fail(f"{args.model}: cannot write {args.csv}: "
                         + (NO_RETURN_PATH if not model.has_return_path else NO_FIXED_CONDUCTOR))
        solution = run_solve(model)
        if args.json:
            print(json.dumps(result_to_json(solution), indent=2, allow_nan=False))
        else:
            print("\n".join(summary_lines(solution)))
        if args.csv:
            write_capacitance_csv(solution, args.csv)
    except SolverError as e:
        text = str(e)
        return _fail(text if text.startswith(str(args.model)) else f"{args.model}: {text}")
    except MemoryError:
        return _fail(f"{args.model}: not enough memory for this model at this mesh density; "
                     "choose a coarser mesh (--density coarse) or move nearly touching parts apart")
    except RecursionError:
        return _fail(f"{args.model}: the file is nested too deeply to read")
    except BrokenPipeError:  # output piped into a program that stopped reading (e.g. head)
        sys.stdout = open(os.devnull, "w")
        return 0
    except OSError as e:
        return _fail(f"cannot write {getattr(e, 'filename', None) or args.csv}: {e.strerror or e}")
    return 0


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
