"""The command line's CSV output: both capacitance matrices in pF/m."""

from __future__ import annotations

import csv

from solver.cli.report import Report


def write_capacitance_csv(report: Report, path: str) -> None:
    """Write both capacitance matrices (pF/m) to ``path``: columns "matrix (pF/m)", "conductor", names."""
    solution = report.solution
    names = list(solution.signal_names)
    with open(path, "w", newline="", encoding="utf-8") as f:
        writer = csv.writer(f)
        writer.writerow(["matrix (pF/m)", "conductor", *names])
        for label, matrix in (("maxwell", solution.capacitance_maxwell_F_per_m),
                              ("mutual", solution.capacitance_mutual_F_per_m)):
            for name, row in zip(names, matrix):
                writer.writerow([label, name, *(f"{x * 1e12:.10g}" for x in row)])
