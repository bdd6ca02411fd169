"""Margins of peak surface fields to air breakdown and corona onset, per conductor, with the
model's verdict.

The margin of a conductor is threshold / peak field (the thresholds and the air they hold for:
:mod:`solver.hot_spots.air_conditions`). A margin below
:data:`~solver.hot_spots.air_conditions.THIN_MARGIN` is "thin"; below 1 the threshold is
"exceeded". The status, its reason and the caution text come from one rule,
:func:`solver.hot_spots.verdict.judge_peak`. Potentials are read by the project's voltage basis
(:mod:`solver.hot_spots.voltage_basis`).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

from solver.hot_spots.air_conditions import (
    HIGH_VOLTAGE_CAUTION,
    REFERENCE_AIR,
    THIN_MARGIN,
    AirConditions,
    corona_radius_m,
    peek_corona_onset_field_V_per_m,
)
from solver.hot_spots.verdict import (
    BY_AIR_BREAKDOWN,
    BY_CORONA_ONSET,
    CautionVerdict,
    judge_peak,
    judges_air_region,
    summarise_verdicts,
)
from solver.hot_spots.verdict import largest_potential_difference_V as spread
from solver.hot_spots.voltage_basis import OPERATING_CREST, VoltageBasis, voltage_basis_of
from solver.model.materials import medium_of_region
from solver.model.model import Model


@dataclass(frozen=True)
class ConductorMargin:
    """Margins of one conductor's peak surface field (all fields crest values, V/m).

    ``peak_field_V_per_m`` is the peak at the model's potentials; the margins compare the
    thresholds with it times ``field_factor`` (the voltage basis: sqrt 2 for rms potentials,
    an overvoltage factor). ``air_breakdown_field_V_per_m`` is the uniform-field strength of
    air for ``gap_m`` (how it was found: ``air_strength_basis``).
    ``*_margin`` = threshold / (peak x field factor) (None when the peak is not graded: not finite, at a sharp
    corner, not in air, or in a low-voltage model).
    ``corona_radius_m`` is the radius put into Peek's formula: the conductor's own radius for a
    round conductor, else the local radius of curvature of the outline at the peak (an
    approximation, said in ``corona_radius_basis``); ``corona_*`` are None when there is
    neither (peak on a straight run or at a corner). ``status``, ``reason``, ``headline`` and
    ``caution`` are the verdict of :func:`solver.judge_peak` (the one caution rule);
    ``deciding_margin`` says which margin set the status ("corona onset" or "air breakdown",
    None when not graded) and ``margin`` is that margin.
    """

    conductor: str
    peak_field_V_per_m: float
    peak_field_estimated_relative_error: float | None
    air_breakdown_field_V_per_m: float
    air_breakdown_margin: float | None
    corona_radius_m: float | None
    corona_radius_basis: str | None
    corona_onset_field_V_per_m: float | None
    corona_onset_margin: float | None
    status: str
    caution: str
    reason: str = ""
    headline: str = ""
    gap_m: float | None = None
    air_strength_basis: str = ""
    field_factor: float = 1.0
    deciding_margin: str | None = None

    @property
    def margin(self) -> float | None:
        """The margin that set the status (None when the peak was not graded)."""
        if self.deciding_margin == BY_CORONA_ONSET:
            return self.corona_onset_margin
        return self.air_breakdown_margin if self.deciding_margin == BY_AIR_BREAKDOWN else None


@dataclass(frozen=True)
class MarginReport:
    """Margins of every analysed conductor, the air conditions and the model's verdict.

    With insulated conductors in air, ``air_region_margin`` compares the largest field in the
    surrounding air (on the outer surface of the insulation, say) with air breakdown, and
    ``air_region_status`` grades it like a conductor's (against
    ``air_region_breakdown_field_V_per_m``, the long-gap strength of air); all are None otherwise (and when that
    field lies on a bare conductor, whose own verdict covers it).
    ``verdict`` is the model's :class:`solver.CautionVerdict`; ``caution_text`` its caution
    (the full high-voltage caution whenever the model is not low-voltage).
    """

    margins: tuple[ConductorMargin, ...]
    air: AirConditions
    thin_margin: float
    caution_text: str = HIGH_VOLTAGE_CAUTION
    air_region_peak_field_V_per_m: float | None = None
    air_region_margin: float | None = None
    air_region_status: str | None = None
    verdict: CautionVerdict | None = None
    voltage_basis: VoltageBasis = OPERATING_CREST
    air_region_breakdown_field_V_per_m: float | None = None

    @property
    def needs_caution(self) -> bool:
        """True when any margin is thin or exceeded, or a high-voltage peak could not be graded."""
        return bool(self.verdict is not None and self.verdict.alarming)

    def as_dict(self) -> dict:
        """JSON-ready summary with SI keys (infinite margins become None)."""

        def clean(v):
            return None if isinstance(v, float) and not math.isfinite(v) else v

        v = self.verdict
        return {
            "relative_air_density": self.air.relative_air_density,
            "air_conditions": self.air.description,
            "air_conditions_settings": self.air.as_settings(),
            "surface_factor": self.air.surface_factor,
            "peek_form": self.air.peek_form,
            "thin_margin_threshold": self.thin_margin,
            "voltage_basis": self.voltage_basis.describe(),
            "voltage_basis_settings": self.voltage_basis.as_settings(),
            "field_factor": self.voltage_basis.field_factor,
            "conductors": [{k: clean(v) for k, v in vars(m).items()} for m in self.margins],
            "air_region_peak_field_V_per_m": self.air_region_peak_field_V_per_m,
            "air_region_margin": clean(self.air_region_margin),
            "air_region_breakdown_field_V_per_m": self.air_region_breakdown_field_V_per_m,
            "air_region_status": self.air_region_status,
            "status": None if v is None else v.status,
            "headline": None if v is None else v.headline,
            "caution": self.caution_text,
        }


def assess_margins(model: Model, hot_spots: Sequence, air: AirConditions = REFERENCE_AIR,
                   thin_margin: float = THIN_MARGIN, air_region=None,
                   largest_potential_difference_V: float | None = None,
                   voltage_basis: VoltageBasis | None = None) -> MarginReport:
    """Margins to air breakdown and (round conductors) corona onset, per conductor, with verdicts.

    Each peak is judged by :func:`solver.judge_peak`, the one caution rule.

    Parameters
    ----------
    model : Model
        The model the peaks belong to (for the radii of round conductors and the media).
    hot_spots : sequence of HotSpot
        From :func:`solver.analyse_hot_spots` (``HotSpotReport.hot_spots``).
    air : AirConditions
    thin_margin : float
        Margins below this are "thin" (default 1.5).
    air_region : AirRegionPeak, optional
        Largest field in the surrounding air of a model with insulation
        (``HotSpotReport.air_region``).
    largest_potential_difference_V : float, optional
        Largest potential difference in the model, V (default: from the model's fixed
        potentials, the hot spots' potentials and 0 V for a ground plane or reference).
    voltage_basis : VoltageBasis, optional
        What the potentials stand for (default: the project's, :func:`voltage_basis_of`); the
        peaks are judged times its field factor.

    Returns
    -------
    MarginReport
    """
    if largest_potential_difference_V is None:
        potentials = [c.potential_V for c in model.conductors if c.role == "fixed"]
        potentials += [s.potential_V for s in hot_spots if getattr(s, "potential_V", None) is not None]
        has_zero = model.ground_plane is not None or any(c.role == "reference" for c in model.conductors)
        largest_potential_difference_V = spread(potentials, has_zero)
    basis = voltage_basis_of(model) if voltage_basis is None else voltage_basis
    background = medium_of_region(model, len(model.dielectrics))
    out, verdicts = [], []
    for spot in hot_spots:
        peak = float(spot.field_V_per_m)
        radius, basis_text = corona_radius_m(model, spot.conductor, getattr(spot, "location_m", None),
                                        getattr(spot, "local_radius_of_curvature_m", None), spot.singular)
        corona = None if radius is None else peek_corona_onset_field_V_per_m(
            radius, air.relative_air_density, air.surface_factor, air.peek_form)
        medium = getattr(spot, "medium", None) or background
        v = judge_peak(peak, where=f"'{spot.conductor}'", largest_potential_difference_V=largest_potential_difference_V,
                       medium=medium, at_sharp_corner=bool(spot.singular), corona_onset_field_V_per_m=corona,
                       corona_radius_basis=basis_text, air=air, thin_margin=thin_margin,
                       gap_m=getattr(spot, "gap_m", None), voltage_basis=basis)
        verdicts.append(v)
        out.append(ConductorMargin(spot.conductor, peak, spot.estimated_relative_error, v.air_breakdown_field_V_per_m,
                                   v.air_breakdown_margin, radius, basis_text, corona, v.corona_onset_margin, v.status,
                                   v.caution, v.reason, v.headline, v.gap_m, v.air_strength_basis, v.field_factor,
                                   v.deciding))
    region_peak = region_margin = region_status = region_strength = None
    if air_region is not None and judges_air_region(air_region.where):
        region_peak = float(air_region.field_V_per_m)
        v = judge_peak(region_peak, where="the surrounding air", largest_potential_difference_V=largest_potential_difference_V,
                       medium=None, at_sharp_corner=bool(air_region.at_sharp_corner), air=air, thin_margin=thin_margin,
                       voltage_basis=basis)
        verdicts.append(v)
        region_margin, region_status, region_strength = v.air_breakdown_margin, v.status, v.air_breakdown_field_V_per_m
    verdict = summarise_verdicts(verdicts)
    caution = "" if verdict is None else verdict.caution
    return MarginReport(tuple(out), air, float(thin_margin), caution, region_peak, region_margin,
                        region_status, verdict, basis, region_strength)
