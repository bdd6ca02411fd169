"""Modes of multiconductor lines, including modes that share a velocity.

Physics: in a homogeneous medium every quasi-TEM mode travels at c / sqrt(eps_r) and the modal
voltage vectors are not fixed by L C alone (C. R. Paul, Analysis of Multiconductor
Transmission Lines, Wiley, 1994, ch. 5); for a symmetric pair the even and odd modes are the
eigenvectors of C with Z_even/odd = 1 / (v C_even/odd) (same source, ch. 5; common practice).
"""

import numpy as np
import pytest

from solver import load_project, solve
from solver.constants import SPEED_OF_LIGHT_M_PER_S
from solver.figures.modes import modes_of
from solver.figures.transmission_line import figures_from_matrices, figures_from_solution
from solver.mesh.panels import MeshSettings


def test_busbar_pair_gives_the_same_modes_on_three_meshes():
    model = load_project("sample_geometries/busbar_enclosure.json")
    results = []
    for level in (0.5, 0.75, 1.0):
        f = figures_from_solution(solve(model, settings=MeshSettings(level)))
        assert f.modes_defined and "eigenvectors of C" in f.modal_note
        vectors = sorted(tuple(np.round(f.modal_voltages[:, k], 6)) for k in range(2))
        assert vectors == [(1.0, -1.0), (1.0, 1.0)]
        z = dict(zip((tuple(np.round(f.modal_voltages[:, k], 6)) for k in range(2)), f.modal_impedances_ohm))
        assert z[(1.0, 1.0)] == pytest.approx(f.even_mode_impedance_ohm, rel=1e-9)
        assert z[(1.0, -1.0)] == pytest.approx(f.odd_mode_impedance_ohm, rel=1e-9)
        results.append((z[(1.0, 1.0)], z[(1.0, -1.0)]))
    even, odd = np.array(results).T
    # the same answer on every mesh, to the discretisation error (not a round-off choice of vectors)
    assert np.ptp(even) / even.mean() < 0.01 and np.ptp(odd) / odd.mean() < 0.01


def test_one_medium_modes_are_the_eigenvectors_of_c_whatever_the_order_of_rows():
    c0 = np.array([[60.0, -12.0, -3.0], [-12.0, 70.0, -9.0], [-3.0, -9.0, 55.0]]) * 1e-12
    eps_r = 2.3
    f = figures_from_matrices(eps_r * c0, c0)
    assert np.allclose(f.modal_effective_permittivities, eps_r)
    _, vecs = np.linalg.eigh(c0)
    for k in range(3):  # every modal vector is parallel to one eigenvector of C
        t = f.modal_voltages[:, k] / np.linalg.norm(f.modal_voltages[:, k])
        assert np.max(np.abs(vecs.T @ t)) == pytest.approx(1.0, abs=1e-9)
    # homogeneous TEM line: Z_k = 1 / (v c_k) with c_k the eigenvalue of C along t_k
    v = SPEED_OF_LIGHT_M_PER_S / np.sqrt(eps_r)
    for k in range(3):
        t = f.modal_voltages[:, k]
        c_k = t @ (eps_r * c0) @ t / (t @ t)
        assert f.modal_impedances_ohm[k] == pytest.approx(1.0 / (v * c_k), rel=1e-9)


def test_distinct_velocities_match_the_eigenvectors_of_lc():
    c0 = np.array([[50.0, -10.0], [-10.0, 40.0]]) * 1e-12
    c = np.array([[120.0, -15.0], [-15.0, 70.0]]) * 1e-12
    m = modes_of(c, c0)
    assert m.defined and m.note == ""
    lc = np.linalg.inv(c0) @ c
    for k in range(2):
        t = m.voltages[:, k]
        assert np.allclose(lc @ t, m.effective_permittivities[k] * t, rtol=1e-10, atol=0)
    assert m.effective_permittivities[0] > m.effective_permittivities[1]  # slowest first


def test_a_symmetric_triple_in_one_medium_has_no_defined_modes_and_says_so():
    # three identical lines on a circle: C has a repeated eigenvalue, so no basis is singled out
    c0 = np.array([[50.0, -8.0, -8.0], [-8.0, 50.0, -8.0], [-8.0, -8.0, 50.0]]) * 1e-12
    m = modes_of(3.0 * c0, c0)
    assert not m.defined
    assert "not defined" in m.note
