"""The interface conditions themselves: normal D and tangential E continuous across an interface.

Source: the boundary conditions of electrostatics at a charge-free interface between two
dielectrics (any text, e.g. D. K. Cheng, Field and Wave Electromagnetics, 2nd ed., 1989,
sec. 3-9): eps1 E_n1 = eps2 E_n2 and E_t1 = E_t2.

The fields are evaluated with the public ``field_V_per_m`` just off each side of the interface
of a microstrip (substrate top and sides), at the panel midpoints (collocation points, where
the method imposes the condition) and at quarter points, where piecewise-constant bound
charge leaves a mismatch that must shrink when the mesh is refined. The solution's own
two-sided interface fields must obey the same conditions.
"""


import numpy as np
from reference_geometries import microstrip

from solver import solve
from solver.mesh.panels import MeshSettings


def _mismatch(sol, fraction):
    ifc = sol.interfaces
    lengths = ifc.chord_lengths
    tangents = (ifc.ends - ifc.starts) / lengths[:, None]
    pts = ifc.starts + fraction * (ifc.ends - ifc.starts)
    # away from the trace edges (junctions) where the field is singular
    keep = (np.abs(pts[:, 0]) > 0.6e-3) & (np.abs(pts[:, 0]) < 5e-3) | (pts[:, 1] > 0.1e-3) & (pts[:, 1] < 0.9e-3)
    pts, n, t = pts[keep], ifc.normals[keep], tangents[keep]
    delta = (1e-6 * lengths[keep])[:, None]
    e_plus, e_minus = sol.field_V_per_m(pts + delta * n), sol.field_V_per_m(pts - delta * n)
    d_plus = ifc.eps_r_plus[keep] * np.einsum("ij,ij->i", e_plus, n)
    d_minus = ifc.eps_r_minus[keep] * np.einsum("ij,ij->i", e_minus, n)
    d_scale = np.maximum(np.abs(d_plus), np.abs(d_minus)).max()
    e_scale = np.hypot(*e_plus.T).max()
    normal_d = np.abs(d_plus - d_minus).max() / d_scale
    tangential_e = np.abs(np.einsum("ij,ij->i", e_plus - e_minus, t)).max() / e_scale
    return normal_d, tangential_e, int(keep.sum())


def test_conditions_hold_at_collocation_points():
    sol = solve(microstrip(1.0, 4.4), estimate_error=False, settings=MeshSettings(1.0))
    normal_d, tangential_e, count = _mismatch(sol, 0.5)
    assert count > 100
    assert normal_d < 1e-5
    assert tangential_e < 1e-5


def test_mismatch_between_collocation_points_shrinks_with_refinement():
    coarse = _mismatch(solve(microstrip(1.0, 4.4), estimate_error=False, settings=MeshSettings(0.5)), 0.25)
    fine = _mismatch(solve(microstrip(1.0, 4.4), estimate_error=False, settings=MeshSettings(1.0)), 0.25)
    assert fine[0] < 0.05
    assert fine[0] < 0.75 * coarse[0]
    assert fine[1] < 1e-5


def test_two_sided_interface_fields_obey_the_conditions():
    sol = solve(microstrip(2.0, 9.8), estimate_error=False, settings=MeshSettings(1.0))
    ifc = sol.interfaces
    plus, minus = sol.interface_fields_V_per_m
    d_plus = ifc.eps_r_plus * np.einsum("ij,ij->i", plus, ifc.normals)
    d_minus = ifc.eps_r_minus * np.einsum("ij,ij->i", minus, ifc.normals)
    scale = np.abs(d_plus).max()
    assert np.abs(d_plus - d_minus).max() < 1e-9 * scale
    tangents = np.column_stack([-ifc.normals[:, 1], ifc.normals[:, 0]])
    np.testing.assert_allclose(np.einsum("ij,ij->i", plus, tangents), np.einsum("ij,ij->i", minus, tangents))
    # the stronger normal field is on the side of lower permittivity
    weaker = np.abs(np.einsum("ij,ij->i", plus, ifc.normals)) < np.abs(np.einsum("ij,ij->i", minus, ifc.normals))
    assert np.all(weaker[ifc.eps_r_plus > ifc.eps_r_minus] | (np.abs(d_plus) < 1e-6 * scale)[ifc.eps_r_plus > ifc.eps_r_minus])
