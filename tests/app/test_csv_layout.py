"""The window and ``python -m solver MODEL --csv`` write the capacitance matrices in one layout."""

import csv

import numpy as np
import pytest
from app_helpers import wait_for_solve

from app.files import project_files as files
from solver.cli.command import main
from solver.cli.csv_output import read_capacitance_blocks

SAMPLE = "three_traces_over_ground.json"


def _blocks(path):
    """Blocks split at empty rows, read with the standard csv module only."""
    with open(path, newline="", encoding="utf-8") as f:
        rows = list(csv.reader(f))
    blocks, current = [], []
    for row in rows:
        if row:
            current.append(row)
        elif current:
            blocks.append(current)
            current = []
    return blocks + ([current] if current else [])


def test_window_and_command_line_write_the_same_layout(window, qtbot, tmp_path, capsys):
    window.commands.open(files.SAMPLES_DIR / SAMPLE)
    wait_for_solve(qtbot, window)
    from_window, from_cli = tmp_path / "window.csv", tmp_path / "cli.csv"
    assert window.commands.export_matrices_csv(from_window)
    assert main([str(files.SAMPLES_DIR / SAMPLE), "--csv", str(from_cli)]) == 0
    capsys.readouterr()
    a, b = _blocks(from_window), _blocks(from_cli)
    assert len(a) == len(b) == 2
    names = list(window.results.solution.signal_names)
    for block_a, block_b, title in zip(a, b, ("Maxwell", "Mutual")):
        assert block_a[0] == block_b[0] == [f"{title} capacitance matrix (pF/m)", *names]  # headers
        assert [r[0] for r in block_a[1:]] == [r[0] for r in block_b[1:]] == names  # row labels
        assert np.allclose(np.array([r[1:] for r in block_a[1:]], float),
                           np.array([r[1:] for r in block_b[1:]], float), rtol=1e-9)
    assert [len(r) for r in csv.reader(from_window.open())] == [len(r) for r in csv.reader(from_cli.open())]
    read = read_capacitance_blocks(str(from_window))
    assert read["Maxwell capacitance matrix (pF/m)"][1] == pytest.approx(
        window.results.solution.capacitance_maxwell_F_per_m * 1e12, rel=1e-9)
