"""Command-line part for dielectrics and transmission-line figures: summary sections and JSON keys.

:func:`figures_for_solution` computes the figures once per report from the solution's own
capacitance matrix (:func:`solver.figures.transmission_line.figures_from_solution`: the matrix
in vacuum is C / eps_r of the background for a homogeneous model; with regions of other
permittivity one solve in vacuum is made). The sections only read the figures.

JSON keys: ``transmission_line`` (the fields of
:class:`~solver.transmission_line.TransmissionLineFigures`, SI units, or None),
``transmission_line_note`` (why there are none, or None) and ``dielectric_regions`` (per region:
name, eps_r, peak field in V/m, its location in metres and where it sits).
"""

from __future__ import annotations

import math

from solver.bem.solution import Solution
from solver.cli.formatting import NEGLIGIBLE_SHARE, format_location, format_plain, true_minus
from solver.figures.transmission_line import (
    TransmissionLineFigures,
    figures_from_solution,
)

NO_LINE_FIGURES = "No transmission-line figures: they need a return path and at least one fixed-potential conductor."


def figures_for_solution(solution: Solution) -> TransmissionLineFigures | None:
    """Transmission-line figures of a solved model, or None without a return path or signal line."""
    model = solution.model
    if not (model.has_return_path and model.signal_names):
        return None
    return figures_from_solution(solution)


def _ohm(value: float) -> str:
    return f"{value:.4g} ohm"


def transmission_line_section(f: TransmissionLineFigures | None) -> list[str]:
    """Quasi-TEM figures: Z0 and eps_eff, even/odd modes of a pair, or the modes of N lines."""
    if f is None:
        return []
    lines = ["Transmission-line figures (quasi-TEM, lossless; L from the same cross-section in vacuum)"]
    if f.characteristic_impedance_ohm is not None:
        # transmission_line_figures sets the one-conductor figures together
        assert f.delay_s_per_m is not None and f.velocity_m_per_s is not None
        lines += [
            f"  characteristic impedance Z0: {_ohm(f.characteristic_impedance_ohm)}",
            f"  effective permittivity: {f.effective_permittivity:.5g}",
            f"  delay: {f.delay_s_per_m * 1e9:.5g} ns/m    velocity: {f.velocity_m_per_s / 299792458.0:.5g} c",
            f"  inductance: {f.inductance_H_per_m[0, 0] * 1e9:.5g} nH/m",
        ]
        return lines
    if f.is_symmetric_pair:
        # transmission_line_figures sets the pair figures together
        assert f.even_mode_impedance_ohm is not None and f.odd_mode_impedance_ohm is not None
        assert f.differential_impedance_ohm is not None and f.common_mode_impedance_ohm is not None
        lines += [
            f"  even mode: Z {_ohm(f.even_mode_impedance_ohm)}, eps_eff {f.even_mode_effective_permittivity:.5g}",
            f"  odd mode:  Z {_ohm(f.odd_mode_impedance_ohm)}, eps_eff {f.odd_mode_effective_permittivity:.5g}",
            f"  differential impedance (2 Z_odd): {_ohm(f.differential_impedance_ohm)}",
            f"  common-mode impedance (Z_even / 2): {_ohm(f.common_mode_impedance_ohm)}",
        ]
    lines.append("  modes (eigenvectors of L C), slowest first:")
    names = f.signal_names
    for k in range(len(names)):
        vec = ", ".join(_modal_component(v) for v in f.modal_voltages[:, k])
        lines.append(
            f"    {k + 1}: Z {_ohm(f.modal_impedances_ohm[k])}, eps_eff {f.modal_effective_permittivities[k]:.5g}, "
            f"voltages ({vec})"
        )
    if f.modal_note:
        lines.append(f"  note on the modes: {f.modal_note}.")
    pairs = [
        f"{names[i]}-{names[j]}: k_C {f.capacitive_coupling[i, j]:.3g}, k_L {f.inductive_coupling[i, j]:.3g}"
        for i in range(len(names)) for j in range(i + 1, len(names))
    ]
    lines.append("  coupling coefficients: " + "; ".join(pairs))
    return lines


def _modal_component(value: float) -> str:
    """One entry of a modal voltage vector (largest entry +-1) to three decimals, true minus
    signs, and 0 for what rounds to zero (a component that symmetry makes 0, solved as 1e-9)."""
    text = f"{value:+.3f}"
    return "0" if text in ("+0.000", "-0.000") else true_minus(text)


def dielectric_section(solution: Solution) -> list[str]:
    """Largest field inside each dielectric region (insulation stress), for models with regions."""
    peaks = solution.peak_region_fields
    if not peaks:
        return []
    m = solution.model
    lines = ["Largest field in each dielectric region (operating point)"]
    largest = max((p.field_V_per_m for p in peaks if math.isfinite(p.field_V_per_m)), default=0.0)
    negligible = False
    for p in peaks:
        x, y = (v / m.metres_per_unit for v in p.location_m)
        if math.isfinite(p.field_V_per_m) and p.field_V_per_m < NEGLIGIBLE_SHARE * largest:
            field, negligible = "≈ 0 MV/m (°)", True
        else:
            field = f"{format_plain(p.field_V_per_m / 1e6, 4)} MV/m"
        lines.append(
            f"  {p.region} (eps_r {p.eps_r:g}): {field} at {format_location(m, x, y)}, "
            f"on {p.where}" + (" *" if p.at_sharp_corner else "")
        )
    if negligible:
        lines.append(f"  (°) Under {NEGLIGIBLE_SHARE:g} of the largest region's peak: negligible beside it; in a "
                     "region screened from the field (outside an earthed screen) what the solver leaves there is "
                     "numerical, not a field. The JSON output keeps the computed value.")
    if any(p.at_sharp_corner for p in peaks):
        lines.append(
            "  * Next to a sharp corner or edge: the 2-D field is singular there and this value grows as the "
            "mesh is refined; round the corner for a usable figure."
        )
    lines.append("  Free charge is reported on conductors; fields include the bound charge of the dielectrics.")
    return lines


def transmission_line_json(solution: Solution, figures: TransmissionLineFigures | None = None) -> dict:
    """JSON keys ``transmission_line``, ``transmission_line_note`` and ``dielectric_regions``.

    ``figures`` are the solution's transmission-line figures when already computed (else they
    are computed here).
    """
    f = figures if figures is not None else figures_for_solution(solution)
    note = None if f is not None else NO_LINE_FIGURES
    peaks = solution.peak_region_fields
    regions = [
        {"name": p.region, "eps_r": p.eps_r, "peak_field_V_per_m": p.field_V_per_m,
         "peak_field_location_m": list(p.location_m), "peak_field_on": p.where,
         "peak_at_sharp_corner": p.at_sharp_corner}
        for p in peaks
    ]
    return {"transmission_line": None if f is None else f.as_dict(), "transmission_line_note": note,
            "dielectric_regions": regions}
