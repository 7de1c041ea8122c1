"""Judging a proposed layout against the reference optimum.

Sources of the check values:

* the reference's own members, sized again by the same LP, give the same
  volume: the LP over a subset of columns that contains an optimal basis has the
  same optimum (W.S. Dorn, R.E. Gomory, H.J. Greenberg 1964, J. de Mecanique
  3:25-52), so the ratio is 1 within solver tolerance;
* the reference is the least volume over all layouts in the domain, so any
  other layout scores >= 1;
* the two-bar bracket's volume by hand statics (common practice): two bars from
  supports at (0, 0) and (0, 2) m to a load P = 1 MN at (4, 1) m each carry
  P sqrt(17) / 2 and are sqrt(17) m long, so weightless V = P * 17 / sigma
  = 1e6 * 17 / 355e6 = 0.047887 m3; self-weight adds a little.
"""

from __future__ import annotations

import json
import subprocess
import sys

import numpy as np
import pytest

from bridgeopt import InputError, SolveError, optimize_layout
from bridgeopt.study.judge import judge_problem, judge_proposal, unbalanced_nodes
from bridgeopt.files.export import export_design
from bridgeopt.files.proposal import proposal_from_dict, read_proposal
from bridgeopt.files.scenario import parse_scenario

BRIDGE = {"name": "Sallow Ford", "bridge": {"span": 400.0, "rise": 100.0, "depth": 40.0,
                                            "deck_load": 1.0e5, "divisions": 10,
                                            # the pier's foot at the envelope's bottom
                                            "foundation_depth": 40.0},
          "material": {"preset": "steel"}}   # a fictional crossing
BRACKET = {"name": "bracket", "domain": {"x": [0.0, 4.0], "z": [0.0, 2.0], "spacing": 0.5},
           "material": {"preset": "steel"},
           "support": [{"at": [0.0, 0.0]}, {"at": [0.0, 2.0]}],
           "load": [{"at": [4.0, 1.0], "force": [0.0, -1.0e6]}]}
TWO_BAR = {"nodes": [{"id": "A", "x": 0.0, "z": 0.0}, {"id": "B", "x": 0.0, "z": 2.0},
                     {"id": "C", "x": 4.0, "z": 1.0}],
           "members": [{"start": "A", "end": "C"}, ["B", "C"]]}


@pytest.fixture(scope="module")
def bridge_reference(tmp_path_factory):
    scenario = parse_scenario(BRIDGE)
    design = optimize_layout(scenario.problem)
    folder = tmp_path_factory.mktemp("reference")
    export_design(design, folder, ["csv", "json"], scenario=scenario)
    return scenario, design, folder


def test_the_reference_layout_scores_one(bridge_reference):
    scenario, design, folder = bridge_reference
    judged = judge_proposal(judge_problem(scenario), read_proposal(folder / "nodes.csv"))
    assert judged.ratio == pytest.approx(1.0, abs=1e-6)
    assert judged.reference_volume == pytest.approx(design.volume, rel=1e-9)
    # no member costs more than the optimum's virtual displacements say it is worth
    assert np.abs(judged.excess["excess_m3"]).max() <= 1e-6 * design.volume


def test_the_reference_layout_from_json_scores_one(bridge_reference):
    scenario, _, folder = bridge_reference
    judged = judge_proposal(judge_problem(scenario), read_proposal(folder / "design.json"))
    assert judged.ratio == pytest.approx(1.0, abs=1e-6)


def test_a_two_bar_bracket_scores_above_one_with_its_hand_volume():
    scenario = parse_scenario(BRACKET)
    judged = judge_proposal(scenario.problem, proposal_from_dict(TWO_BAR))
    hand = 1.0e6 * 17 / 355e6                       # module docstring
    assert hand <= judged.volume <= 1.01 * hand      # self-weight of 4 m steel bars: < 1 %
    assert judged.ratio > 1.05
    # on-grid proposal: the excesses add up to the volume difference (LP duality)
    assert judged.excess["excess_m3"].sum() == pytest.approx(
        judged.volume - judged.reference_volume, rel=1e-6)
    assert (judged.excess["excess_m3"] >= -1e-12).all()
    assert set(judged.excess["start"]) | set(judged.excess["end"]) == {"A", "B", "C"}
    assert "CAUTION" in judged.summary()


def test_a_poor_bridge_layout_scores_above_one(bridge_reference):
    scenario, _, _ = bridge_reference
    # a king-post truss over the half span: deck nodes every 40 m, one post at the pier
    deck = [(40.0 * i, 0.0) for i in range(6)]
    nodes = deck + [(0.0, 80.0), (0.0, -40.0)]
    members = [[i, i + 1] for i in range(5)] + [[6, i] for i in range(1, 6)] + [[0, 6], [0, 7]]
    judged = judge_proposal(judge_problem(scenario),
                            proposal_from_dict({"nodes": [list(p) for p in nodes],
                                                "members": members}))
    assert judged.ratio > 1.0 + 1e-3
    assert judged.excess["excess_m3"].iloc[0] == judged.excess["excess_m3"].max()


def test_a_node_held_along_one_line_only_is_named():
    scenario = parse_scenario(BRACKET)
    # the loaded node 'tip' hangs on one horizontal member: it cannot take the vertical load
    layout = {"nodes": [{"id": "A", "x": 0.0, "z": 0.0}, {"id": "B", "x": 0.0, "z": 2.0},
                        {"id": "mid", "x": 2.0, "z": 1.0}, {"id": "tip", "x": 4.0, "z": 1.0}],
              "members": [["A", "mid"], ["B", "mid"], ["mid", "tip"]]}
    with pytest.raises(SolveError) as err:
        judge_proposal(scenario.problem, proposal_from_dict(layout))
    assert err.value.status == "unstable"
    assert "tip" in err.value.message and "mid" not in err.value.message


