"""The 100-conductor bus: 10 x 10 rounded bars in an earthed box (a large-model test case).

Invented geometry for benchmarks and tests (not a real product): bars 8 mm x 24 mm with 2 mm
edge radii on a 30 mm x 45 mm pitch, three phases at the peak of L1 (1, -1/2, -1/2 of 10 kV),
inside a 5 mm steel box with 25 mm clearance.
"""

from __future__ import annotations

from solver.model.model import Conductor, Model, Polygon, Rectangle


def hundred_conductor_bus(columns: int = 10, rows: int = 10) -> Model:
    """``columns`` x ``rows`` rounded bars (mm) in an earthed rectangular box."""
    pitch_x, pitch_y, w, h, r = 30.0, 45.0, 8.0, 24.0, 2.0
    phases = (10e3, -5e3, -5e3)
    bars = []
    for i in range(columns):
        for j in range(rows):
            x = (i - (columns - 1) / 2) * pitch_x
            y = (j - (rows - 1) / 2) * pitch_y
            bars.append(Conductor(f"B{i + 1}.{j + 1}", (Rectangle((x, y), w, h, r),),
                                  potential_V=phases[(i + j) % 3]))
    half_w = (columns - 1) / 2 * pitch_x + w / 2 + 25.0
    half_h = (rows - 1) / 2 * pitch_y + h / 2 + 25.0
    inner = ((-half_w, -half_h), (half_w, -half_h), (half_w, half_h), (-half_w, half_h))
    t = 5.0
    outer = ((-half_w - t, -half_h - t), (half_w + t, -half_h - t), (half_w + t, half_h + t), (-half_w - t, half_h + t))
    box = Conductor("box", (Polygon(outer, (inner,)),), role="reference")
    return Model(unit="mm", title=f"{columns * rows}-conductor bus", conductors=tuple(bars) + (box,))
