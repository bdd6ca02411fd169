"""BLAS thread cap for small dense factorisations.

On a small shared machine two BLAS threads make a small LU many times slower than one
(measured on the 2-core development machine under load: a 1,500-unknown LU took 0.19 s with
one thread against 0.52 s with two; 500 unknowns 0.010 s against 0.20 s). Systems below
:data:`SINGLE_THREAD_BELOW` unknowns are therefore factorised and solved with one thread;
larger ones keep the library's default.

Work that is not a factorisation (triangular solves with existing factors for a few hundred
right-hand sides, products of thin matrices) is bound by memory traffic, not arithmetic, and
runs on one thread whatever the size (:func:`one_blas_thread`): the first geometry edit of the
busbar sample (2,505 unknowns) took 0.17 s of CPU with one thread against 0.62 s with two, and
its wall time fell as well (measured, ``python -m solver.bench``).
"""

from __future__ import annotations

import contextlib
import logging
from contextlib import AbstractContextManager

logger = logging.getLogger(__name__)

#: Systems with fewer unknowns than this run their dense linear algebra on one BLAS thread.
SINGLE_THREAD_BELOW = 1500

try:
    from threadpoolctl import ThreadpoolController
except ImportError:  # pragma: no cover - threadpoolctl is a declared dependency
    ThreadpoolController = None

_controller = None


def _blas_controller():
    """One controller for the process, made at the first use (after numpy and scipy have
    loaded their BLAS): listing the loaded libraries costs about 3 ms, which a fresh
    ``threadpool_limits`` would pay at every call (measured), limiting through it 0.01 ms."""
    global _controller
    if _controller is None:
        _controller = ThreadpoolController()
    return _controller


def blas_threads_for(n_unknowns: int) -> AbstractContextManager[object]:
    """Context in which dense linear algebra on ``n_unknowns`` unknowns runs.

    One BLAS thread below :data:`SINGLE_THREAD_BELOW` unknowns, the default above.

    Examples
    --------
    >>> import numpy as np, scipy.linalg
    >>> with blas_threads_for(10):
    ...     lu = scipy.linalg.lu_factor(np.eye(10))
    """
    if ThreadpoolController is None:
        return contextlib.nullcontext()
    controller = _blas_controller()  # made at the first large solve too, not at the first edit after it
    if n_unknowns >= SINGLE_THREAD_BELOW:
        return contextlib.nullcontext()
    return controller.limit(limits=1, user_api="blas")


def one_blas_thread() -> AbstractContextManager[object]:
    """Context in which dense linear algebra runs on one BLAS thread, for memory-bound work
    (solves with factors already made, thin products) of any size.

    Examples
    --------
    >>> import numpy as np
    >>> with one_blas_thread():
    ...     y = np.ones((3, 2)) @ np.ones((2, 3))
    """
    if ThreadpoolController is None:
        return contextlib.nullcontext()
    return _blas_controller().limit(limits=1, user_api="blas")
