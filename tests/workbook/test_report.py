"""HTML reports: ``bridgeopt report`` writes one self-contained file that renders offline.

The file is opened in a real headless Chromium with every host name unresolvable
(``--host-resolver-rules``), so a figure that needed the network would stay blank.
Without Chromium the browser test is skipped, except under CI (``CI`` set), where
it must run (``.ci/run`` installs Debian's ``chromium``).
"""

import os
import re
import shutil
import subprocess
import sys
import tempfile
from pathlib import Path

import pytest

pytest.importorskip("nbclient")
pytest.importorskip("plotly")

from bridgeopt.cautions import CAUTION_LINES  # noqa: E402
from bridgeopt.workbook.report import remote_references  # noqa: E402

STUDIES = Path(__file__).resolve().parents[2] / "studies"

#: notebook -> plotly figures its report shows
EXPECTED_FIGURES = {"client_report": 2, "explorer": 2}


def _chromium():
    for name in ("chromium", "chromium-browser", "chromium-headless-shell"):
        path = shutil.which(name)
        if path:
            return path
    if os.environ.get("CI"):
        pytest.fail("Chromium is required under CI (.ci/run installs Debian's chromium)")
    pytest.skip("Chromium is not installed (apt-get install chromium); not under CI")


@pytest.fixture(scope="module", params=sorted(EXPECTED_FIGURES))
def report(request, tmp_path_factory):
    out = tmp_path_factory.mktemp("report") / f"{request.param}.html"
    run = subprocess.run([sys.executable, "-m", "bridgeopt", "report",
                          str(STUDIES / f"{request.param}.ipynb"), "-o", str(out),
                          "--param", "fast=1", "--timeout", "120"],
                         capture_output=True, text=True, timeout=300)
    assert run.returncode == 0, run.stderr
    assert "CAUTION" in run.stdout
    return request.param, out


@pytest.mark.slow
def test_report_is_one_file_with_inputs_results_and_cautions(report):
    name, path = report
    text = path.read_text(encoding="utf-8")
    assert remote_references(text) == []
    assert not re.search(r"<script[^>]+src=", text), "every script is inlined"
    assert "jupyter-widgets" not in text and "require.js" not in text
    assert text.count("Plotly.newPlot(") == EXPECTED_FIGURES[name]
    assert "window.PlotlyConfig" in text and len(text) > 3_000_000  # plotly.js inlined
    for line in CAUTION_LINES:
        assert line in text
    # the scenario and its inputs with units
    assert "Scenario:" in text and "rise allowed above deck" in text and "kN/m" in text
    if name == "client_report":
        assert "Inputs" in text and "kN/m" in text and "Results" in text
        assert "reference optimum" in text and "m3" in text


def test_remote_reference_check_catches_web_addresses():
    assert remote_references('<script src="https://x.org/a.js"></script>')
    assert remote_references('<link href="//x.org/a.css" rel="stylesheet">')
    assert remote_references("<style>@import url('https://f.org/f.css');</style>")
    assert remote_references('<script>var u = "https://plot.ly";</script>') == []


@pytest.mark.slow
def test_report_renders_offline_in_headless_chromium(report):
    name, path = report
    browser = _chromium()
    with tempfile.TemporaryDirectory() as profile:
        run = subprocess.run(
            [browser, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic",
             "--no-first-run", "--disable-background-networking", "--disable-component-update",
             "--disable-sync", f"--user-data-dir={profile}",
             "--host-resolver-rules=MAP * ~NOTFOUND", "--enable-logging=stderr", "--v=0",
             "--virtual-time-budget=10000", "--dump-dom", path.as_uri()],
            capture_output=True, text=True, timeout=180)
    dom = run.stdout
    plots = re.findall(r'<div[^>]*class="[^"]*\bjs-plotly-plot\b', dom)
    assert len(plots) == EXPECTED_FIGURES[name], run.stderr[-2000:]
    # every figure drew its traces (scatter lines or bars) into SVG
    assert len(re.findall(r'class="trace (?:scatter|bars)', dom)) >= EXPECTED_FIGURES[name]
    assert len(re.findall(r'<path class="js-line"', dom)) > 0
    console = [ln for ln in run.stderr.splitlines() if "CONSOLE" in ln or "Uncaught" in ln]
    assert not [ln for ln in console if "Uncaught" in ln or "Error" in ln], console
