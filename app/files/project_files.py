"""Project files, samples, recent files and the recovery file (Qt-free apart from paths).

Opening goes through :func:`solver.load_project`; a file that cannot be read raises
``ProjectFileError`` with a message naming the file and the field, and nothing changes.
"""

from __future__ import annotations

import json
import logging
import math
import os
import re
import time
import uuid
from dataclasses import replace
from pathlib import Path

from solver import Model, ProjectFileError, load_project, model_from_dict, model_to_dict, save_project
from solver.samples import samples_dir

logger = logging.getLogger(__name__)


def _find_samples() -> Path:
    try:
        return samples_dir()
    except ProjectFileError as exc:  # an installation without its samples: the samples list stays empty
        logger.warning("%s", exc)
        return Path(__file__).resolve().parent.parent / "sample_geometries"


#: Where the sample models live (the repository's sample_geometries folder, or the installed copy).
SAMPLES_DIR = _find_samples()
DEFAULT_SAMPLE = "coaxial_feeder.json"
MAX_RECENT = 8


def sample_paths() -> list[Path]:
    """The sample model files, sorted by name."""
    return sorted(SAMPLES_DIR.glob("*.json")) if SAMPLES_DIR.is_dir() else []


#: View settings kept in a project's ``extras`` and the check each value must pass.
VIEW_SETTINGS = {
    "part_length": ("a positive number", lambda v: _is_number(v) and v > 0),
    "relative_air_density": ("a positive number", lambda v: _is_number(v) and v > 0),
    "altitude_m": ("a number", lambda v: v is None or _is_number(v)),
}


def _is_number(value) -> bool:
    return isinstance(value, (int, float)) and not isinstance(value, bool) and math.isfinite(value)


def checked_view_settings(model: Model) -> tuple[Model, list[str]]:
    """``model`` without view settings of the wrong type in ``extras``, and a note for each dropped."""
    extras = dict(model.extras)
    notes = []
    for key, (expected, ok) in VIEW_SETTINGS.items():
        if key in extras and not ok(extras[key]):
            notes.append(f"view setting '{key}' ignored: expected {expected}, got {type(extras.pop(key)).__name__}")
    return (replace(model, extras=extras) if notes else model), notes


def open_model(path: Path) -> Model:
    """Read a project file; raises ProjectFileError naming the problem (never anything else).

    View settings of the wrong type in ``extras`` are dropped with a log note (see
    :func:`checked_view_settings`).
    """
    try:
        model = load_project(path)
    except ProjectFileError:
        raise
    except OSError as exc:
        raise ProjectFileError(f"{path}: cannot be read ({exc.strerror or exc}).") from exc
    except (RecursionError, MemoryError, OverflowError, ValueError, TypeError) as exc:
        raise ProjectFileError(f"{path}: cannot be read ({type(exc).__name__}: {exc}).") from exc
    model, notes = checked_view_settings(model)
    for note in notes:
        logger.warning("%s: %s", path, note)
    return model


def save_model(model: Model, path: Path) -> None:
    """Write the project file (raises OSError or the solver's errors with a plain message).

    Saving through a symbolic link writes the file it points to and keeps the link.
    """
    save_project(model, path)


# ---- recovery ---------------------------------------------------------------------------------
#: Seconds of quiet after an edit before the recovery file is written...
RECOVERY_QUIET_S = 1.5
#: ...but never longer than this after the first unsaved edit, even while editing goes on.
RECOVERY_MAX_WAIT_S = 10.0

#: This running program: its recovery file carries the process id so that another instance
#: neither offers nor deletes it while this one runs.
INSTANCE_ID = f"{os.getpid()}-{uuid.uuid4().hex[:8]}"


class RecoverySchedule:
    """When to write the recovery file: after :data:`RECOVERY_QUIET_S` of quiet, and at least
    every :data:`RECOVERY_MAX_WAIT_S` while edits keep coming (Qt-free; ``clock`` in seconds)."""

    def __init__(self, clock=time.monotonic, quiet_s: float = RECOVERY_QUIET_S, max_wait_s: float = RECOVERY_MAX_WAIT_S):
        self.clock, self.quiet_s, self.max_wait_s = clock, quiet_s, max_wait_s
        self._pending_since: float | None = None

    def edited(self) -> bool:
        """Record an edit; True when the file is due now (the longest wait has passed)."""
        now = self.clock()
        if self._pending_since is None:
            self._pending_since = now
        return now - self._pending_since >= self.max_wait_s

    def written(self) -> None:
        """Record that the recovery file was written (or discarded)."""
        self._pending_since = None


