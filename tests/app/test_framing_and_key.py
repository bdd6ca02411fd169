"""The view opens on the conductors (board-scale samples readable), follows a part whose
coordinates were typed, keeps labels apart, and keeps its colour key in one place with round ticks."""

import math

import numpy as np
import pytest
from app_helpers import wait_for_solve
from hypothesis import given
from hypothesis import strategies as st

import solver
from app import edits
from app.canvas import labels
from app.canvas.colour_key import round_ticks
from app.document import PartRef
from app.files import project_files as files
from app.framing import framing_box

#: Board-scale samples and their signal traces: each trace spans at least this share of the frame's width.
PCB_SAMPLES = ("microstrip_on_substrate.json", "buried_stripline.json", "edge_coupled_pair.json",
               "three_traces_over_ground.json")
READABLE_SHARE = 0.25


def _signal_box(model):
    boxes = [s.bounds() for c in model.conductors if c.role == "fixed" for s in c.shapes]
    return (min(b[0] for b in boxes), min(b[1] for b in boxes), max(b[2] for b in boxes), max(b[3] for b in boxes))


@pytest.mark.parametrize("name", PCB_SAMPLES)
def test_board_samples_open_with_the_traces_readable(name):
    model = solver.load_project(files.SAMPLES_DIR / name)
    x0, y0, x1, y1 = framing_box(model)
    sx0, sy0, sx1, sy1 = _signal_box(model)
    assert x0 < sx0 and sx1 < x1 and y0 < sy0 and sy1 < y1  # the traces are in view
    assert (sx1 - sx0) / (x1 - x0) >= READABLE_SHARE
    for board in (s.bounds() for d in model.dielectrics for s in d.shapes):
        assert (x1 - x0) < 0.5 * (board[2] - board[0])  # the wide board does not set the zoom
    assert y0 <= model.ground_plane.y  # the plane under the trace stays in view ...
    assert model.ground_plane.y - y0 < 0.15 * (y1 - y0)  # ... with only a strip of earth below it


@pytest.mark.parametrize("name, must_show", [("twin_lead.json", "return"), ("busbar_enclosure.json", "enclosure"),
                                             ("coaxial_feeder.json", "shield"), ("three_phase_line.json", "E2")])
def test_returns_and_near_enclosures_stay_in_the_frame(name, must_show):
    model = solver.load_project(files.SAMPLES_DIR / name)
    x0, y0, x1, y1 = framing_box(model)
    part = next(c for c in model.conductors if c.name == must_show)
    for s in part.shapes:
        bx0, by0, bx1, by1 = s.bounds()
        assert x0 <= bx0 and bx1 <= x1 and y0 <= by0 and by1 <= y1


def test_the_view_follows_a_part_whose_coordinates_were_typed(window, qtbot):
    window.commands.open(files.SAMPLES_DIR / "microstrip_on_substrate.json")
    ref = PartRef("conductor", 0, 0)
    window.document.select(ref)
    field = window.properties.fields["cx"]  # the trace's centre, typed as a user types it
    field.setText("60")
    field.editingFinished.emit()
    assert edits.shape_of(window.document.model, ref).bounds()[0] > 50.0
    (vx0, vx1), (vy0, vy1) = window.canvas.plotItem.vb.viewRange()
    bx0, by0, bx1, by1 = edits.shape_of(window.document.model, ref).bounds()
    assert vx0 < bx0 and bx1 < vx1 and vy0 < by0 and by1 < vy1


def test_labels_take_a_free_place():
    view = (0.0, 100.0, 0.0, 100.0)
    first_anchor, first = labels.free_place(50.0, 50.0, 20.0, 5.0, 1.0, 1.0, [], view)
    anchor, second = labels.free_place(50.0, 50.0, 20.0, 5.0, 1.0, 1.0, [first], view)
    assert not labels.overlap(first, second) and anchor != first_anchor
    # near the right edge the label goes left, inside the view
    anchor, box = labels.free_place(95.0, 50.0, 20.0, 5.0, 1.0, 1.0, [], view)
    assert box[2] <= 100.0 and anchor[0] == 1.0


