"""What the user drew: shapes, conductors, dielectric regions, materials and their geometry.

The lowest layer of the solver: it imports nothing from the other stages.
"""

from solver.model.model import (
    LENGTH_UNITS,
    MESH_DENSITIES,
    ROLES,
    Circle,
    Conductor,
    Dielectric,
    GroundPlane,
    Model,
    Polygon,
    Rectangle,
    Ring,
    Shape,
    Strip,
)
from solver.model.shapes import SHAPE_KINDS, Arc, MeshingHints

__all__ = [
    "LENGTH_UNITS", "MESH_DENSITIES", "ROLES", "Circle", "Conductor", "Dielectric", "GroundPlane",
    "Model", "Polygon", "Rectangle", "Ring", "Shape", "Strip", "SHAPE_KINDS", "Arc", "MeshingHints",
]
