"""Inclined suspension hangers leaning further than one panel: a continuation of the node moves.

The free stage of the suspension form moves each hanger's cable node along x,
towards the tower, within ``hanger_lean`` panels of its deck point.  With a
box wider than a panel the cable nodes near the tower run into their
neighbours (a move that puts a cable node past its neighbour is refused) and
the sequential-LP moves stall (1.807 at 5 km whatever the box from 4 panels,
docs/benchmarks.md).  Here the moves are restarted from where they stopped,
round after round, each cable node's x box re-set from its neighbours' new
places: from :data:`NODE_GAP` of a panel past the cable node nearer the tower
(or the tower line), but no further than ``lean`` panels from its deck point,
to the least lean short of its deck point's vertical (and short of the next
cable node).  The other free dimensions (cable heights, tower height, sag)
keep their bounds, shifted by the move made.

What the continuation finds (docs/benchmarks.md, "Suspension: hanger net and
lean continuation"): the hangers lean the whole box, and the cable nodes
nearest the tower gather at the tower top, their hangers becoming stays from
there: with a wide box the form turns into a hybrid of a suspension bridge and
a cable-stayed fan, not a classic suspension bridge.
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np

from bridgeopt.forms.builder import deck_level
from bridgeopt.forms.specs import MAX_LEAN
from bridgeopt.forms.suspension import LEAN_GAP, least_lean
from bridgeopt.geometry.moves import NodeMoves
from bridgeopt.model.limits import SPAN, checked_number, checked_whole
from bridgeopt.solver.design import Design
from bridgeopt.solver.frame import Frame

__all__ = ["MAX_ROUNDS", "NODE_GAP", "NODE_GAP_MAX", "PANEL", "ROUNDS", "ROUND_GAIN",
           "lean_continuation", "relean_moves"]

#: Least x distance from a cable node to the one nearer the tower (or the tower line),
#: as a part of the hanger panel, in the continuation. [-]
NODE_GAP = 0.1
#: Largest ``node_gap`` accepted: short of a whole panel, so the nodes can still lean. [-]
NODE_GAP_MAX = 0.99
#: Hanger panel lengths accepted (from a millimetre to the longest span). [m]
PANEL = (1e-3, SPAN[1])
#: Most rounds of the continuation. [-]
ROUNDS = 12
#: Most rounds accepted as an input. [-]
MAX_ROUNDS = 100
#: The continuation stops when a round gains less than this part of the volume. [-]
ROUND_GAIN = 1e-4

_LEAN = "hanger lean "


def _check(*, lean: float, node_gap: float, panel: float = 1.0) -> None:
    """Range checks of the continuation's inputs: a clear error naming the input."""
    checked_number("lean", lean, low=LEAN_GAP, high=MAX_LEAN, unit="panels")
    checked_number("node_gap", node_gap, low=0.0, high=NODE_GAP_MAX, unit="panels")
    checked_number("panel", panel, low=PANEL[0], high=PANEL[1], unit="m")


