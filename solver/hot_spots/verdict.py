"""The one caution rule: the status of a peak field, the reason and the caution text.

Every place that shows a high-voltage verdict -- the desktop program's banner, its High
voltage and Hot spots tabs, the PDF report, the command line's text and JSON -- asks
:func:`judge_peak` (one peak) or :func:`summarise_verdicts` (a model) and shows their words.

The rule, in order (the first that applies decides):

1. **Non-finite value** (a peak or a potential that is NaN or infinite): "not assessed".
2. **Low voltage**: the largest potential difference in the model is below
   :data:`LOW_VOLTAGE_THRESHOLD_V` (300 V, a choice of this program). It sits under the
   Paschen minimum of air, about 327 V (from memory; see the Paschen curve of air in
   E. Kuffel, W. S. Zaengl & J. Kuffel, High Voltage Engineering Fundamentals, 2000): no gap
   in air at ordinary density breaks down below it, whatever its length. "not assessed", and
   no breakdown caution.
3. **Sharp corner or free edge**: the 2-D peak has no finite value (it grows at every
   refinement), so it is never graded: "not assessed", give a corner radius.
4. **Not in air**: the peak sits in a region whose material is not air
   (:func:`solver.model.materials.region_is_air`): the air thresholds do not apply.
5. **Graded**: margin = threshold / peak, with two thresholds. The air-breakdown margin
   compares the peak with the uniform-field strength of air for the gap to the nearest
   conductor at another potential, corrected for air density and multiplied by the surface
   factor (:mod:`solver.hot_spots.air_strength`: the empirical relation of E. Kuffel,
   W. S. Zaengl & J. Kuffel, High Voltage Engineering Fundamentals, 2000). The corona-onset
   margin compares it with Peek's corona-onset field (F. W. Peek, Dielectric Phenomena in
   High-Voltage Engineering, 1929) for a corona radius, which already contains the strength
   of air and the help of the field's decay away from a curved surface. Which one decides
   (:attr:`PeakVerdict.deciding`):

   - a round conductor (one circle or ring, the shape Peek's formula was made for): the
     corona-onset margin;
   - a peak where the corona radius is only the local radius of curvature of the outline (a
     rounded corner of a bar, say): the smaller of the two, because carrying Peek's formula
     over to a curved piece of a larger outline is an approximation and may not make the
     verdict more lenient than the uniform-field strength of air (a choice of this program);
   - no corona radius (a straight run): the air-breakdown margin.

   Below 1: "exceeded"; below :data:`THIN_MARGIN` (1.5, a choice of this program): "thin";
   else "ample". Only "exceeded" says "expect corona or flashover". Every view shows which
   margin decided, beside both margins.

The voltage basis (:mod:`solver.hot_spots.voltage_basis`) says what the potentials stand for
(operating, power-frequency withstand, lightning impulse or an overvoltage factor; crest or
rms): the peak and the potential difference are multiplied by its field factor before rules
2-5, every graded headline names the basis, and a check at operating voltage says to check
again at the test and overvoltage levels.

Whenever the model is not low-voltage (and the values are finite) the full
:data:`HIGH_VOLTAGE_CAUTION` is part of the caution text, whatever the status.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from typing import Any

from solver.hot_spots.air_conditions import (
    HIGH_VOLTAGE_CAUTION,
    REFERENCE_AIR,
    ROUND_CONDUCTOR_BASIS,
    THIN_MARGIN,
    AirConditions,
    corona_radius_m,
    peek_corona_onset_field_V_per_m,
)
from solver.hot_spots.air_region import largest_air_field, medium_next_to
from solver.hot_spots.air_strength import air_strength
from solver.hot_spots.curvature import signed_radius_of_curvature_m
from solver.hot_spots.peak_diagnostics import nearest_other_potential
from solver.hot_spots.voltage_basis import OPERATING_CREST, VOLTAGE_BASES, VoltageBasis, voltage_basis_of
from solver.hot_spots.weak_corners import weak_corner_at
from solver.model.materials import Medium

#: Largest potential difference (V) below which no breakdown caution is given; a choice of
#: this program, under the Paschen minimum of air (about 327 V, from memory).
LOW_VOLTAGE_THRESHOLD_V = 300.0

#: Statuses from the most to the least severe (the order a summary uses).
STATUSES = ("exceeded", "thin", "not assessed", "ample")

#: How each status reads to a person: the same words on the command line, in the desktop
#: program's caution line and in the PDF report (the JSON keeps the status itself).
STATUS_WORDS = {"exceeded": "exceeded", "thin": "approaching (thin margin)", "not assessed": "not assessed",
                "ample": "ample"}

#: The part of every reason that says why a peak was not graded (the first words).
NON_FINITE, LOW_VOLTAGE, SHARP_CORNER, NOT_IN_AIR = "non-finite value", "low voltage", "at a sharp corner", "not in air"

#: The two margins a graded verdict can be decided by (:attr:`PeakVerdict.deciding`).
BY_CORONA_ONSET, BY_AIR_BREAKDOWN = "corona onset", "air breakdown"


@dataclass(frozen=True)
class PeakVerdict:
    """The verdict on one peak field (all fields crest values at the voltage basis, V/m).

    Attributes
    ----------
    where : what the peak belongs to, as shown: "'<conductor>'" or "the surrounding air".
    status : "ample", "thin", "exceeded" or "not assessed".
    reason : why, in words (no figures, so every view shows the same words).
    headline : one line for a banner or a frame.
    caution : the full text to show (headline, advice and :data:`HIGH_VOLTAGE_CAUTION`);
        empty only for a low-voltage model.
    peak_field_V_per_m : the peak that was judged: the model's peak times the basis's field
        factor.
    air_breakdown_field_V_per_m, air_breakdown_margin : uniform-field strength of air for the
        gap (density and surface factor included) and strength / peak (None when not graded).
    corona_onset_field_V_per_m, corona_onset_margin : Peek's onset and onset / peak (None
        without a corona radius or when not graded).
    margin : the margin that set the status (None when not graded).
    threshold : what ``margin`` compares with, in words (None when not graded).
    deciding : which margin set the status, in short: :data:`BY_CORONA_ONSET` or
        :data:`BY_AIR_BREAKDOWN` (None when not graded).
    at_sharp_corner : the peak sits at a sharp corner or free edge, so its value is mesh-made
        (whatever decided the status: a low-voltage model's corner peak is one too).
    gap_m : the gap the strength of air was taken for, metres (None: none known).
    air_strength_basis : how the strength of air was found, in words.
    voltage_basis : the voltage basis in words (:meth:`VoltageBasis.describe`).
    field_factor : what the model's fields were multiplied by (1 for operating crest).
    """

    where: str
    status: str
    reason: str
    headline: str
    caution: str
    peak_field_V_per_m: float
    air_breakdown_field_V_per_m: float
    air_breakdown_margin: float | None = None
    corona_onset_field_V_per_m: float | None = None
    corona_onset_margin: float | None = None
    margin: float | None = None
    threshold: str | None = None
    gap_m: float | None = None
    air_strength_basis: str = ""
    voltage_basis: str = ""
    field_factor: float = 1.0
    deciding: str | None = None
    at_sharp_corner: bool = False

    @property
    def graded(self) -> bool:
        """True when a margin was computed (status ample, thin or exceeded)."""
        return self.margin is not None


def largest_potential_difference_V(potentials_V: Iterable[float], has_zero_volt_return: bool) -> float:
    """Largest |V_i - V_j| among ``potentials_V`` (and 0 V when a ground plane or reference exists), V.

    NaN when any potential is not finite.

    >>> largest_potential_difference_V([500.0, -500.0], False)
    1000.0
    >>> largest_potential_difference_V([10e3], True)
    10000.0
    """
    values = [float(v) for v in potentials_V] + ([0.0] if has_zero_volt_return else [])
    if not values:
        return 0.0
    if not all(math.isfinite(v) for v in values):
        return math.nan
    return max(values) - min(values)


def _graded(peak: float, breakdown: float, corona: float | None, corona_basis: str | None,
            thin_margin: float) -> tuple[str, str, float, float | None, float, str, str]:
    m_air = breakdown / peak if peak > 0 else math.inf
    m_cor = None if corona is None else (corona / peak if peak > 0 else math.inf)
    air_threshold = "the uniform-field strength of air for its gap"
    round_conductor = corona_basis is None or corona_basis == ROUND_CONDUCTOR_BASIS
    if m_cor is not None and (round_conductor or m_cor <= m_air):
        margin, threshold, deciding = m_cor, f"corona onset (Peek 1929, {corona_basis or ROUND_CONDUCTOR_BASIS})", BY_CORONA_ONSET
    else:
        margin, threshold, deciding = m_air, air_threshold, BY_AIR_BREAKDOWN
    status = "exceeded" if margin < 1 else "thin" if margin < thin_margin else "ample"
    reason = f"graded against {threshold}"
    if m_cor is not None and deciding == BY_AIR_BREAKDOWN:
        reason += (", the smaller margin: the corona-onset margin is larger but rests on the local radius of "
                   "curvature, an approximation (Peek's formula is for round conductors)")
    return status, reason, m_air, m_cor, margin, threshold, deciding


def judge_peak(
    peak_field_V_per_m: float,
    *,
    where: str,
    largest_potential_difference_V: float,
    medium: Medium | None,
    at_sharp_corner: bool,
    corona_onset_field_V_per_m: float | None = None,
    corona_radius_basis: str | None = None,
    air: AirConditions = REFERENCE_AIR,
    thin_margin: float = THIN_MARGIN,
    gap_m: float | None = None,
    voltage_basis: VoltageBasis = OPERATING_CREST,
) -> PeakVerdict:
    """The status of one peak surface field, its reason and its caution text.

    Parameters
    ----------
    peak_field_V_per_m : float
        Largest |E| at the model's potentials, V/m (times the basis's field factor when judged).
    where : str
        What the peak belongs to, as shown ("'bar'" or "the surrounding air").
    largest_potential_difference_V : float
        Largest potential difference in the model, V (see :func:`largest_potential_difference_V`).
    medium : Medium or None
        The medium next to the peak (None: air, e.g. the surrounding air itself).
    at_sharp_corner : bool
        The peak sits at a sharp corner or free edge (its 2-D value is mesh-made).
    corona_onset_field_V_per_m : float, optional
        Peek's onset for the conductor's radius at the peak (None without one).
    corona_radius_basis : str, optional
        Where that radius came from ("round conductor", "local radius of curvature ...").
    air : AirConditions
        The project's air conditions.
    thin_margin : float
        Margins below this are "thin" (default 1.5, a choice of this program).
    gap_m : float, optional
        Gap from the peak's conductor to the nearest conductor (or earth) at another
        potential, metres, for the strength of air (None: its long-gap limit).
    voltage_basis : VoltageBasis
        What the model's potentials stand for (default: operating crest values).

    Returns
    -------
    PeakVerdict

    Examples
    --------
    >>> v = judge_peak(2.4e6, where="'wire'", largest_potential_difference_V=50e3, medium=None,
    ...                at_sharp_corner=False)
    >>> v.status, round(v.margin, 3)  # 2.47 MV/m (no gap known: long-gap limit) / 2.4 MV/m
    ('thin', 1.028)
    >>> judge_peak(2.4e6, where="'trace'", largest_potential_difference_V=1.0, medium=None,
    ...            at_sharp_corner=True).caution
    ''
    """
    strength = air_strength(gap_m, air.relative_air_density, air.surface_factor)
    breakdown = strength.field_V_per_m
    k = voltage_basis.field_factor
    peak = float(peak_field_V_per_m) * k
    dv = float(largest_potential_difference_V) * k
    extra: dict[str, Any] = dict(gap_m=strength.gap_m, air_strength_basis=strength.basis,
                                 voltage_basis=voltage_basis.describe(), field_factor=k,
                                 at_sharp_corner=bool(at_sharp_corner))
    caution_applies = True
    graded: tuple | None = None
    if not (math.isfinite(peak) and math.isfinite(dv)):
        reason = (f"{NON_FINITE}: the peak field or a potential is not a finite number, so no margin can be given; "
                  "check the model (a floating conductor with a net charge and no return path has no defined "
                  "potential in 2-D)")
    elif dv < LOW_VOLTAGE_THRESHOLD_V:
        caution_applies = False
        reason = (f"{LOW_VOLTAGE}: below {LOW_VOLTAGE_THRESHOLD_V:g} V between any two conductors (a choice of "
                  "this program, under the Paschen minimum of air of about 327 V), so no breakdown caution applies")
    elif at_sharp_corner:
        reason = (f"{SHARP_CORNER}: the 2-D peak is mesh-made (it grows with every refinement), so it is not "
                  "graded; give a corner radius")
    elif medium is not None and not medium.is_air:
        reason = (f"{NOT_IN_AIR}: inside {medium.describe()}; the air-breakdown and corona thresholds do not "
                  "apply; judge the insulation by its material's own rating, and mind air gaps and voids in "
                  "series with it")
    else:
        graded = _graded(peak, breakdown, corona_onset_field_V_per_m, corona_radius_basis, thin_margin)
    if graded is None:
        status, headline = "not assessed", f"No margin for {where}: {reason}."
        caution = f"{headline} {HIGH_VOLTAGE_CAUTION}" if caution_applies else ""
        return PeakVerdict(where, status, reason, headline, caution, peak, breakdown, **extra)
    status, reason, m_air, m_cor, margin, threshold, deciding = graded
    at = basis_phrase(voltage_basis)
    basis_text = f"Voltage basis: {voltage_basis.describe()}."
    advice = voltage_basis.advice()
    tail = f"{basis_text} {advice + ' ' if advice else ''}{HIGH_VOLTAGE_CAUTION}"
    if m_cor is not None and deciding == BY_AIR_BREAKDOWN:
        tail = ("The corona-onset margin is larger but does not decide: its radius is the local radius of curvature "
                f"of the outline, an approximation. {tail}")
    if status == "exceeded":
        headline = f"CAUTION: the peak surface field on {where} exceeds {threshold} {at}."
        caution = f"{headline} Expect corona or flashover in air at these potentials. {tail}"
    elif status == "thin":
        headline = f"CAUTION: thin margin on {where} to {threshold} (below {thin_margin:g}) {at}."
        caution = f"{headline} Margins are small. {tail}"
    else:
        headline = f"Margin on {where} to {threshold} is ample ({thin_margin:g} or more) {at}."
        caution = f"{headline} {tail}"
    return PeakVerdict(where, status, reason, headline, caution, peak, breakdown, m_air,
                       corona_onset_field_V_per_m if m_cor is not None else None, m_cor, margin, threshold,
                       deciding=deciding, **extra)


def basis_phrase(voltage_basis: VoltageBasis) -> str:
    """How a headline names the voltage basis ("at operating voltage", ...).

    >>> basis_phrase(VoltageBasis("factor", factor=1.2))
    'at 1.2 x operating voltage'
    """
    if voltage_basis.basis == "factor":
        return f"at {voltage_basis.factor:g} x operating voltage"
    if voltage_basis.basis == "operating":
        return "at operating voltage"
    return f"at the {VOLTAGE_BASES[voltage_basis.basis]}"


@dataclass(frozen=True)
class CautionVerdict:
    """The verdict on a whole model: its most severe peak verdict, and all of them.

    Attributes
    ----------
    status : the most severe status (:data:`STATUSES` order; a low-voltage "not assessed"
        ranks below "ample").
    reason : the reason of that verdict.
    headline : the headline of that verdict.
    caution : its full caution text (empty only for a low-voltage model).
    verdicts : every peak verdict, model order (the surrounding air last, when judged).
    """

    status: str
    reason: str
    headline: str
    caution: str
    verdicts: tuple[PeakVerdict, ...]

    @property
    def alarming(self) -> bool:
        """True when a caution must catch the eye: a margin is thin or exceeded, or a
        high-voltage peak has no usable value (sharp corner, non-finite). A peak inside
        insulation is not alarming by itself: the insulation's own rating decides."""
        if self.status in ("exceeded", "thin"):
            return True
        return self.status == "not assessed" and bool(self.caution) and not self.reason.startswith(NOT_IN_AIR)


