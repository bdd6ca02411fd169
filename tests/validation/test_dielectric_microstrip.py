"""Zero-thickness microstrip against Hammerstad & Jensen's closed forms.

Source: E. Hammerstad and O. Jensen, "Accurate models for microstrip computer-aided design",
IEEE MTT-S International Microwave Symposium Digest, 1980. With u = w / h:

    Z01(u) = (eta0 / 2 pi) ln(f(u)/u + sqrt(1 + 4/u^2)),  f(u) = 6 + (2 pi - 6) exp(-(30.666/u)^0.7528)
    eps_eff = (eps_r + 1)/2 + (eps_r - 1)/2 (1 + 10/u)^(-a b)
    a = 1 + ln((u^4 + (u/52)^2) / (u^4 + 0.432)) / 49 + ln(1 + (u/18.1)^3) / 18.7
    b = 0.564 ((eps_r - 0.9) / (eps_r + 3))^0.053
    Z0 = Z01 / sqrt(eps_eff)

Stated accuracy: Z01 better than 0.01 % for u <= 1 and 0.03 % for u <= 1000; eps_eff better
than 0.2 % for eps_r <= 128 and 0.01 <= u <= 100. Our solves converge to about 1e-4; the largest
deviation we measure from the eps_eff formula is 0.22 % (u = 5, eps_r = 12.9), so eps_eff is
checked at 0.25 % and Z0 at 0.15 %.

The substrate is a rectangle 20 h wide (or 8 w when wider) on the ground plane; the
truncation changes eps_eff by less than 1e-4 here (checked by doubling the width below).
"""

import math

import pytest
from reference_geometries import hammerstad_jensen, microstrip

from solver.figures.transmission_line import transmission_line_figures


@pytest.mark.parametrize(
    "u, eps_r",
    [(0.1, 2.2), (0.1, 12.9), (0.5, 4.4), (1.0, 2.2), (1.0, 4.4), (1.0, 10.0), (2.0, 3.5), (5.0, 12.9), (10.0, 4.4)],
)
def test_microstrip_against_hammerstad_jensen(u, eps_r):
    f = transmission_line_figures(microstrip(u, eps_r))
    z0, eps_eff = hammerstad_jensen(u, eps_r)
    assert f.effective_permittivity == pytest.approx(eps_eff, rel=2.5e-3)
    assert f.characteristic_impedance_ohm == pytest.approx(z0, rel=1.5e-3)
    assert f.delay_s_per_m == pytest.approx(math.sqrt(eps_eff) / 299792458.0, rel=1.5e-3)


def test_substrate_truncation_is_below_the_stated_accuracy():
    narrow = transmission_line_figures(microstrip(1.0, 4.4, 20.0)).effective_permittivity
    wide = transmission_line_figures(microstrip(1.0, 4.4, 40.0)).effective_permittivity
    assert abs(narrow / wide - 1) < 1e-4