def _lean_nodes(moves: NodeMoves) -> list[tuple[int, int]]:
    """(parameter, cable node) of every hanger-lean parameter of ``moves``."""
    out = []
    for j, name in enumerate(moves.names):
        if name.startswith(_LEAN):
            rows = np.nonzero(moves.T[:, j])[0]
            out.append((j, int(rows[0]) // 2))
    return out


def relean_moves(frame: Frame, moves: NodeMoves, shift: np.ndarray, *, lean: float,
                 panel: float, gap: float, tower_x: float,
                 node_gap: float = NODE_GAP) -> NodeMoves:
    """The free geometry of ``frame`` after a move ``shift`` of its parameters, boxes re-set.

    Parameters
    ----------
    frame : Frame
        The suspension form's frame at its moved geometry (``frame.moved(nodes)``).
    moves : NodeMoves
        Its free geometry before the move (names ``"hanger lean j"``, ``"cable height j"`` ...).
    shift : (k,) array
        The parameters' move from ``moves``' origin to ``frame``'s nodes. [m]
    lean : float
        Largest lean of a hanger: its cable node's offset from its deck point's
        vertical towards the tower, in panels (LEAN_GAP to MAX_LEAN). [-]
    panel : float
        Hanger spacing along the deck. [m]
    gap : float
        Least lean of a hanger (it never turns vertical). [m]
    tower_x : float
        x of the tower line. [m]
    node_gap : float
        Least x distance between a cable node and the one nearer the tower, in panels. [-]

    Returns
    -------
    NodeMoves
        Every bound shifted by ``shift``; each hanger-lean parameter's bounds
        re-set from the cable nodes' places in ``frame`` (0 always inside).

    Raises
    ------
    InputError
        ``lean`` not from :data:`~bridgeopt.forms.suspension.LEAN_GAP` to
        :data:`~bridgeopt.forms.specs.MAX_LEAN` panels, ``node_gap`` not from 0 to
        :data:`NODE_GAP_MAX`, ``panel`` outside :data:`PANEL`.
    """
    _check(lean=lean, node_gap=node_gap, panel=panel)
    lower = np.minimum(moves.lower - shift, 0.0)
    upper = np.maximum(moves.upper - shift, 0.0)
    nodes = frame.nodes
    cable = np.nonzero(frame.group == "cable")[0]
    ends = np.unique(np.r_[frame.start[cable], frame.end[cable]])
    cable_x = np.sort(nodes[ends, 0])
    hangers = np.nonzero(frame.group == "hanger")[0]
    for j, node in _lean_nodes(moves):
        x = nodes[node, 0]
        h = hangers[(frame.start[hangers] == node) | (frame.end[hangers] == node)]
        if len(h) != 1:
            continue
        deck = frame.end[h[0]] if frame.start[h[0]] == node else frame.start[h[0]]
        xd = nodes[deck, 0]
        before = cable_x[cable_x < x - 0.5 * gap]
        after = cable_x[cable_x > x + 0.5 * gap]
        nearer = before.max() if len(before) else tower_x
        low = max(xd - lean * panel, nearer + node_gap * panel, tower_x + gap)
        high = xd - gap
        if len(after):
            high = min(high, after.min() - node_gap * panel)
        lower[j] = min(low - x, 0.0)
        upper[j] = max(high - x, 0.0)
    return NodeMoves(T=moves.T, lower=lower, upper=upper, names=moves.names)


def lean_continuation(frame: Frame, moves: NodeMoves, best: Design,
                      polish: Callable[[Frame, NodeMoves, Design], Design], *, lean: float,
                      node_gap: float = NODE_GAP, rounds: int = ROUNDS) -> Design:
    """The suspension form's free stage restarted round by round, the lean boxes re-set.

    Parameters
    ----------
    frame : Frame
        The free stage's frame at its starting geometry.
    moves : NodeMoves
        Its free geometry (with ``"hanger lean j"`` parameters).
    best : Design
        The lightest design so far on ``frame``'s members (the free stage's result).
    polish : callable
        ``polish(frame, moves, best) -> Design``: the node moves from ``frame``,
        never heavier than ``best``.
    lean : float
        Largest lean of a hanger, in panels (the panel: the hangers' deck spacing). [-]
    node_gap : float
        As :func:`relean_moves`. [-]
    rounds : int
        Most rounds. [-]

    Returns
    -------
    Design
        Never heavier than ``best``.

    Raises
    ------
    InputError
        ``lean`` or ``node_gap`` as :func:`relean_moves`; ``rounds`` not a whole number
        from 0 to :data:`MAX_ROUNDS`.
    """
    _check(lean=lean, node_gap=node_gap)
    checked_whole("rounds", rounds, low=0, high=MAX_ROUNDS)
    if not _lean_nodes(moves):
        return best
    hangers = frame.group == "hanger"
    ends = np.r_[frame.start[hangers], frame.end[hangers]]
    zd = deck_level(frame.problem)[2]
    on_deck = np.abs(frame.nodes[ends, 1] - zd) <= 1e-9 * max(1.0, abs(zd)) + 1e-6
    deck_x = np.unique(frame.nodes[ends[on_deck], 0])
    panel = float(np.diff(deck_x).min())
    gap = least_lean(frame.problem, panel)
    tower_x = deck_level(frame.problem)[0]
    for _ in range(rounds):
        if best.nodes.shape != frame.nodes.shape:
            break
        shift = np.linalg.lstsq(moves.T, (best.nodes - frame.nodes).ravel(), rcond=None)[0]
        frame = frame.moved(best.nodes)
        moves = relean_moves(frame, moves, shift, lean=lean, panel=panel, gap=gap,
                             tower_x=tower_x, node_gap=node_gap)
        design = polish(frame, moves, best)
        gain = 1.0 - design.volume / best.volume
        if design.volume < best.volume:
            best = design
        if gain < ROUND_GAIN:
            break
    return best
