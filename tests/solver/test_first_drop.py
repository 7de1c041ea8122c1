"""Columns of a coarse-started first LP that are far from entering leave after its solve.

Reference for the optimum: member adding ends at the full ground structure's optimum when no
candidate out of the LP violates the dual check u.a > c, whatever columns were taken out on the
way (they are priced again like any candidate; M. Gilbert, A. Tyas 2003, Engineering
Computations 20(8):1044-1064; W.S. Dorn, R.E. Gomory, H.J. Greenberg 1964, J. de Mecanique
3:25-52), so removing columns early must give the full ground structure's volume.  Reference
for the reduced cost: d = c - u.a for a column of cost c and coefficients a at duals u (any LP
text, e.g. V. Chvatal, Linear Programming, 1983, ch. 7), so u.a/c = 1 - d/c.
"""

import highspy
import numpy as np
import pytest

from bridgeopt import PRESETS, BridgeScenario, optimize_layout
from bridgeopt.solver import lpmodel, multilevel
from bridgeopt.solver.adding import Pruner
from bridgeopt.solver.lpmodel import LayoutModel

REL = 1e-6  # same optimum as the full ground structure (issue 12)


def _bridge(divisions):
    return BridgeScenario(
        span=1000.0,
        rise=500.0,
        depth=0.0,
        deck_load=2e5,
        material=PRESETS["steel"],
        divisions=divisions,
    ).to_problem()


@pytest.fixture
def small_coarse(monkeypatch):
    """Start from a coarser grid already at 8 cells across (as in test_multilevel.py)."""
    monkeypatch.setattr(multilevel, "COARSE_MIN", 4)


@pytest.fixture
def spy(monkeypatch):
    """Record, for every fine (first-drop) model, what its first solve marked and what left."""
    seen = []
    solve, remove = LayoutModel.solve, LayoutModel.remove_due

    def spy_solve(self):
        status = solve(self)
        if self.first_drop and self.solves == 1:
            force = self.forces()
            basis = self.h.getBasis()
            basic = np.array(
                [
                    int(c) == int(highspy.HighsBasisStatus.kBasic)
                    for c in basis.col_status[self.nfix :]
                ]
            )
            reduced = np.asarray(self.h.getSolution().col_dual)[self.nfix :]
            seen.append(
                {
                    "due": self.pruner.zero >= self.pruner.after,
                    "force": force,
                    "basic": basic,
                    "ratio": 1.0 - reduced / self.cost,
                }
            )
        return status

    def spy_remove(self):
        gone = remove(self)
        if self.first_drop and self.solves == 1:
            seen[-1]["left"] = len(gone[0])
        return gone

    monkeypatch.setattr(LayoutModel, "solve", spy_solve)
    monkeypatch.setattr(LayoutModel, "remove_due", spy_remove)
    return seen


def test_pruner_due_now_takes_marked_removable_members_once():
    p = Pruner(5, 2, after=2)
    p.added(4)
    p.solved(np.array([True, True, True, False]))  # one zero solve: none due yet
    pair, group = np.array([0, 1, 2, 3]), np.zeros(4, dtype=np.int64)
    assert not p.pick(pair, group, np.ones(4, dtype=bool)).any()
    p.due_now(np.array([True, True, False, False]))
    drop = p.pick(pair, group, np.array([True, False, True, True]))
    # member 0: marked and removable; 1: marked, basic (not removable); 2: not marked
    assert drop.tolist() == [True, False, False, False]
    assert p.count == 1 and p.dropped[0, 0]


@pytest.mark.parametrize("divisions", [16, 24])
def test_first_drop_gives_the_full_ground_structure_optimum(
    small_coarse, spy, divisions
):
    p = _bridge(divisions)
    full = optimize_layout(p, member_adding=False)
    d = optimize_layout(p)
    assert d.stats["start"] == "multilevel"
    assert d.stats["gap"] == 0.0 and d.stats["vertex"] is True
    assert d.volume == pytest.approx(full.volume, rel=REL)
    fine = spy[-1]
    # marked: nonbasic, at zero force, u.a/c below the ratio; and they left before solve 2
    due = fine["due"]
    assert due.any()
    assert not fine["basic"][due].any()
    assert np.all(fine["force"][due] <= lpmodel.ZERO_FORCE * fine["force"].max())
    assert np.all(fine["ratio"][due] < lpmodel.FIRST_DROP_RATIO)
    assert fine["left"] == due.sum()


def test_without_a_coarse_start_nothing_leaves_after_one_solve(spy):
    d = optimize_layout(_bridge(16))
    assert d.stats["start"] == "reach 1"
    assert spy == []  # the first-drop path is for coarse-started models only


def test_coarse_levels_keep_their_columns(small_coarse, spy):
    """32 -> 16 -> 8 divisions: the 16-division level is mapped too, but only the finest
    level removes columns after its first solve (the coarse vertex seeds the finer grid)."""
    p = _bridge(32)
    d = optimize_layout(p)
    assert d.stats["start"] == "multilevel"
    assert len(spy) == 1
    assert len(spy[0]["force"]) > 0 and spy[0]["due"].any()
    assert (
        d.stats["grid_nodes"] == 17 * 17
    )  # the finest grid: 16 cells each way (half span)
