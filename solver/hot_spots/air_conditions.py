"""The air a high-voltage result is judged in: its conditions, the thresholds of breakdown and
corona onset, and the caution text.

Thresholds and where they come from
-----------------------------------
* Air breakdown: the uniform-field strength of air for the gap to the nearest conductor at
  another potential, from the empirical relation of Kuffel, Zaengl & Kuffel (High Voltage
  Engineering Fundamentals, 2000), in proportion to gas density and times the surface factor
  (:mod:`solver.hot_spots.air_strength`). The rule of thumb 3 MV/m x delta
  (:func:`air_breakdown_field_V_per_m`, common practice) is that relation near a 1 cm gap;
  for longer gaps it is not conservative, so the verdicts no longer use it.
* Relative air density: delta = (p / p0) (T0 / T) with the standard reference atmosphere of
  high-voltage testing, p0 = 101.325 kPa and T0 = 293.15 K (20 degC) (from memory of IEC
  60060-1). Peek's own reference was 25 degC and 76 cm Hg (delta = 3.92 b / (273 + t)); the
  two differ by 1.7 %.
* Pressure at altitude: the barometric formula of the standard atmosphere in the troposphere
  (ISO 2533:1975; U.S. Standard Atmosphere, 1976), p = 101325 Pa (1 - 2.25577e-5 h / m)^5.25588,
  valid from sea level to 11 km. Unless a temperature is given, the air is taken at the
  reference temperature, so altitude enters through pressure alone.
* Corona onset on a round conductor of radius r: F. W. Peek, Dielectric Phenomena in
  High-Voltage Engineering, 3rd ed., 1929, visual critical gradient, crest values:
  parallel wires  E_c = 30 m delta (1 + 0.301 / sqrt(delta r)) kV/cm, r in cm (the default;
  it suits wires over earth and between wires), or coaxial  E_c = 31 m delta (1 + 0.308 /
  sqrt(delta r)) kV/cm. The surface factor m is 1 for a smooth, polished surface, about 0.93
  to 0.98 for a roughened or weathered one and about 0.83 to 0.87 for a stranded conductor.

A margin below :data:`THIN_MARGIN` (1.5, a choice of this program, not a standard) is "thin".
The project's air conditions live in the project file (:func:`air_conditions_of`,
:func:`with_air_conditions`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from typing import Any

from solver.errors import InvalidModelError
from solver.model.model import Model

#: Dielectric strength of air in a uniform field at the reference atmosphere, V/m (common practice).
AIR_DIELECTRIC_STRENGTH_V_PER_M = 3.0e6
#: Reference pressure of the relative air density, Pa.
REFERENCE_PRESSURE_PA = 101_325.0
#: Reference temperature of the relative air density, K (20 degC).
REFERENCE_TEMPERATURE_K = 293.15
#: Kelvin at 0 degC.
KELVIN_AT_0_C = 273.15
#: Margins (threshold / peak) below this are reported as thin; a choice of this program.
THIN_MARGIN = 1.5
#: Peek's constants (A in kV/cm, B in cm^0.5) of E_c = A m delta (1 + B / sqrt(delta r)).
PEEK_FORMS: dict[str, tuple[float, float]] = {"parallel_wires": (30.0, 0.301), "coaxial": (31.0, 0.308)}

#: The caution shown with every high-voltage result; SAFETY.md repeats it word for word.
HIGH_VOLTAGE_CAUTION = (
    "Caution - high voltage. These figures come from a two-dimensional electrostatic model of an "
    "infinitely long, uniform cross-section in clean, dry air. They are an aid to design, not a "
    "safety assessment. Breakdown and corona onset also depend on gap length, field uniformity, "
    "surface condition, humidity, contamination, altitude, voltage waveform and polarity, and the "
    "ends, supports and joints of a real part (which a 2-D model cannot see) often carry higher "
    "fields. Keep a generous margin. This program does not determine clearances, creepage "
    "distances or insulation coordination. Applicable local codes and standards, and review by a "
    "licensed or otherwise qualified engineer, prevail over anything it reports. Work on or near "
    "energised equipment is for qualified persons only."
)


def pressure_at_altitude_Pa(altitude_m: float) -> float:
    """Air pressure of the standard atmosphere at ``altitude_m`` above sea level, Pa.

    Troposphere barometric formula (ISO 2533:1975), valid from 0 to 11 000 m.

    >>> round(pressure_at_altitude_Pa(2000.0))
    79495
    """
    if not (math.isfinite(altitude_m) and -500.0 <= altitude_m <= 11_000.0):
        raise InvalidModelError(f"Altitude is {altitude_m} m; the standard-atmosphere formula holds from -500 to 11000 m.")
    return REFERENCE_PRESSURE_PA * (1.0 - 2.25577e-5 * altitude_m) ** 5.25588


def relative_air_density(pressure_Pa: float, temperature_K: float = REFERENCE_TEMPERATURE_K) -> float:
    """Relative air density delta = (p / 101.325 kPa) (293.15 K / T), dimensionless."""
    if not (pressure_Pa > 0 and temperature_K > 0):
        raise InvalidModelError(
            f"Air pressure {pressure_Pa} Pa and temperature {temperature_K} K; both must be positive."
        )
    return (pressure_Pa / REFERENCE_PRESSURE_PA) * (REFERENCE_TEMPERATURE_K / temperature_K)


def relative_air_density_at_altitude(altitude_m: float, temperature_K: float = REFERENCE_TEMPERATURE_K) -> float:
    """Relative air density at an altitude (standard-atmosphere pressure, given temperature)."""
    return relative_air_density(pressure_at_altitude_Pa(altitude_m), temperature_K)


def air_breakdown_field_V_per_m(relative_air_density: float = 1.0) -> float:
    """The rule of thumb for air, 3 MV/m x delta (common practice), V/m crest.

    About right for a gap near 1 cm only; the verdicts use the gap-dependent relation of
    :func:`solver.hot_spots.air_strength.air_strength` instead.
    """
    if not relative_air_density > 0:
        raise InvalidModelError(f"Relative air density is {relative_air_density}; it must be positive.")
    return AIR_DIELECTRIC_STRENGTH_V_PER_M * relative_air_density


def peek_corona_onset_field_V_per_m(
    radius_m: float,
    relative_air_density: float = 1.0,
    surface_factor: float = 1.0,
    form: str = "parallel_wires",
) -> float:
    """Peek's visual corona-onset surface field of a round conductor, V/m crest.

    E_c = A m delta (1 + B / sqrt(delta r)) kV/cm with r in cm; (A, B) = (30, 0.301) for
    parallel wires, (31, 0.308) for coaxial cylinders (Peek, 1929).

    >>> round(peek_corona_onset_field_V_per_m(0.01) / 1e6, 4)  # r = 1 cm: 30 x 1.301 kV/cm
    3.903
    """
    if form not in PEEK_FORMS:
        raise InvalidModelError(f"Peek form '{form}' is not known; use one of {', '.join(PEEK_FORMS)}.")
    if not radius_m > 0:
        raise InvalidModelError(f"Conductor radius is {radius_m} m; it must be positive.")
    if not 0 < surface_factor <= 1:
        raise InvalidModelError(f"Surface factor is {surface_factor}; it lies between 0 and 1 (1 = smooth).")
    if not relative_air_density > 0:
        raise InvalidModelError(f"Relative air density is {relative_air_density}; it must be positive.")
    a, b = PEEK_FORMS[form]
    r_cm = radius_m * 100.0
    kv_per_cm = a * surface_factor * relative_air_density * (1.0 + b / math.sqrt(relative_air_density * r_cm))
    return kv_per_cm * 1e5


@dataclass(frozen=True)
class AirConditions:
    """The air around the conductors and the surface of round conductors (one set per project).

    Attributes
    ----------
    relative_air_density : delta, 1 at 101.325 kPa and 20 degC.
    surface_factor : Peek's m (1 smooth, ~0.95 weathered, ~0.85 stranded).
    peek_form : "parallel_wires" or "coaxial".
    description : where delta came from, in words.
    altitude_m, pressure_Pa, temperature_K : what the user gave (None when not given); kept so
        that the conditions can be saved with the project and shown again as typed.
    """

    relative_air_density: float = 1.0
    surface_factor: float = 1.0
    peek_form: str = "parallel_wires"
    description: str = "standard reference atmosphere (101.325 kPa, 20 degC)"
    altitude_m: float | None = None
    pressure_Pa: float | None = None
    temperature_K: float | None = None

    def __post_init__(self) -> None:
        if not (math.isfinite(self.relative_air_density) and self.relative_air_density > 0):
            raise InvalidModelError(f"Relative air density is {self.relative_air_density}; it must be positive.")
        if not (math.isfinite(self.surface_factor) and 0 < self.surface_factor <= 1):
            raise InvalidModelError(f"Surface factor is {self.surface_factor}; it lies between 0 and 1 (1 = smooth).")
        if self.peek_form not in PEEK_FORMS:
            raise InvalidModelError(f"Peek form '{self.peek_form}' is not known; use one of {', '.join(PEEK_FORMS)}.")

    @classmethod
    def at_altitude(cls, altitude_m: float, temperature_K: float = REFERENCE_TEMPERATURE_K, **kw) -> AirConditions:
        """Air at ``altitude_m`` (standard-atmosphere pressure) and ``temperature_K``."""
        delta = relative_air_density_at_altitude(altitude_m, temperature_K)
        text = f"altitude {altitude_m:g} m, {temperature_K - 273.15:g} degC (standard-atmosphere pressure)"
        return cls(delta, description=text, altitude_m=float(altitude_m), temperature_K=float(temperature_K), **kw)

    @classmethod
    def at_pressure(cls, pressure_Pa: float, temperature_K: float = REFERENCE_TEMPERATURE_K, **kw) -> AirConditions:
        """Air at a measured pressure and temperature."""
        delta = relative_air_density(pressure_Pa, temperature_K)
        return cls(delta, description=f"{pressure_Pa / 1e3:g} kPa, {temperature_K - 273.15:g} degC",
                   pressure_Pa=float(pressure_Pa), temperature_K=float(temperature_K), **kw)

    def as_settings(self) -> dict:
        """The project-file form (``air_conditions``, see docs/project_file.md): what the user gave.

        >>> AirConditions.at_altitude(1500.0, surface_factor=0.9).as_settings()
        {'altitude_m': 1500.0, 'temperature_C': 20.0, 'surface_factor': 0.9, 'peek_form': 'parallel_wires'}
        """
        out: dict = {}
        if self.altitude_m is not None:
            out["altitude_m"] = self.altitude_m
        elif self.pressure_Pa is not None:
            out["pressure_kPa"] = round(self.pressure_Pa / 1e3, 12)
        elif self.relative_air_density != 1.0:
            out["relative_air_density"] = self.relative_air_density
        if self.temperature_K is not None:
            out["temperature_C"] = round(self.temperature_K - KELVIN_AT_0_C, 12)
        out["surface_factor"] = self.surface_factor
        out["peek_form"] = self.peek_form
        return out

    @classmethod
    def from_settings(cls, settings: dict) -> AirConditions:
        """Air conditions from their project-file form (the inverse of :meth:`as_settings`).

        Keys: ``altitude_m`` or ``pressure_kPa`` or ``relative_air_density`` (at most one),
        ``temperature_C`` (default 20), ``surface_factor`` (default 1), ``peek_form``.
        """
        kw: dict[str, Any] = {"surface_factor": float(settings.get("surface_factor", 1.0)),
              "peek_form": str(settings.get("peek_form", "parallel_wires"))}
        given = [k for k in ("altitude_m", "pressure_kPa", "relative_air_density") if settings.get(k) is not None]
        if len(given) > 1:
            raise InvalidModelError(f"Air conditions give both {given[0]} and {given[1]}; give one of them.")
        t = settings.get("temperature_C")
        temperature_K = REFERENCE_TEMPERATURE_K if t is None else float(t) + KELVIN_AT_0_C
        if "altitude_m" in given:
            return cls.at_altitude(float(settings["altitude_m"]), temperature_K, **kw)
        if "pressure_kPa" in given or t is not None:
            pressure = float(settings.get("pressure_kPa") or REFERENCE_PRESSURE_PA / 1e3) * 1e3
            return cls.at_pressure(pressure, temperature_K, **kw)
        if "relative_air_density" in given:
            delta = float(settings["relative_air_density"])
            return cls(delta, description=f"relative air density {delta:g} as given", **kw)
        return cls(**kw)


#: The standard reference atmosphere and a smooth surface (the default air conditions).
REFERENCE_AIR = AirConditions()

#: Key of the project's air conditions in ``Model.extras`` (the project file's ``air_conditions``).
AIR_CONDITIONS_KEY = "air_conditions"
#: Keys earlier versions of the desktop program kept in ``extras`` (read, never written).
_LEGACY_ALTITUDE_KEY, _LEGACY_DENSITY_KEY = "altitude_m", "relative_air_density"


def air_conditions_of(model: Model) -> AirConditions:
    """The project's one set of air conditions (standard reference atmosphere when none is saved).

    Reads ``model.extras["air_conditions"]`` (the project file's ``air_conditions``); files
    written by earlier versions that kept only a site altitude or an air density in ``extras``
    are read too.

    Raises
    ------
    InvalidModelError
        When the saved conditions are out of range (e.g. an altitude above 11 000 m).
    """
    extras = model.extras or {}
    settings = extras.get(AIR_CONDITIONS_KEY)
    if isinstance(settings, dict):
        return AirConditions.from_settings(settings)
    if extras.get(_LEGACY_ALTITUDE_KEY) is not None:
        return AirConditions.at_altitude(float(extras[_LEGACY_ALTITUDE_KEY]))
    if extras.get(_LEGACY_DENSITY_KEY) is not None:
        return AirConditions.from_settings({"relative_air_density": float(extras[_LEGACY_DENSITY_KEY])})
    return AirConditions()


def with_air_conditions(model: Model, air: AirConditions) -> Model:
    """A copy of ``model`` carrying ``air`` as its project air conditions (legacy keys dropped)."""
    extras = {k: v for k, v in (model.extras or {}).items() if k not in (_LEGACY_ALTITUDE_KEY, _LEGACY_DENSITY_KEY)}
    extras[AIR_CONDITIONS_KEY] = air.as_settings()
    return replace(model, extras=extras)


def round_radius_m(model: Model, conductor: str, location_m: tuple[float, float] | None = None) -> float | None:
    """Radius (m) of a conductor made of one circle or one ring, else None.

    For a ring, the outer radius — unless ``location_m`` (the peak) lies on the inner surface,
    which is hollow toward the field and has no corona-onset radius (None).
    """
    shapes = model.conductor(conductor).shapes
    if len(shapes) != 1:
        return None
    scale = model.metres_per_unit
    point = None if location_m is None else (location_m[0] / scale, location_m[1] / scale)
    radius = shapes[0].round_radius_at(point)
    return None if radius is None else radius * scale


#: Where a corona radius came from: the conductor is one circle or ring (Peek's own case).
ROUND_CONDUCTOR_BASIS = "round conductor"
#: How a corona radius taken from the outline's curvature is described.
LOCAL_RADIUS_BASIS = "local radius of curvature at the peak (approximation: Peek's formula is for round conductors)"


def corona_radius_m(model: Model, conductor: str, location_m: tuple[float, float] | None,
                    local_radius_of_curvature_m: float | None, at_sharp_corner: bool) -> tuple[float | None, str | None]:
    """The radius for Peek's formula at a peak, metres, and where it came from (or (None, None)).

    The conductor's own radius when it is one circle or ring, else the local radius of
    curvature of the outline at the peak (not at a sharp corner).
    """
    radius = round_radius_m(model, conductor, location_m) if conductor in model.conductor_names else None
    if radius is not None:
        return radius, ROUND_CONDUCTOR_BASIS
    if local_radius_of_curvature_m is not None and not at_sharp_corner:
        return float(local_radius_of_curvature_m), LOCAL_RADIUS_BASIS
    return None, None
