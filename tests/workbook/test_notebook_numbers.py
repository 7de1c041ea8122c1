"""One number per study notebook, at its defaults (the BRIDGEOPT_FAST=1 variant tests run).

Each notebook runs in a kernel with one cell appended that prints its result table as
JSON (the run shared with the other notebook tests, ``notebook_runs``); the numbers are
then checked here.  Where a check value comes from outside the
program it says so beside the check; otherwise the value is an independent
recomputation: the same scenario solved here, in this process, with the package's
reference solve (``study.solve_reference``), apart from the notebook and its sweep code.
"""

from __future__ import annotations

import dataclasses
import json
import math
import tomllib
from pathlib import Path

import pytest

pytest.importorskip("nbclient")
pytest.importorskip("ipywidgets")
pytest.importorskip("plotly")

from bridgeopt import PRESETS, BridgeScenario, study  # noqa: E402

from .notebook_runs import register_probe, run  # noqa: E402

pytestmark = pytest.mark.slow  # each test runs a notebook in a kernel

STUDIES = Path(__file__).resolve().parents[2] / "studies"
REFERENCE = "reference optimum"
STEEL = PRESETS["steel"]
#: S355 steel: 355 MPa design strength (EN 10025-2, thickness up to 16 mm) and 7850 kg/m3
#: (EN 1991-1-1 Annex A, Table A.4: 77.0-78.5 kN/m3); standard gravity 9.80665 m/s2
#: (3rd CGPM, 1901).
S355, STEEL_DENSITY, G0 = 355e6, 7850.0, 9.80665

#: What the appended cell prints, per notebook (names of the notebook's own variables).
PROBES = {
    "explorer": '{"state": explorer.state(), "divisions": explorer.divisions}',
    "span_study": '{"table": table.to_dict("records"), "divisions": divisions}',
    "height_study": '{"table": table.to_dict("records"), "divisions": divisions}',
    "pylon_study": '{"table": table.to_dict("records"), "divisions": divisions}',
    "client_report": ('{"comparison": comparison.to_dict("records"), "divisions": '
                      'bridge.divisions, "file": scenario_file}'),
}


#: Per-cell time limit of these tests' runs [s] (the shared run's limit is larger).
LIMIT = 120

for _name, _probe in PROBES.items():
    register_probe(_name, "numbers",
                   f'import json\nprint("PROBE" + json.dumps({_probe}, default=float))')


def run_probe(name: str) -> dict:
    """Run ``studies/<name>.ipynb`` at its fast defaults and return what its probe printed."""
    done = run(name)
    assert done.slowest("numbers") < LIMIT
    return json.loads(done.text("numbers").split("PROBE", 1)[1])


def bridge(span: float, rise: float, depth: float, divisions: int) -> BridgeScenario:
    """The notebooks' default scenario: steel, 200 kN/m, anchored abutments (``single``)."""
    return BridgeScenario(span=span, rise=rise, depth=depth, deck_load=2.0e5, material=STEEL,
                          arrangement="single", divisions=divisions)


def reference_rows(table: list[dict]) -> list[dict]:
    return [r for r in table if r["option"] == REFERENCE]


def test_explorer_reference_volume_at_its_defaults():
    out = run_probe("explorer")
    state = out["state"]
    assert state["error"] is None and state["span"] == 1800.0
    # recomputation: the explorer's default scenario (1800 m, 360 m up, 180 m down) solved here
    alone = study.solve_reference(bridge(1800.0, 360.0, 180.0, out["divisions"]))
    assert state["reference_volume"] == pytest.approx(alone.volume, rel=1e-6)


