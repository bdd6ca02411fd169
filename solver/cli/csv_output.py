"""The CSV layout of the capacitance matrices, shared by the command line and the desktop program.

One block per matrix: a header row with the matrix's name and unit followed by the conductor
names, one row per conductor (its name first), and an empty row after the block::

    Maxwell capacitance matrix (pF/m),a,b
    a,21.3,-4.1
    b,-4.1,19.8

    Mutual capacitance matrix (pF/m),a,b
    ...

A spreadsheet shows each block as a small table; ``csv.reader`` splits the blocks at the
empty rows. Values carry 10 significant figures (data, not display).
"""

from __future__ import annotations

import csv
from collections.abc import Sequence

import numpy as np

from solver.cli.report import Report

#: Titles of the blocks, in order, with the unit in the header.
MAXWELL_TITLE = "Maxwell capacitance matrix (pF/m)"
MUTUAL_TITLE = "Mutual capacitance matrix (pF/m)"
PF_PER_M = 1e-12


def capacitance_csv_rows(names: Sequence[str], maxwell_F_per_m: np.ndarray,
                         mutual_F_per_m: np.ndarray) -> list[list[str]]:
    """The rows of the CSV layout (see the module docstring) for both matrices, in pF/m.

    Parameters
    ----------
    names : sequence of str
        Signal conductor names, in matrix order.
    maxwell_F_per_m, mutual_F_per_m : ndarray, shape (n, n)
        The capacitance matrices in F/m.
    """
    rows: list[list[str]] = []
    for title, matrix in ((MAXWELL_TITLE, maxwell_F_per_m), (MUTUAL_TITLE, mutual_F_per_m)):
        rows.append([title, *names])
        rows += [[name, *(f"{x / PF_PER_M:.10g}" for x in row)] for name, row in zip(names, np.asarray(matrix))]
        rows.append([])
    return rows


def write_capacitance_rows(rows: list[list[str]], path: str) -> None:
    """Write rows made by :func:`capacitance_csv_rows` to ``path`` (UTF-8, no index column)."""
    with open(path, "w", newline="", encoding="utf-8") as f:
        csv.writer(f).writerows(rows)


def write_capacitance_csv(report: Report, path: str) -> None:
    """Write both capacitance matrices (pF/m) of ``report`` to ``path`` in the shared layout."""
    solution = report.solution
    write_capacitance_rows(capacitance_csv_rows(list(solution.signal_names), solution.capacitance_maxwell_F_per_m,
                                                solution.capacitance_mutual_F_per_m), path)


def read_capacitance_blocks(path: str) -> dict[str, tuple[list[str], np.ndarray]]:
    """Read a file in this layout back: block title -> (conductor names, matrix in pF/m)."""
    blocks: dict[str, tuple[list[str], np.ndarray]] = {}
    with open(path, newline="", encoding="utf-8") as f:
        rows = list(csv.reader(f))
    k = 0
    while k < len(rows):
        if not rows[k]:
            k += 1
            continue
        title, names = rows[k][0], rows[k][1:]
        body = rows[k + 1: k + 1 + len(names)]
        blocks[title] = ([r[0] for r in body], np.array([[float(x) for x in r[1:]] for r in body]))
        k += 1 + len(names)
    return blocks
