"""The shared solver core: member-adding driver, sparse column sets, line-load lumping.

Check values: the resultant and moment of a uniform line load (statics, common
practice); LP duality for the proven gap (W.S. Dorn, R.E. Gomory, H.J. Greenberg
1964, J. de Mecanique 3:25-52; M. Gilbert, A. Tyas 2003, Engineering
Computations 20(8):1044-1064); hand-sized LPs whose optimum is derived in each
test.
"""

from __future__ import annotations

import ast
from pathlib import Path

import numpy as np
import pytest

from bridgeopt import Domain, LineLoad, Material, PointLoad, Problem, Support, optimize_layout
from bridgeopt.files.proposal import Proposal
from bridgeopt.solver.adding import add_members, proven_gap
from bridgeopt.solver.elements import element_coefficients
from bridgeopt.solver.frame import Frame, frame_loads, frame_lp_data
from bridgeopt.solver.highs import (INF, entry_columns, solve_columns, stack_columns,
                                    triplet_columns, unit_columns)
from bridgeopt.solver.lp import column_entries, price_candidates
from bridgeopt.solver.lumping import line_load_shares
from bridgeopt.study.judge import unbalanced_nodes

ROOT = Path(__file__).resolve().parents[2]
WEIGHTLESS = Material("weightless", 1.0, 1.0, 0.0)


# ---------------------------------------------------------------- line-load lumping

@pytest.mark.parametrize("xs, xe", [(0.0, 40.0), (3.0, 27.5), (10.0, 20.0), (12.5, 13.0)])
def test_line_load_shares_keep_resultant_and_moment(xs, xe):
    """Shares of a unit load on [xs, xe]: sum = xe - xs, sum x share = (xe^2 - xs^2)/2 (statics)."""
    x = np.arange(0.0, 50.0, 10.0)
    share = line_load_shares(x, xs, xe)
    assert share.sum() == pytest.approx(xe - xs, rel=1e-14)
    assert (x * share).sum() == pytest.approx(0.5 * (xe * xe - xs * xs), rel=1e-13)
    assert np.all(share >= 0)


def test_line_load_shares_between_nodes_are_halves():
    """A load from node to node: half of each interval to either end (linear shape functions)."""
    x = np.array([0.0, 10.0, 25.0, 30.0])
    assert line_load_shares(x).tolist() == [5.0, 12.5, 10.0, 2.5]


def test_grid_and_frame_lump_a_line_load_alike():
    """The same nodes give the same lumped loads whether they are a grid or a frame."""
    p = Problem(domain=Domain.rectangle((0.0, 40.0), (0.0, 20.0)), spacing=10.0,
                material=WEIGHTLESS, supports=(Support((0.0, 0.0), "xz"),),
                line_loads=(LineLoad((0.0, 0.0), (40.0, 0.0), 2e5),),
                loads=(PointLoad((20.0, 10.0), (1e4, -3e4)),))
    from bridgeopt.solver.ground import build_grid
    from bridgeopt.solver.lumping import nodal_loads

    grid = build_grid(p)
    assert np.array_equal(nodal_loads(p, grid), frame_loads(p, grid.xz))
    assert nodal_loads(p, grid)[:, 1].sum() == pytest.approx(-40.0 * 2e5 - 3e4, rel=1e-14)


# ---------------------------------------------------------------- coefficients

def test_lp_columns_and_sensitivity_share_one_coefficient_function():
    """column_entries is element_coefficients scaled by the sense's cost factor."""
    nodes = np.array([[0, 0], [10, 0], [10, 8], [20, 11]], dtype=float)
    p = Problem(domain=Domain.rectangle((0.0, 20.0), (0.0, 20.0)), spacing=10.0,
                material=Material("steel-like", 355e6, 355e6, 7850.0),
                supports=(Support((0.0, 0.0), "xz"), Support((20.0, 11.0), "xz")),
                loads=(PointLoad((10.0, 0.0), (0.0, -1e6)),))
    data, _, _ = frame_lp_data(Frame(problem=p, nodes=nodes, start=[0, 1, 0, 2],
                                     end=[1, 2, 3, 3]))
    pair = np.arange(4)
    for sense in ("tension", "compression"):
        cost, rows, vals = column_entries(data, pair, sense)
        lx = data.xz[data.b, 0] - data.xz[data.a, 0]
        dz = data.xz[data.b, 1] - data.xz[data.a, 1]
        c2, v2 = element_coefficients(lx, dz, data.k[sense], sense, lx <= 1e-12)
        assert np.array_equal(cost, c2 * data.cost_scale[sense])
        assert np.array_equal(vals, v2)
        assert rows[1].tolist() == [2, 3, 4, 5]


