"""Exploration: a suspension hanger net chosen by the frame LP, vertical towers (issue 11).

The acceptance crossing of bench/bench_form_ratios.py (repeating steel spans, rise
span/2, no depth, 30 divisions).  From the default suspension form's optimum
(``hanger_lean = 1``), the main cable's nodes are kept and candidate hangers run from
every cable node but the tower top to the deck grid points within REACH panels of
its x (``none``: to every deck point); the frame LP chooses among them.  Then, as
long as a round gains 1e-4, the cable nodes' heights, the tower height and each
cable node's x (between its two nearest deck points, so no hanger turns vertical)
are geometry-optimized and the candidates re-built from the new cable.

Usage::

    python bench/explore_hanger_net.py SPAN_M REACH [REACH ...] [--divisions N]   # REACH: panels or none
    python bench/explore_hanger_net.py SPAN_M --lean LEAN [...] [--gap NODE_GAP]

``--divisions`` (default 30, the acceptance crossing's) sets the grid; the hanger
panels are the default form's own (one hanger per cable node), so any even number
of divisions from 4 up works.

The second form solves the package's own suspension form with ``hanger_lean = LEAN``
(the lean continuation, bridgeopt/forms/hangers.py), its cable nodes at least
NODE_GAP panels apart (default :data:`bridgeopt.forms.hangers.NODE_GAP`).

Prints, per reach, the ratio to the reference at the start (LP choice on the
one-panel cable) and after the rounds, and the part of the reference volume in
each element group (whole span).  The figures quoted in docs/benchmarks.md
("Suspension: hanger net and lean continuation", idea 1) came from this loop.
"""

from __future__ import annotations

import logging
import sys

import numpy as np
from bench_form_ratios import crossing

import dataclasses

from bridgeopt import InputError, SolveError, optimize_layout
from bridgeopt.forms import SuspensionForm, form_problem, solve_form
from bridgeopt.forms.builder import FrameBuilder, deck_level
from bridgeopt.forms.suspension import least_lean
from bridgeopt.geometry.optimize import optimize_geometry
from bridgeopt.solver.frame import size_frame



def panels_of(cable: np.ndarray) -> int:
    """Hanger panels per half span of the default form: one hanger per cable node but the
    tower top."""
    return len(cable) - 1


def cable_of(design) -> np.ndarray:
    """The main cable's nodes, from the tower top to mid-span. [m]"""
    m = design.members
    sel = np.asarray(m.group) == "cable"
    idx = np.unique(np.r_[m.start[sel], m.end[sel]])
    return design.nodes[idx[np.argsort(design.nodes[idx, 0])]]


def net(problem, cable: np.ndarray, reach: float | None, rise: float, panels: int):
    """The candidate frame and its free geometry (cable heights, tower, cable node x)."""
    b = FrameBuilder(problem)
    xs, xe, zd = deck_level(problem)
    p = (xe - xs) / panels
    gap = least_lean(problem, p)   # as the suspension form's own
    xd = xs + p * np.arange(panels + 1)
    cable = cable.copy()
    for j in range(1, len(cable) - 1):   # off the deck points' verticals
        k = int(np.argmin(np.abs(xd - cable[j, 0])))
        if abs(xd[k] - cable[j, 0]) < gap:
            cable[j, 0] = xd[k] + (gap if k == 0 else -gap)
    base = b.node(xs, zd)
    b.foundation(xs, base)
    nodes = [b.node(x, z) for x, z in cable]
    b.member(base, nodes[0], "compression", "tower")
    for j in range(1, len(nodes)):
        for i in range(1, panels + 1):
            if reach is None or abs(xd[i] - cable[j, 0]) <= reach * p + 1e-9:
                b.member(nodes[j], b.node(xd[i], zd), "tension", "hanger")
    b.chain(nodes, "tension", "cable")
    b.deck()
    least = 0.01 * rise
    b.parameter("tower", least - (cable[0, 1] - zd), rise - (cable[0, 1] - zd),
                {(nodes[0], 1): 1.0})
    for j in range(1, len(nodes)):
        h = cable[j, 1] - zd
        b.parameter(f"cable height {j}", least - h, rise - h, {(nodes[j], 1): 1.0})
        if j < len(nodes) - 1:
            lo = max(xd[xd < cable[j, 0]].max(), cable[j - 1, 0]) + gap
            hi = xd[xd > cable[j, 0]].min() - gap
            b.parameter(f"cable x {j}", lo - cable[j, 0], hi - cable[j, 0],
                        {(nodes[j], 0): 1.0})
    frame, moves = b.build()
    return frame, moves, nodes


