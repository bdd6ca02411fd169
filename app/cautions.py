"""The caution and caveat texts of the program and the report, in one place.

Qt-free. The high-voltage caution, the air strength and the air density are the solver's
(:mod:`solver.hot_spots.margins`), whose caution SAFETY.md repeats word for word, so the program, the
report, the command line and SAFETY.md say the same. The numbers are the usual rules of thumb
(common practice), not design limits: air breaks down at about 3 MV/m in a uniform field at the
reference atmosphere (20 degC, 101.325 kPa), in proportion to the relative air density; end
effects of a part of length L are small once L is above about ten times its largest
cross-section dimension.
"""

from __future__ import annotations

from dataclasses import dataclass

from solver import HIGH_VOLTAGE_CAUTION, air_breakdown_field_V_per_m
from solver.hot_spots.margins import AIR_DIELECTRIC_STRENGTH_V_PER_M, relative_air_density_at_altitude

#: Dielectric strength of air in a uniform field at the reference atmosphere, V/m (common practice).
AIR_STRENGTH_SEA_LEVEL_V_PER_M = AIR_DIELECTRIC_STRENGTH_V_PER_M

#: The standing statement shown with every high-voltage figure (SAFETY.md has it word for word).
STANDING_STATEMENT = HIGH_VOLTAGE_CAUTION

#: Length-to-cross-section ratio above which end effects are usually small (common practice).
LENGTH_RATIO_RULE = 10.0

#: The limits of a 2-D electrostatic model (the same points as SAFETY.md and the design brief).
TWO_D_LIMITS = (
    "Results are per metre of an infinitely long, uniform cross-section; a real part of finite "
    "length has end fringing, so its total capacitance is larger than C' times its length.",
    "In 2-D there is no capacitance 'to infinity': a return conductor (reference or ground plane) "
    "is always implied.",
    "The field at 3-D corners and at the ends of bars is stronger than the 2-D value at the same edge.",
    "Electrostatic (quasi-TEM) only: the cross-section must be small against the wavelength; no skin "
    "effect, conductor or dielectric loss, dispersion, space charge or conduction is modelled.",
    "A sharp corner or free edge has no finite peak field; a peak reported there depends on the mesh. "
    "Round the corner (corner radius) to get a meaningful value.",
)


def relative_air_density_at(altitude_m: float) -> float:
    """Relative air density at ``altitude_m`` (standard atmosphere, 20 degC); SolverError out of range."""
    return relative_air_density_at_altitude(altitude_m)


def air_strength_V_per_m(relative_air_density: float) -> float:
    """Uniform-field strength of air, 3 MV/m times the relative air density (common practice), V/m."""
    return air_breakdown_field_V_per_m(relative_air_density)


@dataclass(frozen=True)
class Caution:
    """A high-voltage caution: ``level`` is "none", "approaching" or "exceeded"."""

    level: str
    headline: str
    detail: str


def field_caution(peak_field_V_per_m: float, relative_air_density: float = 1.0,
                  at_sharp_corner: bool = False, conductor: str = "") -> Caution:
    """Compare the peak surface field with the air strength and word the caution.

    "approaching" from half the air strength, "exceeded" at or above it.
    """
    strength = air_strength_V_per_m(relative_air_density)
    ratio = peak_field_V_per_m / strength
    where = f" on '{conductor}'" if conductor else ""
    numbers = (
        f"Peak surface field{where}: {peak_field_V_per_m / 1e6:.3g} MV/m = {100 * ratio:.0f} % of about "
        f"{strength / 1e6:.2f} MV/m, the uniform-field strength of air at relative air density "
        f"{relative_air_density:.3g} (common practice)."
    )
    corner = (" The peak sits at a sharp corner or edge, where the 2-D value grows as the mesh is "
              "refined: the real field there may be higher still.") if at_sharp_corner else ""
    if ratio >= 1.0:
        return Caution("exceeded", "CAUTION: the surface field exceeds the breakdown strength of air.",
                       numbers + corner + " Expect corona or flashover in air at these potentials. " + STANDING_STATEMENT)
    if ratio >= 0.5:
        return Caution("approaching", "CAUTION: the surface field approaches the breakdown strength of air.",
                       numbers + corner + " Margins are small. " + STANDING_STATEMENT)
    return Caution("none", "Surface field below half the breakdown strength of air.",
                   numbers + corner + " " + STANDING_STATEMENT)


def insulation_note(peak_field_V_per_m: float, eps_r: float, conductor: str = "") -> Caution:
    """The note when every peak surface field sits in insulation (eps_r > 1), not in air."""
    where = f" on '{conductor}'" if conductor else ""
    return Caution(
        "none", "The peak surface fields sit in insulation, not in air.",
        f"Peak surface field{where}: {peak_field_V_per_m / 1e6:.3g} MV/m, in material of relative permittivity "
        f"{eps_r:g}. The breakdown strength of air does not apply there; compare with the rating of the "
        "insulation itself and mind any air gaps or voids. " + STANDING_STATEMENT)


def length_caveat(part_length: float | None, largest_dimension: float, unit: str) -> str:
    """How far a part of ``part_length`` is from the ~10x rule for trusting per-metre figures."""
    if not part_length or part_length <= 0 or largest_dimension <= 0:
        return (f"Enter the length of the real part to see how well the per-metre figures describe it "
                f"(common practice: end effects are small above about {LENGTH_RATIO_RULE:g} times the "
                "largest cross-section dimension).")
    ratio = part_length / largest_dimension
    head = (f"Part length {part_length:g} {unit} is {ratio:.1f} times the largest cross-section dimension "
            f"({largest_dimension:.3g} {unit}).")
    if ratio >= LENGTH_RATIO_RULE:
        return head + (f" That is above the ~{LENGTH_RATIO_RULE:g}x of common practice: end effects should be "
                       "small, and C' times the length is a fair estimate of the total.")
    if ratio >= 3:
        return head + (f" That is below the ~{LENGTH_RATIO_RULE:g}x of common practice: expect the ends to add "
                       "noticeably to the total capacitance and to raise the field at the bar ends.")
    return head + (" The part is short against its cross-section: the 2-D figures describe only its middle, "
                   "and the total capacitance and end fields need a 3-D analysis.")