# ---------------------------------------------------------------- sparse column sets

def test_column_sets_solve_a_small_lp():
    """min x + 2y, x + y = 3, x <= 1 (a column bound): x = 1, y = 2, objective 5 (by hand)."""
    cols = stack_columns(
        entry_columns([1.0], np.array([[0]]), np.array([[1.0]]), 1, upper=1.0),
        triplet_columns([0], [0], [1.0], shape=(1, 1), cost=2.0))
    res = solve_columns(cols, [3.0], [3.0])
    assert res.status == "optimal"
    assert res.x.tolist() == pytest.approx([1.0, 2.0], abs=1e-12)
    assert res.objective == pytest.approx(5.0, abs=1e-12)
    # without the second column the row cannot be met
    assert solve_columns(stack_columns(cols, unit_columns([0], 1, lower=0.0, upper=0.0)),
                         [3.0], [3.0]).status == "optimal"
    only = entry_columns([1.0], np.array([[0]]), np.array([[1.0]]), 1, upper=1.0)
    assert solve_columns(only, [3.0], [3.0]).status == "infeasible"


def test_entry_columns_drop_zeros_and_keep_order():
    cols = entry_columns([1.0, 2.0], np.array([[4, 1, 3], [0, 2, 5]]),
                         np.array([[1.0, 0.0, -1.0], [2.0, 3.0, 0.0]]), 6, lower=-INF)
    assert cols.matrix.nnz == 4
    assert cols.matrix.indices.tolist() == [4, 3, 0, 2]
    assert cols.lower.tolist() == [-INF, -INF] and cols.upper.tolist() == [INF, INF]


