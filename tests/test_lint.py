"""The lint gate: ``ruff check`` passes on the whole tree with the project's configuration.

The rules are pyproject.toml's ``[tool.ruff.lint]`` selection (pyflakes and
pycodestyle errors and warnings; common practice for a Python code base).  The
check can fail: any unused import, undefined name, bare ``except`` or stray
whitespace in bridgeopt/, tests/, bench/ or the workbooks makes it fail.
"""

from __future__ import annotations

import importlib.util
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]


@pytest.mark.skipif(importlib.util.find_spec("ruff") is None,
                    reason="ruff is not installed (pip install -e '.[test]' installs it)")
def test_ruff_check_passes_on_the_tree():
    run = subprocess.run([sys.executable, "-m", "ruff", "check", "--no-cache", str(ROOT)],
                         cwd=ROOT, capture_output=True, text=True, timeout=120)
    assert run.returncode == 0, run.stdout + run.stderr
