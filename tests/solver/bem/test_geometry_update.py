"""Re-solving after a geometry edit by block elimination equals a fresh solve.

The capacitance matrix and the conductor potentials agree to 1e-12 relative. Single panel
strengths agree to 1e-9 of the largest: the system matrices here have condition numbers up
to about 1e7, and two fresh LU solves of the same busbar matrix with the unknowns in another
order already differ by 2.6e-11 of the largest strength (measured), so a tighter bound on
single strengths would test the LU's pivot order, not the update.
"""

from __future__ import annotations

import numpy as np

import solver
from solver import Circle, Conductor, GroundPlane, Model, Rectangle, Ring
from solver.bem.geometry_update import GeometryEditSolver


def _moved(model: Model, name: str, dx: float, dy: float) -> Model:
    out = []
    for c in model.conductors:
        if c.name == name:
            c = Conductor(c.name, tuple(s.translated(dx, dy) for s in c.shapes), c.role, c.potential_V,
                          c.charge_C_per_m)
        out.append(c)
    return model.with_conductors(tuple(out))


def _close(a, b, rel):
    return np.max(np.abs(a - b)) <= rel * max(np.max(np.abs(b)), 1e-300)


def _assert_same(edited, fresh, strength_rel=1e-9):
    assert edited.n_unknowns == fresh.n_unknowns
    assert _close(edited.total_strengths, fresh.total_strengths, strength_rel)
    assert _close(edited.capacitance_strengths, fresh.capacitance_strengths, strength_rel)
    assert _close(edited.conductor_potentials_V, fresh.conductor_potentials_V, 1e-12)
    assert _close(edited.conductor_charges_C_per_m, fresh.conductor_charges_C_per_m, 1e-12)
    if fresh.has_capacitance:
        c_new, c_ref = edited.capacitance_maxwell_F_per_m, fresh.capacitance_maxwell_F_per_m
        assert np.max(np.abs(c_new - c_ref)) <= 1e-12 * np.max(np.abs(c_ref))
    scale = max(np.max(np.abs(fresh.conductor_potentials_V)), 1e-300)
    assert abs(edited.phi_inf_V - fresh.phi_inf_V) <= 1e-12 * scale


def _drag(model: Model, name: str, steps, far=True, strength_rel=1e-9, bordered=True):
    """Move ``name`` by each step (inside the model's extent, so the length scale is kept);
    ``far``: whether the low-rank blocks are expected at every step; ``bordered``: whether
    the first step solves with the fresh solve's factors instead of factorising A_PP.
    Returns (rigid, solves): per step, whether the own block and the A_PP solves were reused."""
    edits = GeometryEditSolver()
    _assert_same(edits.solve(model), solver.solve(model, estimate_error=False))
    assert edits.reused_panels == 0  # nothing to reuse yet
    factors, fars, rigid, solves = [], [], [], []
    for dx, dy in steps:
        model = _moved(model, name, dx, dy)
        edited = edits.solve(model)
        assert edits.reused_panels > 0
        factors.append(edits.reused_factor)
        fars.append(edits.far_blocks)
        rigid.append(edits.reused_self_block)
        solves.append(edits.reused_solves)
        _assert_same(edited, solver.solve(model, estimate_error=False), strength_rel)
    # factorised once (or never: bordered by the fresh solve's factors), then reused
    assert factors == [far and bordered] + [True] * (len(steps) - 1)
    assert fars == [far] * len(steps)
    assert solves[0] is False  # the first step solves with A_PP
    return rigid, solves


def test_dragging_a_busbar_equals_fresh_solves():
    model = solver.load_project("sample_geometries/busbar_enclosure.json").with_mesh_density("coarse")
    rigid, solves = _drag(model, "L1", [(1.0, 0.0), (1.0, 0.5), (0.0, -2.0)])
    assert rigid == [True, True, True]  # from the fresh solve's matrix at the first step
    assert solves == [False, True, True]  # the bar stays inside the widened disc


def test_dragging_a_busbar_at_normal_density_equals_fresh_solves():
    """The benchmark's case (2,504 panels). Single strengths to 1e-7 of the largest: the
    closed-form integrals of the enclosure's shortest corner panels lose digits to
    cancellation (see solver.bem.geometry_update); capacitances and potentials to 1e-12."""
    model = solver.load_project("sample_geometries/busbar_enclosure.json")
    rigid, solves = _drag(model, "L1", [(1.0, 0.0), (0.5, 0.0)], strength_rel=1e-7)
    assert rigid == [True, True] and solves == [False, True]


