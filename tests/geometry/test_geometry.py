"""Geometry optimization: sensitivities, rules and failure paths.

Check values: finite differences of the LP optimum (the envelope theorem of
linear programming, common practice); hand-built frames whose optimum is known
from statics derived in each docstring.
"""

from __future__ import annotations

import copy

import numpy as np
import pytest

from bridgeopt import Domain, InputError, LineLoad, Material, PointLoad, Problem, Support
from bridgeopt.solver.frame import Frame, frame_from_design, frame_lp_data, size_frame
from bridgeopt.geometry.optimize import NodeMoves, default_moves, optimize_geometry
from bridgeopt.solver.lp import solve_lp
from bridgeopt.geometry.sensitivity import volume_gradient
from bridgeopt.geometry.topology import simplify
from helpers import assert_equilibrium

STEEL = Material("steel-like", 355e6, 355e6, 7850.0)
WEIGHTLESS = Material("weightless", 1.0, 1.0, 0.0)


def _deck_problem(material) -> Problem:
    """A 40 m x 20 m box, pinned at both deck ends, a uniform load on the deck (z = 0)."""
    return Problem(domain=Domain.rectangle((0.0, 40.0), (0.0, 20.0)), spacing=10.0,
                   material=material, supports=(Support((0.0, 0.0), "xz"),
                                                Support((40.0, 0.0), "xz")),
                   line_loads=(LineLoad((0.0, 0.0), (40.0, 0.0), 1e5),))


def _arch_frame(material) -> Frame:
    """Deck nodes every 10 m, an arch of 3 nodes above them: hangers, arch, deck and diagonals."""
    nodes = np.array([[0, 0], [10, 0], [20, 0], [30, 0], [40, 0],
                      [10, 8], [20, 11], [30, 8]], dtype=float)
    start = [0, 5, 6, 7, 1, 2, 3, 0, 1, 2, 3, 1, 2, 2, 3]
    end = [5, 6, 7, 4, 5, 6, 7, 1, 2, 3, 4, 6, 5, 7, 6]
    return Frame(problem=_deck_problem(material), nodes=nodes, start=start, end=end)


@pytest.mark.parametrize("material", [WEIGHTLESS, STEEL], ids=["weightless", "self-weight"])
def test_volume_gradient_matches_finite_differences(material):
    """dV*/dX from forces and duals against one-sided differences of the re-solved LP.

    Where V* is smooth both differences agree with the gradient; at a kink (a
    degenerate LP, common in weightless layouts) the envelope-theorem value lies
    between the left and right derivatives.
    """
    frame = _arch_frame(material)
    nodes = frame.nodes.copy()
    nodes[2, 0] += 1.0          # deck node off its grid point: its load share moves too
    nodes[6] += (0.7, -0.4)
    frame = frame.moved(nodes)
    data, _, refs = frame_lp_data(frame)
    grad = volume_gradient(frame.problem, data, solve_lp(data, member_adding=False))
    h = 1e-6
    smooth = 0
    # x of deck node 2, z of arch node 5, x and z of arch node 6, z of arch node 7 (the
    # x of a node on a vertical hanger moves only with the hanger's other end)
    for coord in (4, 11, 12, 13, 15):
        vols = []
        for sign in (1, 0, -1):
            moved = nodes.copy().ravel()
            moved[coord] += sign * h * refs[0]
            vols.append(solve_lp(frame_lp_data(frame.moved(moved.reshape(-1, 2)))[0],
                                 member_adding=False).objective)
        right, left = (vols[0] - vols[1]) / h, (vols[1] - vols[2]) / h
        tol = 1e-4 * max(1.0, abs(right), abs(left))
        assert min(left, right) - tol <= grad[coord] <= max(left, right) + tol
        if abs(right - left) <= tol:
            smooth += 1
            assert grad[coord] == pytest.approx(0.5 * (left + right), rel=1e-4, abs=1e-7)
    assert smooth >= 3


def test_node_pushed_against_the_domain_edge_stays_inside():
    """An apex whose best height lies above the domain stops on the top edge.

    Statics (common practice): a load P at (a, 0) midway between supports at (0, 0)
    and (2a, 0), hung by a vertical tie from an apex (a, h) that two struts carry to
    the supports.  Tie P h, struts 2 (P/2)(a^2 + h^2)/h (force times length), so
    V sigma = P h + P (a^2 + h^2)/h, least at h = a/sqrt(2).  The domain is only a/4
    high, so the apex ends on the edge, h = a/4, and V = 4.5 P a / sigma.
    """
    a, P = 10.0, 1.0
    problem = Problem(domain=Domain.rectangle((0.0, 2 * a), (0.0, a / 4)), spacing=a / 8,
                      material=WEIGHTLESS, supports=(Support((0.0, 0.0), "xz"),
                                                     Support((2 * a, 0.0), "xz")),
                      loads=(PointLoad((a, 0.0), (0.0, -P)),))
    frame = Frame(problem=problem, nodes=[[0, 0], [2 * a, 0], [a, 0], [a, a / 8]],
                  start=[0, 3, 2], end=[3, 1, 3])
    out = optimize_geometry(frame, merge=False)
    assert out.volume < size_frame(frame).volume
    apex = out.nodes[np.argmax(out.nodes[:, 1])]
    assert apex[1] == pytest.approx(a / 4, abs=1e-9)
    assert np.all(out.nodes[:, 1] <= a / 4 + 1e-12)
    assert out.volume == pytest.approx(4.5 * P * a, rel=1e-9)
    assert_equilibrium(out)


