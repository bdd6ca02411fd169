"""The desktop program holds no physics: no breakdown thresholds, permittivity logic or physical
constants of its own (the solver's verdict, air conditions and checks are used instead).

Checked on the syntax tree of every module in app/, the way tests/solver/test_architecture.py
checks the solver's imports.
"""

import ast
import pathlib

APP = pathlib.Path(__file__).resolve().parents[2] / "app"

#: Numbers that only a physics rule would need: air strength (V/m and kV/cm), an "is it air"
#: tolerance, eps0 and mu0, Peek's constants, the reference and standard atmospheres.
FORBIDDEN_NUMBERS = {3e6, 3e5, 1.001, 1.0006, 8.854e-12, 8.8541878128e-12, 4e-7 * 3.141592653589793,
                     1.25663706212e-6, 0.301, 0.308, 101.325, 101325.0, 293.15, 2.25577e-5, 5.25588}
#: Names of the solver's physics constants the app must not reach for to do its own sums.
FORBIDDEN_NAMES = {"AIR_DIELECTRIC_STRENGTH_V_PER_M", "EPSILON_0_F_PER_M", "MU_0_H_PER_M", "PEEK_FORMS",
                   "REFERENCE_PRESSURE_PA", "REFERENCE_TEMPERATURE_K"}
#: Anything about relative permittivity: the app must not compare or compute with it.
PERMITTIVITY_WORDS = ("eps_r", "epsilon")


def _offences(path: pathlib.Path) -> list[str]:
    tree = ast.parse(path.read_text(encoding="utf-8"))
    found = []
    for node in ast.walk(tree):
        where = f"{path.name}:{getattr(node, 'lineno', '?')}"
        if isinstance(node, ast.Constant) and isinstance(node.value, float) and node.value in FORBIDDEN_NUMBERS:
            found.append(f"{where}: number {node.value!r}")
        if isinstance(node, (ast.Name, ast.Attribute)):
            name = node.id if isinstance(node, ast.Name) else node.attr
            if name in FORBIDDEN_NAMES:
                found.append(f"{where}: uses {name}")
        if isinstance(node, ast.Compare):
            text = ast.unparse(node).lower()
            if any(word in text for word in PERMITTIVITY_WORDS):
                found.append(f"{where}: compares a permittivity ({ast.unparse(node)})")
        if isinstance(node, (ast.FunctionDef, ast.ClassDef)) and node.name in (
                "field_caution", "insulation_note", "length_caveat", "medium_eps_r", "worst_peak"):
            found.append(f"{where}: re-implements {node.name}")
    return found


def test_app_defines_no_physics_thresholds_or_permittivity_logic():
    offences = [o for path in sorted(APP.rglob("*.py")) for o in _offences(path)]
    assert offences == []


def test_the_check_catches_what_it_is_meant_to_catch(tmp_path):
    bad = tmp_path / "bad.py"
    bad.write_text(
        "def medium_eps_r(s, i):\n    return 1.0\n"
        "def in_air(eps_r):\n    return eps_r <= 1.001\n"
        "STRENGTH = 3e6\n"
        "from solver.constants import EPSILON_0_F_PER_M\nx = EPSILON_0_F_PER_M\n",
        encoding="utf-8")
    found = " ".join(_offences(bad))
    for needed in ("re-implements medium_eps_r", "compares a permittivity", "number 1.001", "number 3000000.0",
                   "uses EPSILON_0_F_PER_M"):
        assert needed in found
