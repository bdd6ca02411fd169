"""``python -m solver.studies``: sweep, search and spread from the command line.

Examples::

    python -m solver.studies sweep sample_geometries/microstrip_on_substrate.json \\
        --vary conductors.trace.shapes.0.width=2:4:5 --figure Z0_ohm --figure eps_eff --out z0.csv
    python -m solver.studies search sample_geometries/microstrip_on_substrate.json \\
        --vary conductors.trace.shapes.0.width --between 1 5 --figure Z0_ohm --target 50
    python -m solver.studies spread sample_geometries/microstrip_on_substrate.json \\
        --vary conductors.trace.shapes.0.width=normal:0.03 --figure Z0_ohm --cases 1000 --dask

Values: ``START:STOP:COUNT`` (evenly spaced, both ends included) or ``V1,V2,...``, in the
project's units. Tables go to ``--out`` (``.csv`` or ``.json``) or, as CSV, to the terminal;
``--plot FILE.svg`` draws the figures against the first parameter (sweep), the solves made
(search) or the histograms (spread), see :mod:`solver.studies.plot`.
A progress bar is drawn on standard error when it is a terminal.
"""

from __future__ import annotations

import argparse
import json
import sys
from collections.abc import Sequence

import numpy as np

from solver.errors import SolverError
from solver.studies.cases import as_model
from solver.studies.figures import FIGURE_WORDS
from solver.studies.plot import histogram_svg, table_plot_svg
from solver.studies.search import search
from solver.studies.spread import parse_distribution, spread
from solver.studies.sweep import sweep
from solver.studies.table import StudyTable


def parse_values(text: str) -> list[float]:
    """``"2:4:5"`` -> [2, 2.5, 3, 3.5, 4]; ``"1,2.5"`` -> [1, 2.5]."""
    try:
        if ":" in text:
            start, stop, count = text.split(":")
            return [float(v) for v in np.linspace(float(start), float(stop), int(count))]
        return [float(v) for v in text.split(",")]
    except ValueError:
        raise SolverError(f"Values '{text}': write START:STOP:COUNT or V1,V2,... (numbers).") from None


def _split_assignment(text: str) -> tuple[str, str]:
    path, sep, value = text.rpartition("=")
    if not sep or not path:
        raise SolverError(f"--vary '{text}': write PATH=VALUES, e.g. conductors.trace.shapes.0.width=2:4:5.")
    return path, value


class ProgressBar:
    """A one-line text progress bar on a stream (drawn only when the stream is a terminal)."""

    def __init__(self, stream=sys.stderr, width: int = 30) -> None:
        self.stream, self.width = stream, width
        self.active = hasattr(stream, "isatty") and stream.isatty()

    def __call__(self, done: int, total: int) -> None:
        if not self.active or total <= 0:
            return
        filled = int(self.width * done / total)
        self.stream.write(f"\r[{'#' * filled}{'.' * (self.width - filled)}] {done}/{total} cases")
        if done >= total:
            self.stream.write("\n")
        self.stream.flush()


def _cluster(args) -> object:
    if args.scheduler:
        return args.scheduler
    if args.dask:
        return {"n_workers": args.workers} if args.workers else "local"
    return None


def _emit(table: StudyTable, out: str | None) -> None:
    if out is None:
        sys.stdout.write(table.to_csv())
    elif out.endswith(".json"):
        table.to_json(out)
    else:
        table.to_csv(out)


def _axis_label(project: str, parameter: str) -> str:
    """The parameter path with the project's length unit (lengths are the usual parameters)."""
    return f"{parameter} (project unit: {as_model(project).unit})"


