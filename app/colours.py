"""Every colour the program shows, each with one reserved meaning (Qt-free).

Meanings and where they come from:

- **Conductor identity**: the colour-blind-safe qualitative palette of Okabe & Ito (2008,
  "Color Universal Design", from memory), black and yellow left out (black is kept for
  selection, yellow is unreadable on white). Used on the canvas, in plots and in legends.
- **Potential**: a diverging map centred on 0 V (Paul Tol's "sunset", Tol 2021, "Colour
  Schemes", SRON/EPS/TN/09-002, from memory); when every potential shares a sign only the
  matching half is used, so 0 V is always the neutral colour.
- **Field strength**: a sequential map (Tol's "YlOrBr", same source), light = weak.
- **Earth**: grey for ground planes and reference conductors, nowhere else.
- **Dielectric**: a dark outline and a light hatch drawn over the map, never a fill that
  tints the shading.
- **Severity** of a high-voltage verdict: exceeded / thin / not assessed / ample; red is used
  for "exceeded" only.
- **Freshness** of results: fresh / stale / solving / failed; no freshness colour is a
  severity colour.

Text colours meet the WCAG 2.1 minimum contrast of 4.5:1 on their backgrounds
(:func:`contrast_ratio`; checked in the tests).
"""

from __future__ import annotations

from dataclasses import dataclass

from solver import STATUS_WORDS

#: Body text, secondary text (axis ticks, notes) and the page they sit on.
TEXT = "#1a1a1a"
TEXT_MUTED = "#505050"
PAGE = "#ffffff"

#: Text of results that are out of date (the drawing changed after the solve).
STALE_TEXT = "#5b6472"

#: Okabe & Ito (2008): blue, vermillion, bluish green, reddish purple, orange, sky blue.
CONDUCTOR_PALETTE = ("#0072b2", "#d55e00", "#009e73", "#cc79a7", "#e69f00", "#56b4e9")

#: Ground plane, its shaded half-space and reference (earthed) conductors.
EARTH = "#6e6e6e"
EARTH_FILL = (110, 110, 110, 40)

#: Dielectric regions: outline and hatch (RGBA) drawn over the shading.
DIELECTRIC_OUTLINE = "#3d3d3d"
DIELECTRIC_HATCH = (40, 40, 40, 90)

#: Selected cells of a table: a light neutral under body text, so a selection never reads as a
#: conductor's identity colour (the system highlight is a blue close to the first conductor's).
TABLE_SELECTION = "#d6dbe0"

#: Outline of a shape being drawn (before it is placed).
PREVIEW = "#8c8c8c"

#: Selection outline and the outline of a shape the solver rejects.
SELECTION = "#000000"
INVALID = "#7b1fa2"

#: Tol "sunset" (diverging), most negative first; the middle entry is 0 V.
POTENTIAL_STOPS = ("#364b9a", "#4a7bb7", "#6ea6cd", "#98cae1", "#c2e4ef", "#eaeccc",
                   "#feda8b", "#fdb366", "#f67e4b", "#dd3d2d", "#a50026")

#: Tol "YlOrBr" (sequential), weakest first.
FIELD_STOPS = ("#ffffe5", "#fff7bc", "#fee391", "#fec44f", "#fb9a29", "#ec7014",
               "#cc4c02", "#993404", "#662506")

#: Equipotential lines, field lines and their labels (text in :data:`TEXT` on this fill).
EQUIPOTENTIAL = (20, 20, 20, 190)
FIELD_LINE = (20, 20, 20, 150)
LABEL_FILL = (255, 255, 255, 215)

#: Hot-spot markers: a dark star with a white rim reads on every map colour.
HOT_SPOT_FILL = "#000000"
HOT_SPOT_RIM = "#ffffff"

#: The thin line from a label stacked away from its point (a hot-spot star) to that point.
LABEL_LEADER = (20, 20, 20, 200)

#: Surface charge drawn as sticks over a shading (the shading holds the one colour key).
CHARGE_STICK = "#1a1a1a"

