"""``import bridgeopt`` stays light: the solver never loads plotting, widgets or pandas.

Run in a fresh interpreter (a subprocess), since this test session has long imported
them; the check reads ``sys.modules`` there after ``import bridgeopt``.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

pytestmark = pytest.mark.slow  # a fresh interpreter per test

ROOT = Path(__file__).resolve().parents[1]
HEAVY = ("plotly", "ipywidgets", "pandas")

PROBE = """
import json, sys
import bridgeopt
print(json.dumps(sorted(m for m in sys.modules if m.split(".")[0] in {heavy!r})))
"""


def loaded_after(statement: str) -> list[str]:
    """Top-level heavy modules in sys.modules after running ``statement`` in a fresh python."""
    code = PROBE.replace("import bridgeopt", statement).format(heavy=set(HEAVY))
    env = {**os.environ, "PYTHONPATH": os.pathsep.join(
        [str(ROOT)] + [p for p in os.environ.get("PYTHONPATH", "").split(os.pathsep) if p])}
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, env=env,
                         cwd=ROOT, timeout=120, check=True)
    return json.loads(out.stdout.strip().splitlines()[-1])



def test_import_bridgeopt_loads_no_plotly_widgets_or_pandas():
    assert loaded_after("import bridgeopt") == []


def test_the_probe_sees_a_heavy_import():
    """The check itself: a statement that does load pandas is caught."""
    assert "pandas" in loaded_after("import bridgeopt, pandas")
