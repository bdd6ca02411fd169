"""The script example in docs/hot_spots.md runs and gives what it says."""

import os
import re
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[3]


@pytest.mark.slow  # the example refines a peak field and assesses margins
def test_docs_example_runs(capsys):
    code = re.search(r"```python\n(.*?)```", (ROOT / "docs" / "hot_spots.md").read_text(encoding="utf-8"), re.S).group(1)
    here = os.getcwd()
    os.chdir(ROOT)
    try:
        scope: dict = {}
        exec(compile(code, "docs/hot_spots.md", "exec"), scope)
    finally:
        os.chdir(here)
    assert scope["spot"].estimated_relative_error < 0.01
    assert scope["margins"].margins[0].air_breakdown_margin > 1
    assert "Peak field of 'electrode'" in capsys.readouterr().out
    assert scope["check_part_length"](scope["model"], 6.0).long_enough is False
