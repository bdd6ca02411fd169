"""The text summary of every bundled sample reads as figures: no Python placeholders or
non-finite values, and locations with true minus signs."""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from solver.cli.command import main

SAMPLES = sorted((Path(__file__).resolve().parents[3] / "sample_geometries").glob("*.json"))


@pytest.mark.slow
@pytest.mark.parametrize("sample", SAMPLES, ids=[p.stem for p in SAMPLES])
def test_the_summary_has_no_placeholders_or_non_finite_values(sample, capsys):
    assert main([str(sample), "--density", "coarse"]) == 0
    out = capsys.readouterr().out
    for word in ("None", "nan", "NaN", "inf ", "Infinity"):
        assert word not in out, f"{word!r} in the summary of {sample.name}"
    assert not re.search(r"\(-\d[\d.e+-]*, ", out), "an ASCII minus in a location or a vector"
    assert not re.search(r"\de-(0[5-9]|[1-9]\d)\b", out), "round-off shown as a figure"
