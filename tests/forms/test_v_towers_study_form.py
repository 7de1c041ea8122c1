"""The study form "suspension, V-towers" puts its legs at the same part of the half span on any grid.

Check values: the leg hanger is round(4/15 x hangers of the half span), 4 of 15 being the
lightest position measured at 30 divisions (docs/benchmarks.md, V-shaped towers); the form
it builds must be the suspension form with that ``tower_legs`` (same volume).
"""

from __future__ import annotations

import math

import pytest

from bridgeopt import PRESETS, BridgeScenario, InputError
from bridgeopt.forms import SuspensionForm, solve_form
from bridgeopt.forms.registry import (FORM_SOLVERS, KNOWN_FORMS, V_TOWERS, solve_v_towers,
                                      v_tower_legs)


def _bridge(divisions):
    return BridgeScenario(span=1000.0, rise=500.0, depth=0.0, deck_load=2e5,
                          material=PRESETS["steel"], divisions=divisions, name="Corrin Water")


def test_offered_to_studies():
    assert V_TOWERS in KNOWN_FORMS and FORM_SOLVERS[V_TOWERS] is solve_v_towers


@pytest.mark.parametrize("divisions, legs", [(8, 1), (12, 2), (30, 4), (60, 8)])
def test_the_leg_sits_at_the_same_part_of_the_half_span(divisions, legs):
    assert v_tower_legs(_bridge(divisions)) == legs          # round(4/15 x divisions/2)


@pytest.mark.parametrize("divisions, legs", [(8, 1)])
def test_same_design_as_the_suspension_form_with_that_leg(divisions, legs):
    b = _bridge(divisions)
    design = solve_v_towers(b, {"pylons": 1})          # a study's options: extra keys ignored
    direct = solve_form(b, SuspensionForm(tower_legs=legs), compare=False)
    assert math.isclose(design.volume, direct.volume, rel_tol=1e-9)


def test_too_coarse_for_a_leg_is_a_clear_error():
    with pytest.raises(InputError) as info:
        solve_v_towers(_bridge(2), {})
    assert info.value.field == "bridge.divisions"
