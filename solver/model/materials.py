"""A small library of insulating materials with typical relative permittivities.

Every value is a *typical* figure at power or low radio frequencies and room temperature,
given with the usual range; real grades differ with composition, filler, moisture,
temperature and frequency. Each entry names its source; values marked "typical, from memory"
are the commonly quoted figures and should be checked against the supplier's data sheet for
design work. The user can always override: pass ``eps_r`` to :func:`dielectric_of` or type a
value into the region.

>>> material("PTFE").eps_r
2.1
>>> from solver.model import Rectangle
>>> dielectric_of("board", (Rectangle((0, 0.8), 20, 1.6),), "FR-4", eps_r=4.2).eps_r  # user override
4.2
"""

from __future__ import annotations

from dataclasses import dataclass

from solver.model.model import Dielectric, Model, Shape

FROM_MEMORY = "typical, from memory"


@dataclass(frozen=True)
class Material:
    """A named insulating material.

    Attributes
    ----------
    name : display name (also the lookup key, case-insensitive).
    eps_r : typical relative permittivity.
    eps_r_range : (low, high) range commonly quoted for the material family.
    source : where the value comes from.
    note : what the value depends on, in a few words.
    """

    name: str
    eps_r: float
    eps_r_range: tuple[float, float]
    source: str = FROM_MEMORY
    note: str = ""


_TABLE = (
    Material("vacuum", 1.0, (1.0, 1.0), "definition"),
    Material("air", 1.0006, (1.0005, 1.0006), FROM_MEMORY, "dry air at sea level; 1.0 is usual in practice"),
    Material("SF6 gas", 1.002, (1.002, 1.002), FROM_MEMORY, "at about 1 bar"),
    Material("PTFE", 2.1, (2.0, 2.1), FROM_MEMORY, "very stable with frequency"),
    Material("polyethylene", 2.25, (2.2, 2.35), FROM_MEMORY, "LDPE/HDPE; solid cable insulation"),
    Material("polypropylene", 2.2, (2.1, 2.3), FROM_MEMORY),
    Material("XLPE", 2.3, (2.2, 2.5), FROM_MEMORY, "cross-linked polyethylene power-cable insulation"),
    Material("EPR", 3.0, (2.6, 3.5), FROM_MEMORY, "ethylene-propylene rubber cable insulation"),
    Material("PVC", 5.0, (3.0, 8.0), FROM_MEMORY, "plasticised cable compound; rigid PVC nearer 3; rises at low frequency"),
    Material("silicone rubber", 3.0, (2.8, 3.5), FROM_MEMORY, "unfilled; filled grades higher"),
    Material("epoxy resin", 3.6, (3.0, 4.5), FROM_MEMORY, "cast, unfilled; silica-filled grades 4 to 6"),
    Material("polyimide", 3.4, (3.2, 3.5), FROM_MEMORY, "film, flexible circuits"),
    Material("FR-4", 4.4, (4.0, 4.8), FROM_MEMORY, "glass-epoxy board; depends on resin content and frequency"),
    Material("PTFE-glass laminate", 2.2, (2.17, 2.6), FROM_MEMORY, "woven or random glass in PTFE"),
    Material("hydrocarbon-ceramic laminate", 3.5, (3.3, 3.7), FROM_MEMORY, "microwave circuit board"),
    Material("alumina", 9.8, (9.4, 10.0), FROM_MEMORY, "96 % to 99.6 % Al2O3 ceramic substrate"),
    Material("porcelain", 6.0, (5.0, 7.0), FROM_MEMORY, "electrical porcelain insulators"),
    Material("soda-lime glass", 7.0, (6.0, 8.0), FROM_MEMORY),
    Material("borosilicate glass", 4.6, (4.4, 4.8), FROM_MEMORY),
    Material("mica", 6.0, (5.4, 7.0), FROM_MEMORY),
    Material("transformer oil", 2.2, (2.1, 2.3), FROM_MEMORY, "mineral insulating oil"),
    Material("oil-impregnated paper", 3.5, (3.0, 4.0), FROM_MEMORY, "paper-insulated cables and bushings"),
)

