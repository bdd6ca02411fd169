"""Boundary meshes: graded panels on conductors and on dielectric interfaces, junctions between them."""
