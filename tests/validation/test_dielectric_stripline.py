"""Zero-thickness striplines in a dielectric against Cohn's conformal-mapping results.

Sources:
* S. B. Cohn, "Characteristic impedance of the shielded-strip transmission line",
  IRE Trans. MTT-2, 1954: a strip of width w midway between plates b apart,
  C' = 4 eps K(k') / K(k), k = sech(pi w / 2b), k' = tanh(pi w / 2b);
  Z0 = (eta0 / (4 sqrt(eps_r))) K(k) / K(k').
* S. B. Cohn, "Shielded coupled-strip transmission line", IRE Trans. MTT-3, 1955: two such
  strips with edge gap s,
  Z_even = (eta0 / (4 sqrt(eps_r))) K(k_e') / K(k_e), k_e = tanh(pi w / 2b) tanh(pi (w + s) / 2b),
  Z_odd  = (eta0 / (4 sqrt(eps_r))) K(k_o') / K(k_o), k_o = tanh(pi w / 2b) coth(pi (w + s) / 2b).

The infinite plates are modelled as wide reference strips (the field between the plates
decays like exp(-pi x / b) away from the strip; plates of width w + 12 b leave an error far
below the tolerance) and the dielectric fills the space between them, so the dielectric
solver sees interfaces only at the two open sides.
"""

import math

import pytest
from scipy.special import ellipk

from solver import Conductor, Dielectric, Model, Rectangle, Strip
from solver.figures.transmission_line import transmission_line_figures

ETA0 = 376.730313


def _k_ratio(k):
    """K(k) / K(k') with scipy's parameter m = k^2."""
    return ellipk(k * k) / ellipk(1.0 - k * k)


def _plates(width, b):
    return (
        Conductor("lower plate", (Strip(((-width / 2, 0.0), (width / 2, 0.0))),), role="reference"),
        Conductor("upper plate", (Strip(((-width / 2, b), (width / 2, b))),), role="reference"),
    )


@pytest.mark.parametrize("w, b, eps_r", [(1.0, 2.0, 2.2), (0.4, 2.0, 4.5), (3.0, 1.5, 10.2)])
def test_stripline_impedance_cohn_1954(w, b, eps_r):
    plate = w + 12 * b
    model = Model(
        unit="mm",
        conductors=(Conductor("strip", (Strip(((-w / 2, b / 2), (w / 2, b / 2))),), potential_V=1.0),)
        + _plates(plate, b),
        dielectrics=(Dielectric("board", (Rectangle((0.0, b / 2), plate, b),), eps_r),),
    )
    f = transmission_line_figures(model)
    k = 1.0 / math.cosh(math.pi * w / (2 * b))
    z_cohn = ETA0 / (4 * math.sqrt(eps_r)) * _k_ratio(k)
    assert f.characteristic_impedance_ohm == pytest.approx(z_cohn, rel=2e-4)
    assert f.effective_permittivity == pytest.approx(eps_r, rel=2e-4)


@pytest.mark.parametrize("w, s, b, eps_r", [(1.0, 0.5, 2.0, 4.4), (0.6, 0.2, 1.0, 3.0)])
def test_edge_coupled_stripline_cohn_1955(w, s, b, eps_r):
    plate = 2 * w + s + 12 * b
    x = (w + s) / 2
    model = Model(
        unit="mm",
        conductors=(
            Conductor("left", (Strip(((-x - w / 2, b / 2), (-x + w / 2, b / 2))),), potential_V=1.0),
            Conductor("right", (Strip(((x - w / 2, b / 2), (x + w / 2, b / 2))),), potential_V=1.0),
        )
        + _plates(plate, b),
        dielectrics=(Dielectric("board", (Rectangle((0.0, b / 2), plate, b),), eps_r),),
    )
    f = transmission_line_figures(model)
    t1, t2 = math.tanh(math.pi * w / (2 * b)), math.tanh(math.pi * (w + s) / (2 * b))
    scale = ETA0 / (4 * math.sqrt(eps_r))
    z_even = scale / _k_ratio(t1 * t2)
    z_odd = scale / _k_ratio(t1 / t2)
    assert f.is_symmetric_pair
    assert f.even_mode_impedance_ohm == pytest.approx(z_even, rel=3e-4)
    assert f.odd_mode_impedance_ohm == pytest.approx(z_odd, rel=3e-4)
    assert f.differential_impedance_ohm == pytest.approx(2 * z_odd, rel=3e-4)
    assert f.common_mode_impedance_ohm == pytest.approx(z_even / 2, rel=3e-4)
    assert f.even_mode_effective_permittivity == pytest.approx(eps_r, rel=3e-4)
    assert f.odd_mode_effective_permittivity == pytest.approx(eps_r, rel=3e-4)
