"""solver.sample_path finds the bundled samples in a checkout and in an installed package."""

from __future__ import annotations

import shutil
from importlib import metadata
from pathlib import Path

import pytest

import solver
from solver import ProjectFileError, load_project, sample_names, sample_path, samples_dir
from solver import samples as samples_module

REPOSITORY_SAMPLES = Path(__file__).resolve().parents[3] / "sample_geometries"


def test_every_sample_in_the_repository_is_found_and_opens():
    names = sorted(p.name for p in REPOSITORY_SAMPLES.glob("*.json"))
    assert names and sample_names() == names
    for name in names:
        path = sample_path(name)
        assert path == REPOSITORY_SAMPLES / name
        assert load_project(path).conductors


def test_the_suffix_may_be_left_out():
    assert sample_path("busbar_enclosure") == sample_path("busbar_enclosure.json")


@pytest.mark.parametrize("name", ["no_such_sample.json", "../pyproject.toml", "sub/coaxial_feeder.json"])
def test_unknown_names_are_refused_with_the_list_of_samples(name):
    with pytest.raises(ProjectFileError, match="coaxial_feeder.json"):
        sample_path(name)


class _FakeDistribution:
    """An installed distribution whose file list holds the samples under share/edgewise/."""

    def __init__(self, site_packages: Path, relative_files: list[str]):
        self._site = site_packages
        self.files = [metadata.PackagePath(f) for f in relative_files]
        for f in self.files:
            f.dist = self

    def locate_file(self, path) -> Path:
        return self._site / path


def test_an_installed_package_finds_the_samples_in_its_data_files(tmp_path, monkeypatch):
    prefix = tmp_path / "venv"
    site = prefix / "lib" / "python3" / "site-packages"
    share = prefix / "share" / "edgewise" / "sample_geometries"
    site.mkdir(parents=True)
    share.mkdir(parents=True)
    shutil.copy(REPOSITORY_SAMPLES / "twin_lead.json", share)
    relative = ["solver/__init__.py", "../../../share/edgewise/sample_geometries/twin_lead.json"]
    fake = _FakeDistribution(site, relative)
    monkeypatch.setattr(samples_module, "_checkout_dir", lambda: site / "sample_geometries")
    monkeypatch.setattr(samples_module.metadata, "distribution",
                        lambda name: fake if name == "edgewise" else metadata.distribution(name))
    assert samples_dir() == share.resolve()
    assert sample_path("twin_lead.json") == share.resolve() / "twin_lead.json"
    assert sample_names() == ["twin_lead.json"]


def test_without_checkout_or_installation_the_error_says_what_to_do(tmp_path, monkeypatch):
    def not_installed(name):
        raise metadata.PackageNotFoundError(name)

    monkeypatch.setattr(samples_module, "_checkout_dir", lambda: tmp_path / "sample_geometries")
    monkeypatch.setattr(samples_module.metadata, "distribution", not_installed)
    with pytest.raises(ProjectFileError, match="reinstall the package"):
        solver.sample_path("twin_lead.json")
