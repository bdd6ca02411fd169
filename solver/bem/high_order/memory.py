"""Memory of a high-order dense solve, estimated and checked before anything large is built.

The system matrix (n x n float64, 8 n^2 bytes) is assembled block by block straight into
its place (:func:`solver.bem.high_order.operator.potential_matrix`) and factorised in place
(LAPACK getrf on the Fortran-ordered transpose, so no copy is made); the right-hand sides
and solutions add a few n x k arrays, and the assembly a bounded set of block temporaries.
So a solve of n unknowns needs about 8 n^2 bytes plus a small remainder: 10,000 unknowns
about 0.8 GB, against 1.6 GB or more when the matrix is copied before the LU.

The limit is the smaller of :func:`solver.mesh.budget.max_system_bytes` (the project's memory
budget, ``EDGEWISE_MAX_SYSTEM_MB``) and a fraction of the memory the system can give now.
"""

from __future__ import annotations

from solver.bem.high_order.operator import BLOCK_ENTRIES
from solver.bem.machine_memory import available_memory_bytes
from solver.errors import MeshTooLargeError
from solver.mesh.budget import max_system_bytes

#: Share of the available memory a solve may take.
AVAILABLE_FRACTION = 0.8

#: Block temporaries of the assembly: at most this many arrays of BLOCK_ENTRIES complex values.
ASSEMBLY_TEMPORARIES = 6

#: n x k arrays alive during the solve: right-hand sides, solutions, and the copy lu_solve makes.
RHS_COPIES = 3


def system_memory_bytes(n_unknowns: int, n_rhs: int) -> int:
    """Estimated peak bytes of assembling and solving a dense high-order system.

    Parameters
    ----------
    n_unknowns : int
        Size of the linear system.
    n_rhs : int
        Right-hand sides solved at once (the operating point and one per driver).

    Returns
    -------
    int
        Bytes: the matrix (factorised in place), the right-hand sides and solutions, and
        the assembly's block temporaries.
    """
    n = int(n_unknowns)
    return 8 * n * n + 8 * RHS_COPIES * n * int(n_rhs) + 16 * ASSEMBLY_TEMPORARIES * BLOCK_ENTRIES


def memory_limit_bytes(available_bytes: int | None = None) -> int:
    """The bytes a high-order solve may use: the budget, or less when less memory is free.

    ``available_bytes`` overrides the free memory read from the system (for tests).
    """
    have = available_memory_bytes() if available_bytes is None else available_bytes
    limit = max_system_bytes()
    if have is not None:
        limit = min(limit, int(AVAILABLE_FRACTION * have))
    return limit


def check_system_memory(n_unknowns: int, n_rhs: int, what: str, available_bytes: int | None = None) -> int:
    """Refuse a dense high-order solve that would not fit in memory; return its estimate in bytes.

    Parameters
    ----------
    n_unknowns, n_rhs : int
        Size of the system and right-hand sides solved at once.
    what : str
        The model or mesh in words, for the message (e.g. "'100-conductor bus' on 940 panels").
    available_bytes : int, optional
        Free memory, bytes; read from the system by default.

    Raises
    ------
    MeshTooLargeError
        Naming the size, the estimate, the limit and a way out.
    """
    need = system_memory_bytes(n_unknowns, n_rhs)
    limit = memory_limit_bytes(available_bytes)
    if need > limit:
        raise MeshTooLargeError(
            f"The high-order system of {what} has {n_unknowns:,} unknowns and would need about "
            f"{need / 1e9:.2f} GB of memory, more than the {limit / 1e9:.2f} GB it may use (the budget "
            "EDGEWISE_MAX_SYSTEM_MB or 80 % of the free memory). Ask for a looser tolerance, remove "
            "conductors that do not matter, close other programs, or raise EDGEWISE_MAX_SYSTEM_MB."
        )
    return need


__all__ = ["system_memory_bytes", "check_system_memory", "memory_limit_bytes", "available_memory_bytes"]
