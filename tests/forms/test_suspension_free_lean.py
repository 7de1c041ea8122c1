"""A free-shape suspension form leaning past one panel gets the lean continuation too.

With ``shape = "free"`` the form's own moves already have the wide lean box and stall
there (docs/benchmarks.md, the 1.807 stall); the continuation (forms/hangers.py) goes
on from where they stopped.  Checks, each able to fail: never heavier than the same
form without the continuation (solved here with it switched off), the ratio to the
reference optimum >= 1 (the reference is the least volume over a ground structure on
the same supports and loads: below it would be a bug), equilibrium of the final
frame with its self-weight (tests/helpers.py), and every hanger leaning towards the
tower by at most ``hanger_lean`` panels (the input's definition, docs/scenario.md).
"""

from __future__ import annotations

import numpy as np
import pytest
from helpers import assert_equilibrium

from bridgeopt import PRESETS, BridgeScenario
from bridgeopt.forms import SuspensionForm, solve_form
from bridgeopt.forms import stages as form_stages

LEAN = 3.0


@pytest.mark.slow
def test_a_free_shape_past_one_panel_is_continued(monkeypatch):
    b = BridgeScenario(span=1000.0, rise=500.0, depth=0.0, deck_load=2e5,
                       material=PRESETS["steel"], arrangement="repeating", divisions=12)
    spec = SuspensionForm(shape="free", hanger_lean=LEAN)
    with monkeypatch.context() as m:
        m.setattr(form_stages, "_lean_continued", lambda frame, moves, best, spec: best)
        plain = solve_form(b, spec)
    lean = solve_form(b, spec, reference=plain.reference)
    assert lean.volume <= plain.volume * (1 + 1e-9)
    assert lean.ratio >= 1.0 - 1e-9
    assert_equilibrium(lean.design)
    d = lean.design
    h = np.nonzero(np.asarray(d.members.group) == "hanger")[0]
    z = d.nodes[:, 1]
    low = np.where(z[d.members.start[h]] < z[d.members.end[h]], d.members.start[h],
                   d.members.end[h])
    high = np.where(low == d.members.start[h], d.members.end[h], d.members.start[h])
    panel = np.diff(np.unique(np.round(d.nodes[low, 0], 9))).min()   # the deck points' grid
    lean_x = d.nodes[low, 0] - d.nodes[high, 0]
    assert np.all(np.abs(lean_x) <= LEAN * panel * (1 + 1e-9))