#: Materials by lower-case name.
MATERIALS: dict[str, Material] = {m.name.lower(): m for m in _TABLE}


def material_names() -> tuple[str, ...]:
    """Display names of every material in the library, in table order."""
    return tuple(m.name for m in _TABLE)


def material(name: str) -> Material:
    """The material called ``name`` (case-insensitive).

    Raises KeyError naming the known materials when there is none.
    """
    try:
        return MATERIALS[name.strip().lower()]
    except KeyError:
        raise KeyError(
            f"No material named '{name}' in the library; known: {', '.join(material_names())}. "
            "Type the relative permittivity instead."
        ) from None


def dielectric_of(name: str, shapes: tuple[Shape, ...], material_name: str, eps_r: float | None = None) -> Dielectric:
    """A dielectric region of a library material; ``eps_r`` overrides the library value."""
    m = material(material_name)
    return Dielectric(name, tuple(shapes), m.eps_r if eps_r is None else float(eps_r), m.name)


# ---- air: decided in one place, by material ----------------------------------------------------
#: Names under which a region's material counts as air (lower case); "air" is the library entry.
AIR_NAMES = frozenset({"air", "dry air", "atmospheric air"})


def is_air_material(material_name: str | None) -> bool:
    """True when ``material_name`` names air (the library's "air", case-insensitive).

    >>> is_air_material("Air"), is_air_material("XLPE"), is_air_material(None)
    (True, False, False)
    """
    return material_name is not None and material_name.strip().lower() in AIR_NAMES


def has_air_permittivity(eps_r: float) -> bool:
    """True when ``eps_r`` lies between vacuum's and the top of the library's range for air.

    >>> has_air_permittivity(1.0), has_air_permittivity(1.0006), has_air_permittivity(2.3)
    (True, True, False)
    """
    return material("vacuum").eps_r <= float(eps_r) <= material("air").eps_r_range[1]


def region_is_air(region: Dielectric) -> bool:
    """True when a dielectric region is air: its material is air (by name or from the library).

    A region without a material counts as air when its own name is an air name. A region
    whose material says air but whose eps_r was overridden outside air's range is not air.
    """
    named = region.material if region.material is not None else region.name
    return is_air_material(named) and has_air_permittivity(region.eps_r)


@dataclass(frozen=True)
class Medium:
    """The medium on the field side of a conductor surface.

    Attributes
    ----------
    region : dielectric region name, or "background".
    material : material name, when the region names one (None otherwise).
    eps_r : relative permittivity.
    is_air : decided by :func:`region_is_air` (a region) or :func:`has_air_permittivity`
        (the background).
    """

    region: str
    material: str | None
    eps_r: float
    is_air: bool

    def describe(self) -> str:
        """e.g. "'jacket' (XLPE, eps_r 2.3)" or "the background (eps_r 4)"."""
        name = "the background" if self.region == BACKGROUND else f"'{self.region}'"
        what = f"{self.material}, " if self.material else ""
        return f"{name} ({what}eps_r {self.eps_r:g})"


#: Name of the background (everything outside the dielectric regions).
BACKGROUND = "background"


def medium_of_region(model: Model, region_index: int) -> Medium:
    """The :class:`Medium` of region ``region_index`` (``len(model.dielectrics)`` = the background)."""
    if 0 <= region_index < len(model.dielectrics):
        d = model.dielectrics[region_index]
        return Medium(d.name, d.material, float(d.eps_r), region_is_air(d))
    return Medium(BACKGROUND, None, float(model.background_eps_r), has_air_permittivity(model.background_eps_r))


def background_is_air(model: Model) -> bool:
    """True when the background (outside every region) is air: its eps_r is air's."""
    return medium_of_region(model, len(model.dielectrics)).is_air
