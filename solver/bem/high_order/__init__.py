"""High-order Nystrom solver for conductors in one homogeneous medium.

Used by :func:`solver.solve` when a ``tolerance`` is given (``python -m solver MODEL.json
--tolerance REL``). The same Model goes in and a :class:`~solver.bem.solution.Solution`
comes out (a :class:`~solver.bem.high_order.solution.HighOrderSolution`), so figures, hot
spots, the command line and the desktop program read it as any other solution.

* :mod:`~solver.mesh.curved_pieces` and :mod:`~solver.mesh.curved_panels` - exact outlines
  (segments and circular arcs) and Gauss-Legendre panels graded toward corners;
* :mod:`.product_rules` - log and Cauchy kernels integrated exactly against the polynomial
  density on and near a panel (Legendre functions of the second kind);
* :mod:`.operator` - the single-layer potential and its gradient, with ground-plane images;
* :mod:`.nystrom` - the system (floating conductors, neutrality) and its solve;
* :mod:`.adaptive` - refinement to a requested accuracy with an error estimate from a check mesh;
* :mod:`.solution` - the Solution built from the nodal charges.

Models with dielectric regions of another permittivity are declined
(:class:`~solver.bem.high_order.nystrom.HighOrderUnsupported`); :func:`solver.solve` then uses
the low-order solver, and the command line says so.
"""
