"""The Python examples in README.md run as written and print what they promise.

(The examples in docs/*.md have their own tests next to the solver tests; ">>>" examples in
Markdown and docstrings run through pytest's doctest options in pyproject.toml.)
"""

from __future__ import annotations

import math
import re
from pathlib import Path

import pytest

from solver import EPSILON_0_F_PER_M

ROOT = Path(__file__).resolve().parents[1]
BLOCKS = re.findall(r"```python\n(.*?)```", (ROOT / "README.md").read_text(encoding="utf-8"), re.S)


def test_the_readme_has_a_python_example():
    assert BLOCKS


@pytest.mark.parametrize("index", range(len(BLOCKS)))
def test_readme_python_example_runs(index, monkeypatch, capsys):
    monkeypatch.chdir(ROOT)
    namespace: dict = {}
    exec(compile(BLOCKS[index], f"README.md python example {index + 1}", "exec"), namespace)
    out = capsys.readouterr().out
    sweep = [float(v) for v in re.findall(r"C' =\s*([0-9.]+) pF/m", out)]
    if "height_mm" in BLOCKS[index]:
        # Wire of radius a at height h over a plane: C' = 2 pi eps0 / acosh(h / a) (closed form,
        # common practice); the printed values have three decimals.
        heights_mm = (1.0, 2.0, 5.0, 10.0)
        assert len(sweep) == len(heights_mm)
        for h, c in zip(heights_mm, sweep, strict=True):
            exact_pF = 2 * math.pi * EPSILON_0_F_PER_M / math.acosh(h / 0.5) * 1e12
            assert c == pytest.approx(exact_pF, abs=2e-3)
    if "sol" in namespace:
        assert namespace["sol"].estimated_relative_error < 1e-3
