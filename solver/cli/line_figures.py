"""Command-line part for dielectrics and transmission-line figures: summary sections and JSON keys.

:mod:`solver.cli` lists :func:`dielectric_section`, :func:`transmission_line_section` and
:func:`transmission_line_json` among its sections. The figures need the capacitance matrix in
vacuum as well: for a homogeneous model it is C / eps_r of the background; with dielectric
regions a second solve with every eps_r = 1 is made once per solution and shared.

JSON keys: ``transmission_line`` (the fields of
:class:`~solver.transmission_line.TransmissionLineFigures`, SI units, or None),
``transmission_line_note`` (why there are none, or None) and ``dielectric_regions`` (per region:
name, eps_r, peak field in V/m, its location in metres and where it sits).
"""

from __future__ import annotations

from solver.bem.solve import has_permittivity_contrast
from solver.mesh.panels import MeshSettings
from solver.bem.solution import Solution
from solver.figures.transmission_line import TransmissionLineFigures, figures_from_matrices, vacuum_model

_memo: dict = {}


def figures_for_solution(solution: Solution) -> TransmissionLineFigures | None:
    """Transmission-line figures of a solved model, or None without a return path or signal line."""
    key = id(solution)
    if key in _memo and _memo[key][0] is solution:
        return _memo[key][1]
    model = solution.model
    figures = None
    if model.has_return_path and model.signal_names:
        c = solution.capacitance_maxwell_F_per_m
        if has_permittivity_contrast(model):
            from solver.bem.solve import solve

            settings = MeshSettings(solution.mesh.settings.level)
            c0 = solve(vacuum_model(model), estimate_error=False, settings=settings).capacitance_maxwell_F_per_m
        else:
            c0 = c / model.background_eps_r
        figures = figures_from_matrices(c, c0, model.signal_names, solution.estimated_relative_error)
    _memo.clear()
    _memo[key] = (solution, figures)
    return figures


def _ohm(value: float) -> str:
    return f"{value:.4g} ohm"


def transmission_line_section(solution: Solution) -> list[str]:
    """Quasi-TEM figures: Z0 and eps_eff, even/odd modes of a pair, or the modes of N lines."""
    f = figures_for_solution(solution)
    if f is None:
        return []
    lines = ["Transmission-line figures (quasi-TEM, lossless; L from the same cross-section in vacuum)"]
    if f.characteristic_impedance_ohm is not None:
        lines += [
            f"  characteristic impedance Z0: {_ohm(f.characteristic_impedance_ohm)}",
            f"  effective permittivity: {f.effective_permittivity:.5g}",
            f"  delay: {f.delay_s_per_m * 1e9:.5g} ns/m    velocity: {f.velocity_m_per_s / 299792458.0:.5g} c",
            f"  inductance: {f.inductance_H_per_m[0, 0] * 1e9:.5g} nH/m",
        ]
        return lines
    if f.is_symmetric_pair:
        lines += [
            f"  even mode: Z {_ohm(f.even_mode_impedance_ohm)}, eps_eff {f.even_mode_effective_permittivity:.5g}",
            f"  odd mode:  Z {_ohm(f.odd_mode_impedance_ohm)}, eps_eff {f.odd_mode_effective_permittivity:.5g}",
            f"  differential impedance (2 Z_odd): {_ohm(f.differential_impedance_ohm)}",
            f"  common-mode impedance (Z_even / 2): {_ohm(f.common_mode_impedance_ohm)}",
        ]
    lines.append("  modes (eigenvectors of L C), slowest first:")
    names = f.signal_names
    for k in range(len(names)):
        vec = ", ".join(f"{v:+.3g}" for v in f.modal_voltages[:, k])
        lines.append(
            f"    {k + 1}: Z {_ohm(f.modal_impedances_ohm[k])}, eps_eff {f.modal_effective_permittivities[k]:.5g}, "
            f"voltages ({vec})"
        )
    pairs = [
        f"{names[i]}-{names[j]}: k_C {f.capacitive_coupling[i, j]:.3g}, k_L {f.inductive_coupling[i, j]:.3g}"
        for i in range(len(names)) for j in range(i + 1, len(names))
    ]
    lines.append("  coupling coefficients: " + "; ".join(pairs))
    return lines


def dielectric_section(solution: Solution) -> list[str]:
    """Largest field inside each dielectric region (insulation stress), for models with regions."""
    peaks = solution.peak_region_fields
    if not peaks:
        return []
    m = solution.model
    lines = ["Largest field in each dielectric region (operating point)"]
    for p in peaks:
        x, y = (v / m.metres_per_unit for v in p.location_m)
        lines.append(
            f"  {p.region} (eps_r {p.eps_r:g}): {p.field_V_per_m / 1e6:.4g} MV/m at ({x:.4g}, {y:.4g}) {m.unit}, "
            f"on {p.where}" + (" *" if p.at_sharp_corner else "")
        )
    if any(p.at_sharp_corner for p in peaks):
        lines.append(
            "  * Next to a sharp corner or edge: the 2-D field is singular there and this value grows as the "
            "mesh is refined; round the corner for a usable figure."
        )
    lines.append("  Free charge is reported on conductors; fields include the bound charge of the dielectrics.")
    return lines


def transmission_line_json(solution: Solution) -> dict:
    """JSON keys ``transmission_line``, ``transmission_line_note`` and ``dielectric_regions``."""
    f = figures_for_solution(solution)
    note = None if f is not None else (
        "No transmission-line figures: they need a return path and at least one fixed-potential conductor."
    )
    peaks = solution.peak_region_fields
    regions = [
        {"name": p.region, "eps_r": p.eps_r, "peak_field_V_per_m": p.field_V_per_m,
         "peak_field_location_m": list(p.location_m), "peak_field_on": p.where,
         "peak_at_sharp_corner": p.at_sharp_corner}
        for p in peaks
    ]
    return {"transmission_line": None if f is None else f.as_dict(), "transmission_line_note": note,
            "dielectric_regions": regions}
