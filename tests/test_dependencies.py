"""environment.yml and pyproject.toml name the same dependencies with the same lower bounds."""

import re
import tomllib
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def _split(req: str) -> tuple[str, str]:
    m = re.match(r"^\s*([A-Za-z0-9_.\-]+)\s*(.*)$", req)
    assert m, req
    return m.group(1).lower().replace("_", "-"), m.group(2).replace(" ", "")


def _pyproject() -> dict[str, str]:
    meta = tomllib.loads((ROOT / "pyproject.toml").read_text())["project"]
    reqs = list(meta["dependencies"])
    for extra in meta["optional-dependencies"].values():
        reqs += extra
    return dict(_split(r) for r in reqs)


def _environment() -> dict[str, str]:
    deps = {}
    text = (ROOT / "environment.yml").read_text()
    for line in text.split("\ndependencies:\n", 1)[1].splitlines():
        m = re.match(r"^  - ([A-Za-z0-9_.\-]+[^#]*?)\s*(#.*)?$", line)
        if m and not line.strip().startswith("- pip:"):
            name, spec = _split(m.group(1))
            if name not in ("python", "pip"):
                deps[name] = spec
    return deps


def test_same_dependencies():
    assert _environment() == _pyproject()


def test_python_floor_agrees():
    meta = tomllib.loads((ROOT / "pyproject.toml").read_text())["project"]
    assert meta["requires-python"] == ">=3.11"
    assert "  - python>=3.11" in (ROOT / "environment.yml").read_text().splitlines()
