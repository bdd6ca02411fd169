"""Figures derived from a Solution: fields on grids and field lines, equivalent radius,
transmission-line figures, end effects and bundles."""
