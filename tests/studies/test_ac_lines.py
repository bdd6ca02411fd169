"""AC line fields against the closed form of line charges and their images.

Source: the method of images for line charges over a conducting plane, J. D. Jackson,
Classical Electrodynamics, 3rd ed., Wiley, 1999, sec. 2.1-2.2, with Maxwell's potential
coefficients P_ii = ln(2 h_i / r_i) / (2 pi eps0), P_ij = ln(D'_ij / D_ij) / (2 pi eps0)
(common practice for overhead-line fields). Charges q = inv(P) V for each phasor part;
E(x) = sum_i q_i / (2 pi eps0) [(x - x_i)/|x - x_i|^2 - (x - x_i')/|x - x_i'|^2].
Treating the wires as line charges at their centres neglects proximity effects of order
(r / D)^2 ~ 1e-5 here, far below the mesh error, so the check holds to 1e-3.
"""

import math

import numpy as np
import pytest

from solver import EPSILON_0_F_PER_M, InvalidModelError, load_project
from solver.figures.ac_lines import (
    ICNIRP_2010_PUBLIC_50HZ,
    ac_field_profile,
    field_ellipse,
    phasors_of,
)


def closed_form_field(model, volts, points):
    wires = [(c.name, c.shapes[0].center, c.shapes[0].radius) for c in model.conductors]
    xy = np.array([w[1] for w in wires])
    r = np.array([w[2] for w in wires])
    image = xy * [1, -1]
    d = np.linalg.norm(xy[:, None] - xy[None], axis=2)
    d_img = np.linalg.norm(xy[:, None] - image[None], axis=2)
    np.fill_diagonal(d, 1.0)
    p = np.log(d_img / d)
    np.fill_diagonal(p, np.log(2 * xy[:, 1] / r))
    v = np.array([volts.get(name, 0.0) for name, _, _ in wires])
    q = np.linalg.solve(p / (2 * math.pi * EPSILON_0_F_PER_M), v)
    rel, rel_img = points[:, None] - xy[None], points[:, None] - image[None]
    e = (rel / np.sum(rel**2, -1)[..., None] - rel_img / np.sum(rel_img**2, -1)[..., None])
    return np.einsum("mnk,n->mk", e, q / (2 * math.pi * EPSILON_0_F_PER_M)), dict(zip([w[0] for w in wires], q))


@pytest.mark.slow
def test_ground_level_field_of_three_phase_sample_matches_line_charges_with_images():
    model = load_project("sample_geometries/three_phase_line.json").with_mesh_density("coarse")
    x = np.linspace(-40.0, 40.0, 41)
    profile = ac_field_profile(model, x_m=x, height_m=1.0, reference=ICNIRP_2010_PUBLIC_50HZ)
    expected, charges = closed_form_field(model, phasors_of(model), np.column_stack([x, np.ones_like(x)]))
    rms = np.sqrt(np.sum(np.abs(expected) ** 2, axis=1))
    np.testing.assert_allclose(profile.rms_field_V_per_m, rms, rtol=1e-3)
    np.testing.assert_allclose(np.abs(profile.field_phasors_V_per_m), np.abs(expected), atol=1e-3 * rms.max())
    for name in ("L1", "L2", "L3"):
        assert abs(profile.charges_C_per_m[name] - charges[name]) <= 1e-3 * abs(charges[name])
    assert profile.max_rms_field_V_per_m == pytest.approx(rms.max(), rel=1e-3)
    assert profile.x_at_max_m == x[np.argmax(rms)]
    assert profile.ratio_to_reference == pytest.approx(rms.max() / 5000.0, rel=1e-3)
    assert "govern" in profile.caution


def test_field_ellipse_of_linear_and_circular_polarisation():
    # in phase: a line (minor axis 0); equal and 90 degrees apart: a circle
    major, minor, rms = field_ellipse(np.array([[3.0 + 0j, 4.0 + 0j], [1.0 + 0j, 1j]]))
    assert major == pytest.approx([5.0, 1.0]) and minor == pytest.approx([0.0, 1.0], abs=1e-12)
    assert rms == pytest.approx([5.0, math.sqrt(2)])


def test_phasors_must_name_energised_conductors():
    model = load_project("sample_geometries/three_phase_line.json")
    with pytest.raises(InvalidModelError, match="'E1': not a fixed-potential conductor"):
        phasors_of(model, {"E1": (1.0, 0.0)})
    assert phasors_of(model)["L2"] == pytest.approx(230940.108 * complex(-0.5, -math.sqrt(3) / 2))
