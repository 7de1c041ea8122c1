"""The documentation names the package as it is: every module path and dotted name in the
docs exists, and DEVELOPERS.md's package map lists every module."""

import importlib
import re
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
DOCS = sorted([ROOT / "README.md", ROOT / "DEVELOPERS.md", *(ROOT / "docs").glob("*.md")])
PATH = re.compile(r"\bbridgeopt(?:/[A-Za-z_]+)+\.py\b")
DOTTED = re.compile(r"\bbridgeopt(?:\.[A-Za-z_][A-Za-z0-9_]*)+(?![\w/])")  # not schema ids
IMPORT = re.compile(r"^\s*from (bridgeopt[\w.]*) import ([\w, ]+)", re.M)


def _text(path: Path) -> str:
    return path.read_text(encoding="utf-8")


def _resolves(dotted: str) -> bool:
    """Whether ``bridgeopt.a.b.c`` is a module, or an attribute of the longest module prefix."""
    parts = dotted.split(".")
    for cut in range(len(parts), 0, -1):
        try:
            obj = importlib.import_module(".".join(parts[:cut]))
        except ImportError:
            continue
        for name in parts[cut:]:
            if not hasattr(obj, name):
                return False
            obj = getattr(obj, name)
        return True
    return False


@pytest.mark.parametrize("doc", DOCS, ids=lambda p: p.name)
def test_module_paths_in_docs_exist(doc):
    missing = [p for p in PATH.findall(_text(doc)) if not (ROOT / p).is_file()]
    assert not missing, f"{doc.name} names files that do not exist: {missing}"


@pytest.mark.parametrize("doc", DOCS, ids=lambda p: p.name)
def test_dotted_names_in_docs_resolve(doc):
    text = _text(doc)
    names = {n.rstrip(".") for n in DOTTED.findall(text)}
    for module, imported in IMPORT.findall(text):
        names |= {f"{module}.{n.strip()}" for n in imported.split(",") if n.strip()}
    missing = sorted(n for n in names if not _resolves(n))
    assert not missing, f"{doc.name} names what bridgeopt does not have: {missing}"


def test_developers_map_lists_every_module():
    text = _text(ROOT / "DEVELOPERS.md").split("## Architecture", 1)[1].split("\n## ", 1)[0]
    modules = sorted(p for p in (ROOT / "bridgeopt").rglob("*.py")
                     if p.parent != ROOT / "bridgeopt" and p.name != "__init__.py")
    missing = []
    for path in modules:
        package = path.parent.name
        section = text.split(f"**`bridgeopt/{package}/`**", 1)
        if len(section) < 2 or f"`{path.name}`" not in section[1].split("\n\n", 1)[0]:
            missing.append(str(path.relative_to(ROOT)))
    assert not missing, f"DEVELOPERS.md's package map does not list: {missing}"
    for name in ("errors.py", "cautions.py"):
        assert f"`{name}`" in text


def test_resolver_fails_on_an_old_flat_name():
    assert _resolves("bridgeopt.solver.lp") and _resolves("bridgeopt.files.export.export_design")
    assert not _resolves("bridgeopt.outputs.export_design")
    assert not _resolves("bridgeopt.solver.lp.no_such_name")
    assert DOTTED.findall("schema `bridgeopt.cases/1` of bridgeopt.solver.design.") == [
        "bridgeopt.solver.design"]
