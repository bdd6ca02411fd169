"""The benchmark's one JSON document (``python -m solver.bench --json``) on a tiny configuration:
its keys, and accuracy figures that are finite and small against the closed forms the accuracy
part names (Cheng 1989; Ransford 1995). No timing is asserted."""

from __future__ import annotations

import json
import math

import pytest

from solver.bench.__main__ import PARTS, main


def test_json_document_of_the_accuracy_part_has_every_key_and_small_errors(capsys):
    assert main(["--json", "--only", "accuracy", "--tolerances", "1e-6", "--levels", "0.5"]) == 0
    doc = json.loads(capsys.readouterr().out)  # nothing but the document on standard output
    assert set(doc) == {"machine", *PARTS}
    assert doc["interactive"]["skipped"] and doc["bus"]["skipped"] and doc["dielectric"]["skipped"]
    rows = doc["accuracy"]["rows"]
    assert {r["solver"] for r in rows} == {"high-order", "low-order"}
    assert len({r["case"] for r in rows}) == 4 and len(rows) == 8
    for r in rows:
        assert {"case", "solver", "unknowns", "true_error", "seconds"} <= set(r)
        assert math.isfinite(r["true_error"]) and r["unknowns"] > 0
    for r in (r for r in rows if r["solver"] == "high-order"):
        assert r["true_error"] < 1e-6 and r["estimated_error"] <= 1e-6
    for r in (r for r in rows if r["solver"] == "low-order"):
        assert r["true_error"] < 1e-2  # the plain solver at half the normal density


@pytest.mark.slow
def test_bus_part_measures_both_paths_in_child_processes(capsys):
    assert main(["--json", "--only", "bus", "--bus-size", "2", "--small-bus-size", "2"]) == 0
    part = json.loads(capsys.readouterr().out)["bus"]
    for key in ("bus", "small_bus", "small_bus_dense_lu"):
        r = part[key]
        assert {"bars", "unknowns", "wall_s", "cpu_s", "peak_MB", "c11_pF_per_m"} <= set(r)
        assert r["bars"] == 4 and r["peak_MB"] > 0
    # The same bus by both paths: the plain low-order dense LU and the high-order path agree on C11
    # to the low-order solver's accuracy at the normal density.
    c_high, c_dense = part["small_bus"]["c11_pF_per_m"], part["small_bus_dense_lu"]["c11_pF_per_m"]
    assert abs(c_dense / c_high - 1) < 1e-2
    assert part["bus_dense_lu_needs"]["fits"] and part["small_bus_dense_over_high_order_wall"] > 0