def test_an_edit_close_to_another_conductor_keeps_that_conductor_exact():
    """L1 moved next to L2 (5 mm gap): the expansions would not converge fast enough for L2's
    panels, so those blocks are assembled in closed form beside the enclosure's low-rank
    ones (FarParts.near), the solves with A_PP are reused from the first step to the next,
    and the answer is still a fresh solve's."""
    model = solver.load_project("sample_geometries/busbar_enclosure.json").with_mesh_density("coarse")
    model = _moved(model, "L1", 60.0, 0.0)
    edits = GeometryEditSolver()
    edits.solve(model)
    l2 = np.flatnonzero(edits._previous.mesh.conductor_index == 1)
    _, solves = _drag(model, "L1", [(1.0, 0.0), (0.0, 1.0), (-0.5, 0.5)], far=True, bordered=False)
    assert solves == [False, True, True]
    edits.solve(_moved(model, "L1", 1.0, 0.0))
    near = edits._far.kept[edits._far.near]
    assert set(near) == set(l2)  # exactly L2's panels are near; the enclosure's are far
    kept_columns = edits._solves._columns.shape[1]
    longer = _moved(model, "L1", 1.0, 20.0)  # out of the disc: a new one, the same near panels
    _assert_same(edits.solve(longer), solver.solve(longer, estimate_error=False))
    assert len(edits._far.near) and not edits.reused_solves
    assert edits._solves._columns.shape[1] == kept_columns  # their columns of A_PP^-1 were kept


def test_near_blocks_over_a_ground_plane_and_after_a_far_start_equal_fresh_solves():
    """A wire dragged from far to near another over a ground plane: the images are near too
    (the plane's mirror of the disc), and the bordered solves of the first edit serve."""
    model = Model(unit="mm", mesh_density="coarse", ground_plane=GroundPlane(0.0), conductors=(
        Conductor("L1", (Rectangle((-40.0, 50.0), 10.0, 60.0, 3.0),), potential_V=100.0),
        Conductor("L2", (Rectangle((40.0, 50.0), 10.0, 60.0, 3.0),), potential_V=-40.0),
        Conductor("L3", (Rectangle((150.0, 50.0), 10.0, 10.0, 1.0),), potential_V=10.0),
        Conductor("L0", (Rectangle((-150.0, 50.0), 10.0, 10.0, 1.0),), role="floating"),
    ))
    edits = GeometryEditSolver()
    edits.solve(model)
    nears = []
    for dx in (5.0, 50.0, 5.0, -2.0):  # L1 ends with a 7 mm gap to L2
        model = _moved(model, "L1", dx, 0.0)
        edited = edits.solve(model)
        assert edits.reused_panels > 0
        nears.append(len(edits._far.near) if edits.far_blocks else None)
        _assert_same(edited, solver.solve(model, estimate_error=False))
    assert nears[0] == 0 and all(n for n in nears[2:])  # far at first, then b kept exact


def test_an_edit_with_most_others_near_is_assembled_in_closed_form():
    """The inner wire of a coax: the shield is all near, no low-rank form pays."""
    model = Model(unit="mm", mesh_density="coarse", conductors=(
        Conductor("inner", (Circle((0.0, 0.0), 1.0),), potential_V=1.0),
        Conductor("shield", (Ring((0.0, 0.0), 1.6, 2.0),), role="reference"),
    ))
    edits = GeometryEditSolver()
    edits.solve(model)
    moved = _moved(model, "inner", 0.1, 0.0)
    _assert_same(edits.solve(moved), solver.solve(moved, estimate_error=False))
    assert edits.reused_panels > 0 and not edits.far_blocks


def test_a_reshaped_conductor_does_not_reuse_its_own_block():
    model = solver.load_project("sample_geometries/busbar_enclosure.json").with_mesh_density("coarse")
    edits = GeometryEditSolver()
    edits.solve(model)
    edits.solve(_moved(model, "L1", 1.0, 0.0))
    wider = model.with_conductors(tuple(
        c if c.name != "L1" else Conductor(c.name, (Rectangle((-39.0, 0.0), 12.0, 60.0, 3.0),), c.role,
                                           c.potential_V)
        for c in model.conductors
    ))
    edited = edits.solve(wider)
    assert edits.far_blocks and edits.reused_factor and not edits.reused_self_block
    _assert_same(edited, solver.solve(wider, estimate_error=False))


def test_dragging_a_floating_wire_over_a_ground_plane_equals_fresh_solves():
    model = Model(unit="mm", mesh_density="coarse", ground_plane=GroundPlane(0.0), conductors=(
        Conductor("hv", (Rectangle((0.0, 20.0), 8.0, 4.0, 1.0),), potential_V=1000.0),
        Conductor("float", (Circle((15.0, 12.0), 2.0),), role="floating", charge_C_per_m=1e-9),
        Conductor("lv", (Circle((-15.0, 10.0), 1.5),), potential_V=-200.0),
        Conductor("mast", (Rectangle((30.0, 16.0), 2.0, 30.0),), role="reference"),
    ))
    rigid, _ = _drag(model, "float", [(0.5, 0.0), (0.5, 0.0), (0.5, 1.0)])
    assert rigid == [True, True, False]  # along the plane the images move with the wire


