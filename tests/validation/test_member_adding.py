"""Member adding must reach the full ground-structure optimum, with self-weight too.

Source: M. Gilbert, A. Tyas (2003), "Layout optimization of large-scale
pin-jointed frames", Engineering Computations 20(8):1044-1064: adding the
members whose dual check is violated, round by round, until none is, gives
the optimum of the full ground structure (LP column generation: an optimal
restricted LP whose duals price every omitted column non-negatively is optimal
for the full LP).  It follows that member adding and the full LP must also agree
when no structure exists: both must report the problem as infeasible.

The cases are half spans of a repeating steel bridge with self-weight (k L
about 0.4 to 0.65 on the half span) on coarse grids, where the full LP is small.
For some of them the nearest-neighbour start of member adding cannot carry the
load at all, or only with absurdly large forces; the method must then widen its
start, not give up.
"""

from __future__ import annotations

import pytest

from bridgeopt import (Domain, LineLoad, Material, PRESETS, Problem, SolveError, Support,
                       optimize_layout)
from helpers import assert_optimal_design

STEEL = PRESETS["steel"]
WEIGHTLESS = Material("weightless", 355e6, 355e6, 0.0)


def half_span(width: float, cells: int, up: int, down: int, material=STEEL) -> Problem:
    """Half span x in [0, width] with a mirror line at x = width, grid step width/cells.

    Pier line x = 0: pinned at deck level (0, 0) and held vertically at the
    bottom of the domain, ``down`` steps below the deck; the domain reaches
    ``up`` steps above the deck.  Deck load 200 kN/m on z = 0.
    """
    s = width / cells
    return Problem(domain=Domain.rectangle((0.0, width), (-down * s, up * s)), spacing=s,
                   material=material,
                   supports=(Support((0.0, 0.0), "xz"), Support((0.0, -down * s), "z")),
                   line_loads=(LineLoad((0.0, 0.0), (width, 0.0), 2e5),),
                   mirror_lines=(width,), copies=2.0)


CASES = {
    "1500m-12x4": (1500.0, 12, 2, 2),
    "2500m-12x6": (2500.0, 12, 2, 4),
    "2000m-16x6": (2000.0, 16, 2, 4),
    "3000m-16x8": (3000.0, 16, 6, 2),
    "3000m-12x4": (3000.0, 12, 2, 2),
}


def _outcome(problem, member_adding):
    try:
        return optimize_layout(problem, member_adding=member_adding)
    except SolveError as err:
        return err


@pytest.mark.parametrize("name", sorted(CASES))
def test_member_adding_matches_full_ground_structure_with_self_weight(name):
    """Same optimum (relative 1e-7), or the same infeasibility, as the full LP (Gilbert & Tyas 2003)."""
    prob = half_span(*CASES[name])
    full = _outcome(prob, False)
    added = _outcome(prob, True)
    if isinstance(full, SolveError):
        assert isinstance(added, SolveError), "member adding found a layout the full LP did not"
        assert (added.status, full.status) in {("infeasible", "infeasible"),
                                               ("span-limit", "span-limit")}, \
            f"full LP: {full.status} ({full}); member adding: {added.status} ({added})"
        return
    assert not isinstance(added, SolveError), \
        f"full LP optimum {full.volume:.10g} m3, but member adding raised: {added.status}: {added}"
    assert added.volume == pytest.approx(full.volume, rel=1e-7)
    assert_optimal_design(added)
    assert_optimal_design(full)


@pytest.mark.parametrize("name", ["2000m-16x6", "3000m-16x8"])
def test_member_adding_weightless_counterpart(name):
    """The same geometry without self-weight: member adding = full LP (Gilbert & Tyas 2003)."""
    prob = half_span(*CASES[name], material=WEIGHTLESS)
    full = optimize_layout(prob, member_adding=False)
    added = optimize_layout(prob, member_adding=True)
    assert added.volume == pytest.approx(full.volume, rel=1e-7)