def test_labels_of_close_points_stack_instead_of_covering_each_other():
    # three traces side by side, each label wider than the gap between them (the labels of the
    # three-trace sample once covered each other and ran out of the view)
    view = (0.0, 100.0, 0.0, 100.0)
    placed = []
    for x in (40.0, 50.0, 60.0):
        anchor, box = labels.free_place(x, 50.0, 45.0, 5.0, 1.0, 1.0, placed, view)
        assert not any(labels.overlap(box, other) for other in placed), (x, box, placed)
        assert 0.0 <= box[0] and box[2] <= 100.0 and 0.0 <= box[1] and box[3] <= 100.0
        placed.append(box)


@given(st.floats(-1e6, 1e6), st.floats(1e-6, 1e6))
def test_colour_key_ticks_are_few_and_round(lo, span):
    ticks = round_ticks(lo, lo + span)
    assert 5 <= len(ticks) <= 7
    tol = 1e-9 * span + 4.0 * math.ulp(max(abs(lo), abs(lo + span)))  # round-off at a large offset
    assert all(lo - tol <= t <= lo + span + tol for t in ticks)
    steps = [b - a for a, b in zip(ticks, ticks[1:])]
    assert max(steps) - min(steps) <= 1e-3 * min(steps)  # evenly spaced (to round-off at a large offset)


def test_round_ticks_of_a_potential_range():
    assert round_ticks(-9800.0, 9800.0) == [-7500.0, -5000.0, -2500.0, 0.0, 2500.0, 5000.0, 7500.0]
    assert round_ticks(0.0, 1.0) == [0.0, 0.25, 0.5, 0.75, 1.0]


def test_the_drawing_keeps_its_size_when_the_shading_changes(window, qtbot):
    window.commands.open(files.SAMPLES_DIR / "twin_lead.json")
    window.solve()
    wait_for_solve(qtbot, window)
    widths = []
    for shading in ("potential", "field strength", "none", "field strength (log)"):
        window.shading_combo.setCurrentText(shading)
        qtbot.wait(20)
        widths.append(window.canvas.plotItem.vb.width())
        key = window.canvas.overlays.key
        if shading != "none":
            assert key.shown and 5 <= len(key.bar.axis._tickLevels[0]) <= 7 or shading.endswith("(log)")
    assert max(widths) - min(widths) < 1.0
    window.document.apply(edits.update_conductor(window.document.model, 0, potential_V=2.0), "Potential")
    assert window.canvas.overlays.key.bar.opacity() < 0.5  # the key dims with the map


def test_a_return_plane_drawn_as_a_wide_strip_frames_with_its_height_only():
    model = solver.load_project(files.SAMPLES_DIR / "buried_stripline.json")
    x0, y0, x1, y1 = framing_box(model)
    upper = next(c for c in model.conductors if c.name == "upper plane").shapes[0].bounds()
    assert y1 >= upper[3]  # the upper plane is in view above the trace ...
    assert (x1 - x0) < 0.25 * (upper[2] - upper[0])  # ... but its 8 mm width does not set the zoom


def test_one_colour_key_in_one_place_with_surface_charge_over_a_shading(window, qtbot):
    import pyqtgraph as pg

    window.commands.open(files.SAMPLES_DIR / "twin_lead.json")
    window.solve()
    wait_for_solve(qtbot, window)
    overlays, plot = window.canvas.overlays, window.canvas.plotItem
    place = overlays.key.bar.sceneBoundingRect()

    def bars():
        return [i for i in plot.scene().items() if isinstance(i, pg.ColorBarItem) and i.opacity() > 0]

    window.shading_combo.setCurrentText("potential")
    window.layer_boxes["surface charge"].setChecked(True)
    qtbot.wait(20)
    assert bars() == [overlays.key.bar] and "potential" in overlays.key.bar.axis.labelText
    assert overlays.key.bar.sceneBoundingRect() == place
    # The charge is drawn as sticks along the normals, its scale in a note: no second key.
    assert len(overlays._notes) == 1 and "Surface charge" in overlays._notes[0].toPlainText()
    sigma = window.results.solution.surface_charge_density_C_per_m2
    assert "C/m²" in overlays._notes[0].toPlainText() and sigma.size > 0
    window.shading_combo.setCurrentText("none")
    qtbot.wait(20)
    assert bars() == [overlays.key.bar] and "surface charge" in overlays.key.bar.axis.labelText
    assert overlays.key.bar.sceneBoundingRect() == place and overlays._notes == []
    window.layer_boxes["surface charge"].setChecked(False)
    qtbot.wait(20)
    assert bars() == []