def test_floating_conductors_without_a_plane_equal_fresh_solves():
    model = Model(unit="mm", mesh_density="coarse", conductors=(
        Conductor("a", (Circle((-5.0, 0.0), 1.0),), potential_V=1.0),
        Conductor("f", (Rectangle((0.0, 3.0), 2.0, 1.0),), role="floating"),
        Conductor("ref", (Circle((5.0, 0.0), 1.5),), role="reference"),
        Conductor("frame", (Rectangle((0.0, -6.0), 16.0, 1.0),), role="reference"),
    ))
    # the floating conductor's charge row and the neutrality row agree on its own panels:
    # the bordered solves would be singular, A_PP is factorised
    _drag(model, "f", [(0.25, 0.0), (0.25, 0.0), (-0.75, 0.0)], bordered=False)


def test_models_with_dielectrics_are_solved_afresh():
    model = solver.load_project("sample_geometries/microstrip_on_substrate.json").with_mesh_density("coarse")
    edits = GeometryEditSolver()
    edits.solve(model)
    name = model.conductors[0].name
    moved = _moved(model, name, 0.01, 0.0)
    edited = edits.solve(moved)
    assert edits.reused_panels == 0
    _assert_same(edited, solver.solve(moved, estimate_error=False))


def test_closed_form_blocks_on_request_equal_the_low_rank_ones():
    model = solver.load_project("sample_geometries/busbar_enclosure.json").with_mesh_density("coarse")
    moved = [_moved(model, "L1", dx, 0.0) for dx in (1.0, 2.0)]
    results = []
    for low_rank in (True, False):
        edits = GeometryEditSolver(low_rank=low_rank)
        edits.solve(model)
        results.append([edits.solve(m) for m in moved])
        assert edits.far_blocks == low_rank and edits.reused_factor
    for a, b in zip(*results):
        _assert_same(a, b)


def test_dragging_one_bar_then_the_other_equals_fresh_solves():
    """The unchanged set changes from step to step (L1 dragged, then L2, then L1 again)."""
    model = solver.load_project("sample_geometries/busbar_enclosure.json").with_mesh_density("coarse")
    edits = GeometryEditSolver()
    edits.solve(model)
    for name, dx in (("L1", 1.0), ("L1", 1.0), ("L2", -1.0), ("L2", -1.0), ("L1", 0.5)):
        model = _moved(model, name, dx, 0.0)
        edited = edits.solve(model)
        assert edits.reused_panels > 0 and edits.far_blocks
        _assert_same(edited, solver.solve(model, estimate_error=False))



def test_a_potential_change_is_superposed_and_a_drag_goes_on_after_it():
    model = solver.load_project("sample_geometries/busbar_enclosure.json").with_mesh_density("coarse")
    edits = GeometryEditSolver()
    edits.solve(model)
    assert not edits.superposed
    other = model.with_potentials({"L1": 12e3, "L2": -6e3})
    _assert_same(edits.solve(other), solver.solve(other, estimate_error=False))
    assert edits.superposed and edits.reused_panels == 0
    moved = _moved(other, "L1", 1.0, 0.0)  # geometry: not superposable
    _assert_same(edits.solve(moved), solver.solve(moved, estimate_error=False))
    assert not edits.superposed and edits.far_blocks and edits.bordered


def test_editing_another_conductor_after_a_drag_equals_a_fresh_solve():
    """A drag step leaves its low-rank blocks multiplied out later (``far.deferred``); an edit
    of another conductor reads them from the matrix, so they must be written first."""
    model = solver.load_project("sample_geometries/busbar_enclosure.json").with_mesh_density("coarse")
    edits = GeometryEditSolver()
    edits.solve(model)
    model = _moved(model, "L1", 1.0, 0.0)
    edits.solve(model)
    assert edits.far_blocks and edits._far is not None and edits._far.deferred
    model = _moved(model, "L2", -1.0, 0.5)
    edited = edits.solve(model)
    assert edits.reused_panels > 0 and edits.far_blocks
    _assert_same(edited, solver.solve(model, estimate_error=False))
    model = _moved(model, "L1", 0.5, 0.0)
    edited = edits.solve(model)
    _assert_same(edited, solver.solve(model, estimate_error=False))


