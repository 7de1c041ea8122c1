"""One crossing, one reference (issue 11): back spans with sized back stays or back-span
cables for a single span, the pier foundation level as its own input, and the bad values
of the new [bridge] keys."""

from __future__ import annotations

import json

import numpy as np
import pytest

from bridgeopt import BridgeScenario, InputError, PRESETS
from bridgeopt.cli import main
from bridgeopt.files.scenario import parse_scenario
from bridgeopt.forms import CableStayedForm, ReferenceForm, SuspensionForm, form_problem, solve_form
from helpers import assert_equilibrium

STEEL = PRESETS["steel"]


def single(**changes) -> BridgeScenario:
    base = dict(span=1000.0, rise=250.0, depth=50.0, deck_load=2.0e5, material=STEEL,
                arrangement="single", divisions=20)
    base.update(changes)
    return BridgeScenario(**base)


# ---------------------------------------------------------------- back spans

def test_default_back_span_is_common_practice_and_clipped_to_the_grid():
    b = single()
    # 0.4 of the main span (common practice for single-span cable-stayed and suspension
    # bridges, from memory), here 400 m = 8 grid steps of 50 m
    assert b.back_length == pytest.approx(400.0)
    assert single(back_span=420.0).back_length == pytest.approx(400.0)
    assert single(back_span=0.0).back_length == 0.0
    problem = b.to_problem()
    assert (-400.0, 0.0) in [s.at for s in problem.supports]
    assert problem.mirror_lines == (500.0,)


def _node_force(design, node, group=None):
    """Sum of the forces the members (of ``group``) apply to ``node``. [N]"""
    m = design.members
    sel = np.ones(len(m.start), dtype=bool) if group is None else m.group == group
    return (m.force_start[(m.start == node) & sel].sum(axis=0)
            + m.force_end[(m.end == node) & sel].sum(axis=0))


def _anchor(design, back):
    return int(np.argmin(np.hypot(*(design.nodes - np.array([-back, 0.0])).T)))


@pytest.mark.parametrize("spec, main, back", [
    (CableStayedForm(pattern="fan", stays=5), "stay", "back stay"),
    (SuspensionForm(), "cable", "back-span cable")], ids=["fan", "suspension"])
def test_single_span_anchors_take_the_main_span_pull_through_sized_back_members(spec, main,
                                                                                 back):
    b = single()
    result = solve_form(b, spec)
    d = result.design
    assert_equilibrium(d)
    m = d.members
    backs = m.group == back
    assert backs.any() and (m.axial_force[backs] > 0).all()
    assert result.quantities[back]["volume_m3"] > 0
    # independent check at the anchor: the members meeting it pull it towards the
    # span, and only the back members meet it
    anchor = _anchor(d, b.back_length)
    at_anchor = (m.start == anchor) | (m.end == anchor)
    assert set(m.group[at_anchor]) == {back}
    pull = _node_force(d, anchor)
    assert pull[0] > 0
    # ... with the horizontal pull of the main span at the pylon or tower tops: the
    # horizontal components of the main-span members there (statics of the top nodes,
    # whose vertical pylon or tower carries no horizontal force)
    tops = np.unique(np.concatenate([m.end[backs], m.start[backs]]))
    tops = [t for t in tops if t != anchor]
    main_pull = sum(_node_force(d, t, main)[0] for t in tops)
    assert pull[0] == pytest.approx(main_pull, rel=1e-6)
    # the reference of this crossing is its plain reference (the same anchor points)
    assert result.reference_volume == pytest.approx(solve_form(b, ReferenceForm()).volume,
                                                    rel=1e-9)
    assert result.volume >= result.reference_volume


def test_single_span_form_without_back_spans_is_one_clear_line():
    with pytest.raises(InputError) as err:
        form_problem(single(back_span=0.0), CableStayedForm())
    assert err.value.field == "bridge.back_span" and "\n" not in str(err.value)


FILE = """
name = "Wrenlow Narrows (fictional)"
[bridge]
span = 800.0
rise = 200.0
depth = 40.0
deck_load = 1.5e5
arrangement = "single"
divisions = 16
[material]
preset = "steel"
[form]
type = "{form}"
"""


@pytest.mark.parametrize("form", ["cable-stayed", "suspension"])
def test_cli_single_span_form_reports_the_plain_reference_of_the_same_file(tmp_path, form,
                                                                           capsys):
    volumes = {}
    for kind in (form, "reference"):
        path = tmp_path / f"{kind}.toml"
        path.write_text(FILE.format(form=kind))
        out = tmp_path / f"{kind}.json"
        assert main(["solve", str(path), "--json", str(out)]) == 0
        volumes[kind] = json.loads(out.read_text())
    capsys.readouterr()
    plain = volumes["reference"]["volume"]
    assert volumes[form]["reference_volume"] == pytest.approx(plain, rel=1e-9)
    assert volumes[form]["volume"] >= plain


# ---------------------------------------------------------------- foundation level

