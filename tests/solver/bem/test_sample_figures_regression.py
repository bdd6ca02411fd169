"""The samples' figures stay what the first release computed, within its own error estimate.

The reference values in ``data/sample_figures_v0_1.json`` were computed by Edgewise 0.1 (two
separate solvers for homogeneous and dielectric models, before they were merged into one).
A change of method may move a figure, but not by more than the error that release estimated
for it; peaks at sharp corners are mesh-made and are not compared.
"""

import json
from pathlib import Path

import numpy as np
import pytest

from solver import load_project, solve

ROOT = Path(__file__).resolve().parents[3]
REFERENCE = json.loads((Path(__file__).parent / "data" / "sample_figures_v0_1.json").read_text(encoding="utf-8"))


@pytest.mark.parametrize("name", sorted(REFERENCE))
def test_sample_figures_match_the_first_release(name):
    ref = REFERENCE[name]
    sol = solve(load_project(ROOT / "sample_geometries" / name))
    tol = 3.0 * max(ref["estimated_relative_error"], sol.estimated_relative_error, 1e-9)
    if "capacitance_maxwell_F_per_m" in ref:
        c_ref = np.array(ref["capacitance_maxwell_F_per_m"])
        change = np.abs(sol.capacitance_maxwell_F_per_m - c_ref).max() / np.abs(c_ref).max()
        assert change <= tol, f"{name}: capacitance moved by {change:.2e} (allowed {tol:.2e})"
    for peak, e_ref, corner in zip(sol.peak_surface_fields, ref["peak_surface_field_V_per_m"], ref["peak_at_sharp_corner"]):
        if corner or peak.at_sharp_corner:
            continue
        assert peak.field_V_per_m == pytest.approx(e_ref, rel=max(10 * tol, 1e-6)), f"{name}: peak on {peak.conductor}"
