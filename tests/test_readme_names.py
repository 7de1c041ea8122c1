"""Every name the README's Python examples use exists, without running the examples.

The ``python`` code blocks of README.md are read with :mod:`ast`:

* each ``from bridgeopt... import name`` must import, and give that name;
* each call of an imported function or class must accept the keywords it is given;
* each ``variable.attribute`` must exist on the variable's type, the type being the
  class called or the return annotation of the function called to make the variable.
"""

from __future__ import annotations

import ast
import dataclasses
import importlib
import inspect
import re
import typing
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]


def readme_blocks() -> list[str]:
    text = (ROOT / "README.md").read_text()
    return re.findall(r"```python\n(.*?)```", text, flags=re.S)


def readme_tree() -> ast.Module:
    """All the README's python blocks as one module (later blocks reuse earlier names)."""
    return ast.parse("\n".join(readme_blocks()))


def imported_names(tree: ast.Module) -> dict[str, object]:
    """``{local name: object}`` for every ``from bridgeopt... import`` in the blocks."""
    out = {}
    for node in ast.walk(tree):
        if isinstance(node, ast.ImportFrom) and node.module.split(".")[0] == "bridgeopt":
            module = importlib.import_module(node.module)
            for a in node.names:
                assert hasattr(module, a.name), f"README: {node.module} has no {a.name}"
                out[a.asname or a.name] = getattr(module, a.name)
    return out


def made_by(value: object) -> type | None:
    """The type of what calling ``value`` gives: the class itself or the return annotation."""
    if inspect.isclass(value):
        return value
    hint = typing.get_type_hints(value).get("return")
    return hint if inspect.isclass(hint) else None


def has_attribute(cls: type, name: str) -> bool:
    return hasattr(cls, name) or (dataclasses.is_dataclass(cls)
                                  and name in {f.name for f in dataclasses.fields(cls)})


def test_readme_has_python_examples():
    assert len(readme_blocks()) >= 2
    names = imported_names(readme_tree())
    assert {"BridgeScenario", "optimize_layout", "optimize_geometry", "solve_form",
            "optimize_cases"} <= set(names)


def test_readme_imports_exist():
    names = imported_names(readme_tree())
    assert all(v is not None for v in names.values())


def bad_keywords(tree: ast.Module) -> list[str]:
    """``name(keyword=)`` for every keyword a called bridgeopt name does not take."""
    names = imported_names(tree)
    out = []
    for call in (n for n in ast.walk(tree) if isinstance(n, ast.Call)
                 and isinstance(n.func, ast.Name) and n.func.id in names):
        params = inspect.signature(names[call.func.id]).parameters
        if not any(p.kind is p.VAR_KEYWORD for p in params.values()):
            out += [f"{call.func.id}({kw.arg}=)" for kw in call.keywords if kw.arg not in params]
    return out


def attribute_uses(tree: ast.Module) -> dict[tuple[str, str], type]:
    """``{(variable, attribute): type of the variable}`` for the blocks' result variables."""
    names = imported_names(tree)
    kinds = {}
    for node in tree.body:  # in order: a variable's type is the one it was last given
        if (isinstance(node, ast.Assign) and isinstance(node.value, ast.Call)
                and isinstance(node.value.func, ast.Name) and node.value.func.id in names):
            cls = made_by(names[node.value.func.id])
            for target in node.targets:
                if isinstance(target, ast.Name) and cls is not None:
                    kinds[target.id] = cls
    return {(n.value.id, n.attr): kinds[n.value.id] for n in ast.walk(tree)
            if isinstance(n, ast.Attribute) and isinstance(n.value, ast.Name)
            and n.value.id in kinds}


def missing_attributes(tree: ast.Module) -> list[str]:
    return [f"{var}.{attr} ({cls.__name__})" for (var, attr), cls in
            sorted(attribute_uses(tree).items()) if not has_attribute(cls, attr)]


def test_readme_keywords_are_accepted():
    tree = readme_tree()
    assert any(isinstance(n, ast.keyword) for n in ast.walk(tree))
    assert not bad_keywords(tree), f"README passes keywords that do not exist: {bad_keywords(tree)}"


def test_readme_attributes_exist():
    tree = readme_tree()
    assert len(attribute_uses(tree)) >= 8  # design.summary, clean.stats, form.ratio, ...
    missing = missing_attributes(tree)
    assert not missing, f"README uses attributes that do not exist: {missing}"


def test_the_checks_catch_a_wrong_name():
    """The checker itself, on a made-up block: a missing keyword, attribute and name."""
    tree = ast.parse("from bridgeopt import BridgeScenario, optimize_layout\n"
                     "b = BridgeScenario(span=1.0, height=2.0)\n"
                     "d = optimize_layout(b.to_problem())\n"
                     "d.volume, d.no_such_thing\n")
    assert bad_keywords(tree) == ["BridgeScenario(height=)"]
    assert missing_attributes(tree) == ["d.no_such_thing (Design)"]
    with pytest.raises(AssertionError, match="no_such_name"):
        imported_names(ast.parse("from bridgeopt import no_such_name\n"))


def test_readme_results_have_a_known_type():
    """Every variable the README makes by calling a bridgeopt name has a type to check
    attributes against (a class, or a function with a return annotation)."""
    tree = readme_tree()
    names = imported_names(tree)
    made = {n.value.func.id for n in tree.body if isinstance(n, ast.Assign)
            and isinstance(n.value, ast.Call) and isinstance(n.value.func, ast.Name)
            and n.value.func.id in names}
    assert len(made) >= 5
    untyped = sorted(f for f in made if made_by(names[f]) is None)
    assert not untyped, f"no return annotation: {untyped}"
