"""A report whose body would only be an error is not written (it was, with exit status 0)."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

pytest.importorskip("nbclient")
pytestmark = pytest.mark.slow

ROOT = Path(__file__).resolve().parents[2]


def test_an_explorer_report_that_solves_nothing_is_refused(tmp_path):
    out = tmp_path / "client.html"
    proc = subprocess.run([sys.executable, "-m", "bridgeopt", "report",
                           str(ROOT / "studies" / "explorer.ipynb"), "-o", str(out),
                           "--param", "span=60000", "--param", "fast=1"],
                          capture_output=True, text=True, timeout=300)
    assert proc.returncode == 3, proc.stderr
    assert proc.stderr.count("\n") == 1 and proc.stderr.startswith("bridgeopt: error: ")
    assert not out.exists()