def test_a_mechanism_is_named():
    scenario = parse_scenario(BRACKET)
    # a four-bar linkage A-C-D-B (A, B pinned) that can sway, carrying the loaded node E
    layout = {"nodes": [[0.0, 0.0], [0.0, 2.0], [2.0, 0.0], [2.0, 2.0], [4.0, 1.0]],
              "members": [[0, 2], [1, 3], [2, 3], [2, 4], [3, 4]]}
    proposal = proposal_from_dict(layout)
    bad = unbalanced_nodes(scenario.problem, proposal)
    assert bad and set(bad) <= {2, 3}     # the swaying nodes, not the supports or the tip
    with pytest.raises(SolveError, match="cannot be balanced"):
        judge_proposal(scenario.problem, proposal)


def test_a_layout_without_a_node_at_the_load_is_an_input_error():
    scenario = parse_scenario(BRACKET)
    layout = {"nodes": [[0.0, 0.0], [0.0, 2.0], [3.0, 1.0]], "members": [[0, 2], [1, 2]]}
    with pytest.raises(InputError) as err:
        judge_proposal(scenario.problem, proposal_from_dict(layout))
    assert err.value.field == "layout.nodes" and "load[0].at" in str(err.value)


def test_a_bridge_layout_without_its_pier_support_is_an_input_error(bridge_reference):
    scenario, _, _ = bridge_reference
    # a deck on the mirror lines only: nothing takes the vertical load at the pier's foot
    nodes = [[40.0 * i, 0.0] for i in range(6)]
    layout = {"nodes": nodes, "members": [[i, i + 1] for i in range(5)]}
    with pytest.raises(InputError) as err:
        judge_proposal(judge_problem(scenario), proposal_from_dict(layout))
    assert err.value.field == "layout.nodes" and "[0, -40]" in str(err.value)


@pytest.mark.parametrize("layout, field", [
    ({"nodes": [[0, 0], [1, 1]], "members": [[0, 5]]}, "members[0].end"),
    ({"nodes": [[0, 0], [1, 1]], "members": [{"start": 0, "end": 1, "sense": "pull"}]},
     "members[0].sense"),
    ({"nodes": [[0, "x"], [1, 1]], "members": [[0, 1]]}, "nodes[0].z"),
    ({"nodes": [{"id": 1, "x": 0, "z": 0}, {"id": 1, "x": 1, "z": 0}], "members": [[1, 1]]},
     "nodes[1].id"),
    ({"nodes": [[0, 0], [1, 1], [0, 0]], "members": [[0, 1]]}, "nodes[2]"),
])
def test_bad_layouts_name_the_field(layout, field):
    with pytest.raises(InputError) as err:
        proposal_from_dict(layout)
    assert err.value.field == field


@pytest.mark.slow
def test_cli_judge(tmp_path, bridge_reference):
    _, _, folder = bridge_reference
    scenario = tmp_path / "bracket.toml"
    scenario.write_text('name = "bracket"\n[domain]\nx = [0.0, 4.0]\nz = [0.0, 2.0]\n'
                        'spacing = 0.5\n[material]\npreset = "steel"\n[[support]]\n'
                        'at = [0.0, 0.0]\n[[support]]\nat = [0.0, 2.0]\n[[load]]\n'
                        'at = [4.0, 1.0]\nforce = [0.0, -1.0e6]\n')
    (tmp_path / "nodes.csv").write_text("id,x_m,z_m\nA,0,0\nB,0,2\nC,4,1\n")
    (tmp_path / "members.csv").write_text("start,end,group\nA,C,strut\nB,C,tie\n")
    run = subprocess.run([sys.executable, "-m", "bridgeopt", "judge", str(scenario),
                          str(tmp_path / "nodes.csv"), "--json", str(tmp_path / "j.json")],
                         capture_output=True, text=True, timeout=120)
    assert run.returncode == 0, run.stderr
    assert "ratio" in run.stdout and "CAUTION" in run.stdout
    data = json.loads((tmp_path / "j.json").read_text())
    assert data["volume_ratio"] > 1 and len(data["excess"]) == 2
    (tmp_path / "members.csv").write_text("start,end\nA,C\n")
    bad = subprocess.run([sys.executable, "-m", "bridgeopt", "judge", str(scenario),
                          str(tmp_path)], capture_output=True, text=True, timeout=120)
    assert bad.returncode == 3
    assert "C (x = 4 m, z = 1 m)" in bad.stderr


@pytest.mark.slow
def test_the_bundled_example_proposal():
    from pathlib import Path

    from bridgeopt.files.scenario import load_scenario

    root = Path(__file__).resolve().parents[2]
    scenario = load_scenario(root / "studies" / "scenarios" / "form_cable_stayed.toml")
    proposal = read_proposal(root / "studies" / "proposals" / "harrowmere_fan.json")
    judged = judge_proposal(judge_problem(scenario), proposal)
    assert judged.ratio > 1        # the reference bounds every layout in the domain
    # every node is on the 50 m grid: the excesses add up to the volume difference
    assert judged.excess["excess_m3"].sum() == pytest.approx(
        judged.volume - judged.reference_volume, rel=1e-6)
