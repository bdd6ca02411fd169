"""Shapes own their behaviour: no module outside solver/model/shapes.py asks which kind a shape
is (no ``isinstance``/``issubclass`` or ``type(...)`` test against a shape class, no table keyed
by shape classes). A new kind is one new class there."""

import ast
import pathlib

import pytest

ROOT = pathlib.Path(__file__).resolve().parents[3]
SHAPE_CLASSES = {"Shape", "Circle", "Ring", "Rectangle", "Polygon", "Strip"}
HOME = ROOT / "solver" / "model" / "shapes.py"
#: Names under which a module may refer to our shape classes by attribute (``model.Circle``).
OUR_MODULES = {"model", "shapes", "solver"}


def _names(node: ast.AST) -> set[str]:
    out = set()
    for sub in ast.walk(node):
        if isinstance(sub, ast.Name):
            out.add(sub.id)
        elif isinstance(sub, ast.Attribute) and not (isinstance(sub.value, ast.Name) and sub.value.id not in OUR_MODULES):
            out.add(sub.attr)  # model.Circle is ours; svgelements' se.Circle is not
    return out


def shape_dispatches(source: str) -> list[int]:
    """Line numbers where ``source`` dispatches on a shape class."""
    lines = []
    for node in ast.walk(ast.parse(source)):
        if (isinstance(node, ast.Call) and isinstance(node.func, ast.Name)
                and node.func.id in ("isinstance", "issubclass") and len(node.args) == 2
                and _names(node.args[1]) & SHAPE_CLASSES):
            lines.append(node.lineno)
        elif isinstance(node, ast.Compare) and any(isinstance(op, (ast.Is, ast.IsNot, ast.Eq, ast.NotEq, ast.In))
                                                   for op in node.ops):
            sides = [node.left, *node.comparators]
            has_type_call = any(isinstance(s, ast.Call) and isinstance(s.func, ast.Name) and s.func.id == "type"
                                for s in sides)
            if has_type_call and any(_names(s) & SHAPE_CLASSES for s in sides):
                lines.append(node.lineno)
        elif isinstance(node, ast.Dict) and any(k is not None and isinstance(k, ast.Name) and k.id in SHAPE_CLASSES
                                                for k in node.keys):
            lines.append(node.lineno)
    return lines


def test_the_check_finds_each_form_of_dispatch():
    assert shape_dispatches("if isinstance(s, (Circle, Ring)): pass") == [1]
    assert shape_dispatches("x = isinstance(s, model.Strip)") == [1]
    assert shape_dispatches("ok = type(s) is Rectangle") == [1]
    assert shape_dispatches("FIELDS = {Circle: 1}") == [1]
    assert shape_dispatches("isinstance(g, ShapelyPolygon) or isinstance(x, str)") == []
    assert shape_dispatches("isinstance(e, se.Circle)") == []  # a foreign library's Circle


@pytest.mark.parametrize("package", ["solver", "app"])
def test_no_module_outside_shapes_dispatches_on_shape_kind(package):
    offenders = {}
    for path in sorted((ROOT / package).rglob("*.py")):
        if path == HOME:
            continue
        found = shape_dispatches(path.read_text(encoding="utf-8"))
        if found:
            offenders[str(path.relative_to(ROOT))] = found
    assert offenders == {}
