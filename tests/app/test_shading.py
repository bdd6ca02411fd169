"""The shading's image: no white slivers where map cells inside metal reach past a drawn edge."""

import numpy as np

import solver
from app.canvas.shading import shading_of, under_metal_filled
from app.files import project_files as files
from solver.figures.field_lines import evaluate_on_grid


def test_cells_inside_metal_next_to_the_field_take_the_nearest_field_value(qapp):
    model = solver.load_project(files.SAMPLES_DIR / "hv_electrode_over_earth.json").with_mesh_density("coarse")
    solution = solver.solve(model, estimate_error=False)
    x = np.linspace(-0.3, 0.3, 61)
    y = np.linspace(-0.1, 1.3, 71)  # reaches below the ground plane at y = 0
    grid = evaluate_on_grid(solution, x, y)
    metal = ~np.isfinite(grid.potential_V)
    below_plane = y <= 0  # on the plane too
    inside_electrode = metal & ~below_plane[:, None]
    assert inside_electrode.any() and metal[below_plane].all()
    shading = shading_of("potential", grid, solution.conductor_potentials_V)
    shown = under_metal_filled(shading.values(grid), grid)
    field = ~metal
    assert np.array_equal(shown[field], shading.values(grid)[field])  # the field itself untouched
    # the electrode's outer rim of cells shows the potential next to it (near the map's highest)
    rim = inside_electrode & ~(np.roll(inside_electrode, 1, 0) & np.roll(inside_electrode, -1, 0)
                               & np.roll(inside_electrode, 1, 1) & np.roll(inside_electrode, -1, 1))
    assert rim.any() and np.isfinite(shown[rim]).all()
    highest = np.nanmax(shading.values(grid))  # next to the electrode, in the key's unit
    assert np.all(shown[rim] > 0.85 * highest)
    assert np.isnan(shown[below_plane]).all()  # below the plane: the earth band, no colour
    assert np.isfinite(shading.image(grid, model.metres_per_unit).image[rim]).all()
