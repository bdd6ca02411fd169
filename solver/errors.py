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


class SuperpositionError(SolverError):
    """A solution cannot be carried to other potentials without a new solve."""


class MeshTooLargeError(SolverError):
    """The mesh a model needs is larger than the memory budget allows, or cannot be graded.

    Raised before anything large is built; the message names the gap or part responsible
    and a way out (move parts apart, round less finely, choose a coarser mesh).
    """


class NetChargeError(InvalidModelError):
    """Floating conductors carry a net charge and nothing can carry the opposite charge.

    In 2-D the potential of a net line charge grows like log(r) and has no value at
    infinity, so potentials (and everything computed from them) would be undefined.
    """


class NoFieldError(InvalidModelError):
    """Nothing in the model drives a field (every conductor ends at one potential, no charge).

    Without a reference conductor or a ground plane the net charge is zero; when the fixed
    conductors share one potential and no floating conductor carries a charge, the exact
    solution has no charge and no field anywhere, and a solver would return round-off.
    """


class NonFiniteResultError(SolverError):
    """The solve produced a non-finite (infinite or NaN) value, or its system was singular."""