def parts(design, ref) -> dict:
    m = design.members   # half-model volumes: twice for the whole span
    return {g: round(2 * float(m.volume[np.asarray(m.group) == g].sum()) / ref.volume, 4)
            for g in ("cable", "hanger", "tower", "deck")}


def main(span: float, reaches, divisions: int = 30) -> None:
    if isinstance(divisions, bool) or divisions < 4 or divisions % 2:
        raise InputError("--divisions", divisions, "an even whole number >= 4 (the half span "
                         "needs at least 2 hanger panels)")
    logging.disable(logging.WARNING)
    bridge = dataclasses.replace(crossing(span), divisions=divisions)
    problem = form_problem(bridge, SuspensionForm())
    ref = optimize_layout(problem)
    one = solve_form(bridge, SuspensionForm(), reference=ref)
    panels = panels_of(cable_of(one.design))
    print(f"{span:g} m, {divisions} divisions ({panels} hanger panels per half span): one "
          f"hanger per cable node {one.ratio:.4f}")
    for reach in reaches:
        cable, best = cable_of(one.design), one.design
        frame, moves, nodes = net(problem, cable, reach, 0.5 * span, panels)
        start = size_frame(frame)
        for _ in range(8):
            try:
                d = optimize_geometry(frame, moves=moves)
            except SolveError as err:
                print(f"  round stopped: {err}")
                break
            gain = 1.0 - d.volume / best.volume
            if d.volume < best.volume:
                best, cable = d, d.nodes[nodes]
            if gain < 1e-4:
                break
            try:
                frame, moves, nodes = net(problem, cable, reach, 0.5 * span, panels)
            except SolveError:
                break
        print(f"  reach {reach if reach is not None else 'any'}: LP choice {start.volume / ref.volume:.4f}, "
              f"after the rounds {best.volume / ref.volume:.4f}, parts {parts(best, ref)}")


def leans(span: float, values, gap: float | None) -> None:
    from bridgeopt.forms import hangers

    logging.disable(logging.WARNING)
    if gap is not None:
        hangers.NODE_GAP = gap   # for the printout below
        # solve_form calls lean_continuation with its default node_gap, bound at definition
        hangers.lean_continuation.__kwdefaults__["node_gap"] = gap
    bridge = crossing(span)
    ref = optimize_layout(form_problem(bridge, SuspensionForm()))
    for lean in values:
        r = solve_form(bridge, SuspensionForm(hanger_lean=lean), reference=ref)
        print(f"{span:g} m: hanger_lean {lean:g}, node gap {hangers.NODE_GAP:g}: ratio "
              f"{r.ratio:.4f}", flush=True)


if __name__ == "__main__":
    args = sys.argv[2:]
    if args and args[0] == "--lean":
        gap = float(args[args.index("--gap") + 1]) if "--gap" in args else None
        vals = [float(a) for a in args[1:args.index("--gap") if "--gap" in args else None]]
        leans(float(sys.argv[1]), vals, gap)
    else:
        divisions = 30
        if "--divisions" in args:
            at = args.index("--divisions")
            divisions = int(args[at + 1])
            args = args[:at] + args[at + 2:]
        main(float(sys.argv[1]), [None if r == "none" else float(r) for r in args], divisions)
