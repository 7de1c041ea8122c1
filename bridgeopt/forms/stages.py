"""The geometry stages of a form: from its starting pattern to every free dimension.

:func:`improve_form` is the geometry part of :func:`bridgeopt.forms.solve.solve_form`.
Each stage moves nodes by :func:`~bridgeopt.geometry.optimize.optimize_geometry`
(sequential LP, restarted while it gains) and is kept only when it is lighter:
first the starting pattern's own dimensions (a pylon height; a funicular cable's
sag or rib's rise by a bounded scalar search, every trial an exact funicular),
then every free dimension (each stay's anchor, each cable or rib node's height,
the tower height and the hanger positions, with the lean continuation of
:mod:`bridgeopt.forms.hangers` for hangers leaning past one panel).

References
----------
.. [1] L. He, M. Gilbert (2015), "Rationalization of trusses generated via layout
   optimization", Struct. Multidisc. Optim. 52:677-694 (geometry optimization).
"""

from __future__ import annotations

import dataclasses
import logging

import numpy as np

from bridgeopt.errors import InputError, SolveError
from bridgeopt.forms.build import build_form
from bridgeopt.forms.builder import deck_level
from bridgeopt.forms.hangers import lean_continuation
from bridgeopt.forms.quantities import form_geometry
from bridgeopt.forms.specs import ArchForm, CableStayedForm, FormSpec, SuspensionForm
from bridgeopt.geometry.optimize import NodeMoves, optimize_geometry
from bridgeopt.solver.design import Design
from bridgeopt.solver.frame import Frame, size_frame

__all__ = ["improve_form", "RESTART_GAIN", "RESTARTS"]

log = logging.getLogger(__name__)


def _funicular_search(bridge, spec, problem, moves, start: Design) -> Design:
    """The lightest exactly funicular form over the free sag (rise), by a bounded scalar search.

    A funicular profile belongs to one sag: moved to another it is no longer
    funicular, and the LP pays for the mismatch with ballast, so node moves from
    a funicular stop at its own sag.  Here every trial sag gets its own exact
    funicular, sized by the LP; a free tower height follows the sag at the least
    clearance (shorter towers and hangers are lighter; the cable is unchanged).
    """
    from scipy.optimize import minimize_scalar

    key = "sag" if isinstance(spec, SuspensionForm) else "rise"
    if key not in moves.names:
        return start
    j = moves.names.index(key)
    now = form_geometry(start, spec.type, deck_level(problem)[2])[key]
    low, high = now + moves.lower[j], now + moves.upper[j]
    found: dict[float, Design] = {}

    def volume(value: float) -> float:
        try:
            frame, _ = build_form(bridge, spec, problem, start={key: value, "tower_height": 0.0})
            found[value] = size_frame(frame)
        except (SolveError, InputError):
            return 1e3 * start.volume  # finite, so the bounded search's arithmetic stays clean
        return found[value].volume

    minimize_scalar(volume, bounds=(low, high), method="bounded",
                    options={"xatol": 1e-5 * bridge.span})
    if not found:
        return start
    value = min(found, key=lambda v: found[v].volume)
    return found[value] if found[value].volume < start.volume else start


#: Restarts of the node moves while a restart still gains this relative volume. [-]
RESTART_GAIN = 1e-4
#: Most restarts of the node moves of one stage.
RESTARTS = 2


def _polish(frame: Frame, moves: NodeMoves | None, best: Design, label: str) -> Design:
    """optimize_geometry of ``frame`` over ``moves``; ``best`` when that is not lighter.

    The sequential-LP moves stop when a step gains little; they are restarted
    from where they stopped (the same parameters, bounds shifted by the move
    made) while a restart gains at least :data:`RESTART_GAIN`.
    """
    if moves is None or not moves.size:
        return best
    out = best
    for _ in range(1 + RESTARTS):
        try:
            design = optimize_geometry(frame, moves=moves)
        except SolveError as err:  # keep the best geometry found so far
            log.warning("geometry optimization of the %s form stopped: %s", label, err)
            break
        gain = 1.0 - design.volume / out.volume
        if design.volume < out.volume:
            out = design
        if gain < RESTART_GAIN or design.nodes.shape != frame.nodes.shape:
            break
        p = np.linalg.lstsq(moves.T, (design.nodes - frame.nodes).ravel(), rcond=None)[0]
        moves = NodeMoves(T=moves.T, lower=np.minimum(moves.lower - p, 0.0),
                          upper=np.maximum(moves.upper - p, 0.0), names=moves.names)
        frame = frame.moved(design.nodes)
    return out


