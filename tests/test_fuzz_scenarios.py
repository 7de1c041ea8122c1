"""Fuzzing scenario values (Hypothesis): every scenario either is refused with one clear
line, or gives a design that passes the independent equilibrium check (tests/helpers.py,
statics by hand: every node, every member and the whole model balance) with a finite,
positive volume.  A refusal from the solver itself is allowed only as "no structure
exists" (infeasible or beyond the equal-strength span limit), again in one line.
"""

from __future__ import annotations

import math

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from bridgeopt import InputError, SolveError
from bridgeopt.files.scenario import parse_scenario
from bridgeopt.study.solve import solve_scenario
from helpers import assert_equilibrium

pytestmark = pytest.mark.slow

SETTINGS = settings(max_examples=150, deadline=None, derandomize=True,
                    suppress_health_check=[HealthCheck.too_slow, HealthCheck.filter_too_much])

#: Values a careless user might type: ordinary ones, and every kind of nonsense.
WILD = st.one_of(
    st.floats(allow_nan=True, allow_infinity=True),
    st.floats(min_value=-1e6, max_value=1e6),
    st.integers(min_value=-10**6, max_value=10**6),
    st.sampled_from([0, 1, -1, 1e-300, 1e300, 5e-324, 1e306, "abc", "", None, True, [], [1.0],
                     {"a": 1}]),
)


def _value(good, wild_in_ten=1):
    """A sensible value nine times in ten (by default), a wild one otherwise."""
    return st.integers(0, 9).flatmap(lambda roll: WILD if roll < wild_in_ten else good)


@st.composite
def bridge_files(draw):
    span = draw(_value(st.floats(50.0, 3000.0)))
    data = {
        "name": "Fuzzholm crossing (fictional)",
        "bridge": {
            "span": span,
            "rise": draw(_value(st.floats(0.0, 1500.0))),
            "depth": draw(_value(st.floats(0.0, 500.0))),
            "deck_load": draw(_value(st.floats(1e3, 1e6))),
            "divisions": draw(_value(st.sampled_from([4, 6, 8, 10, 12]))),
            "arrangement": draw(_value(st.sampled_from(["repeating", "single"]))),
        },
        "material": draw(st.one_of(
            st.just({"preset": "steel"}),
            st.fixed_dictionaries({"strength": _value(st.floats(50e6, 2e9)),
                                   "density": _value(st.floats(0.0, 9000.0))}))),
    }
    if draw(st.booleans()):
        data["form"] = {"type": draw(_value(st.sampled_from(["reference", "cable-stayed",
                                                             "suspension", "arch"])))}
    return data


def _one_line(err: Exception) -> None:
    text = str(err)
    assert text and "\n" not in text and len(text) < 1000


@SETTINGS
@given(bridge_files())
def test_every_scenario_is_refused_in_one_line_or_solved_soundly(data):
    try:
        scenario = parse_scenario(data)
        design = solve_scenario(scenario).design
    except InputError as err:
        _one_line(err)
        assert " is invalid: valid is " in str(err)
        return
    except SolveError as err:
        _one_line(err)
        assert err.status in ("infeasible", "span-limit"), err
        return
    assert math.isfinite(design.volume) and design.volume > 0
    assert_equilibrium(design, rtol=1e-6)