def test_a_cancelled_edit_leaves_the_next_solve_right():
    """The cancelled solve has written over the previous matrix: its system is kept as the
    previous one (a drag released while its last position is solved), and the next edit
    reuses it and still equals a fresh solve."""
    model = solver.load_project("sample_geometries/busbar_enclosure.json").with_mesh_density("coarse")
    edits = GeometryEditSolver()
    edits.solve(model)
    moved = _moved(model, "L1", 1.0, 0.0)
    try:
        edits.solve(moved, cancel=lambda: True)  # asked first after the matrix is assembled
    except solver.errors.SolveCancelled:
        pass
    else:
        raise AssertionError("the solve was not cancelled")
    for again in (moved, _moved(model, "L1", 1.0, 1.0)):
        edited = edits.solve(again)
        assert edits.reused_panels > 0
        _assert_same(edited, solver.solve(again, estimate_error=False))


def test_a_conductor_dragged_far_from_where_it_was_still_uses_the_fresh_factors():
    """The disc around the wire's panels of then and now would reach the other wire: the
    solves with A_PP come from the fresh solve's factors on a disc around its old panels
    alone, and serve the next steps too (no factorisation)."""
    model = Model(unit="mm", mesh_density="coarse", conductors=(
        Conductor("a", (Circle((-10.0, 0.0), 1.0),), potential_V=100.0),
        Conductor("b", (Circle((10.0, 0.0), 1.0),), role="reference"),
        Conductor("shield", (Ring((0.0, 5.0), 28.0, 30.0),), potential_V=-20.0),
    ))
    edits = GeometryEditSolver()
    edits.solve(model)
    for dx, dy in ((20.0, 18.0), (0.5, 0.0), (-3.0, 2.0)):
        model = _moved(model, "a", dx, dy)
        edited = edits.solve(model)
        assert edits.far_blocks and edits.bordered and not edits._far.anchored
        _assert_same(edited, solver.solve(model, estimate_error=False))


def test_a_prepared_first_edit_reuses_the_preparation_and_equals_a_fresh_solve():
    """prepare() does the first edit's disc, compression and solves ahead; the edit then only
    assembles the moved panels' own terms, and equals a fresh solve. The enclosure's disc
    would hold everything: it is not prepared."""
    model = solver.load_project("sample_geometries/busbar_enclosure.json").with_mesh_density("coarse")
    edits = GeometryEditSolver()
    edits.solve(model)
    assert edits.prepare() == ("L1", "L2")
    ready = edits._prepared["L1"]
    for dx, dy in ((1.0, 0.0), (0.5, -0.5)):  # then a drag step after the prepared edit
        model = _moved(model, "L1", dx, dy)
        edited = edits.solve(model)
        _assert_same(edited, solver.solve(model, estimate_error=False))
        assert edits.far_blocks and edits.bordered and edits.reused_self_block
    assert edits._solves is ready.solves  # the prepared solves serve the drag
    assert edits._prepared == {}  # the system changed: what was prepared for L2 is gone
    assert edits.prepare() == ()  # the last solve was an edit, not a fresh one


def test_a_prepared_edit_is_taken_only_for_its_own_conductor():
    model = solver.load_project("sample_geometries/busbar_enclosure.json").with_mesh_density("coarse")
    edits = GeometryEditSolver()
    edits.solve(model)
    assert edits.prepare(["L1"]) == ("L1",)
    moved = _moved(model, "L2", -1.0, 0.0)
    _assert_same(edits.solve(moved), solver.solve(moved, estimate_error=False))
    assert not edits.prepared and edits.bordered  # L2's first edit, made as without preparation
    both = _moved(_moved(model, "L1", 1.0, 0.0), "L2", 0.0, 1.0)
    edits = GeometryEditSolver()
    edits.solve(model)
    edits.prepare()
    _assert_same(edits.solve(both), solver.solve(both, estimate_error=False))
    assert not edits.prepared  # two conductors edited


def test_a_prepared_edit_that_leaves_the_disc_and_a_potential_change_keep_results_right():
    model = solver.load_project("sample_geometries/busbar_enclosure.json").with_mesh_density("coarse")
    edits = GeometryEditSolver()
    edits.solve(model)
    edits.prepare()
    other = model.with_potentials({"L1": 5e3, "L2": 2e3})
    edits.solve(other)
    assert edits.superposed and set(edits._prepared) == {"L1", "L2"}  # the system is unchanged
    far = _moved(other, "L1", 30.0, 0.0)  # out of the prepared disc
    _assert_same(edits.solve(far), solver.solve(far, estimate_error=False))
    assert edits.prepared and edits.reused_panels > 0


def test_prepare_stops_when_asked_and_does_nothing_for_a_large_or_dielectric_model():
    model = solver.load_project("sample_geometries/busbar_enclosure.json").with_mesh_density("coarse")
    edits = GeometryEditSolver()
    assert edits.prepare() == ()  # nothing solved yet
    edits.solve(model)
    assert edits.prepare(cancel=lambda: True) == ()
    assert edits.prepare(["L2"]) == ("L2",)
    microstrip = solver.load_project("sample_geometries/microstrip_on_substrate.json")
    edits.solve(microstrip)
    assert edits.prepare() == ()
