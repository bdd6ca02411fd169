"""Errors raised by the solver for bad input or impossible requests.

Every message names the part, the field and the reason, in plain words, and where it can
it suggests a way out.
"""

from __future__ import annotations


class SolverError(Exception):
    """Base class of every error the solver raises on purpose."""


class InvalidGeometryError(SolverError):
    """A shape is self-intersecting, empty, zero-size, or overlaps something it must not."""


class InvalidModelError(SolverError):
    """A model field has a bad value (unknown role, missing name, non-finite number...)."""


class NoReferenceError(SolverError):
    """A capacitance was asked for but the model has no return path.

    A 2-D per-unit-length capacitance needs a reference conductor or a ground plane.
    """


class ProjectFileError(SolverError):
    """A project file cannot be read: not JSON, wrong version, missing or ill-typed field."""


class SolveCancelled(SolverError):
    """The caller asked the solve to stop (through its cancel callback)."""
