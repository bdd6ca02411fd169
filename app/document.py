"""The open document: one immutable Model, its file path, undo/redo and the selection.

Qt-free. Every edit replaces the Model by a new value through :meth:`Document.apply`; the
document fires one ``model_changed`` event per edit, and only when something really changed.

Events (see :class:`app.events.Events`):

- ``model_changed(model)`` after an edit, undo, redo or open;
- ``selection_changed(ref)`` with a :class:`PartRef` or None;
- ``modified_changed(bool)`` when the document becomes modified or saved;
- ``path_changed(path)`` when the document is saved under, or opened from, another path.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

from app.events import Events
from solver import Model


@dataclass(frozen=True)
class PartRef:
    """Which part is meant: ``kind`` is "conductor", "dielectric" or "plane".

    ``index`` is the conductor (or dielectric) index in the model, ``shape`` the shape index
    within it; both are 0 for the ground plane.
    """

    kind: str
    index: int = 0
    shape: int = 0


def models_equal(a: Model, b: Model) -> bool:
    """True when two models are the same, view settings in ``extras`` included."""
    return a == b and a.extras == b.extras


class Document:
    """A model being edited, with an undo stack of whole-model snapshots."""

    def __init__(self, model: Model | None = None, path: Path | None = None) -> None:
        self.events = Events()
        self._stack: list[tuple[str, Model]] = [("", model or Model())]
        self._index = 0
        self._saved_index: int | None = 0
        self._path = Path(path) if path else None
        self._selection: PartRef | None = None

    # ---- reading ---------------------------------------------------------------------------
    @property
    def model(self) -> Model:
        return self._stack[self._index][1]

    @property
    def path(self) -> Path | None:
        return self._path

    @property
    def is_modified(self) -> bool:
        return self._saved_index != self._index

    @property
    def can_undo(self) -> bool:
        return self._index > 0

    @property
    def can_redo(self) -> bool:
        return self._index < len(self._stack) - 1

    @property
    def undo_text(self) -> str:
        return self._stack[self._index][0] if self.can_undo else ""

    @property
    def redo_text(self) -> str:
        return self._stack[self._index + 1][0] if self.can_redo else ""

    @property
    def selection(self) -> PartRef | None:
        return self._selection

    # ---- editing ---------------------------------------------------------------------------
    def apply(self, model: Model, description: str) -> bool:
        """Make ``model`` the current model as one undoable edit; False if nothing changed."""
        if models_equal(model, self.model):
            return False
        was_modified = self.is_modified
        del self._stack[self._index + 1:]
        if self._saved_index is not None and self._saved_index > self._index:
            self._saved_index = None
        self._stack.append((description, model))
        self._index += 1
        self._after_change(was_modified)
        return True

    def undo(self) -> bool:
        if not self.can_undo:
            return False
        was_modified = self.is_modified
        self._index -= 1
        self._after_change(was_modified)
        return True

    def redo(self) -> bool:
        if not self.can_redo:
            return False
        was_modified = self.is_modified
        self._index += 1
        self._after_change(was_modified)
        return True

    def replace(self, model: Model, path: Path | None, *, modified: bool = False) -> None:
        """Start afresh with ``model`` (after New or Open): the undo history is cleared."""
        self._stack = [("", model)]
        self._index = 0
        self._saved_index = None if modified else 0
        self._path = Path(path) if path else None
        self._selection = None
        self.events.emit("path_changed", self._path)
        self.events.emit("selection_changed", None)
        self.events.emit("model_changed", self.model)
        self.events.emit("modified_changed", self.is_modified)

    def snapshot(self) -> tuple:
        """Everything needed to :meth:`restore` this document as it is now (undo history too)."""
        return (list(self._stack), self._index, self._saved_index, self._path, self._selection)

    def restore(self, snapshot: tuple) -> None:
        """Go back to a :meth:`snapshot` (after an open that could not be shown)."""
        stack, self._index, self._saved_index, self._path, selection = snapshot
        self._stack = list(stack)
        self._selection = self._valid(selection)
        self.events.emit("path_changed", self._path)
        self.events.emit("selection_changed", self._selection)
        self.events.emit("model_changed", self.model)
        self.events.emit("modified_changed", self.is_modified)

    def mark_saved(self, path: Path) -> None:
        """Record that the current model was written to ``path``."""
        was_modified = self.is_modified
        self._saved_index = self._index
        if self._path != Path(path):
            self._path = Path(path)
            self.events.emit("path_changed", self._path)
        if was_modified:
            self.events.emit("modified_changed", False)

    def select(self, ref: PartRef | None) -> None:
        """Select a part (None clears); fires ``selection_changed`` only on a real change."""
        ref = self._valid(ref)
        if ref != self._selection:
            self._selection = ref
            self.events.emit("selection_changed", ref)

    # ---- helpers ---------------------------------------------------------------------------
    def _valid(self, ref: PartRef | None) -> PartRef | None:
        m = self.model
        if ref is None:
            return None
        if ref.kind == "plane":
            return ref if m.ground_plane is not None else None
        parts = m.conductors if ref.kind == "conductor" else m.dielectrics
        if 0 <= ref.index < len(parts) and 0 <= ref.shape < len(parts[ref.index].shapes):
            return ref
        return None

    def _after_change(self, was_modified: bool) -> None:
        still = self._valid(self._selection)
        lost = still != self._selection
        self._selection = still  # before model_changed, so views never see a dangling selection
        self.events.emit("model_changed", self.model)
        if lost:
            self.events.emit("selection_changed", still)
        if was_modified != self.is_modified:
            self.events.emit("modified_changed", self.is_modified)