def test_judge_balance_check_builds_no_dense_matrix(monkeypatch):
    """A 2 x 200-node chain without diagonals is a mechanism; the check finds it sparsely."""
    n = 200
    x = np.repeat(np.arange(n, dtype=float) * 10.0, 2)
    z = np.tile([0.0, 10.0], n)
    nodes = np.column_stack([x, z])
    low, high = np.arange(0, 2 * n, 2), np.arange(1, 2 * n, 2)
    start = np.concatenate([low[:-1], high[:-1], low])
    end = np.concatenate([low[1:], high[1:], high])
    span = 10.0 * (n - 1)
    p = Problem(domain=Domain.rectangle((0.0, span), (0.0, 10.0)), spacing=10.0,
                material=WEIGHTLESS, supports=(Support((0.0, 0.0), "xz"),
                                               Support((span, 0.0), "z")),
                loads=(PointLoad((10.0 * (n // 2), 0.0), (0.0, -1e6)),))
    proposal = Proposal(nodes=nodes, start=start, end=end, senses=np.full(len(start), "either"),
                        group=np.full(len(start), "member"),
                        ids=tuple(str(i) for i in range(2 * n)), source="test")

    def no_dense(*args, **kwargs):
        raise AssertionError("a dense identity matrix was built")

    monkeypatch.setattr(np, "eye", no_dense)
    bad = unbalanced_nodes(p, proposal)
    assert bad, "a panel chain without diagonals is a mechanism"


# ---------------------------------------------------------------- the driver

class _Toy:
    """Columns j = 0..5 carry x_j toward the row sum x = 1 at cost c_j; the LP picks the cheapest.

    Dual u of the row is the cheapest cost in the LP; a column out of it violates
    the check when u > c_j (its ratio u / c_j), so member adding ends at min c.
    """

    cost = np.array([5.0, 4.0, 3.0, 2.0, 1.5, 1.0])

    def __init__(self):
        self.in_lp = np.zeros((6, 1), dtype=bool)
        self.solves = 0

    def add(self, pair, group):
        self.in_lp[pair, group] = True

    def solve(self):
        self.solves += 1
        self.u = self.cost[self.in_lp[:, 0]].min() if self.in_lp.any() else None
        return "optimal" if self.u is not None else "infeasible"

    def price(self):
        out = ~self.in_lp[:, 0] & (self.u > self.cost * (1 + 1e-7))
        if not out.any():
            return None
        pair = np.nonzero(out)[0]
        return pair, np.zeros(len(pair), dtype=int), self.u / self.cost[pair]


def test_driver_widens_the_start_and_adds_until_no_column_violates():
    toy = _Toy()
    reach = np.array([2, 2, 3, 4, 5, 6])     # no pair of reach 1: the start must widen
    result = add_members(toy, reach, batch=1)
    assert result.status == "optimal" and result.gap == 0.0
    assert toy.u == 1.0                       # the cheapest column is found
    # widen 1 -> 2 (two solves), then one column per round, most violated first
    assert result.rounds == toy.solves
    assert toy.in_lp[:, 0].tolist() == [True, True, False, False, False, True]


def test_driver_stops_at_the_proven_gap():
    toy = _Toy()
    result = add_members(toy, np.ones(6, dtype=int) * 2, seed=np.array([4]), gap_tol=0.5)
    # seeded with c = 1.5 (u = 1.5); the best out has ratio 1.5: gap 1/3 <= 0.5, stop
    assert result.gap == pytest.approx(proven_gap(1.5)) == pytest.approx(1 / 3)
    assert result.rounds == 1


def test_single_case_pricing_finds_nothing_at_the_optimum():
    """At the full ground-structure optimum no column violates the dual check (LP duality)."""
    p = Problem(domain=Domain.rectangle((0.0, 40.0), (0.0, 20.0)), spacing=10.0,
                material=WEIGHTLESS, supports=(Support((0.0, 0.0), "xz"),
                                               Support((40.0, 0.0), "xz")),
                loads=(PointLoad((20.0, 0.0), (0.0, -1e6)),))
    from bridgeopt.solver.layout import solve_layout_lp

    _, _, data, sol, _ = solve_layout_lp(p, member_adding=False)
    in_lp = np.zeros((len(data.a), 2), dtype=bool)
    assert price_candidates(data, in_lp, sol.duals) is None
    assert optimize_layout(p).volume == pytest.approx(optimize_layout(
        p, member_adding=False).volume, rel=1e-9)


# ---------------------------------------------------------------- layout of the package

def test_moved_names_stay_importable():
    from bridgeopt.geometry import NodeMoves, default_moves, optimize_geometry  # noqa: F401
    from bridgeopt.geometry.optimize import NodeMoves as again  # noqa: F401
    from bridgeopt.solver.layout import nodal_loads, restrained_rows  # noqa: F401
    from bridgeopt.solver.multicase import (MAX_FULL_COLUMNS, CaseDesign,  # noqa: F401
                                            optimize_cases, single_case_reference)

    assert again is NodeMoves


@pytest.mark.parametrize("package, allowed", [
    ("solver", {"errors", "cautions", "model", "solver"}),
    ("geometry", {"errors", "cautions", "model", "solver", "geometry"})])
def test_core_modules_import_only_lower_layers_and_no_private_names(package, allowed):
    for path in sorted((ROOT / "bridgeopt" / package).glob("*.py")):
        text = path.read_text()
        assert len(text.splitlines()) <= 420, f"{path.name} is over about 400 lines"
        for node in ast.walk(ast.parse(text)):
            if isinstance(node, ast.ImportFrom) and node.module and \
                    node.module.startswith("bridgeopt."):
                assert node.module.split(".")[1] in allowed, (path.name, node.module)
                private = [a.name for a in node.names if a.name.startswith("_")]
                assert not private, (path.name, node.module, private)
