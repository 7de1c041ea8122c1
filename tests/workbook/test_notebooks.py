"""Study notebooks: committed clean, run headlessly, and the explorer's callbacks work in a kernel.

Each notebook runs with BRIDGEOPT_FAST=1 (coarse grids, few sweep points) read by its
``parameters`` cell, with a per-cell time limit; the run is shared with the other notebook
tests (``notebook_runs``: one kernel run per notebook, every test's probe cells appended).
"""

import json
from pathlib import Path

import nbformat
import pytest

pytest.importorskip("nbclient")
pytest.importorskip("ipywidgets")
pytest.importorskip("plotly")

from bridgeopt import PRESETS, BridgeScenario, study  # noqa: E402
from bridgeopt.cautions import CAUTION_LINES  # noqa: E402

from .notebook_runs import register_probe, run  # noqa: E402

STUDIES = Path(__file__).resolve().parents[2] / "studies"
NOTEBOOKS = sorted(STUDIES.glob("*.ipynb"))


def test_the_five_studies_exist():
    names = {p.stem for p in NOTEBOOKS}
    assert {"explorer", "span_study", "height_study", "pylon_study", "client_report"} <= names


@pytest.mark.parametrize("path", NOTEBOOKS, ids=lambda p: p.stem)
def test_committed_without_outputs_and_opening_with_question_and_cautions(path):
    nb = nbformat.read(path, as_version=4)
    nbformat.validate(nb)
    code = [c for c in nb.cells if c.cell_type == "code"]
    assert all(c.outputs == [] and c.execution_count is None for c in code)
    first = nb.cells[0]
    assert first.cell_type == "markdown" and "What it answers" in first.source
    assert all(line in first.source for line in CAUTION_LINES)
    tagged = [c for c in nb.cells if "parameters" in c.metadata.get("tags", [])]
    assert len(tagged) == 1 and tagged[0] is code[0]
    assert "widgets" not in nb.metadata


#: Per-cell time limit of these tests' runs [s] (the shared run's limit is larger).
LIMIT = 120


def _errors(cells):
    return [o for c in cells if c.cell_type == "code" for o in c.outputs
            if o.output_type == "error" or "bridgeopt-error" in json.dumps(o.get("data", {}))]


@pytest.mark.slow
@pytest.mark.parametrize("path", [p for p in NOTEBOOKS if p.stem != "explorer"],
                         ids=lambda p: p.stem)
def test_study_runs_headlessly(path):
    done = run(path.stem)
    assert done.slowest() < LIMIT
    cells = done.own_cells  # the notebook as committed, without the other tests' probes
    assert not _errors(cells)
    outputs = [o for c in cells if c.cell_type == "code" for o in c.outputs]
    assert sum("application/vnd.plotly.v1+json" in o.get("data", {}) for o in outputs) >= 2


PROBE = """
import json
before = explorer.state()
explorer.controls["span"].value = explorer.controls["span"].value + 600
after = explorer.state()
explorer.controls["depth"].value = 0
explorer.controls["rise"].value = 0
bad = explorer.state()
explorer.controls["rise"].value = 800
again = explorer.state()
print("PROBE" + json.dumps({"before": before, "after": after, "bad": bad, "again": again,
                            "divisions": explorer.divisions}))
"""

# Run as a later cell: the explorer's output area as the front end (nbclient) holds it.
SHOWN = """
import json
print("SHOWN" + json.dumps([o.get("data", {}).get("application/vnd.plotly.v1+json")
                            for o in explorer.drawing.outputs]))
"""

# The slider probe changes the explorer's state: it runs after every reading probe.
register_probe("explorer", "sliders", PROBE, changes_state=True)
register_probe("explorer", "shown", SHOWN, changes_state=True)


@pytest.mark.slow
def test_explorer_sliders_resolve_redraw_and_show_errors_in_a_kernel():
    done = run("explorer")
    assert done.slowest("sliders", "shown") < LIMIT
    nb = done.nb
    probe = json.loads(done.text("sliders").split("PROBE", 1)[1])
    before, after, bad, again = probe["before"], probe["after"], probe["bad"], probe["again"]
    assert before["error"] is None and after["error"] is None
    assert after["span"] == before["span"] + 600
    assert after["reference_volume"] != before["reference_volume"]
    assert str(int(after["span"])) in after["title"].replace(",", "")
    # the kernel's number is the optimum of the same scenario solved here
    bridge = BridgeScenario(span=after["span"], rise=360.0, depth=180.0, deck_load=2.0e5,
                            material=PRESETS["steel"], arrangement="single",
                            divisions=probe["divisions"])
    assert after["reference_volume"] == pytest.approx(study.solve_reference(bridge).volume,
                                                      rel=1e-6)
    # rise = depth = 0: a readable one-line message in the notebook, last drawing kept
    assert bad["error"] and "bridge.rise" in bad["error"]
    assert "bridge.rise" in bad["message"] and "bridgeopt-error" in bad["message"]
    assert bad["traces"] == after["traces"] and bad["title"] == after["title"]
    # a valid input again clears the error
    assert again["error"] is None and "bridgeopt-error" not in again["message"]
    assert again["reference_volume"] != after["reference_volume"]
    assert not _errors(nb.cells)
    # the redrawn figure is what the output area shows: one plotly figure, the new span
    shown = json.loads(done.text("shown").split("SHOWN", 1)[1])
    assert len(shown) == 1 and shown[0] is not None
    assert shown[0]["layout"]["title"]["text"].startswith(again["title"].split("<br>")[0])
    assert f"{after['span']:,.0f} m span" in shown[0]["layout"]["title"]["text"]
