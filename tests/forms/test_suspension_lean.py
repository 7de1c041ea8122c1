"""Suspension form with hangers leaning past one panel: the lean continuation (forms/hangers.py).

Checks, each able to fail:

* the solved frame balances at every node with its self-weight, and every
  member's end forces balance its own weight (tests/helpers.py recomputes this
  from the end forces, loads and reactions, not from the solver's residual);
* the ratio to the reference optimum is >= 1, with and without self-weight (the
  reference is the least volume over a ground structure on the same supports and
  loads; below it would be a bug), and the form is never heavier than its start
  nor than the one-panel form (``hanger_lean = 1``, the default) it continues;
* every hanger leans towards the tower by at most ``hanger_lean`` panels, the deck
  points stay on the grid, and the cable nodes keep their order along the span;
* the re-set lean boxes (:func:`relean_moves`) hold the start (0 inside), keep a
  cable node :data:`NODE_GAP` of a panel past its neighbour nearer the tower and
  within ``lean`` panels of its deck point (checked without solving);
* a weightless parabolic cable with vertical hangers against its closed form:
  H = w L^2 / (8 f) (equal loads at equal spacings on the chord polygon of a
  parabola: the polygon is funicular, closed form), and the equal-strength cable's
  volume H/sigma * sum(l_i^2 / dx_i) over its chords; its continuous limit is
  w L^3 / (8 f sigma) * (1 + 16/3 (f/L)^2) per span (H/sigma * integral of
  (1 + z'^2) dx over the parabola z = 4 f x (L - x) / L^2; the form of
  Irvine 1981, Cable Structures, ch. 2, from memory; derived here), which the
  chord sum approaches from below by (16/3) f^2 h^2 / L^3 (the midpoint rule on
  the quadratic z'^2, h the panel).
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest

from bridgeopt import PRESETS, BridgeScenario
from bridgeopt.forms import SuspensionForm, form_problem, solve_form
from bridgeopt.forms.build import build_form
from bridgeopt.forms.hangers import NODE_GAP, relean_moves
from helpers import assert_equilibrium

STEEL = PRESETS["steel"]
LEAN = 3.0


def repeating(span: float = 1000.0, divisions: int = 12, material=STEEL) -> BridgeScenario:
    """Repeating spans, rise span/2 above the deck, no depth (issue 11's crossing, coarser)."""
    return BridgeScenario(span=span, rise=0.5 * span, depth=0.0, deck_load=2e5,
                          material=material, arrangement="repeating", divisions=divisions)


@pytest.fixture(scope="module")
def solved():
    """The one-panel form and the continuation to LEAN panels (about a minute on 2 cores)."""
    b = repeating()
    one = solve_form(b, SuspensionForm())
    lean = solve_form(b, SuspensionForm(hanger_lean=LEAN), reference=one.reference)
    return b, one, lean


def _hangers(design):
    """(deck x, cable x) of every hanger, from the tower outwards."""
    m = design.members
    h = np.nonzero(np.asarray(m.group) == "hanger")[0]
    z = design.nodes[:, 1]
    low = np.where(z[m.start[h]] < z[m.end[h]], m.start[h], m.end[h])
    high = np.where(low == m.start[h], m.end[h], m.start[h])
    order = np.argsort(design.nodes[low, 0])
    return design.nodes[low[order], 0], design.nodes[high[order], 0]


@pytest.mark.slow
def test_the_solved_frame_balances_with_its_self_weight(solved):
    _, _, lean = solved
    assert lean.design.weight > 0
    assert_equilibrium(lean.design)


@pytest.mark.slow
def test_ratio_at_least_one_and_never_heavier_than_the_one_panel_form(solved):
    _, one, lean = solved
    assert lean.ratio >= 1.0
    assert lean.volume <= lean.start_volume * (1 + 1e-12)
    # the continuation starts from the one-panel optimum and keeps only lighter designs
    assert lean.volume <= one.volume * (1 + 1e-9)


@pytest.mark.slow
def test_hangers_lean_within_the_box_and_the_cable_keeps_its_order(solved):
    b, _, lean = solved
    step = b.span / b.divisions
    deck_x, cable_x = _hangers(lean.design)
    assert len(deck_x) == b.divisions // 2
    assert np.allclose(deck_x / step, np.round(deck_x / step), atol=1e-9)   # on the grid
    tilt = deck_x - cable_x
    assert tilt.min() >= -1e-9 * step                    # towards the tower ...
    assert tilt.max() <= LEAN * step * (1 + 1e-9)        # ... at most hanger_lean panels
    assert tilt.max() > 1.0 * step                       # and past the one-panel box
    assert np.all(np.diff(cable_x) > 0)                  # no cable node passed another


def test_relean_moves_hold_the_start_and_the_gaps_without_solving():
    b = repeating(divisions=12)
    spec = SuspensionForm(shape="free", hanger_lean=1.0)
    problem = form_problem(b, spec)
    frame, moves = build_form(b, spec, problem)
    step = b.span / b.divisions
    lean = 2.5
    out = relean_moves(frame, moves, np.zeros(moves.size), lean=lean, panel=step,
                       gap=1e-3 * step, tower_x=0.0)
    assert np.all(out.lower <= 0) and np.all(out.upper >= 0)
    deck_x, cable_x = _hangers(size_like(frame))
    checked = 0
    for j, name in enumerate(out.names):
        if not name.startswith("hanger lean "):
            assert out.lower[j] == moves.lower[j] and out.upper[j] == moves.upper[j]
            continue
        node = int(np.nonzero(moves.T[:, j])[0][0]) // 2
        x = frame.nodes[node, 0]
        k = int(np.argmin(np.abs(cable_x - x)))
        nearer = cable_x[k - 1] if k else 0.0
        low, high = x + out.lower[j], x + out.upper[j]
        if out.lower[j] < 0:   # a box that opens keeps the gap and the largest lean
            assert low >= nearer + NODE_GAP * step - 1e-9 * step
            assert low >= deck_x[k] - lean * step - 1e-9 * step
        assert high <= deck_x[k] + 1e-9 * step
        checked += 1
    assert checked == b.divisions // 2 - 1   # every hanger but the mirror-line one


def size_like(frame):
    """A stand-in with the frame's nodes and members for :func:`_hangers`."""
    members = dataclasses.make_dataclass("M", ["group", "start", "end"])(
        frame.group, frame.start, frame.end)
    return dataclasses.make_dataclass("D", ["nodes", "members"])(frame.nodes, members)


def test_weightless_lean_form_stays_above_the_reference():
    weightless = dataclasses.replace(STEEL, density=0.0)
    b = repeating(divisions=12, material=weightless)
    r = solve_form(b, SuspensionForm(hanger_lean=LEAN))
    assert r.design.weight == 0
    assert r.ratio >= 1.0
    assert_equilibrium(r.design)


@pytest.mark.parametrize("divisions", [12, 40])
def test_weightless_parabolic_cable_against_its_closed_form(divisions):
    weightless = dataclasses.replace(STEEL, density=0.0)
    span, sag, tower = 1000.0, 200.0, 210.0
    b = repeating(span=span, divisions=divisions, material=weightless)
    spec = SuspensionForm(shape="parabolic", sag_ratio=sag / span, tower_height=tower,
                          hanger_lean=0.0)
    r = solve_form(b, spec, optimize=False, compare=False)
    w, sigma = b.deck_load, weightless.tension_strength
    h = span / divisions
    H = w * span**2 / (8 * sag)                                   # closed form, above
    x = np.arange(divisions + 1) * h
    z = 4 * sag * x * (span - x) / span**2
    chords = np.diff(x) ** 2 + np.diff(z) ** 2
    exact = H / sigma * np.sum(chords / np.diff(x))               # whole span
    cable = r.quantities["cable"]["volume_m3"]
    assert cable == pytest.approx(exact, rel=1e-6)
    continuous = w * span**3 / (8 * sag * sigma) * (1 + 16 / 3 * (sag / span) ** 2)
    midpoint = H / sigma * 16 / 3 * sag**2 * h**2 / span**3       # the chord sum's shortfall
    assert cable == pytest.approx(continuous - midpoint, rel=1e-6)
