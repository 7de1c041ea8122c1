"""Pylons without foundations (issue 11): intermediate pylon tops carried by compression
legs from the piers, sized and height-optimized, on the plain crossing."""

from __future__ import annotations

import pytest

from bridgeopt import BridgeScenario, InputError, PRESETS, study
from bridgeopt.solver.frame import size_frame
from bridgeopt.forms.legs import legs_frame, solve_legs
from helpers import assert_equilibrium


def bridge(**changes):
    base = dict(span=1000.0, rise=500.0, depth=0.0, deck_load=2.0e5, material=PRESETS["steel"],
                divisions=12)
    base.update(changes)
    return BridgeScenario(**base)


@pytest.mark.parametrize("arrangement", ["repeating", "single"])
@pytest.mark.parametrize("pylons", [2, 3, 4])
def test_legs_carry_the_intermediate_pylons_on_the_plain_crossing(arrangement, pylons):
    b = bridge(arrangement=arrangement)
    frame, moves = legs_frame(b, pylons)
    assert frame.problem == b.to_problem()         # no pier added: the plain crossing
    assert moves.names == ("pier pylon height", "leg apex height")
    start = size_frame(frame)
    design = solve_legs(b, {"pylons": pylons})
    assert_equilibrium(design)
    assert design.volume <= start.volume * (1 + 1e-9)   # never heavier than the start
    legs = design.members.group == "leg"
    assert legs.any() and design.members.volume[legs].sum() > 0
    if arrangement == "single":
        assert (design.members.group == "back stay").any()
    # its reference is the plain reference optimum (a lower bound on the same supports)
    assert design.volume >= study.solve_reference(b).volume


def test_legs_in_the_pylon_sweep_stand_on_the_plain_crossing():
    study.register_legs()
    try:
        table = study.pylon_sweep(bridge(foundation_depth=60.0), [1000.0], [1, 2],
                                  ["cable-stayed fan", study.LEGS_FORM])
    finally:
        study.unregister_form(study.LEGS_FORM)
    legs = table[table["option"] == study.LEGS_FORM].set_index("pylons")
    plain = table[table["option"] == study.REFERENCE]["volume_m3"].iloc[0]
    assert list(legs["crossing"]) == ["", ""]
    assert list(legs["reference_volume_m3"]) == pytest.approx([plain, plain], rel=1e-12)
    assert list(legs["foundations"]) == [1, 1]        # only the pier's own foundation
    fan = table[table["option"] == "cable-stayed fan"].set_index("pylons")
    assert list(fan["foundations"]) == [1, 2]
    # with one pylon per span there is nothing to carry: the plain fan with its stays
    # anchored in the fan pattern (the same optimum, reached from another starting height);
    # the study's fan also frees every anchor, so it can only be lighter
    from bridgeopt.forms import CableStayedForm, solve_form

    pattern = solve_form(bridge(foundation_depth=60.0),
                         CableStayedForm(pattern="fan", anchors="pattern"), compare=False)
    assert legs.loc[1, "volume_m3"] == pytest.approx(pattern.volume, rel=1e-6)
    assert fan.loc[1, "volume_m3"] <= legs.loc[1, "volume_m3"] * (1 + 1e-9)


@pytest.mark.parametrize("value", [0, 5, 2.5, True])
def test_bad_pylon_count_for_legs_is_one_clear_line(value):
    with pytest.raises(InputError) as err:
        legs_frame(bridge(), value)
    assert err.value.field == "form.pylons" and "\n" not in str(err.value)
