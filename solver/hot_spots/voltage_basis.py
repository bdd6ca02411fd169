"""The voltage basis of a high-voltage check: which voltage the model's potentials stand for.

A margin means little unless one knows the voltage it was computed at. At the operating
voltage a design must of course hold; what sizes insulation in air is the voltage it must
withstand in tests and in service: temporary overvoltages, the power-frequency withstand
test and the lightning (and switching) impulse withstand (common practice; the levels
themselves come from the equipment's standard and insulation coordination, which this program
does not do). The project therefore says what its potentials are:

* ``"operating"`` -- the operating voltage (the default, and what files written before this
  field existed are read as);
* ``"power_frequency_withstand"`` -- the power-frequency withstand test voltage;
* ``"lightning_impulse"`` -- the lightning-impulse withstand voltage (its crest);
* ``"factor"`` -- the operating voltage, to be checked at ``factor`` times it (an overvoltage
  factor of the user's choice, e.g. 1.2 for a temporary overvoltage).

and whether the potentials are entered as **crest** (peak) values or as **rms** values of a
sine wave. All thresholds (air breakdown, Peek's corona onset) are crest values, so rms
potentials are converted to crest by sqrt 2 (common practice) and the result says so.

Fields scale linearly with the potentials in electrostatics, so the check multiplies every
peak field (and the largest potential difference) by :attr:`VoltageBasis.field_factor`
= factor x (sqrt 2 for rms) before comparing it with a threshold; the model is not solved
again. The project file keeps the basis under ``voltage_basis`` (docs/project_file.md).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

from solver.errors import InvalidModelError
from solver.model.model import Model

#: The bases a project can state, with how a result names them.
VOLTAGE_BASES: dict[str, str] = {
    "operating": "operating voltage",
    "power_frequency_withstand": "power-frequency withstand voltage",
    "lightning_impulse": "lightning-impulse withstand voltage",
    "factor": "operating voltage times an overvoltage factor",
}
#: How potentials may be entered.
POTENTIAL_FORMS = ("crest", "rms")
#: Crest / rms of a sine wave.
CREST_PER_RMS = math.sqrt(2.0)
#: Key of the voltage basis in ``Model.extras`` (the project file's top-level ``voltage_basis``).
VOLTAGE_BASIS_KEY = "voltage_basis"

#: What to say after an "ample" (or any) verdict at operating voltage.
CHECK_AT_TEST_LEVELS = (
    "This check is at operating voltage only: air gaps are sized by the voltages they must withstand "
    "(temporary overvoltages, the power-frequency withstand and lightning-impulse withstand levels of the "
    "equipment's standard), so check again with the voltage basis set to those levels.")
#: What to say of a check at lightning-impulse level.
IMPULSE_NOTE = (
    "The thresholds are for power-frequency and DC voltages; air holds about the same crest field under a "
    "lightning impulse in a near-uniform field and more in a strongly non-uniform one (common practice), so "
    "this check is on the safe side.")


@dataclass(frozen=True)
class VoltageBasis:
    """Which voltage the model's potentials stand for (one per project).

    Attributes
    ----------
    basis : one of :data:`VOLTAGE_BASES`.
    potentials : "crest" or "rms" (rms is a sine wave's; not with a lightning impulse).
    factor : the overvoltage factor of the "factor" basis (1 for every other basis).
    """

    basis: str = "operating"
    potentials: str = "crest"
    factor: float = 1.0

    def __post_init__(self) -> None:
        if self.basis not in VOLTAGE_BASES:
            raise InvalidModelError(f"Voltage basis '{self.basis}' is not known; use one of "
                                    f"{', '.join(VOLTAGE_BASES)}.")
        if self.potentials not in POTENTIAL_FORMS:
            raise InvalidModelError(f"Voltage basis: potentials '{self.potentials}' must be 'crest' or 'rms'.")
        if not (isinstance(self.factor, (int, float)) and math.isfinite(self.factor) and 0 < self.factor <= 100):
            raise InvalidModelError(f"Voltage basis: factor {self.factor} must be a number above 0 and at most 100.")
        if self.basis != "factor" and self.factor != 1.0:
            raise InvalidModelError(f"Voltage basis '{self.basis}' takes no factor (got {self.factor:g}); "
                                    "use the basis 'factor' for an overvoltage factor.")
        if self.basis == "lightning_impulse" and self.potentials == "rms":
            raise InvalidModelError("Voltage basis: a lightning impulse has no rms value; give its crest.")

    @property
    def field_factor(self) -> float:
        """What the model's fields are multiplied by for the check: factor x (sqrt 2 for rms)."""
        return self.factor * (CREST_PER_RMS if self.potentials == "rms" else 1.0)

    @property
    def at_operating_voltage(self) -> bool:
        """True when the check is at operating voltage (basis "operating", or a factor of 1)."""
        return self.basis == "operating" or (self.basis == "factor" and self.factor == 1.0)

    def describe(self) -> str:
        """The basis in words, with the conversion applied.

        >>> VoltageBasis("operating", "rms").describe()
        'operating voltage; potentials entered as rms, converted to crest (x 1.414)'
        >>> VoltageBasis("factor", factor=1.25).describe()
        'operating voltage times an overvoltage factor of 1.25 (crest); fields x 1.25'
        """
        name = VOLTAGE_BASES[self.basis]
        if self.basis == "factor":
            name = f"{name.replace('an overvoltage factor', 'an overvoltage factor of')} {self.factor:g}"
        if self.potentials == "rms":
            text = f"{name}; potentials entered as rms, converted to crest (x {CREST_PER_RMS:.3f})"
            if self.basis == "factor":
                text += f"; fields x {self.field_factor:.4g} in all"
            return text
        text = f"{name} (crest)"
        if self.basis == "factor":
            text += f"; fields x {self.factor:g}"
        return text

    def advice(self) -> str:
        """What a result at this basis must add (empty when nothing)."""
        if self.at_operating_voltage:
            return CHECK_AT_TEST_LEVELS
        if self.basis == "lightning_impulse":
            return IMPULSE_NOTE
        return ""

    def as_settings(self) -> dict:
        """The project-file form (``voltage_basis``).

        >>> VoltageBasis("factor", "rms", 1.2).as_settings()
        {'basis': 'factor', 'potentials': 'rms', 'factor': 1.2}
        """
        out: dict = {"basis": self.basis, "potentials": self.potentials}
        if self.basis == "factor":
            out["factor"] = self.factor
        return out

    @classmethod
    def from_settings(cls, settings: dict) -> VoltageBasis:
        """The basis from its project-file form (missing keys: operating, crest, factor 1)."""
        basis = str(settings.get("basis", "operating"))
        potentials = str(settings.get("potentials", "crest"))
        factor = settings.get("factor", 1.0)
        if isinstance(factor, bool) or not isinstance(factor, (int, float)):
            raise InvalidModelError(f"Voltage basis: factor {factor!r} must be a number.")
        return cls(basis, potentials, float(factor))


#: The default: potentials are operating crest values (what every earlier file meant).
OPERATING_CREST = VoltageBasis()


def voltage_basis_of(model: Model) -> VoltageBasis:
    """The project's voltage basis (operating crest when none is saved).

    Raises
    ------
    InvalidModelError
        When the saved basis is not valid.
    """
    settings = (model.extras or {}).get(VOLTAGE_BASIS_KEY)
    return VoltageBasis.from_settings(settings) if isinstance(settings, dict) else OPERATING_CREST


def with_voltage_basis(model: Model, basis: VoltageBasis) -> Model:
    """A copy of ``model`` carrying ``basis`` as its project voltage basis."""
    extras = dict(model.extras or {})
    extras[VOLTAGE_BASIS_KEY] = basis.as_settings()
    return replace(model, extras=extras)
