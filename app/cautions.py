"""The words the program shows around results: the 2-D limits, the caution texts and colours.

Qt-free and free of physics: the verdict on a peak field (status, reason, caution) is the
solver's (:func:`solver.judge_solution`, :func:`solver.assess_margins`, both by
:func:`solver.judge_peak`), the air conditions are the project's
(:func:`solver.air_conditions_of`) and the part-length check is :func:`solver.check_part_length`.
This module only words and colours what they return.
"""

from __future__ import annotations

import solver
from app import colours
from solver import HIGH_VOLTAGE_CAUTION, SolverError

#: The standing statement shown with every high-voltage figure (SAFETY.md has it word for word).
STANDING_STATEMENT = HIGH_VOLTAGE_CAUTION

#: Text and background colours of each verdict status (from the one colour table, app.colours).
STATUS_COLOURS = {status: (badge.text, badge.background) for status, badge in colours.SEVERITY.items()}

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


def caution_body(verdict) -> str:
    """The caution text of a verdict without its headline (shown separately in bold)."""
    text = verdict.caution
    return text[len(verdict.headline):].strip() if text.startswith(verdict.headline) else text


def length_text(model, part_length: float | None) -> str:
    """What the solver's part-length check says for ``part_length`` (in the model's unit)."""
    if not part_length or part_length <= 0:
        return ("Enter the length of the real part to see how well the per-metre figures describe it "
                "(end effects count as small once the part is many times longer than its cross-section).")
    try:
        return solver.check_part_length(model, part_length * model.metres_per_unit).note
    except SolverError as exc:
        return f"No part-length check: {exc}"
