"""The free-charge operator F is sparse: eps_r on the diagonal, full rows only for strip panels
between two media (Rao, Sarkar & Harrington 1984: sigma_free = (eps+ + eps-)/2 sigma_total +
eps0 (eps+ - eps-) E_pv . n on such a strip)."""

from __future__ import annotations

import numpy as np
import scipy.sparse
from reference_geometries import microstrip

from solver import Circle, Conductor
from solver.bem.system import build_system
from solver.mesh.panels import discretize_boundary


def test_sparse_with_full_rows_only_on_strips_between_media():
    trace = microstrip(1.0, 4.0)  # a strip on the substrate's top face
    model = trace.with_conductors(trace.conductors + (Conductor("wire", (Circle((0.0, 3.0), 0.3),)),))
    system = build_system(model, discretize_boundary(model))
    f = system.free_charge_rows
    assert scipy.sparse.issparse(f)
    jump = system.mesh.is_strip & (system.eps_r_plus != system.eps_r_minus)
    nc, n = f.shape
    assert 0 < jump.sum() < nc and f.nnz <= nc + int(jump.sum()) * n
    dense = f.toarray()
    scale = np.where(system.mesh.is_strip, 0.5 * (system.eps_r_plus + system.eps_r_minus), system.eps_r_plus)
    np.testing.assert_array_equal(np.diag(dense[:, :nc])[~jump], scale[~jump])
    off = dense.copy()
    off[np.arange(nc), np.arange(nc)] = 0.0
    assert np.all(off[~jump] == 0.0) and np.all(np.any(off[jump] != 0.0, axis=1))