#: The probe line and its end marks.
PROBE = "#000000"

#: Curves of the probe plots (potential, field strength).
POTENTIAL_CURVE = "#0072b2"
FIELD_CURVE = "#d55e00"

#: Plots of studies and checks (the corner-radius sweep, the sweep dialog, the cross-check's
#: points): the data in the text colour, guides (error bars, targets, outlines) muted, so a plot
#: never borrows a conductor's, a severity's or a freshness colour.
PLOT_DATA = TEXT
PLOT_GUIDE = TEXT_MUTED

#: Construction lines over the drawing (the Green's-function contours, the equivalent round
#: wire, the 1 % circle): dark, told apart by line style, labelled on :data:`LABEL_FILL`.
CONSTRUCTION = (20, 20, 20, 200)


@dataclass(frozen=True)
class Badge:
    """How a state is shown: a symbol, a word, text and background colours."""

    symbol: str
    word: str
    text: str
    background: str


#: High-voltage verdicts, most severe first, keyed by the solver's statuses; the words are the
#: solver's (solver.STATUS_WORDS: "thin" reads "approaching (thin margin)" everywhere).
SEVERITY = {
    "exceeded": Badge("✕", STATUS_WORDS["exceeded"], "#a00018", "#fde3e3"),
    "thin": Badge("▲", STATUS_WORDS["thin"], "#7a4100", "#fff0cc"),
    "not assessed": Badge("?", STATUS_WORDS["not assessed"], "#3f3f3f", "#e8e8e8"),
    "ample": Badge("✓", STATUS_WORDS["ample"], "#17602f", "#e2f2e5"),
}

#: The state of the results shown.
FRESHNESS = {
    "fresh": Badge("●", "up to date", "#0b5563", "#ffffff"),
    "stale": Badge("◐", "out of date", "#243a73", "#e4e9f6"),
    "solving": Badge("…", "solving", "#1f4e79", "#eef4fa"),
    "failed": Badge("!", "cannot solve", "#5c1a66", "#f3e4f5"),
    "none": Badge("○", "not solved", TEXT_MUTED, "#ffffff"),
}


#: A hint laid over the empty drawing: text on a nearly opaque page, a light frame.
HINT_FILL = (255, 255, 255, 225)
HINT_BORDER = PREVIEW


def conductor_colour(index: int, role: str = "signal") -> str:
    """The identity colour of the ``index``-th conductor (earth grey for a reference conductor)."""
    if role == "reference":
        return EARTH
    return CONDUCTOR_PALETTE[index % len(CONDUCTOR_PALETTE)]


def display_colour(conductor, index: int) -> str:
    """The colour a conductor is drawn in: its own (chosen by the user and saved), else
    :func:`conductor_colour` by its place in the model."""
    return conductor.color or conductor_colour(index, conductor.role)


def hex_to_rgb(colour: str) -> tuple[int, int, int]:
    """(r, g, b) of a '#rrggbb' colour."""
    c = colour.lstrip("#")
    return int(c[0:2], 16), int(c[2:4], 16), int(c[4:6], 16)


def relative_luminance(colour: str) -> float:
    """WCAG 2.1 relative luminance of a '#rrggbb' colour (0 black ... 1 white)."""
    def linear(v: int) -> float:
        s = v / 255.0
        return s / 12.92 if s <= 0.04045 else ((s + 0.055) / 1.055) ** 2.4

    r, g, b = (linear(v) for v in hex_to_rgb(colour))
    return 0.2126 * r + 0.7152 * g + 0.0722 * b


def contrast_ratio(foreground: str, background: str) -> float:
    """WCAG 2.1 contrast ratio of two '#rrggbb' colours (1 ... 21)."""
    a, b = relative_luminance(foreground), relative_luminance(background)
    return (max(a, b) + 0.05) / (min(a, b) + 0.05)


