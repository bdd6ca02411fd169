"""Plain names of the figures a study collects (Qt-free), for lists, table headings and plot axes.

A study names its figures for machines (``Z0_ohm``, ``C_F_per_m.trace.trace``; see
:data:`solver.studies.figures.FIGURE_WORDS`); the window shows them as a reader writes them:
"Z0 (Ω)", "C trace–trace (pF/m)".
"""

from __future__ import annotations

from solver.studies.plot import figure_unit

#: The unit a figure's kind is shown in when no values are at hand yet (lists of choices);
#: a column of values takes the SI prefix that suits its values instead.
LIST_UNITS = {"F/m": "pF/m", "s/m": "ns/m", "V/m": "kV/m", "Ω": "Ω"}

_TITLES = {
    "Z0_ohm": "Z0", "eps_eff": "εeff", "delay_s_per_m": "delay",
    "Z_even_ohm": "Z even", "Z_odd_ohm": "Z odd", "Z_diff_ohm": "Z differential", "Z_common_ohm": "Z common",
    "eps_eff_even": "εeff even", "eps_eff_odd": "εeff odd", "relative_error": "estimated relative error",
}
_PER_PAIR = {"C_F_per_m": "C", "C_mutual_F_per_m": "C mutual", "C_vacuum_F_per_m": "C in vacuum"}
_PER_CONDUCTOR = {"peak_field_V_per_m": "peak |E| on", "margin": "margin of", "equivalent_radius_m": "equivalent radius of"}


def figure_title(name: str) -> str:
    """The plain name of figure ``name``, without its unit.

    >>> figure_title("C_F_per_m.trace.trace"), figure_title("Z0_ohm"), figure_title("margin.bar")
    ('C trace–trace', 'Z0', 'margin of bar')
    """
    word, *parts = name.split(".")
    if word in _PER_PAIR:
        return f"{_PER_PAIR[word]} {'–'.join(parts)}".strip()
    if word in _PER_CONDUCTOR:
        return f"{_PER_CONDUCTOR[word]} {' + '.join(parts)}".strip()
    return _TITLES.get(word, name)


def figure_label(name: str, unit: str | None = None, length_unit: str = "m") -> str:
    """The plain name with a unit in brackets: ``unit`` (e.g. the prefixed unit of a column) or
    the unit its kind is listed in (``length_unit``, the model's, for a length); none for a
    pure number.

    >>> figure_label("C_F_per_m.trace.trace"), figure_label("Z0_ohm"), figure_label("eps_eff")
    ('C trace–trace (pF/m)', 'Z0 (Ω)', 'εeff')
    """
    si = figure_unit(name)
    shown = unit if unit is not None else length_unit if si == "m" else LIST_UNITS.get(si, si)
    return f"{figure_title(name)} ({shown})" if shown else figure_title(name)
