"""The script example in docs/dielectrics.md runs as written."""

import re
from pathlib import Path

ROOT = Path(__file__).resolve().parents[3]


def test_docs_example_runs(monkeypatch, capsys):
    monkeypatch.chdir(ROOT)
    code = re.search(r"```python\n(.*?)```", (ROOT / "docs" / "dielectrics.md").read_text(encoding="utf-8"), re.S)
    namespace: dict = {}
    exec(code.group(1), namespace)
    assert 49 < namespace["f"].characteristic_impedance_ohm < 51
    assert "board 4.4" in capsys.readouterr().out