def potential_stops(lowest_V: float, highest_V: float) -> tuple[list[float], list[str], float, float]:
    """Colour stops for a potential map from ``lowest_V`` to ``highest_V``, 0 V neutral.

    Returns (positions 0..1, colours, level_low_V, level_high_V): a map centred on 0 V
    (symmetric levels) when the potentials have both signs, else the half of the diverging
    map that matches their sign, starting at 0 V.
    """
    n = len(POTENTIAL_STOPS)
    mid = n // 2
    tiny = 1e-3 * max(abs(lowest_V), abs(highest_V))  # solver noise near 0 V (a part per thousand) is no sign
    lowest_V = 0.0 if abs(lowest_V) <= tiny else lowest_V
    highest_V = 0.0 if abs(highest_V) <= tiny else highest_V
    if lowest_V < 0 < highest_V:
        top = max(-lowest_V, highest_V)
        colours = list(POTENTIAL_STOPS)
        lo, hi = -top, top
    elif highest_V <= 0:
        colours = list(POTENTIAL_STOPS[: mid + 1])
        lo, hi = (lowest_V if lowest_V < 0 else -1.0), 0.0
    else:
        colours = list(POTENTIAL_STOPS[mid:])
        lo, hi = 0.0, (highest_V if highest_V > 0 else 1.0)
    positions = [i / (len(colours) - 1) for i in range(len(colours))]
    return positions, colours, lo, hi


def style_sheet(badge: Badge, *, bold: bool = False) -> str:
    """A Qt style sheet for a label showing ``badge``."""
    weight = " font-weight: bold;" if bold else ""
    return f"color: {badge.text}; background: {badge.background}; padding: 2px 6px;{weight}"


def status_style(*, error: bool = False, stale: bool = False) -> str:
    """A Qt style sheet for a section's status line: "cannot solve" for an error, "out of date"
    for stale results, else plain text."""
    if error:
        return style_sheet(FRESHNESS["failed"], bold=True)
    if stale:
        return style_sheet(FRESHNESS["stale"], bold=True)
    return ""


def rgba(colour: str | tuple, alpha: int | None = None) -> str:
    """A Qt style-sheet colour ``rgba(r, g, b, a)`` of a '#rrggbb' colour or an (r, g, b[, a]) tuple."""
    r, g, b, *rest = hex_to_rgb(colour) if isinstance(colour, str) else colour
    a = alpha if alpha is not None else (rest[0] if rest else 255)
    return f"rgba({r}, {g}, {b}, {a})"


#: The Solve button's fill while the results are up to date: a light tint of the "up to date"
#: colour, so the one primary action never reads as a plain tool button.
SOLVE_FRESH_FILL = "#e0eff1"

#: The primary action (Solve) by the state of the results: (text on the button, text colour,
#: fill, outline). It is filled strongly when the results need it (not solved, out of date,
#: failed) in that state's freshness colour, and lightly tinted while solving or up to date:
#: never white like the drawing tools beside it.
SOLVE_BUTTON = {
    "none": ("\u25b6 Solve", "#ffffff", FRESHNESS["stale"].text, FRESHNESS["stale"].text),
    "stale": ("\u25b6 Solve \u2014 out of date", "#ffffff", FRESHNESS["stale"].text, FRESHNESS["stale"].text),
    "solving": ("\u2026 Solving", FRESHNESS["solving"].text, FRESHNESS["solving"].background,
                FRESHNESS["solving"].text),
    "fresh": ("\u2713 Up to date", FRESHNESS["fresh"].text, SOLVE_FRESH_FILL, FRESHNESS["fresh"].text),
    "failed": ("! Cannot solve \u2014 retry", "#ffffff", FRESHNESS["failed"].text, FRESHNESS["failed"].text),
}


def solve_button_style(state: str) -> str:
    """A Qt style sheet for the Solve button in ``state`` (a key of :data:`SOLVE_BUTTON`)."""
    _, text, fill, outline = SOLVE_BUTTON[state]
    return (f"QToolButton {{ color: {text}; background: {fill}; border: 2px solid {outline}; border-radius: 4px;"
            " padding: 4px 14px; margin-left: 6px; font-weight: bold; }")