def test_charge_sticks_point_out_for_positive_charge_and_are_cut_at_the_percentile():
    import types

    from app.canvas.charge_overlay import STICK_PX, charge_sticks

    # Two panels 1 unit long, far apart on the x axis, outward normal +y: one charge +1 uC/m2,
    # one -4 uC/m2 (cut to the 98th percentile of |sigma|).
    mesh = types.SimpleNamespace(midpoints=np.array([[0.0, 0.0], [100.0, 0.0]]), lengths=np.array([1.0, 1.0]),
                                 normals=np.array([[0.0, 1.0], [0.0, 1.0]]), conductor_index=np.array([0, 1]))
    sigma = np.array([1.0e-6, -4.0e-6])
    items, note = charge_sticks(mesh, sigma, 1.0, 0.1)
    x, y = items[0].getData()
    level = np.percentile(np.abs(sigma), 98)
    assert y[1] == pytest.approx(STICK_PX * 0.1 * 1.0e-6 / level)  # out of the surface
    assert y[3] == pytest.approx(-STICK_PX * 0.1)                    # into it, cut at full length
    assert len(items) == 2 and "cut" in note                          # the cut one is marked


def test_charge_sticks_stand_apart_on_a_fine_mesh_and_keep_the_charge():
    import types

    from app.canvas.charge_overlay import STICK_GAP_PX, charge_sticks

    # 1000 panels of 0.01 unit on one outline; at 0.01 unit per pixel a stick stands for 5 panels.
    n = 1000
    mid = np.column_stack([np.arange(n) * 0.01, np.zeros(n)])
    mesh = types.SimpleNamespace(midpoints=mid, lengths=np.full(n, 0.01), normals=np.tile([0.0, 1.0], (n, 1)),
                                 conductor_index=np.zeros(n, dtype=int))
    items, _ = charge_sticks(mesh, np.full(n, 2e-6), 1.0, 0.01)
    x, _ = items[0].getData()
    assert len(x) // 2 == n // STICK_GAP_PX
    assert np.min(np.diff(x[::2])) >= STICK_GAP_PX * 0.01 * 0.999


def test_a_label_with_no_place_in_view_is_moved_into_it():
    view = (0.0, 100.0, 0.0, 100.0)
    anchor, box = labels.free_place(50.0, 50.0, 60.0, 5.0, 1.0, 1.0, [], view)  # wider than either side
    assert 0.0 <= box[0] and box[2] <= 100.0


def _three_traces_solved(window, qtbot) -> None:
    """The three-trace sample at 1366 x 768, coarse mesh, solved and drawn."""
    window.resize(1366, 768)
    window.commands.open(files.SAMPLES_DIR / "three_traces_over_ground.json")
    window.document.apply(window.document.model.with_mesh_density("coarse"), "Mesh")
    window.solve()
    wait_for_solve(qtbot, window)
    qtbot.wait(50)


def test_hot_spot_labels_of_the_three_traces_stay_apart_and_in_view(window, qtbot):
    import pyqtgraph as pg

    _three_traces_solved(window, qtbot)
    vb = window.canvas.plotItem.vb
    view = vb.mapRectToScene(vb.boundingRect())
    spots = [i for i in window.canvas.overlays._items if isinstance(i, pg.TextItem) and "V/m" in i.toPlainText()]
    assert len(spots) == 3
    rects = [s.mapRectToScene(s.boundingRect()) for s in spots]
    for k, r in enumerate(rects):
        assert view.adjusted(-1, -1, 1, 1).contains(r), spots[k].toPlainText()
        for other in rects[k + 1:]:
            overlap = r.intersected(other)
            assert overlap.width() < 2 or overlap.height() < 2