def test_more_depth_never_makes_a_repeating_fan_heavier():
    """Issue 11, point 5: with the pier foundation at the bottom of the envelope, a 2 km
    fan paid for a 500 m pier shaft when depth L/4 was allowed (3661 m3 against 2751 m3
    at depth 0 on this grid); the foundation level is now its own input, default the
    deck's support level, so the form is the same and the reference no heavier."""
    L = 2000.0
    out = {}
    for depth in (0.0, L / 4):
        b = BridgeScenario(span=L, rise=L / 2, depth=depth, deck_load=2.0e5, material=STEEL,
                           divisions=12)
        out[depth] = solve_form(b, CableStayedForm(pattern="fan"))
    shallow, deep = out[0.0], out[L / 4]
    assert deep.volume <= shallow.volume * (1 + 1e-9)
    assert deep.reference_volume <= shallow.reference_volume * (1 + 1e-9)
    assert deep.quantities["pier"]["volume_m3"] == 0.0
    assert deep.volume >= deep.reference_volume


def test_foundation_below_the_envelope_gets_a_pier_shaft_for_form_and_reference():
    L = 1000.0
    b = BridgeScenario(span=L, rise=L / 2, depth=0.0, deck_load=2.0e5, material=STEEL,
                       divisions=10, foundation_depth=300.0)
    problem = b.to_problem()
    assert problem.supports[0].at == (0.0, -300.0)
    assert problem.domain.bounds[2] == -300.0
    result = solve_form(b, CableStayedForm(pattern="fan"))
    pier = result.quantities["pier"]
    assert pier["volume_m3"] > 0
    # a compression shaft of uniform strength carrying half the span's load R =
    # w L/2 + the superstructure's weight: V >= R h / sigma (common practice statics, the
    # weightless lower bound)
    assert pier["volume_m3"] >= 2.0e5 * L / 2 * 300.0 / STEEL.compression_strength
    assert result.volume >= result.reference_volume


@pytest.mark.parametrize("key, value, words", [
    ("back_span", -5.0, "0 to 800"),
    ("back_span", 2000.0, "0 to 800"),
    ("back_span", "long", "0 to 800"),
    ("foundation_depth", -1.0, ">= 0"),
    ("foundation_depth", float("nan"), ">= 0"),
])
def test_bad_new_bridge_keys_are_one_clear_line(key, value, words):
    data = {"name": "Wrenlow Narrows (fictional)", "material": {"preset": "steel"},
            "bridge": {"span": 800.0, "rise": 200.0, "depth": 40.0, "deck_load": 1.5e5,
                       "arrangement": "single", "divisions": 16, key: value}}
    with pytest.raises(InputError) as err:
        parse_scenario(data)
    text = str(err.value)
    assert err.value.field == f"bridge.{key}" and "\n" not in text
    assert words in text.replace("at most the span", "0 to 800") or words in text


def test_back_span_on_repeating_spans_and_huge_foundation_depth_are_refused():
    with pytest.raises(InputError) as err:
        BridgeScenario(span=800.0, rise=200.0, depth=40.0, deck_load=1.5e5, material=STEEL,
                       back_span=100.0)
    assert err.value.field == "bridge.back_span" and "repeating" in str(err.value)
    with pytest.raises(InputError) as err:
        BridgeScenario(span=800.0, rise=200.0, depth=40.0, deck_load=1.5e5, material=STEEL,
                       foundation_depth=1e9)
    assert err.value.field == "bridge.foundation_depth" and "spans" in str(err.value)


def test_new_keys_round_trip_through_the_scenario_file():
    data = {"name": "Wrenlow Narrows (fictional)", "material": {"preset": "steel"},
            "bridge": {"span": 800.0, "rise": 200.0, "depth": 40.0, "deck_load": 1.5e5,
                       "arrangement": "single", "divisions": 16, "back_span": 300.0,
                       "foundation_depth": 90.0}}
    s = parse_scenario(data)
    assert (s.bridge.back_span, s.bridge.foundation_depth) == (300.0, 90.0)
    again = parse_scenario(s.to_dict())
    assert again.bridge == s.bridge


@pytest.mark.parametrize("arrangement, changes", [
    ("repeating", {"foundation_depth": 100.0}),
    ("single", {"back_span": 100.0})])
def test_whole_span_model_matches_the_half_model_on_the_same_crossing(arrangement, changes):
    """The whole-span model (for traffic cases and channels) has the same supports as the
    half model: pier slots down to the foundations, back spans and their anchor points."""
    from bridgeopt.model.crossing import full_span_problem
    from bridgeopt.solver.layout import optimize_layout

    b = BridgeScenario(span=400.0, rise=100.0, depth=50.0, deck_load=1.0e5, material=STEEL,
                       arrangement=arrangement, divisions=8, **changes)
    whole = optimize_layout(full_span_problem(b)).volume
    assert whole == pytest.approx(optimize_layout(b.to_problem()).volume, rel=1e-7)


def test_touching_pier_slots_make_one_slot():
    from bridgeopt.model.crossing import full_span_problem

    b = BridgeScenario(span=400.0, rise=100.0, depth=0.0, deck_load=1.0e5, material=STEEL,
                       divisions=8, foundation_depth=100.0)
    outline = full_span_problem(b, piers=(100.0, 150.0)).domain.outline
    assert (100.0, -100.0) in outline and (200.0, -100.0) in outline
    assert (150.0, -100.0) not in outline
