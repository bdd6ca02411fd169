"""The solver stays pure numerics: no Qt, no pyqtgraph, no app/."""

import ast
import pathlib
import subprocess
import sys

ALLOWED_TOP_LEVEL = {"numpy", "scipy", "shapely", "solver", "threadpoolctl", "pyfmmlib"}
#: Imported only inside the functions that need them (drawings, studies on a cluster, tables),
#: so that ``import solver`` needs none of them.
OPTIONAL_INSIDE_FUNCTIONS = {"ezdxf", "svgelements", "dask", "distributed", "pandas"}
SOLVER = pathlib.Path(__file__).resolve().parents[2] / "solver"


def _imported_modules(path: pathlib.Path, top_level_only: bool = False) -> set[str]:
    tree = ast.parse(path.read_text(encoding="utf-8"))
    names = set()
    for node in (tree.body if top_level_only else ast.walk(tree)):
        if isinstance(node, ast.Import):
            names.update(alias.name.split(".")[0] for alias in node.names)
        elif isinstance(node, ast.ImportFrom) and node.level == 0 and node.module:
            names.add(node.module.split(".")[0])
    return names


def test_solver_imports_only_stdlib_numpy_scipy_shapely():
    stdlib = set(sys.stdlib_module_names)
    offenders = {}
    for path in sorted(SOLVER.rglob("*.py")):
        allowed = stdlib | ALLOWED_TOP_LEVEL
        bad = {m for m in _imported_modules(path) if m not in allowed | OPTIONAL_INSIDE_FUNCTIONS}
        bad |= {m for m in _imported_modules(path, top_level_only=True) if m not in allowed}
        if bad:
            offenders[str(path.relative_to(SOLVER))] = sorted(bad)
    assert offenders == {}


def test_importing_the_solver_loads_no_qt():
    code = "import sys, solver; print(any(m.split('.')[0] in ('PySide6', 'pyqtgraph', 'app') for m in sys.modules))"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"
