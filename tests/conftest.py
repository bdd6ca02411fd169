"""Test-suite options: slow tests are left out of a local run unless asked for.

Tests marked ``@pytest.mark.slow`` (the full command line with hot-spot refinement on a sample,
fine-mesh convergence studies) are deselected by default so that ``pytest -q`` stays quick while
editing. ``--run-slow`` runs everything (the README's test command and CI use it); ``-m slow``
runs only the slow ones, and any other ``-m`` expression is obeyed as written.
"""

from __future__ import annotations

from pathlib import Path

import pytest


def pytest_ignore_collect(collection_path: Path, config: pytest.Config) -> bool | None:
    """Conftest files hold no doctests; importing them a second time as doctest modules fails.

    (Both conftest files are named ``conftest`` and live outside packages, so ``--doctest-modules``
    would import the second under the first one's name.)
    """
    return True if collection_path.name == "conftest.py" else None


def pytest_addoption(parser: pytest.Parser) -> None:
    parser.addoption("--run-slow", action="store_true", default=False,
                     help="also run the tests marked slow (deselected by default)")


def pytest_collection_modifyitems(config: pytest.Config, items: list[pytest.Item]) -> None:
    if config.getoption("--run-slow") or config.getoption("markexpr"):
        return
    slow = [item for item in items if item.get_closest_marker("slow") is not None]
    if slow:
        config.hook.pytest_deselected(items=slow)
        items[:] = [item for item in items if item.get_closest_marker("slow") is None]
