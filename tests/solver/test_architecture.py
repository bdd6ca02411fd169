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


def _import_graph(root: pathlib.Path) -> dict[str, set[str]]:
    """Module -> modules of the same package it imports anywhere in its text (inside functions
    too; package ``__init__`` files left out: they only gather the public names)."""
    modules = {
        ".".join(p.relative_to(root.parent).with_suffix("").parts): p
        for p in root.rglob("*.py") if p.name != "__init__.py"
    }
    graph: dict[str, set[str]] = {}
    for name, path in modules.items():
        targets = set()
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, ast.ImportFrom) and node.level == 0 and node.module:
                targets |= {node.module, *(f"{node.module}.{a.name}" for a in node.names)}
            elif isinstance(node, ast.Import):
                targets |= {a.name for a in node.names}
        graph[name] = {t for t in targets if t in modules and t != name}
    return graph


def _cycles(graph: dict[str, set[str]]) -> list[list[str]]:
    state: dict[str, int] = {}
    cycles = []

    def visit(node: str, path: list[str]) -> None:
        state[node] = 1
        for nxt in sorted(graph[node]):
            if state.get(nxt) == 1:
                cycles.append(path[path.index(nxt):] + [nxt])
            elif nxt not in state:
                visit(nxt, path + [nxt])
        state[node] = 2

    for start in sorted(graph):
        if start not in state:
            visit(start, [start])
    return cycles


def test_solver_modules_import_each_other_without_cycles():
    # A cycle hidden by an import inside a function still ties two modules into one idea;
    # data flows model -> mesh -> solution -> figures, never back.
    assert _cycles(_import_graph(SOLVER)) == []


def test_the_cycle_check_sees_imports_inside_functions(tmp_path):
    package = tmp_path / "pkg"
    package.mkdir()
    (package / "__init__.py").write_text("from pkg.a import f\n")
    (package / "a.py").write_text("from pkg.b import g\n\ndef f():\n    return g()\n")
    (package / "b.py").write_text("def g():\n    from pkg.a import f\n    return f\n")
    assert _cycles(_import_graph(package)) == [["pkg.a", "pkg.b", "pkg.a"]]
    (package / "b.py").write_text("def g():\n    return 1\n")
    assert _cycles(_import_graph(package)) == []
