"""Field lines run the whole gap to the earth plane.

Physics: a conductor alone above an infinite earthed plane sends all its flux to the plane
(the image charge is -q; method of images, common practice), so its field lines end there.
"""

import numpy as np

import solver
from solver.figures.field_lines import trace_field_lines


def test_field_lines_of_the_high_voltage_sample_reach_the_earth_plane():
    model = solver.load_project("sample_geometries/hv_electrode_over_earth.json").with_mesh_density("coarse")
    solution = solver.solve(model)
    lines = trace_field_lines(solution, 24)
    ends = np.array([line.points_m[-1] for line in lines])
    starts = np.array([line.points_m[0] for line in lines])
    on_plane = np.isclose(ends[:, 1], 0.0, atol=1e-9)
    # the bar's underside is 1 m above the plane, its top 1.1 m: lines from the lower half go straight down
    lower = starts[:, 1] < 1.05
    assert lower.any() and on_plane[lower].all()
    assert on_plane.mean() >= 0.7
    assert (ends[:, 1] >= -1e-12).all()  # a line that crosses the plane ends on it
