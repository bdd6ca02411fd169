"""The command line's options, as one frozen value built from the parsed arguments."""

from __future__ import annotations

import argparse
from dataclasses import dataclass

from solver.errors import InvalidModelError
from solver.hot_spots.air_conditions import AirConditions, air_conditions_of
from solver.hot_spots.voltage_basis import VOLTAGE_BASES, VoltageBasis, voltage_basis_of
from solver.model.model import Model


@dataclass(frozen=True)
class ReportOptions:
    """What one run of the command line asks for beyond the plain solve.

    Attributes
    ----------
    air_override : air settings given on the command line (project-file keys such as
        ``altitude_m``, ``pressure_kPa``, ``temperature_C``, ``surface_factor``); they replace
        the project's own air conditions field by field (see :meth:`air_for`).
    corner_radius_m : round every sharp corner and strip edge to this radius for the peak
        fields, metres (None: as drawn).
    peak_target : relative error target of the refined peak fields.
    part_length_m : length of the real part, metres, for the 2-D check (None: not asked).
    radius_sweep : (conductor, radii in metres) for the peak field against corner radius,
        or None.
    tolerance : requested relative accuracy of the capacitance matrix and equivalent radii
        (``--tolerance``; the high-order adaptive solver), or None for the mesh density.
    basis_override : voltage-basis settings given on the command line (project-file keys
        ``basis``, ``potentials``, ``factor``); they replace the project's own field by field
        (see :meth:`basis_for`).
    """

    air_override: tuple[tuple[str, float], ...] = ()
    corner_radius_m: float | None = None
    peak_target: float = 0.01
    part_length_m: float | None = None
    radius_sweep: tuple[str, tuple[float, ...]] | None = None
    cross_check_points: tuple[int, ...] | None = None
    tolerance: float | None = None
    basis_override: tuple[tuple[str, str | float], ...] = ()

    def air_for(self, model: Model) -> AirConditions:
        """The project's air conditions with this run's command-line air settings over them."""
        override = dict(self.air_override)
        settings = air_conditions_of(model).as_settings()
        if {"altitude_m", "pressure_kPa"} & override.keys():
            for key in ("altitude_m", "pressure_kPa", "relative_air_density"):
                settings.pop(key, None)
        return AirConditions.from_settings(settings | override)

    def basis_for(self, model: Model) -> VoltageBasis:
        """The project's voltage basis with this run's --voltage-basis, --voltage-factor and
        --potentials-rms over it."""
        settings = voltage_basis_of(model).as_settings()
        override = dict(self.basis_override)
        if "basis" in override and override["basis"] != "factor":
            settings.pop("factor", None)
        return VoltageBasis.from_settings(settings | override)


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Add the air, surface, corner-radius and error-target options to ``parser``."""
    group = parser.add_argument_group("hot spots and margins")
    group.add_argument("--altitude-m", type=float, help="site altitude above sea level, m (standard-atmosphere pressure)")
    group.add_argument("--pressure-kPa", type=float, help="air pressure, kPa (instead of --altitude-m)")
    group.add_argument("--temperature-C", type=float, help="air temperature, degC (default 20)")
    group.add_argument("--surface-factor", type=float,
                       help="Peek's surface factor m of round conductors (1 smooth, ~0.85 stranded)")
    group.add_argument("--voltage-basis", choices=tuple(VOLTAGE_BASES),
                       help="what the potentials stand for in the high-voltage check (default: the project's, "
                            "else operating)")
    group.add_argument("--voltage-factor", type=float,
                       help="overvoltage factor: check at this multiple of the operating voltage "
                            "(sets --voltage-basis factor)")
    group.add_argument("--potentials-rms", action="store_true",
                       help="the potentials are rms values of a sine wave (converted to crest for the check)")
    group.add_argument("--corner-radius-m", type=float,
                       help="round every sharp corner and strip edge to this radius, m, for the peak fields")
    group.add_argument("--peak-target", type=float, default=0.01,
                       help="relative error target of the peak fields (default 0.01)")
    group.add_argument("--part-length-m", type=float,
                       help="length of the real part, m: how far it is from the 2-D assumption")
    group.add_argument("--radius-sweep", metavar="CONDUCTOR=R1,R2,...",
                       help="peak field of CONDUCTOR with its corners rounded to each radius (m)")
    accuracy = parser.add_argument_group("accuracy")
    accuracy.add_argument("--tolerance", type=float, metavar="REL",
                          help="solve with the high-order solver, refining until the estimated relative "
                               "error of the capacitance matrix is at most REL (e.g. 1e-10)")


def air_override(args: argparse.Namespace) -> tuple[tuple[str, float], ...]:
    """The air settings given with --altitude-m or --pressure-kPa, --temperature-C and
    --surface-factor (checked here, before any solve)."""
    override: dict[str, float] = {}
    for option, key in (("altitude_m", "altitude_m"), ("pressure_kPa", "pressure_kPa"),
                        ("temperature_C", "temperature_C"), ("surface_factor", "surface_factor")):
        if getattr(args, option, None) is not None:
            override[key] = float(getattr(args, option))
    if "altitude_m" in override and "pressure_kPa" in override:
        raise InvalidModelError("Give --altitude-m or --pressure-kPa, not both.")
    AirConditions.from_settings(override)
    return tuple(override.items())


def basis_override(args: argparse.Namespace) -> tuple[tuple[str, str | float], ...]:
    """The voltage-basis settings given with --voltage-basis, --voltage-factor and
    --potentials-rms (checked here, before any solve)."""
    override: dict[str, str | float] = {}
    basis = getattr(args, "voltage_basis", None)
    factor = getattr(args, "voltage_factor", None)
    if factor is not None:
        if basis not in (None, "factor"):
            raise InvalidModelError(f"--voltage-factor goes with --voltage-basis factor, not {basis}.")
        override["basis"], override["factor"] = "factor", float(factor)
    elif basis is not None:
        if basis == "factor":
            raise InvalidModelError("--voltage-basis factor needs --voltage-factor (e.g. 1.2).")
        override["basis"] = basis
    if getattr(args, "potentials_rms", False):
        override["potentials"] = "rms"
    VoltageBasis.from_settings(override)
    return tuple(override.items())


def parse_radius_sweep(text: str | None) -> tuple[str, tuple[float, ...]] | None:
    """``"CONDUCTOR=R1,R2,..."`` as (conductor, radii in metres); None for no text."""
    if not text:
        return None
    name, sep, radii = text.rpartition("=")
    try:
        values = tuple(float(r) for r in radii.split(",") if r.strip())
    except ValueError:
        values = ()
    if not sep or not name or not values:
        raise InvalidModelError(f"--radius-sweep '{text}': write CONDUCTOR=R1,R2,... with radii in metres.")
    return name, values


def options_from_args(args: argparse.Namespace) -> ReportOptions:
    """The :class:`ReportOptions` of one command-line run (raises InvalidModelError on a bad sweep)."""
    return ReportOptions(
        air_override=air_override(args),
        basis_override=basis_override(args),
        corner_radius_m=getattr(args, "corner_radius_m", None),
        peak_target=getattr(args, "peak_target", 0.01),
        part_length_m=getattr(args, "part_length_m", None),
        radius_sweep=parse_radius_sweep(getattr(args, "radius_sweep", None)),
        cross_check_points=tuple(args.cross_check_points) if getattr(args, "cross_check", False) else None,
        tolerance=checked_tolerance(getattr(args, "tolerance", None)),
    )


def checked_tolerance(value: float | None) -> float | None:
    """``--tolerance`` checked: a relative error between 1e-15 and 1 (None when not given)."""
    if value is None:
        return None
    if not (1e-15 <= value < 1.0):
        raise InvalidModelError(f"--tolerance {value:g}: give a relative error between 1e-15 and 1, e.g. 1e-10.")
    return float(value)
