"""The package's import layering: no import circle, and no lower package importing a higher one.

Every module of ``bridgeopt`` is read with :mod:`ast` (nothing is imported), and every
import statement in it is collected, at module level and inside functions alike.  The
layering is written out here, lowest first; a module may import modules of its own
package or of a lower one, never of a higher one:

    errors, cautions  <  model  <  solver  <  geometry  <  forms  <  files  <  study
                      <  sweep  <  workbook  <  cli

The root ``bridgeopt/__init__.py`` (the public API) and ``bridgeopt/__main__.py`` are
exempt, both as importers and as imported (``from bridgeopt import __version__``).
Modules of one package may import each other, but not in a circle.
"""

from __future__ import annotations

import ast
import functools
from pathlib import Path

PACKAGE = Path(__file__).resolve().parents[1] / "bridgeopt"

#: Lowest first; names on one line share a level.
LAYERS = (
    ("errors", "cautions"),
    ("model",),
    ("solver",),
    ("geometry",),
    ("forms",),
    ("files",),
    ("study",),
    ("sweep",),
    ("workbook",),
    ("cli",),
)
LEVEL = {room: i for i, rooms in enumerate(LAYERS) for room in rooms}
EXEMPT = {"bridgeopt", "bridgeopt.__main__"}


def module_name(path: Path, package: Path = PACKAGE) -> str:
    """Dotted name of a module file under ``package`` (``bridgeopt.solver.lp``)."""
    parts = path.relative_to(package.parent).with_suffix("").parts
    return ".".join(parts[:-1] if parts[-1] == "__init__" else parts)


def all_modules(package: Path = PACKAGE) -> dict[str, Path]:
    return {module_name(p, package): p for p in sorted(package.rglob("*.py"))}


def imported_modules(name: str, path: Path, modules: dict[str, Path]) -> list[tuple[str, int]]:
    """The package modules ``name`` imports, each with the line of its first import.

    ``from a.b import c`` counts as importing ``a.b.c`` when that is a module,
    otherwise ``a.b``; relative imports are resolved against ``name``'s package.
    """
    package = name if path.name == "__init__.py" else name.rpartition(".")[0]
    out = []
    for node in ast.walk(ast.parse(path.read_text(), filename=str(path))):
        if isinstance(node, ast.Import):
            out += [(a.name, node.lineno) for a in node.names]
        elif isinstance(node, ast.ImportFrom):
            base = node.module or ""
            if node.level:
                anchor = package.split(".")[:len(package.split(".")) - node.level + 1]
                base = ".".join(anchor + ([base] if base else []))
            for a in node.names:
                sub = f"{base}.{a.name}"
                out.append((sub if sub in modules else base, node.lineno))
    first = {}
    for m, line in out:
        if m in modules and m != name:
            first.setdefault(m, line)
    return sorted(first.items())


def room(name: str) -> str:
    """The package room of a module: ``bridgeopt.solver.lp`` -> ``solver``."""
    return name.split(".")[1]


@functools.cache
def import_graph(package: Path = PACKAGE) -> dict[str, list[tuple[str, int]]]:
    """Every module (but the exempt ones) with the modules it imports and the lines."""
    modules = all_modules(package)
    return {name: [(m, line) for m, line in imported_modules(name, path, modules)
                   if m not in EXEMPT]
            for name, path in modules.items() if name not in EXEMPT}


def circles(graph: dict[str, list[tuple[str, int]]]) -> list[list[str]]:
    """Strongly connected components with more than one module (Tarjan's algorithm)."""
    index, low, stack, on_stack, found = {}, {}, [], set(), []

    def visit(v):
        index[v] = low[v] = len(index)
        stack.append(v)
        on_stack.add(v)
        for w, _ in graph.get(v, ()):
            if w not in index:
                visit(w)
                low[v] = min(low[v], low[w])
            elif w in on_stack:
                low[v] = min(low[v], index[w])
        if low[v] == index[v]:
            comp = []
            while True:
                w = stack.pop()
                on_stack.discard(w)
                comp.append(w)
                if w == v:
                    break
            if len(comp) > 1:
                found.append(sorted(comp))

    for v in sorted(graph):
        if v not in index:
            visit(v)
    return found


def upward_imports(graph: dict[str, list[tuple[str, int]]]) -> list[str]:
    """``importer:line -> imported`` for every import of a higher package."""
    return [f"{a}:{line} -> {b}" for a, targets in sorted(graph.items())
            for b, line in targets if LEVEL[room(b)] > LEVEL[room(a)]]


def test_every_module_has_a_layer():
    """A new package room must be placed in LAYERS before it can be checked."""
    rooms = {room(name) for name in import_graph()}
    assert rooms <= set(LEVEL), sorted(rooms - set(LEVEL))
    assert len(import_graph()) > 30  # the walk really found the package


def test_the_walk_sees_function_level_and_relative_imports(tmp_path):
    """The checker itself: a circle through a function-level import and an upward
    relative import, in a throw-away package, are both found."""
    pkg = tmp_path / "bridgeopt"
    for sub in ("model", "cli"):
        (pkg / sub).mkdir(parents=True)
        (pkg / sub / "__init__.py").write_text("")
    (pkg / "__init__.py").write_text("")
    (pkg / "model" / "a.py").write_text("def f():\n    from bridgeopt.model import b\n")
    (pkg / "model" / "b.py").write_text("from . import a\nfrom ..cli import app\n")
    (pkg / "cli" / "app.py").write_text("import bridgeopt.model.a\n")
    graph = import_graph(pkg)
    assert circles(graph) == [["bridgeopt.cli.app", "bridgeopt.model.a", "bridgeopt.model.b"]]
    assert upward_imports(graph) == ["bridgeopt.model.b:2 -> bridgeopt.cli.app"]


def test_no_import_circle():
    found = circles(import_graph())
    assert not found, "import circles: " + "; ".join(" <-> ".join(c) for c in found)


def test_no_lower_package_imports_a_higher_one():
    bad = upward_imports(import_graph())
    assert not bad, "lower package imports a higher one:\n" + "\n".join(bad)