def test_no_label_covers_a_hot_spot_star(window, qtbot):
    # the three-phase line's "−11.3 kV" equipotential label sat on the star of L3
    import pyqtgraph as pg
    from PySide6.QtCore import QPointF

    window.resize(1366, 768)
    window.commands.open(files.SAMPLES_DIR / "three_phase_line.json")
    window.document.apply(window.document.model.with_mesh_density("coarse"), "Mesh")
    window.solve()
    wait_for_solve(qtbot, window)
    qtbot.wait(50)
    overlays = window.canvas.overlays
    scale = overlays.results.model.metres_per_unit
    stars = [QPointF(p.location_m[0] / scale, p.location_m[1] / scale)
             for p in overlays.results.solution.peak_surface_fields]
    texts = [i for i in overlays._items if isinstance(i, pg.TextItem)]
    assert len(texts) > len(stars)  # equipotential labels and hot-spot labels
    vb = window.canvas.plotItem.vb
    for item in texts:
        rect = item.mapRectToScene(item.boundingRect())
        for star in stars:
            assert not rect.contains(vb.mapViewToScene(star)), item.toPlainText()


def test_a_label_stays_near_its_point_rather_than_wander_off():
    # the busbar's "L2: 496 kV/m" once stood five label heights below its star, outside the enclosure
    view = (0.0, 100.0, 0.0, 100.0)
    crowd = (20.0, 50.0 - 21.0, 80.0, 50.0 + 21.0)  # one box around the point, 4 label heights each way
    anchor, box = labels.free_place(50.0, 50.0, 20.0, 5.0, 1.0, 1.0, [crowd], view)
    assert abs(0.5 * (box[1] + box[3]) - 50.0) <= 1.0 + 5.0  # beside the point, at the price of one clash


def test_labels_are_placed_again_after_a_zoom(window, qtbot):
    # labels are sized in pixels: placed for one scale they drifted off their stars at another
    import pyqtgraph as pg

    window.commands.open(files.SAMPLES_DIR / "busbar_enclosure.json")
    window.document.apply(window.document.model.with_mesh_density("coarse"), "Mesh")
    window.solve()
    wait_for_solve(qtbot, window)
    overlays, vb = window.canvas.overlays, window.canvas.plotItem.vb

    def spot_label(name):
        return next(i for i in overlays._items if isinstance(i, pg.TextItem) and i.toPlainText().startswith(name))

    before = spot_label("L1:")
    (x0, x1), (y0, y1) = vb.viewRange()
    vb.setRange(xRange=(x0 / 2, x1 / 2), yRange=(y0 / 2, y1 / 2), padding=0)
    qtbot.waitUntil(lambda: spot_label("L1:") is not before, timeout=3000)
    scale = overlays.results.model.metres_per_unit
    star = [v / scale for v in next(p for p in overlays.results.solution.peak_surface_fields if p.conductor == "L1").location_m]
    label = spot_label("L1:")
    rect = label.mapRectToScene(label.boundingRect())
    corner = vb.mapViewToScene(pg.QtCore.QPointF(*star))
    assert abs(rect.center().y() - corner.y()) < 4 * rect.height()  # beside its star at the new scale


