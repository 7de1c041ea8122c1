"""The cable-stayed form with a forked pylon (``pylon = "forked"``, bridgeopt.forms.forked).

Weightless closed form (statics derived here; common practice, the method of
joints of a pin-jointed frame).  A mast stands at x = 0 (a mirror line, its
foot held vertically) from (0, 0) to (0, H); a straight leg runs from the foot
to the head (l, h), and a head tie from the head to the mast top.  Every deck
point x_i (loads P_i, hat-lumped from w: w a/n inside, w a/(2n) at the free
end x_n = a) hangs from the head by one straight stay.  Stay i carries P_i up
with force P_i L_i/h, L_i^2 = (x_i - l)^2 + h^2: volume P_i L_i^2/(h sigma); it
pulls its deck point towards x = l by P_i (l - x_i)/h, so deck segment j (from
x_{j-1} to x_j) carries H_j = sum_{i >= j} P_i (l - x_i)/h (the free end takes
nothing, the mirror line at x = 0 the rest).  At the head the stays pull
(X, -P) with X = sum P_i (x_i - l)/h, P = sum P_i; the leg pushes alpha (l, h)
and the tie pulls beta (-l, H - h), so

    alpha = (P - X (H - h)/l) / H,   beta = alpha + X/l,

and the mast carries beta (H - h) over its height H.  Hence

    sigma V = sum P_i L_i^2/h + sum |H_j| dx + alpha (l^2 + h^2)
              + beta (l^2 + (H - h)^2) + beta (H - h) H.
"""

from __future__ import annotations

import itertools

import numpy as np
import pytest

from bridgeopt import (PRESETS, BridgeScenario, Domain, InputError, LineLoad, Material, Problem,
                       Support, optimize_layout)
from bridgeopt.forms import CableStayedForm, form_problem, parse_form, solve_form
from bridgeopt.forms.builder import FrameBuilder
from bridgeopt.forms.forked import candidate_frame, forked_frame
from bridgeopt.solver.frame import Frame, size_frame
from helpers import assert_equilibrium

A = 120.0        # deck length served by the pylon [m]
N = 10           # deck grid steps
W = 2.0e5        # deck load [N/m]
SIGMA = 300e6    # design stress [Pa]
WEIGHTLESS = Material("weightless", SIGMA, SIGMA, 0.0)
L_HEAD, H_HEAD, H_MAST = 0.45 * A, 0.5 * A, 0.7 * A   # the head between two deck points


def cantilever() -> Problem:
    """Pylon line x = 0 a mirror line, pylon foot held vertically, deck end x = a free."""
    return Problem(domain=Domain.rectangle((0.0, A), (0.0, A)), spacing=A / N,
                   material=WEIGHTLESS, supports=(Support((0.0, 0.0), "z"),),
                   line_loads=(LineLoad((0.0, 0.0), (A, 0.0), W),), mirror_lines=(0.0,))


def head_fan_volume(l: float, h: float, H: float) -> float:  # noqa: E741 (the docstring's l)
    """sigma V / sigma of the module docstring's frame. [m3]"""
    x = A * np.arange(1, N + 1) / N
    p = np.full(N, W * A / N)
    p[-1] *= 0.5
    stays = np.sum(p * ((x - l) ** 2 + h * h) / h)
    pull = p * (l - x) / h
    deck = np.sum(np.abs(np.cumsum(pull[::-1])[::-1]) * A / N)
    X, P = np.sum(p * (x - l) / h), p.sum()
    alpha = (P - X * (H - h) / l) / H
    beta = alpha + X / l
    assert alpha > 0 and beta > 0          # the leg in compression, the tie in tension
    return (stays + deck + alpha * (l * l + h * h) + beta * (l * l + (H - h) ** 2)
            + beta * (H - h) * H) / SIGMA


def vertical_fan_volume(h: float) -> float:
    """V_n of the discrete fan from the top of a vertical pylon of height h (statics in
    tests/validation/test_cable_stayed_closed_forms.py, derived there). [m3]"""
    return W / SIGMA * (2 * A ** 3 / (3 * h) * (1 + 1 / (2 * N * N))
                        + 2 * h * A * (1 - 1 / (2 * N)))


def test_a_fan_from_the_leg_head_matches_the_closed_form():
    problem = cantilever()
    b = FrameBuilder(problem)
    foot, top, head = b.node(0.0, 0.0), b.node(0.0, H_MAST), b.node(L_HEAD, H_HEAD)
    b.member(foot, top, "compression", "pylon")
    b.member(foot, head, "compression", "pylon leg")
    b.member(head, top, "tension", "head tie")
    for i in range(1, N + 1):
        b.member(head, b.node(i * A / N, 0.0), "tension", "stay")
    b.deck()
    design = size_frame(b.build()[0])
    assert_equilibrium(design)
    assert design.volume == pytest.approx(head_fan_volume(L_HEAD, H_HEAD, H_MAST), rel=1e-9)