def _parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(prog="python -m solver.studies", description=__doc__.split("\n\n")[0],
                                epilog="Figures: " + "; ".join(f"{k}: {v}" for k, v in FIGURE_WORDS.items()))
    sub = p.add_subparsers(dest="command", required=True)
    for name, text in (("sweep", "solve on a grid of values"), ("search", "find the value that meets a target"),
                       ("spread", "Monte Carlo tolerance spread")):
        s = sub.add_parser(name, help=text)
        s.add_argument("project", help="project file (.json)")
        s.add_argument("--vary", action="append", required=True,
                       help="sweep: PATH=START:STOP:COUNT or PATH=V1,V2; search: PATH; spread: PATH=normal:STD "
                            "or PATH=uniform:HALF_WIDTH (project units); join paths with + to move them together")
        s.add_argument("--figure", action="append", required=True, help="figure name (repeatable)")
        s.add_argument("--plot", metavar="FILE.svg", help="also draw the results as an SVG plot")
        if name != "search":
            s.add_argument("--out", help="write the table to this .csv or .json file")
            s.add_argument("--dask", action="store_true", help="run on a local Dask cluster of processes")
            s.add_argument("--workers", type=int, help="number of local Dask workers (with --dask)")
            s.add_argument("--scheduler", help="run on an existing Dask cluster at this address (tcp://host:8786)")
        if name == "search":
            s.add_argument("--between", nargs=2, type=float, required=True, metavar=("LOW", "HIGH"))
            s.add_argument("--target", type=float, required=True, help="wanted figure value, SI units")
            s.add_argument("--scan", type=int, default=0, help="interior points to try for a sign change")
            s.add_argument("--method", default="brentq", choices=("brentq", "toms748"))
        if name == "spread":
            s.add_argument("--cases", type=int, default=100)
            s.add_argument("--seed", type=int, default=0)
            s.add_argument("--percentiles", default="5,50,95")
            s.add_argument("--bins", type=int, default=20)
    return p


def main(argv: Sequence[str] | None = None) -> int:
    args = _parser().parse_args(argv)
    bar = ProgressBar()
    try:
        if args.command == "sweep":
            vary = {path: parse_values(v) for path, v in map(_split_assignment, args.vary)}
            table = sweep(args.project, vary, args.figure, cluster=_cluster(args), progress=bar)
            _emit(table, args.out)
            if args.plot:
                table_plot_svg(table, x_label=_axis_label(args.project, table.parameters[0]), path=args.plot)
        elif args.command == "search":
            if len(args.vary) != 1 or len(args.figure) != 1:
                raise SolverError("search varies one --vary PATH to meet one --figure; give exactly one of each.")
            found = search(args.project, args.vary[0], args.figure[0], args.target, tuple(args.between),
                           scan=args.scan, method=args.method, progress=bar)
            print(json.dumps({"parameter": found.parameter, "value": found.value, "figure": found.figure,
                              "figure_value": found.figure_value, "target": found.target,
                              "parameter_tolerance": found.parameter_tolerance, "solves": found.n_solves}, indent=1))
            if args.plot:
                table_plot_svg(found.evaluations, x_label=_axis_label(args.project, found.parameter), path=args.plot)
        else:
            dists = {path: parse_distribution(v) for path, v in map(_split_assignment, args.vary)}
            spread_of = spread(args.project, dists, args.figure, n_cases=args.cases, seed=args.seed,
                               percentiles=parse_values(args.percentiles), bins=args.bins, cluster=_cluster(args),
                               progress=bar)
            if args.out:
                _emit(spread_of.table, args.out)
            if args.plot:
                histogram_svg(spread_of.histograms, path=args.plot)
            print(json.dumps({"seed": spread_of.seed, "cases": len(spread_of.table), "failed": spread_of.n_failed,
                              "nominal": spread_of.nominal, "percentiles": spread_of.percentiles,
                              "sensitivities": spread_of.sensitivities, "contributions": spread_of.contributions,
                              "histograms": {f: {"counts": c.tolist(), "edges": e.tolist()}
                                             for f, (c, e) in spread_of.histograms.items()}}, indent=1))
    except SolverError as e:
        print(f"error: {e}", file=sys.stderr)
        return 2
    except OSError as e:
        print(f"error: cannot write {getattr(e, 'filename', None) or 'the output'}: {e.strerror or e}", file=sys.stderr)
        return 2
    return 0