def test_two_close_nodes_merge_and_a_slack_member_goes():
    """Two nodes 1 mm apart merge; a member that carries nothing is dropped.

    Statics (common practice): a point load P at (a, -h) hung from supports (0, 0) and
    (2a, 0) by two ties; the node is doubled by a twin 1 mm away joined to it, and a
    horizontal bar between the supports carries no force (the supports take the thrust).
    """
    a, h, P = 10.0, 10.0, 1.0
    problem = Problem(domain=Domain.rectangle((0.0, 2 * a), (-h, 0.0)), spacing=a / 2,
                      material=WEIGHTLESS, supports=(Support((0.0, 0.0), "xz"),
                                                     Support((2 * a, 0.0), "xz")),
                      loads=(PointLoad((a, -h), (0.0, -P)),))
    nodes = [[0, 0], [2 * a, 0], [a, -h], [a + 1e-3, -h + 1e-3]]
    frame = Frame(problem=problem, nodes=nodes, start=[0, 3, 2, 0], end=[2, 1, 3, 1])
    design = size_frame(frame)
    assert len(design.members) == 3          # the support-to-support bar is slack
    tidy = simplify(design, merge_tolerance=0.01)
    assert tidy is not None and len(tidy.nodes) == 3 and len(tidy) == 2
    out = optimize_geometry(frame)
    assert len(out.nodes) == 3 and len(out.members) == 2
    # two ties at 45 degrees: V = 2 * (P/sqrt 2) * a sqrt 2 / sigma = 2 P a / sigma
    assert out.volume == pytest.approx(2 * P * a, rel=1e-9)


def test_pass_through_node_is_joined():
    """An unloaded node between two collinear bars adds nothing: the bars become one."""
    a, P = 10.0, 1.0
    problem = Problem(domain=Domain.rectangle((0.0, 2 * a), (-a, 0.0)), spacing=a / 2,
                      material=WEIGHTLESS, supports=(Support((0.0, 0.0), "xz"),
                                                     Support((2 * a, 0.0), "xz")),
                      loads=(PointLoad((a, -a), (0.0, -P)),))
    frame = Frame(problem=problem, nodes=[[0, 0], [2 * a, 0], [a, -a], [a / 2, -a / 2]],
                  start=[0, 3, 2], end=[3, 2, 1])
    tidy = simplify(size_frame(frame), merge_tolerance=0.0)
    assert tidy is not None and len(tidy) == 2 and len(tidy.nodes) == 3


def test_geometry_never_heavier_with_deck_sliding():
    frame = _arch_frame(STEEL)
    start = size_frame(frame)
    out = optimize_geometry(frame)
    assert out.volume <= start.volume * (1 + 1e-12)
    assert_equilibrium(out)
    deck = out.nodes[np.abs(out.nodes[:, 1]) < 1e-9]
    assert deck[:, 0].min() == pytest.approx(0.0) and deck[:, 0].max() == pytest.approx(40.0)


def test_given_moves_keep_the_topology():
    frame = _arch_frame(WEIGHTLESS)
    T = np.zeros((2 * len(frame.nodes), 1))
    T[2 * 6 + 1, 0] = 1.0                    # only the crown height moves
    moves = NodeMoves(T=T, lower=[-8.0], upper=[9.0], names=("crown",))
    out = optimize_geometry(frame, moves=moves)
    assert len(out.members) <= len(frame) and out.volume <= size_frame(frame).volume
    others = np.delete(out.nodes, np.argmax(out.nodes[:, 1]), axis=0)
    assert others.shape[0] == len(frame.nodes) - 1


def test_bad_options_are_named():
    frame = _arch_frame(WEIGHTLESS)
    with pytest.raises(InputError, match="merge_tolerance"):
        optimize_geometry(frame, merge_tolerance=-1.0)
    with pytest.raises(InputError, match="max_rounds"):
        optimize_geometry(frame, max_rounds=0)
    with pytest.raises(InputError, match="moves.lower"):
        NodeMoves(T=np.zeros((16, 1)), lower=[1.0], upper=[2.0])


def test_input_is_not_mutated():
    """The caller's own (writeable) arrays come back unchanged: a write into any of them
    would show here, not be stopped by a read-only flag."""
    template = _arch_frame(STEEL)
    nodes, start, end = (np.array(a) for a in (template.nodes, template.start, template.end))
    assert nodes.flags.writeable and start.flags.writeable and end.flags.writeable
    frame = Frame(problem=template.problem, nodes=nodes, start=start, end=end)
    moves = default_moves(frame)
    assert moves.T.flags.writeable and moves.lower.flags.writeable
    kept = copy.deepcopy((nodes, start, end, moves.T, moves.lower, moves.upper))
    before = frame.nodes.copy()
    design = size_frame(frame)
    design_before = copy.deepcopy((design.nodes, design.loads, design.members.volume,
                                   design.members.start, design.members.end, design.volume))
    optimize_geometry(frame, moves=moves)
    optimize_geometry(design)
    for now, then in zip((nodes, start, end, moves.T, moves.lower, moves.upper), kept):
        np.testing.assert_array_equal(now, then)
    for now, then in zip((design.nodes, design.loads, design.members.volume,
                          design.members.start, design.members.end, design.volume),
                         design_before):
        np.testing.assert_array_equal(now, then)
    assert np.array_equal(frame.nodes, before)
    assert not frame.nodes.flags.writeable


def test_frame_from_a_design_reproduces_its_volume():
    frame = _arch_frame(STEEL)
    design = size_frame(frame)
    again = size_frame(frame_from_design(design))
    assert again.volume == pytest.approx(design.volume, rel=1e-9)
