"""The click-to-drawn measurement drives the real window: each mouse event leads to drawn
results, and its parts (waiting, solver, drawing) add up to the total (no timings checked)."""

from __future__ import annotations

import math

import pytest

from app import bench_window


@pytest.mark.slow
def test_each_mouse_event_is_drawn_and_its_parts_add_up(qapp, tmp_path, monkeypatch):
    monkeypatch.setenv("EDGEWISE_RECOVERY_DIR", str(tmp_path))
    clicks = bench_window.measure(repeat=1)
    assert [c.name.split(" ")[0] for c in clicks] == ["first", "a", "a", "release"]
    for c in clicks:
        parts = (c.waiting, c.solve, c.map, c.drawing)
        assert all(math.isfinite(p) and p >= 0.0 for p in parts)
        assert c.total == pytest.approx(c.waiting + c.solver_part + c.drawing, abs=1e-9)
    assert "first edit of L1" in bench_window.report(clicks)
