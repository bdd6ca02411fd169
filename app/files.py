"""Project files, samples, recent files and the recovery file (Qt-free apart from paths).

Opening goes through :func:`solver.load_project`; a file that cannot be read raises
``ProjectFileError`` with a message naming the file and the field, and nothing changes.
"""

from __future__ import annotations

import json
import logging
import os
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


def open_model(path: Path) -> Model:
    """Read a project file; raises ProjectFileError naming the problem."""
    try:
        return load_project(path)
    except ProjectFileError:
        raise
    except OSError as exc:
        raise ProjectFileError(f"{path}: cannot be read ({exc.strerror or exc}).") from exc


def save_model(model: Model, path: Path) -> None:
    """Write the project file (raises OSError or the solver's errors with a plain message)."""
    save_project(model, path)


def recovery_dir() -> Path:
    """Folder of the recovery file: $EDGEWISE_RECOVERY_DIR, else ~/.local/state/edgewise."""
    base = os.environ.get("EDGEWISE_RECOVERY_DIR")
    if base:
        return Path(base)
    state = os.environ.get("XDG_STATE_HOME") or str(Path.home() / ".local" / "state")
    return Path(state) / "edgewise"


def recovery_path() -> Path:
    return recovery_dir() / "recovery.autosave.json"


def write_recovery(model: Model, original: Path | None) -> Path:
    """Save the unsaved work for crash recovery, with the path it belongs to."""
    path = recovery_path()
    path.parent.mkdir(parents=True, exist_ok=True)
    data = {"original_path": str(original) if original else None, "model": model_to_dict(model)}
    tmp = path.with_suffix(".tmp")
    tmp.write_text(json.dumps(data), encoding="utf-8")
    tmp.replace(path)
    return path


def read_recovery() -> tuple[Model, Path | None] | None:
    """The recovered model and its original path, or None when there is nothing to recover."""
    path = recovery_path()
    if not path.is_file():
        return None
    try:
        data = json.loads(path.read_text(encoding="utf-8"))
        original = data.get("original_path")
        return model_from_dict(data["model"]), Path(original) if original else None
    except (ValueError, KeyError, TypeError, ProjectFileError) as exc:
        logger.warning("recovery file %s unreadable: %s", path, exc)
        return None


def discard_recovery() -> None:
    try:
        recovery_path().unlink()
    except FileNotFoundError:
        pass


def updated_recent(recent: list[str], path: Path) -> list[str]:
    """``recent`` with ``path`` moved to the front, at most MAX_RECENT entries."""
    p = str(Path(path).resolve())
    return ([p] + [r for r in recent if r != p])[:MAX_RECENT]
