"""The words a results section shows in its status line when it has no results (Qt-free)."""

from __future__ import annotations

#: Before any solve.
NOT_SOLVED = "Not solved yet: press Solve (F5)."

#: The start of the status line after a failed solve (the summary's "cannot solve").
FAILED = "Cannot solve:"


def failure_text(message: str) -> str:
    """The status line of a section after a failed solve: why, in the solver's words (which say
    what to change), then how to try again."""
    return f"{FAILED} {message.rstrip('.')}. Change the drawing, then press Solve (F5)."
