"""``python -m solver.bench``: speed and accuracy on a ladder of meshes."""
