"""Project files with extreme content end in one line naming the field (CLI exit 2), never a traceback."""

from __future__ import annotations

import json

import pytest

from solver import ProjectFileError, load_project
from solver.cli.command import main

GOOD = {
    "format": "edgewise-project", "version": 1, "unit": "mm",
    "conductors": [
        {"name": "a", "role": "fixed", "potential_V": 1.0, "shapes": [{"kind": "circle", "center": [0, 0], "radius": 1.0}]},
        {"name": "g", "role": "reference", "shapes": [{"kind": "circle", "center": [5, 0], "radius": 1.0}]},
    ],
}


def _write(tmp_path, text: str, encoding: str = "utf-8"):
    path = tmp_path / "p.json"
    path.write_text(text, encoding=encoding)
    return path


def _with(field_text: str, replacement: str) -> str:
    text = json.dumps(GOOD)
    assert field_text in text
    return text.replace(field_text, replacement, 1)


BIG = "1" + "0" * 400


@pytest.mark.parametrize(
    "text, message",
    [
        ("[" * 100_000 + "]" * 100_000, "nested too deeply"),
        ('{"format": "edgewise-project", "version": 1, "unit": "mm", "conductors": [], "extras": '
         + '{"a": ' * 5000 + "1" + "}" * 5000 + "}", "nested too deeply"),
        (_with('"radius": 1.0}', f'"radius": {BIG}}}'), r"conductors\[0\]\.shapes\[0\]\.radius: number with 401 digits"),
        (_with('"potential_V": 1.0', f'"potential_V": -{BIG}'), r"conductors\[0\]\.potential_V: number with 401 digits"),
        (_with('"version": 1', f'"version": {BIG}'), r"version 1000.* is newer"),
        (_with('"radius": 1.0}', '"radius": 1e-300}'),
         r"conductors\[0\]\.shapes\[0\]\.radius: 1e-300 \(1e-303 m\) is smaller than 1e-10 m"),
        (_with('"radius": 1.0}', '"radius": 1e300}'), r"conductors\[0\]\.shapes\[0\]\.radius: 1e\+300 \(1e\+297 m\) is larger"),
        (_with('"center": [0, 0]', '"center": [1e300, 0]'), r"conductors\[0\]\.shapes\[0\]\.center\[0\]: 1e\+300 \(1e\+297 m\) is more than"),
        (_with('"potential_V": 1.0', '"potential_V": 1e30'), r"conductors\[0\]\.potential_V: 1e\+30 V is more than 100 MV"),
        (_with('"unit": "mm"', '"unit": "mm", "ground_plane": {"y": -1e200}'), r"ground_plane\.y: .* is more than"),
    ],
    ids=["deep list", "deep extras", "huge radius int", "huge potential", "huge version", "tiny radius",
         "huge radius", "far centre", "implausible potential", "far plane"],
)
def test_extreme_files_give_one_line_naming_the_field(tmp_path, capsys, text, message):
    path = _write(tmp_path, text)
    with pytest.raises(ProjectFileError, match=message):
        load_project(path)
    assert main([str(path)]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and err.startswith(f"error: {path}: ")


def test_byte_order_mark_is_accepted(tmp_path):
    path = _write(tmp_path, json.dumps(GOOD), encoding="utf-8-sig")
    assert path.read_bytes().startswith(b"\xef\xbb\xbf")
    assert [c.name for c in load_project(path).conductors] == ["a", "g"]


def test_memory_error_is_one_line_and_exit_2(tmp_path, capsys, monkeypatch):
    from solver.cli import command

    def out_of_memory(model):
        raise MemoryError

    monkeypatch.setattr(command, "run_solve", out_of_memory)
    assert main([str(_write(tmp_path, json.dumps(GOOD)))]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "not enough memory" in err


def test_nearly_touching_parts_from_a_file_exit_2_naming_the_gap(tmp_path, capsys):
    text = _with('"center": [5, 0]', '"center": [2.000001, 0]')
    assert main([str(_write(tmp_path, text))]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "between conductors" in err and "move them apart" in err
