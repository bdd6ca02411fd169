"""The Qt-free document: one event per real edit, undo/redo round trips, selection checks."""

from app import edits
from app.document import Document, PartRef
from solver import Circle, Model, Rectangle


def _events(doc):
    seen = []
    for name in ("model_changed", "selection_changed", "modified_changed"):
        doc.events.connect(name, lambda *a, n=name: seen.append(n))
    return seen


def test_one_event_per_edit_and_none_without_change():
    doc = Document(Model())
    seen = _events(doc)
    model, ref = edits.add_conductor(doc.model, Circle((0, 0), 1))
    assert doc.apply(model, "Draw circle")
    assert seen.count("model_changed") == 1
    assert not doc.apply(doc.model, "Nothing")
    assert seen.count("model_changed") == 1
    assert doc.is_modified and doc.undo_text == "Draw circle"


def test_undo_redo_round_trip():
    doc = Document(Model())
    states = [doc.model]
    model, ref = edits.add_conductor(doc.model, Rectangle((0, 0), 2, 1))
    doc.apply(model, "Draw")
    states.append(doc.model)
    doc.apply(edits.move_part(doc.model, ref, 3, 4), "Move")
    states.append(doc.model)
    doc.apply(edits.update_conductor(doc.model, 0, potential_V=250.0), "Potential")
    states.append(doc.model)
    for expected in reversed(states[:-1]):
        assert doc.undo()
        assert doc.model == expected
    assert not doc.undo() and not doc.is_modified
    for expected in states[1:]:
        assert doc.redo()
        assert doc.model == expected
    assert doc.model.conductors[0].shapes[0].center == (3.0, 4.0)
    assert doc.model.conductors[0].potential_V == 250.0


def test_a_new_edit_after_undo_drops_the_redo_branch_and_marks_modified():
    doc = Document(Model())
    model, _ = edits.add_conductor(doc.model, Circle((0, 0), 1))
    doc.apply(model, "Draw")
    doc.mark_saved("/tmp/x.json")
    doc.undo()
    model2, _ = edits.add_conductor(doc.model, Circle((5, 0), 1))
    doc.apply(model2, "Draw other")
    assert not doc.can_redo and doc.is_modified


def test_selection_is_cleared_when_its_part_goes_away():
    doc = Document(Model())
    model, ref = edits.add_conductor(doc.model, Circle((0, 0), 1))
    doc.apply(model, "Draw")
    doc.select(ref)
    seen = _events(doc)
    doc.apply(edits.delete_part(doc.model, ref), "Delete")
    assert doc.selection is None and "selection_changed" in seen
    doc.select(PartRef("conductor", 5, 0))
    assert doc.selection is None


def test_shapes_join_one_conductor_and_names_stay_unique():
    model, _ = edits.add_conductor(Model(), Circle((0, 0), 1))
    model, ref = edits.add_conductor(model, Circle((5, 0), 1))
    assert model.conductor_names == ("conductor 1", "conductor 2")
    model, joined = edits.move_shape_to(model, ref, "conductor 1")
    assert model.conductor_names == ("conductor 1",)
    assert len(model.conductors[0].shapes) == 2 and joined == PartRef("conductor", 0, 1)