def test_span_study_reference_at_the_first_span():
    out = run_probe("span_study")
    refs = sorted(reference_rows(out["table"]), key=lambda r: r["span_m"])
    first = refs[0]
    assert first["span_m"] == 500.0 and first["status"] == "optimal"
    # recomputation: 500 m, rise 0.2 span, depth 0.1 span, solved here
    alone = study.solve_reference(bridge(500.0, 100.0, 50.0, out["divisions"]))
    assert first["volume_m3"] == pytest.approx(alone.volume, rel=1e-6)
    # outside the program: weight = V rho g with S355's density and standard gravity
    assert first["weight_N"] == pytest.approx(first["volume_m3"] * STEEL_DENSITY * G0, rel=1e-9)
    # outside the program: normalised volume V sigma / (w L^2), by hand
    assert first["normalised_volume"] == pytest.approx(
        first["volume_m3"] * S355 / (2.0e5 * 500.0 ** 2), rel=1e-9)
    # published trend: with self-weight the normalised volume grows with span (H.E.
    # Fairclough, M. Gilbert, A.V. Pichugin, A. Tyas, I. Firth 2018, Proc. R. Soc. A
    # 474:20170726); weightless it would stay the same
    # (at 10 km the fast grid of 8 divisions has no feasible layout: recorded as failed)
    nv = [r["normalised_volume"] for r in refs if r["status"] == "optimal"]
    assert len(nv) >= 2 and all(b > a for a, b in zip(nv, nv[1:]))


def test_height_study_reference_at_span_to_rise_five():
    out = run_probe("height_study")
    refs = {round(1800.0 / r["rise_m"], 6): r for r in reference_rows(out["table"])}
    assert set(refs) == {2.0, 5.0, 10.0}
    # recomputation: 1800 m span, rise 360 m (span / 5), depth 180 m, solved here
    alone = study.solve_reference(bridge(1800.0, 360.0, 180.0, out["divisions"]))
    assert refs[5.0]["volume_m3"] == pytest.approx(alone.volume, rel=1e-6)
    # common practice: on one grid a taller domain holds every member of a lower one, so its
    # optimum is never heavier (rises 180, 360, 900 m are whole grid steps of 90 m)
    v = [refs[k]["volume_m3"] for k in (10.0, 5.0, 2.0)]
    assert v[1] <= v[0] * (1 + 1e-7) and v[2] <= v[1] * (1 + 1e-7)


def test_pylon_study_reference_at_the_first_span():
    out = run_probe("pylon_study")
    refs = [r for r in reference_rows(out["table"])
            if r["span_m"] == 1000.0 and not r.get("crossing")]
    assert refs
    # recomputation: 1000 m, rise 200 m, depth 100 m, repeating spans on pier foundations
    # 60 m below the deck (the pylon study's defaults), solved here
    plain = dataclasses.replace(bridge(1000.0, 200.0, 100.0, out["divisions"]),
                                arrangement="repeating", foundation_depth=60.0)
    alone = study.solve_reference(plain)
    for r in refs:  # the plain crossing's reference does not depend on the pylon count
        assert r["volume_m3"] == pytest.approx(alone.volume, rel=1e-6)


def test_client_report_reference_of_the_demo_crossing():
    out = run_probe("client_report")
    rows = {r["option"]: r for r in out["comparison"]}
    # outside the program's parser: the demo file read with tomllib
    demo = tomllib.loads((STUDIES / out["file"]).read_text())["bridge"]
    scenario = bridge(demo["span"], demo["rise"], demo["depth"], out["divisions"])
    assert demo["deck_load"] == 2.0e5 and demo["arrangement"] == "single"
    # recomputation: the demo crossing at the fast grid, solved here
    alone = study.solve_reference(scenario)
    assert rows[REFERENCE]["volume_m3"] == pytest.approx(alone.volume, rel=1e-6)
    for name, r in rows.items():  # by hand: each ratio is the volume over its reference
        if r["status"] == "optimal":
            assert r["ratio_to_reference"] == pytest.approx(
                r["volume_m3"] / r["reference_volume_m3"], rel=1e-9), name
    assert not math.isnan(rows[REFERENCE]["normalised_volume"])