def test_a_label_stacked_away_from_its_point_gets_a_leader_and_one_beside_it_none():
    view = (0.0, 100.0, 0.0, 100.0)
    anchor, beside = labels.free_place(50.0, 50.0, 20.0, 5.0, 1.0, 1.0, [], view)
    assert labels.leader_line(50.0, 50.0, beside, 1.0, 1.0) is None
    # the four places beside the point taken: the label stacks a label height away
    taken = [labels.free_place(50.0, 50.0, 20.0, 5.0, 1.0, 1.0, [], view)[1]]
    for _ in range(3):
        taken.append(labels.free_place(50.0, 50.0, 20.0, 5.0, 1.0, 1.0, taken, view)[1])
    anchor, stacked = labels.free_place(50.0, 50.0, 20.0, 5.0, 1.0, 1.0, taken, view)
    assert not any(labels.overlap(stacked, other) for other in taken)
    (x0, y0), (x1, y1) = labels.leader_line(50.0, 50.0, stacked, 1.0, 1.0)
    assert (x0, y0) == (50.0, 50.0)
    # the line ends on the label's edge, at its nearest point to the star
    assert stacked[0] <= x1 <= stacked[2] and y1 in (stacked[1], stacked[3])
    assert abs(y1 - 50.0) >= 5.0


def test_hot_spot_labels_away_from_their_stars_are_led_back_to_them(window, qtbot):
    # the three traces: the outer traces' labels stack above the middle one's, far from their stars
    import pyqtgraph as pg
    from PySide6.QtCore import QPointF

    _three_traces_solved(window, qtbot)
    overlays, vb = window.canvas.overlays, window.canvas.plotItem.vb
    scale = overlays.results.model.metres_per_unit
    stars = {p.conductor: vb.mapViewToScene(QPointF(p.location_m[0] / scale, p.location_m[1] / scale))
             for p in overlays.results.solution.peak_surface_fields}
    led = {label.toPlainText().split(":")[0]: line for label, line in overlays.leaders}
    spots = [i for i in overlays._items if isinstance(i, pg.TextItem) and "V/m" in i.toPlainText()]
    assert len(spots) == 3 and led  # at 1366 x 768 at least one label cannot stand beside its star
    for label in spots:
        name = label.toPlainText().split(":")[0]
        rect = label.mapRectToScene(label.boundingRect())
        star = stars[name]
        gap = math.hypot(max(rect.left() - star.x(), star.x() - rect.right(), 0.0),
                         max(rect.top() - star.y(), star.y() - rect.bottom(), 0.0))
        if name not in led:
            assert gap < 2.5 * 10 * math.sqrt(2), name  # beside its star: no leader needed
            continue
        xs, ys = led[name].getData()
        start, end = vb.mapViewToScene(QPointF(xs[0], ys[0])), vb.mapViewToScene(QPointF(xs[-1], ys[-1]))
        assert (start - star).manhattanLength() < 1.0, name  # from its own star ...
        assert rect.adjusted(-3, -3, 3, 3).contains(end), name  # ... to its own label
        assert (end - star).manhattanLength() > 15, name
        assert led[name].zValue() < label.zValue()


def test_a_label_does_not_stand_nearer_another_point_than_its_own():
    # the edge-coupled pair: n's label stood under p's star and read as p's
    view = (0.0, 100.0, 0.0, 100.0)
    _, alone = labels.free_place(45.0, 50.0, 15.0, 5.0, 1.0, 1.0, [], view)
    assert alone[2] < 45.0  # outward (left) when nothing else is near
    _, beside_other = labels.free_place(45.0, 50.0, 15.0, 5.0, 1.0, 1.0, [], view, others=[(30.0, 50.0)])
    assert beside_other[0] > 45.0  # the point at x = 30 keeps the left side


def test_a_segment_crosses_a_box_only_through_its_inside():
    box = (0.0, 0.0, 10.0, 5.0)
    assert labels.segment_crosses(((-5.0, 2.0), (15.0, 2.0)), box)
    assert labels.segment_crosses(((5.0, 2.0), (5.0, 20.0)), box)  # from inside out
    assert not labels.segment_crosses(((-5.0, 6.0), (15.0, 6.0)), box)  # above it
    assert not labels.segment_crosses(((-5.0, 5.0), (15.0, 5.0)), box)  # along its edge
    assert not labels.segment_crosses(((11.0, -3.0), (20.0, 8.0)), box)  # beside it