def recovery_dir() -> Path:
    """Folder of the recovery files: $EDGEWISE_RECOVERY_DIR, else ~/.local/state/edgewise."""
    base = os.environ.get("EDGEWISE_RECOVERY_DIR")
    if base:
        return Path(base)
    state = os.environ.get("XDG_STATE_HOME") or str(Path.home() / ".local" / "state")
    return Path(state) / "edgewise"


def recovery_path(instance: str = "") -> Path:
    """The recovery file of ``instance`` (default: this running program)."""
    return recovery_dir() / f"recovery-{instance or INSTANCE_ID}.autosave.json"


def write_recovery(model: Model, original: Path | None, *, instance: str = "") -> Path:
    """Save the unsaved work for crash recovery, with the path it belongs to.

    Raises OSError (or ProjectFileError) when it cannot be written; the caller tells the user.
    """
    path = recovery_path(instance)
    path.parent.mkdir(parents=True, exist_ok=True)
    data = {"original_path": str(original) if original else None, "model": model_to_dict(model)}
    tmp = path.with_suffix(".tmp")
    tmp.write_text(json.dumps(data), encoding="utf-8")
    tmp.replace(path)
    return path


def _owner_pid(path: Path) -> int | None:
    match = re.fullmatch(r"recovery-(\d+)-[0-9a-f]+\.autosave\.json", path.name)
    return int(match.group(1)) if match else None


def _process_running(pid: int) -> bool:
    if pid == os.getpid():
        return True
    if os.name == "nt":  # pragma: no cover - exercised on Windows only
        import ctypes

        kernel = ctypes.windll.kernel32
        handle = kernel.OpenProcess(0x1000, False, pid)  # query limited information
        if not handle:
            return False
        code = ctypes.c_ulong()
        ok = kernel.GetExitCodeProcess(handle, ctypes.byref(code))
        kernel.CloseHandle(handle)
        return bool(ok) and code.value == 259  # still active
    try:
        os.kill(pid, 0)  # signal 0: only asks whether the process exists
    except ProcessLookupError:
        return False
    except PermissionError:
        return True
    except OSError:
        return False
    return True


def read_recovery(for_file: Path | None = None) -> tuple[Model, Path | None] | None:
    """Unsaved work left by an instance that is no longer running, or None.

    The file is first claimed (renamed to this instance's recovery file, which is atomic), so
    two programs starting together never both offer it, and a running instance's file is
    never offered. Declining is :func:`discard_recovery`. With ``for_file`` (a project file
    the user asked to open), only unsaved work on that same file is looked at; work on other
    files stays for a start without a file.
    """
    folder = recovery_dir()
    if not folder.is_dir():
        return None
    candidates = sorted(folder.glob("recovery*.autosave.json"), key=lambda p: p.stat().st_mtime, reverse=True)
    mine = recovery_path()
    if mine.exists():
        return None  # this instance already keeps unsaved work of its own
    for path in candidates:
        pid = _owner_pid(path)
        if pid is not None and _process_running(pid):
            continue
        if for_file is not None and not _same_file(_original_of(path), for_file):
            continue
        try:
            path.replace(mine)  # atomic claim
        except OSError:
            continue  # another instance claimed it first
        found = read_recovery_file(mine)
        if found is not None:
            return found
        discard_recovery()
    return None


def _original_of(path: Path) -> Path | None:
    """The project file a recovery file's work belongs to (None: unsaved or unreadable)."""
    try:
        original = json.loads(path.read_text(encoding="utf-8")).get("original_path")
    except (OSError, ValueError, AttributeError):
        return None
    return Path(original) if isinstance(original, str) and original else None


def _same_file(a: Path | None, b: Path) -> bool:
    if a is None:
        return False
    try:
        return a.resolve() == b.resolve()
    except OSError:
        return False


def read_recovery_file(path: Path) -> tuple[Model, Path | None] | None:
    """The model and original path kept in one recovery file, or None when it is unreadable."""
    try:
        data = json.loads(path.read_text(encoding="utf-8"))
        original = data.get("original_path")
        model, _ = checked_view_settings(model_from_dict(data["model"]))
        return model, Path(original) if original else None
    except (OSError, ValueError, KeyError, TypeError, RecursionError, ProjectFileError) as exc:
        logger.warning("recovery file %s unreadable: %s", path, exc)
        return None


def discard_recovery() -> None:
    """Delete this instance's recovery file (never another running instance's)."""
    try:
        recovery_path().unlink()
    except FileNotFoundError:
        pass


def updated_recent(recent: list[str], path: Path) -> list[str]:
    """``recent`` with ``path`` moved to the front, at most MAX_RECENT entries."""
    p = str(Path(path).resolve())
    return ([p] + [r for r in recent if r != p])[:MAX_RECENT]