def improve_form(bridge, spec, problem, frame, moves, start: Design) -> tuple[Design, Design]:
    """The form after geometry optimization, never heavier than ``start``, and the pattern.

    Stages, each kept only when it is lighter: (1) the starting pattern's own
    free dimensions (pylon height; or a funicular cable or rib's sag or rise, by
    :func:`_funicular_search`, then its node moves); (2) every free dimension from
    there: each stay's anchor height and deck point (cable-stayed, ``anchors =
    "free"``), or each cable or rib node's height, the tower height and the
    hanger positions, the hangers inclining towards the tower by up to ``hanger_lean``
    panels (a free sag or rise with a funicular or parabolic start).
    Returns (final design, design at the end of stage 1).

    Parameters
    ----------
    bridge : BridgeScenario
        The crossing.
    spec : FormSpec
        The form.
    problem : Problem
        Its half-span problem (:func:`~bridgeopt.forms.build.form_problem`).
    frame : Frame
        The starting frame of ``start_spec(spec)``.
    moves : NodeMoves
        Its free geometry.
    start : Design
        ``frame`` sized by the LP.

    Returns
    -------
    (Design, Design)
        The final design and the design at the end of stage 1 (the pattern).
    """
    best = start
    if getattr(spec, "shape", None) == "funicular":
        best = _funicular_search(bridge, spec, problem, moves, start)
        if best is not start:
            value = form_geometry(best, spec.type, deck_level(problem)[2])
            frame, moves = build_form(bridge, spec, problem, start=value)
    best = _polish(frame, moves, best, spec.type)
    if isinstance(spec, SuspensionForm) and spec.shape == "free":
        # a free shape from the start: a lean box past one panel is already wide, the
        # moves stall there; the continuation goes on from where they stopped (hangers.py)
        best = _lean_continued(frame, moves, best, spec)
    # a forked pylon's anchors are measured from the stays the LP chose at the start
    stage1 = start if getattr(spec, "pylon", None) == "forked" else best
    free = None
    if isinstance(spec, CableStayedForm) and spec.anchors == "free" \
            and spec.span_to_height is None and spec.pylon == "vertical":
        free = spec, {"pylon_height": form_geometry(best, spec.type, deck_level(problem)[2])
                      ["pylon_height"]}
    elif isinstance(spec, SuspensionForm) and spec.shape != "free" and spec.sag_ratio is None \
            and spec.tower_height is None:
        # a lean past one panel: from the one-panel box, then the continuation (hangers.py)
        free = dataclasses.replace(spec, shape="free",
                                   hanger_lean=min(spec.hanger_lean, 1.0)), None
    elif isinstance(spec, ArchForm) and spec.shape != "free" and spec.rise_ratio is None:
        free = dataclasses.replace(spec, shape="free"), None
    if free is not None:
        value = free[1] or form_geometry(best, spec.type, deck_level(problem)[2])
        try:
            frame, moves = build_form(bridge, free[0], problem, start=value)
        except InputError as err:  # pragma: no cover - the same envelope as stage 1
            log.warning("free dimensions of the %s form not optimized: %s", spec.type, err)
            return best, stage1
        best = _lean_continued(frame, moves, _polish(frame, moves, best, spec.type), spec)
    return best, stage1


def _lean_continued(frame, moves, best: Design, spec: FormSpec) -> Design:
    """:func:`~bridgeopt.forms.hangers.lean_continuation` of a suspension form's free stage
    when its hangers may lean past one panel; ``best`` as it is otherwise."""
    if not (isinstance(spec, SuspensionForm) and spec.hanger_lean > 1.0):
        return best
    return lean_continuation(frame, moves, best, lambda f, m, d: _polish(f, m, d, spec.type),
                             lean=spec.hanger_lean)
