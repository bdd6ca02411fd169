"""Command line: solve a project file and print a summary, JSON or a CSV of the capacitance matrices.

    python -m solver MODEL.json [--json] [--csv FILE] [--density coarse|normal|fine]
    python -m solver DRAWING.dxf --layer BUS=conductor:10kV --layer EPOXY=dielectric:4.4 ...

A drawing (.dxf, .svg) is read with its ``--layer`` map (:mod:`solver.cli.drawing_input`) and
then solved like a project file.

One run reads the options (:func:`solver.cli.options.options_from_args`), solves the model
once, computes one :class:`~solver.cli.report.Report` from the solution
(:func:`~solver.cli.report.build_report`) and prints it with a renderer: the text summary
(:mod:`solver.cli.text`), JSON (:mod:`solver.cli.json_output`) and the CSV of the matrices
(:mod:`solver.cli.csv_output`). Nothing is kept between runs. To print more, give
:func:`main` other ``sections`` or ``json_parts`` (tuples of functions of the report).

Exit status: 0 on success, 2 on bad input (unreadable project file, invalid geometry, any
solver error), with one line on standard error and no traceback.
"""

from __future__ import annotations

import argparse
import json
import os
import sys
from collections.abc import Sequence

from solver.bem.solution import Solution
from solver.bem.solve import solve
from solver.cli.cross_check import add_arguments as add_cross_check_arguments
from solver.cli.csv_output import write_capacitance_csv
from solver.cli.drawing_input import add_arguments as add_drawing_arguments
from solver.cli.drawing_input import load_model
from solver.cli.formatting import format_engineering
from solver.cli.json_output import JSON_PARTS, JsonPart, report_to_json
from solver.cli.options import add_arguments, options_from_args
from solver.cli.report import NO_FIXED_CONDUCTOR, NO_RETURN_PATH, build_report
from solver.cli.text import TEXT_SECTIONS, TextSection, summary_lines
from solver.errors import SolverError
from solver.model.model import MESH_DENSITIES, Model

__all__ = ["build_parser", "format_engineering", "main", "run_solve"]


def build_parser() -> argparse.ArgumentParser:
    """The argument parser of ``python -m solver``."""
    parser = argparse.ArgumentParser(
        prog="edgewise-solve" if sys.argv[0].endswith("edgewise-solve") else "python -m solver",
        description="Solve an Edgewise project file (2-D electrostatics of conductor cross-sections).",
    )
    parser.add_argument("model", metavar="MODEL.json", help="project file to solve, or a drawing (.dxf, .svg) with --layer")
    parser.add_argument("--json", action="store_true", help="print the full result as JSON (SI units)")
    parser.add_argument("--csv", metavar="FILE", help="write the capacitance matrices (pF/m) to FILE")
    parser.add_argument("--density", choices=MESH_DENSITIES, help="mesh density (default: as in the file)")
    add_arguments(parser)
    add_cross_check_arguments(parser)
    add_drawing_arguments(parser)
    return parser


def run_solve(model: Model, tolerance: float | None = None) -> Solution:
    """The solve the command line runs: the operating point, the capacitance matrix and the
    error estimate (whose coarser mesh the hot spots reuse); with ``tolerance``, the
    high-order adaptive solve (see :func:`solver.solve`)."""
    if tolerance is not None:
        return solve(model, tolerance=tolerance)
    return solve(model, estimate_error=True)


def _fail(message: str) -> int:
    print(f"error: {' '.join(message.split())}", file=sys.stderr)
    return 2


def main(
    argv: Sequence[str] | None = None,
    *,
    sections: Sequence[TextSection] = TEXT_SECTIONS,
    json_parts: Sequence[JsonPart] = JSON_PARTS,
) -> int:
    """Run the command line with ``argv`` (default ``sys.argv[1:]``); returns the exit status.

    ``sections`` and ``json_parts`` are the text sections and JSON parts to print (by default
    :data:`~solver.cli.text.TEXT_SECTIONS` and :data:`~solver.cli.json_output.JSON_PARTS`).
    """
    try:
        args = build_parser().parse_args(argv)
    except SystemExit as e:
        return int(e.code or 0)
    try:
        options = options_from_args(args)
        model = load_model(args)
        if args.density:
            model = model.with_mesh_density(args.density)
        if args.csv and not (model.has_return_path and model.signal_names):
            return _fail(f"{args.model}: cannot write {args.csv}: "
                         + (NO_RETURN_PATH if not model.has_return_path else NO_FIXED_CONDUCTOR))
        solution = run_solve(model) if options.tolerance is None else run_solve(model, options.tolerance)
        report = build_report(solution, options)
        if args.json:
            print(json.dumps(report_to_json(report, json_parts), indent=2, allow_nan=False))
        else:
            print("\n".join(summary_lines(report, sections)))
        if args.csv:
            write_capacitance_csv(report, args.csv)
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
