"""A shared catalogue of reference geometries with their published closed forms.

Every test that needs a coax, a two-wire line, a wire over a plane, a microstrip or a shape of
known logarithmic capacity builds it here, so the geometry and the formula it is checked against
live side by side, each with its source:

* coaxial cylinders, two parallel wires, a wire over a ground plane:
  D. K. Cheng, Field and Wave Electromagnetics, 2nd ed., Addison-Wesley, 1989;
* microstrip: E. Hammerstad and O. Jensen, "Accurate models for microstrip computer-aided
  design", IEEE MTT-S International Microwave Symposium Digest, 1980 (stated accuracy 0.2 %);
* logarithmic capacities of a disc, segment, square, ellipse and equilateral triangle:
  T. Ransford, Potential Theory in the Complex Plane, Cambridge University Press, 1995.

Lengths are in the model unit given (mm unless stated); capacitances in F/m.
"""

from __future__ import annotations

import math

from solver import (
    EPSILON_0_F_PER_M,
    Circle,
    Conductor,
    Dielectric,
    GroundPlane,
    Model,
    Polygon,
    Rectangle,
    Ring,
    Strip,
)

EPS0 = EPSILON_0_F_PER_M
#: Impedance of free space, ohm (mu0 c).
ETA0_OHM = 376.730313668


# ---- coaxial line ----------------------------------------------------------------------------
def coax(a: float = 1.0, b: float = 2.5, *, wall: float = 0.5, eps_r: float = 1.0, unit: str = "mm",
         dielectrics: tuple = (), potential_V: float = 1.0) -> Model:
    """Inner conductor of radius ``a`` at ``potential_V`` inside a screen of inner radius ``b``."""
    return Model(
        unit=unit,
        background_eps_r=eps_r,
        conductors=(
            Conductor("inner", (Circle((0.0, 0.0), a),), role="fixed", potential_V=potential_V),
            Conductor("shield", (Ring((0.0, 0.0), b, b + wall),), role="reference"),
        ),
        dielectrics=dielectrics,
    )


def coax_capacitance_F_per_m(a: float, b: float, eps_r: float = 1.0) -> float:
    """C' = 2 pi eps / ln(b / a) (Cheng 1989)."""
    return 2 * math.pi * EPS0 * eps_r / math.log(b / a)


# ---- two-wire line ---------------------------------------------------------------------------
def two_wire(a: float = 1.0, d: float = 3.0, *, unit: str = "mm") -> Model:
    """Two round wires of radius ``a``, centres ``d`` apart; "go" at 1 V, "return" the reference."""
    return Model(
        unit=unit,
        conductors=(
            Conductor("go", (Circle((0.0, 0.0), a),), role="fixed", potential_V=1.0),
            Conductor("return", (Circle((d, 0.0), a),), role="reference"),
        ),
    )


def two_wire_capacitance_F_per_m(a: float, d: float) -> float:
    """C' = pi eps0 / arccosh(d / 2a) between the wires (Cheng 1989)."""
    return math.pi * EPS0 / math.acosh(d / (2 * a))


# ---- wire over a ground plane ----------------------------------------------------------------
def wire_over_plane(a: float = 1.0, h: float = 2.0, *, x: float = 0.0, unit: str = "mm",
                    potential_V: float = 1.0) -> Model:
    """A round wire of radius ``a`` with its centre ``h`` above an earthed plane at y = 0."""
    return Model(
        unit=unit,
        ground_plane=GroundPlane(0.0),
        conductors=(Conductor("wire", (Circle((x, h), a),), role="fixed", potential_V=potential_V),),
    )


def wire_over_plane_capacitance_F_per_m(a: float, h: float) -> float:
    """C' = 2 pi eps0 / arccosh(h / a) (Cheng 1989, method of images)."""
    return 2 * math.pi * EPS0 / math.acosh(h / a)


def wire_over_plane_surface_field_V_per_m(a_m: float, h_m: float, voltage_V: float) -> float:
    """Largest surface field of a wire over a plane, V/m, on the side facing the plane.

    The wire and its image are equivalent to line charges +-q at heights +-s, s = sqrt(h^2 - a^2),
    with q / (2 pi eps0) = V / arccosh(h / a); at y = h - a the two add (Cheng 1989, images).
    """
    s = math.sqrt(h_m * h_m - a_m * a_m)
    y = h_m - a_m
    return voltage_V / math.acosh(h_m / a_m) * (1.0 / (s - y) + 1.0 / (s + y))


# ---- microstrip ------------------------------------------------------------------------------
def microstrip(u: float, eps_r: float, substrate_width: float | None = None, h: float = 1.0) -> Model:
    """A zero-thickness trace of width u h on a substrate of height ``h`` over a ground plane."""
    w = u * h
    width = substrate_width or max(20 * h, 8 * w)
    return Model(
        unit="mm",
        ground_plane=GroundPlane(0.0),
        conductors=(Conductor("trace", (Strip(((-w / 2, h), (w / 2, h))),), potential_V=1.0),),
        dielectrics=(Dielectric("substrate", (Rectangle((0.0, h / 2), width, h),), eps_r),),
    )


def hammerstad_jensen(u: float, eps_r: float) -> tuple[float, float]:
    """(Z0 in ohm, eps_eff) of a zero-thickness microstrip with w/h = u (Hammerstad & Jensen 1980)."""
    f = 6 + (2 * math.pi - 6) * math.exp(-((30.666 / u) ** 0.7528))
    z01 = ETA0_OHM / (2 * math.pi) * math.log(f / u + math.sqrt(1 + 4 / u**2))
    a = 1 + math.log((u**4 + (u / 52) ** 2) / (u**4 + 0.432)) / 49 + math.log(1 + (u / 18.1) ** 3) / 18.7
    b = 0.564 * ((eps_r - 0.9) / (eps_r + 3)) ** 0.053
    eps_eff = (eps_r + 1) / 2 + (eps_r - 1) / 2 * (1 + 10 / u) ** (-a * b)
    return z01 / math.sqrt(eps_eff), eps_eff


# ---- shapes of known logarithmic capacity (Ransford 1995) -------------------------------------
def square_capacity(side: float) -> float:
    """Gamma(1/4)^2 s / (4 pi^(3/2))."""
    return math.gamma(0.25) ** 2 * side / (4 * math.pi**1.5)


def equilateral_triangle_capacity(side: float) -> float:
    """sqrt(3) Gamma(1/3)^3 s / (8 pi^2)."""
    return math.sqrt(3) * math.gamma(1 / 3) ** 3 * side / (8 * math.pi**2)


def segment_capacity(length: float) -> float:
    """L / 4."""
    return length / 4


def ellipse_capacity(a: float, b: float) -> float:
    """(a + b) / 2 for semi-axes a and b."""
    return (a + b) / 2


def square(side: float = 1.0, *, unit: str = "m") -> Model:
    """One conductor, a square of side ``side`` centred at the origin, at 1 V."""
    return Model(unit=unit, conductors=(Conductor("square", (Rectangle((0.0, 0.0), side, side),), potential_V=1.0),))


def equilateral_triangle(side: float = 1.0, *, unit: str = "m") -> Model:
    """One conductor, an equilateral triangle of side ``side``, at 1 V."""
    h = side * math.sqrt(3) / 2
    pts = ((-side / 2, -h / 3), (side / 2, -h / 3), (0.0, 2 * h / 3))
    return Model(unit=unit, conductors=(Conductor("triangle", (Polygon(pts),), potential_V=1.0),))