def _severity(v: PeakVerdict) -> int:
    if v.status == "not assessed" and not v.caution:
        return len(STATUSES)  # low voltage: below "ample"
    return STATUSES.index(v.status)


def summarise_verdicts(verdicts: Sequence[PeakVerdict]) -> CautionVerdict | None:
    """The model's verdict: the most severe of ``verdicts`` (first in order on a tie), or None if empty."""
    if not verdicts:
        return None
    worst = min(verdicts, key=_severity)
    return CautionVerdict(worst.status, worst.reason, worst.headline, worst.caution, tuple(verdicts))


def judges_air_region(where: str) -> bool:
    """True when the largest field in air needs a verdict of its own: it lies on an interface
    (the outer surface of insulation, say). On a bare conductor surface it is that conductor's
    peak, already judged (with its corona onset) in the conductor's verdict."""
    return where == "interface"


def solution_potential_difference_V(solution) -> float:
    """Largest potential difference of a solved model, V (conductors, and 0 V for a ground plane)."""
    model = solution.model
    has_zero = model.ground_plane is not None or any(c.role == "reference" for c in model.conductors)
    return largest_potential_difference_V(solution.conductor_potentials_V, has_zero)


def judge_solution(solution, air: AirConditions = REFERENCE_AIR, thin_margin: float = THIN_MARGIN,
                   voltage_basis: VoltageBasis | None = None) -> CautionVerdict | None:
    """The verdict on the operating-point peaks of one solve (no refinement), by :func:`judge_peak`.

    One verdict per conductor (its largest surface field), plus the largest field in air
    around insulated conductors when the model has dielectric regions and some air, and that
    field lies on an interface (:func:`judges_air_region`). The
    refined figures of :func:`solver.analyse_hot_spots` judged by :func:`solver.assess_margins`
    use the same rule and the same words.

    Parameters
    ----------
    solution : Solution
    air : AirConditions
        The project's air conditions (:func:`solver.air_conditions_of`).
    thin_margin : float
    voltage_basis : VoltageBasis, optional
        What the potentials stand for (default: the project's, :func:`solver.voltage_basis_of`).

    Returns
    -------
    CautionVerdict or None (no conductors)
    """
    model = solution.model
    basis = voltage_basis_of(model) if voltage_basis is None else voltage_basis
    dv = solution_potential_difference_V(solution)
    gaps = {name: gap for name, (_, gap, _) in zip(solution.conductor_names, nearest_other_potential(model, solution))}
    verdicts = []
    for p in solution.peak_surface_fields:
        curvature = signed_radius_of_curvature_m(solution.mesh, p.panel_index)
        local = curvature if 0 < curvature < math.inf else None
        at_corner = bool(p.at_sharp_corner) or weak_corner_at(solution.mesh, p.panel_index) is not None
        radius, radius_basis = corona_radius_m(model, p.conductor, p.location_m, local, at_corner)
        corona = None if radius is None else peek_corona_onset_field_V_per_m(
            radius, air.relative_air_density, air.surface_factor, air.peek_form)
        verdicts.append(judge_peak(p.field_V_per_m, where=f"'{p.conductor}'", largest_potential_difference_V=dv,
                                   medium=medium_next_to(solution, p.panel_index), at_sharp_corner=at_corner,
                                   corona_onset_field_V_per_m=corona, corona_radius_basis=radius_basis, air=air,
                                   thin_margin=thin_margin, gap_m=gaps.get(p.conductor), voltage_basis=basis))
    in_air = largest_air_field(solution) if model.dielectrics else None
    if in_air is not None and judges_air_region(in_air.where):
        verdicts.append(judge_peak(in_air.field_V_per_m, where="the surrounding air", largest_potential_difference_V=dv,
                                   medium=None, at_sharp_corner=in_air.at_sharp_corner, air=air,
                                   thin_margin=thin_margin, voltage_basis=basis))
    return summarise_verdicts(verdicts)
