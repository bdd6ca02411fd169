"""The lattice kernel spectra from cosine and sine transforms of a quarter equal the plain
2-D real FFT of the whole circular kernel (to round-off)."""

from __future__ import annotations

import numpy as np
import pytest
import scipy.fft

from solver.bem.grid_sums import _even_length, _kernel_spectra


def _plain_spectra(nx: int, ny: int, hx: float, hy: float, shape: tuple[int, int]):
    def wrapped(n: int, size: int, step: float) -> np.ndarray:
        idx = np.arange(size)
        off = np.where(idx < n, idx, idx - size).astype(float)
        off[(idx >= n) & (idx <= size - n)] = np.nan
        return off * step

    dx, dy = np.meshgrid(wrapped(nx, shape[1], hx), wrapped(ny, shape[0], hy))
    r2 = dx * dx + dy * dy
    unused = ~np.isfinite(r2) | (r2 == 0)
    r2[unused], dx[unused], dy[unused] = 1.0, 0.0, 0.0
    log = 0.5 * np.log(r2)
    log[unused] = 0.0
    return [scipy.fft.rfft2(k) for k in (log, dx / r2, dy / r2)]


@pytest.mark.parametrize(("nx", "ny", "hx", "hy"), [(7, 5, 0.3, 0.2), (40, 33, 1e-3, 2.5e-3), (2, 9, 1.0, 1.0)])
def test_spectra_equal_the_plain_transform(nx, ny, hx, hy):
    shape = (_even_length(ny), _even_length(nx))
    assert shape[0] % 2 == 0 and shape[1] % 2 == 0 and shape[0] >= 2 * ny - 1 and shape[1] >= 2 * nx - 1
    for fast, plain in zip(_kernel_spectra(nx, ny, hx, hy, shape), _plain_spectra(nx, ny, hx, hy, shape)):
        assert fast.shape == plain.shape
        assert np.max(np.abs(fast - plain)) <= 1e-13 * np.max(np.abs(plain))
