"""Every python block of docs/studies.md runs, in order, and gives what the text says."""

import os
import re
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]


@pytest.mark.slow
def test_docs_examples_run(capsys):
    text = (ROOT / "docs" / "studies.md").read_text(encoding="utf-8")
    blocks = re.findall(r"```python\n(.*?)```", text, re.DOTALL)
    assert len(blocks) == 5
    here = os.getcwd()
    os.chdir(ROOT)
    scope: dict = {}
    try:
        for block in blocks:
            exec(compile(block, "docs/studies.md", "exec"), scope)  # noqa: S102 - the docs are ours
    finally:
        os.chdir(here)
    out = capsys.readouterr().out
    assert "corner_radius=3.0" in out and "pF/m" in out and "kV/m at x =" in out
    assert len(scope["table"]) == 6 and scope["r"].figure_value == __import__("pytest").approx(20e-12, rel=1e-6)
    assert sum(scope["counts"]) == 10
    assert "govern" in scope["profile"].caution