def test_the_chosen_stays_are_never_heavier_than_either_fan():
    """The LP's choice includes the fan from the mast top and the fan from the leg head."""
    problem = cantilever()
    kw = dict(pylons_x=[0.0], reach=A, height=H_MAST)
    cand = size_frame(candidate_frame(problem, lean=L_HEAD, head=H_HEAD, **kw))
    assert cand.volume <= head_fan_volume(L_HEAD, H_HEAD, H_MAST) * (1 + 1e-9)
    assert cand.volume <= vertical_fan_volume(H_MAST) * (1 + 1e-9)
    frame, moves = forked_frame(problem, lean=L_HEAD, head=H_HEAD, anchor_bounds=(1.0, A), **kw)
    chosen = size_frame(frame)
    assert_equilibrium(chosen)
    # dropping the stays that carry nothing changes nothing
    assert chosen.volume == pytest.approx(cand.volume, rel=1e-7)
    assert len(frame) < len(candidate_frame(problem, lean=L_HEAD, head=H_HEAD, **kw))
    assert any("leg lean" in n for n in moves.names)
    assert any("leg head height" in n for n in moves.names)


def steel(span: float, divisions: int = 12, **changes) -> BridgeScenario:
    base = dict(span=span, rise=0.5 * span, depth=0.0, deck_load=2e5,
                material=PRESETS["steel"], arrangement="repeating", divisions=divisions)
    base.update(changes)
    return BridgeScenario(**base)


@pytest.mark.parametrize("span", [1000.0, 5000.0])
def test_forked_pylon_against_the_reference_on_a_small_grid(span):
    b = steel(span)
    spec = CableStayedForm(pylon="forked")
    ref = optimize_layout(form_problem(b, spec))
    r = solve_form(b, spec, reference=ref)
    assert_equilibrium(r.design)                       # independent nodal balance
    assert r.volume <= r.start_volume * (1 + 1e-12)    # never heavier than its start
    assert r.ratio >= 1.0                              # the reference bounds it
    groups = set(r.design.members.group.tolist())
    assert {"stay", "pylon", "pylon leg", "head tie", "deck"} <= groups
    assert 0 < r.geometry["leg_lean"] < 0.5 * span
    assert 0 < r.geometry["leg_head_height"] <= 0.5 * span * (1 + 1e-9)
    assert r.dimensions["start_pattern"] == "chosen"
    assert "moved from the stays the LP chose" in r.summary()
    # straight stays end at the deck's grid points (no deck slide)
    m = r.design.members
    stay = m.group == "stay"
    low = np.where(r.design.nodes[m.start[stay], 1] < r.design.nodes[m.end[stay], 1],
                   m.start[stay], m.end[stay])
    steps = r.design.nodes[low, 0] / b.spacing
    np.testing.assert_allclose(steps, np.round(steps), atol=1e-9)


@pytest.mark.parametrize("span, divisions", [(1000.0, 6), (5000.0, 8)])
def test_a_ground_structure_with_the_forms_nodes_bounds_it_on_a_coarse_grid(span, divisions):
    """On a coarse grid the form's off-grid leg heads and anchors can beat the grid reference
    (solve_form warns); the least-volume structure over every pair of the grid nodes and the
    form's own nodes contains the form's members, so it bounds the form (LP duality, Dorn,
    Gomory and Greenberg 1964)."""
    b = steel(span, divisions)
    r = solve_form(b, CableStayedForm(pylon="forked"), compare=False)
    problem = r.design.problem
    s = problem.spacing
    x0, x1, z0, z1 = problem.domain.bounds
    grid = [(x0 + i * s, z0 + j * s) for i in range(round((x1 - x0) / s) + 1)
            for j in range(round((z1 - z0) / s) + 1)]
    nodes = np.array(sorted({tuple(np.round(p, 6)) for p in [*grid, *r.design.nodes]}))
    pairs = np.array(list(itertools.combinations(range(len(nodes)), 2)))
    bound = size_frame(Frame(problem=problem, nodes=nodes, start=pairs[:, 0], end=pairs[:, 1]))
    assert bound.volume <= r.volume * (1 + 1e-7)


def test_a_single_span_forked_pylon_is_bounded_by_its_reference():
    b = steel(1000.0, arrangement="single", back_span=200.0)
    r = solve_form(b, CableStayedForm(pylon="forked"))
    assert_equilibrium(r.design)
    assert r.ratio >= 1.0
    assert "back stay" in set(r.design.members.group.tolist())


@pytest.mark.parametrize("raw, key", [
    ({"pylon": "tilted"}, "form.pylon"),
    ({"pylon": "forked", "stays": 4}, "form.stays"),
    ({"pylon": "forked", "span_to_height": 3.0}, "form.span_to_height"),
    ({"pylon": "forked", "anchors": "pattern"}, "form.anchors"),
    ({"pylon": "forked", "pattern": "semi-fan", "anchor_zone": 0.3}, "form.anchor_zone"),
])
def test_bad_pylon_keys_name_the_key(raw, key):
    with pytest.raises(InputError) as err:
        parse_form({"type": "cable-stayed", **raw})
    assert err.value.field == key


def test_the_pylon_key_reads_from_a_form_table():
    spec = parse_form({"type": "cable-stayed", "pylon": "forked"})
    assert spec.pylon == "forked" and spec.to_dict()["pylon"] == "forked"
    assert parse_form({"type": "cable-stayed"}).pylon == "vertical"


def test_the_forked_table_leaves_out_the_unused_pattern_and_round_trips():
    """A forked pylon's [form] table shows only keys that act on it (CLI summary, JSON)."""
    from bridgeopt.forms.specs import parse_form

    spec = CableStayedForm(pylon="forked")
    table = spec.to_dict()
    assert "pattern" not in table and "anchors" not in table and table["pylon"] == "forked"
    assert parse_form(table) == spec
