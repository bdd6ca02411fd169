"""The bundled sample models, found in a source checkout and in an installed package alike.

The samples live in the repository's ``sample_geometries/`` folder. A wheel installs them as
data files under ``<prefix>/share/edgewise/sample_geometries/`` (see ``[tool.setuptools.data-files]``
in pyproject.toml); the installed distribution's file list says where that is for any install
scheme (virtual environment, ``--user``, system).

>>> from solver import load_project, sample_path
>>> sample_path("coaxial_feeder.json").name
'coaxial_feeder.json'
>>> load_project(sample_path("coaxial_feeder.json")).unit
'mm'
"""

from __future__ import annotations

from importlib import metadata
from pathlib import Path

from solver.errors import ProjectFileError

#: Name of the samples folder, in the repository and under ``share/edgewise/`` when installed.
SAMPLES_FOLDER = "sample_geometries"
#: Name of the distribution that ships the samples.
DISTRIBUTION = "edgewise"


def _checkout_dir() -> Path:
    return Path(__file__).resolve().parent.parent / SAMPLES_FOLDER


def _installed_dir() -> Path | None:
    try:
        files = metadata.distribution(DISTRIBUTION).files or []
    except metadata.PackageNotFoundError:
        return None
    for entry in files:
        if entry.suffix == ".json" and len(entry.parts) >= 2 and entry.parts[-2] == SAMPLES_FOLDER:
            folder = Path(str(entry.locate())).resolve().parent
            if folder.is_dir():
                return folder
    return None


def samples_dir() -> Path:
    """Folder holding the bundled sample models (``*.json``).

    A source checkout (or an editable install) uses the repository's ``sample_geometries/``;
    an installed wheel uses the copy it installed.

    Returns
    -------
    pathlib.Path
        An existing folder.

    Raises
    ------
    ProjectFileError
        If neither the checkout nor the installed package has the samples.
    """
    checkout = _checkout_dir()
    if checkout.is_dir():
        return checkout
    installed = _installed_dir()
    if installed is not None:
        return installed
    raise ProjectFileError(
        f"sample models: folder '{SAMPLES_FOLDER}' not found next to the solver package ({checkout.parent}) "
        f"nor among the installed files of '{DISTRIBUTION}'; reinstall the package, or open the project "
        "file by its path")


def sample_names() -> list[str]:
    """File names of the bundled samples, sorted (``["buried_stripline.json", ...]``)."""
    return sorted(p.name for p in samples_dir().glob("*.json"))


def sample_path(name: str) -> Path:
    """Path of the bundled sample ``name`` (a file name such as ``"busbar_enclosure.json"``).

    Parameters
    ----------
    name : str
        File name of the sample, with or without the ``.json`` suffix.

    Returns
    -------
    pathlib.Path
        An existing project file; open it with :func:`solver.load_project`.

    Raises
    ------
    ProjectFileError
        If no bundled sample has that name (the message lists those that exist).
    """
    file_name = name if name.endswith(".json") else f"{name}.json"
    path = samples_dir() / file_name
    if Path(file_name).name != file_name or not path.is_file():
        raise ProjectFileError(
            f"sample '{name}': no bundled sample has that file name; "
            f"choose one of {', '.join(sample_names())}")
    return path
