"""The lean continuation's own inputs are range-checked (bridgeopt.forms.hangers).

Check values: the valid ranges stated in the functions' docstrings (lean > 0 panels,
node_gap in [0, 1) panel, rounds a whole number >= 0, panel > 0 m).
"""

from __future__ import annotations

import numpy as np
import pytest

from bridgeopt.errors import InputError
from bridgeopt.forms.hangers import lean_continuation, relean_moves
from bridgeopt.geometry.moves import NodeMoves


def _moves() -> NodeMoves:
    return NodeMoves(T=np.zeros((2, 0)), lower=np.zeros(0), upper=np.zeros(0), names=())


@pytest.mark.parametrize("kwargs, field", [
    ({"lean": 0.0}, "lean"), ({"lean": -2.0}, "lean"), ({"lean": float("nan")}, "lean"),
    ({"lean": True}, "lean"), ({"lean": 4.0, "node_gap": 1.0}, "node_gap"),
    ({"lean": 4.0, "node_gap": -0.1}, "node_gap"), ({"lean": 4.0, "rounds": -1}, "rounds"),
    ({"lean": 4.0, "rounds": 2.5}, "rounds")])
def test_a_bad_continuation_input_names_itself(kwargs, field):
    with pytest.raises(InputError, match=field):
        lean_continuation(None, _moves(), None, lambda f, m, d: d, **kwargs)


@pytest.mark.parametrize("kwargs, field", [
    ({"panel": 0.0}, "panel"), ({"panel": float("inf")}, "panel"), ({"lean": -1.0}, "lean")])
def test_a_bad_relean_input_names_itself(kwargs, field):
    args = {"lean": 4.0, "panel": 10.0, "gap": 0.01, "tower_x": 0.0, **kwargs}
    with pytest.raises(InputError, match=field):
        relean_moves(None, _moves(), np.zeros(0), **args)


def test_no_lean_parameters_leave_the_design_as_it_is():
    best = object()
    assert lean_continuation(None, _moves(), best, lambda f, m, d: d, lean=4.0) is best
