"""Small systems run their dense linear algebra on one BLAS thread; large ones keep the default."""

from threadpoolctl import threadpool_info

from solver.bem.blas_threads import SINGLE_THREAD_BELOW, blas_threads_for, one_blas_thread


def _blas_threads() -> list[int]:
    return [p["num_threads"] for p in threadpool_info() if p["user_api"] == "blas"]


def test_one_thread_below_the_crossover_and_the_default_above():
    default = _blas_threads()
    with blas_threads_for(SINGLE_THREAD_BELOW - 1):
        assert _blas_threads() and all(n == 1 for n in _blas_threads())
    assert _blas_threads() == default
    with blas_threads_for(SINGLE_THREAD_BELOW):
        assert _blas_threads() == default


def test_one_thread_for_memory_bound_work_of_any_size():
    default = _blas_threads()
    with one_blas_thread():
        assert _blas_threads() and all(n == 1 for n in _blas_threads())
    assert _blas_threads() == default
