"""Member adding with columns leaving the LP, and the vertex re-solve after interior point rounds.

Reference for the optimum: member adding ends at the full ground structure's optimum when no
candidate out of the LP violates the dual check u.a > c (M. Gilbert, A. Tyas 2003, Engineering
Computations 20(8):1044-1064; W.S. Dorn, R.E. Gomory, H.J. Greenberg 1964, J. de Mecanique
3:25-52); columns that left the LP are candidates like any other, so removing them does not
change the optimum.  A basic (vertex) solution of an LP with m equality rows has at most m
nonzero variables (G.B. Dantzig 1963, Linear Programming and Extensions, ch. 3).
"""

import numpy as np
import pytest

from bridgeopt import PRESETS, BridgeScenario, optimize_layout
from bridgeopt.errors import InputError
from bridgeopt.solver import lp, lpmodel
from bridgeopt.solver.adding import Pruner
from bridgeopt.solver.layout import solve_layout_lp
from helpers import fail_after_removal

REL = 1e-6  # same optimum as the full ground structure (issue 12)


def _bridge(divisions):
    return BridgeScenario(span=1000.0, rise=500.0, depth=0.0, deck_load=2e5,
                          material=PRESETS["steel"], divisions=divisions).to_problem()


def test_pruner_drops_only_old_zero_nonbasic_members_and_each_once():
    pr = Pruner(5, 2, after=2)
    pair, group = np.arange(3), np.zeros(3, dtype=int)
    pr.added(3)
    pr.solved(np.array([True, True, False]))
    assert not pr.pick(pair, group, np.ones(3, bool)).any()  # one solve at zero is not enough
    pr.solved(np.array([True, True, False]))
    drop = pr.pick(pair, group, np.array([True, False, True]))  # member 1 is basic
    assert drop.tolist() == [True, False, False] and pr.count == 1
    # member 0 comes back, stays at zero: it is never taken out a second time
    pair, group = np.array([1, 2, 0]), np.zeros(3, dtype=int)
    pr.added(1)
    for _ in range(3):
        pr.solved(np.array([True, False, True]))
    assert pr.pick(pair, group, np.array([False, True, True])).tolist() == [False, False, False]
    with pytest.raises(InputError):
        Pruner(2, 2, after=0)


@pytest.mark.parametrize("divisions", [16, 24])
def test_removal_keeps_the_full_ground_structure_optimum(divisions):
    p = _bridge(divisions)
    adding, full = optimize_layout(p), optimize_layout(p, member_adding=False)
    assert adding.stats["dropped"] > 0
    assert adding.stats["gap"] == 0.0 and adding.stats["vertex"] is True
    assert adding.volume == pytest.approx(full.volume, rel=REL)


def test_vertex_resolve_after_interior_point_rounds(monkeypatch):
    p = _bridge(16)
    full = optimize_layout(p, member_adding=False)
    monkeypatch.setattr(lp, "IPM_ROWS", 0)  # interior point rounds at this small size
    _, _, data, sol, _ = solve_layout_lp(p, coarse_start=False)
    assert sol.vertex is True
    assert sol.gap <= lp.IPM_GAP
    # at most one nonzero force per equality row (a basic solution)
    assert len(sol.force) <= 2 * len(data.xz)
    d = optimize_layout(p)
    assert d.stats["vertex"] is True
    assert d.volume == pytest.approx(full.volume, rel=max(REL, lp.IPM_GAP))
    monkeypatch.setattr(lpmodel, "VERTEX", False)
    d = optimize_layout(p)
    assert d.stats["vertex"] is False
    assert d.volume == pytest.approx(full.volume, rel=max(REL, lp.IPM_GAP))


@pytest.mark.parametrize("failures", [1, 2])
def test_columns_come_back_when_a_solve_after_removal_fails(monkeypatch, failures):
    """Should HiGHS not call the LP optimal after a removal, the removed columns come back
    (after two failures: every column ever removed) and the optimum is the same."""
    p = _bridge(16)
    full = optimize_layout(p, member_adding=False)
    state = fail_after_removal(monkeypatch, lpmodel.LayoutModel, lpmodel, failures)
    d = optimize_layout(p, coarse_start=False)
    assert state["left"] == 0
    assert d.volume == pytest.approx(full.volume, rel=REL)
