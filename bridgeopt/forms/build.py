"""Build a bridge form: its problem (with the supports it needs) and its starting frame.

:func:`form_problem` is the half-span problem on which a form and its reference
are both solved: :meth:`~bridgeopt.model.bridge.BridgeScenario.to_problem` (same
domain, deck load, materials, mirror lines and copies), plus the supports the
form needs, so that the reference stays a fair lower bound:

* intermediate pylons (``pylons > 1``) stand on their own piers: a vertical
  support at the bridge's foundation level under each
  (:meth:`~bridgeopt.model.bridge.BridgeScenario.to_problem` ``piers``), for the
  form and the reference alike; studies name that crossing ("2 piers")
  wherever it is shown (:func:`bridgeopt.study.options.crossing_name`);
* a single span's cable-stayed pylon or suspension tower is held at its top by
  back stays or the main cable's back span running to the anchor point at the
  end of the back span (:attr:`~bridgeopt.model.bridge.BridgeScenario.back_span`):
  the crossing's own support, which the plain reference has too; the back
  stays and cable are members of the form (:mod:`bridgeopt.forms.backspan`).

:func:`build_form` turns a spec into a :class:`~bridgeopt.solver.frame.Frame` and its
free geometry (:class:`~bridgeopt.geometry.optimize.NodeMoves`), checking that the form
fits: nothing above the domain's rise or below its depth; the suspension
cable's lowest point and a deck arch's crown at least :data:`CLEARANCE` of the
available height from the deck; a sag or rise larger than the least with which
an equal-strength cable or arch carries its own weight (:func:`self_weight_sag`).
"""

from __future__ import annotations

import dataclasses
from typing import Mapping

import numpy as np

from bridgeopt.model.bridge import BridgeScenario
from bridgeopt.errors import InputError
from bridgeopt.solver.frame import Frame
from bridgeopt.geometry.optimize import NodeMoves
from bridgeopt.model.problem import Problem
from bridgeopt.forms.arch import arch_frame
from bridgeopt.forms.backspan import with_back_spans
from bridgeopt.forms.builder import available_heights, deck_level, funicular_heights
from bridgeopt.forms.cable_stayed import cable_stayed_frame
from bridgeopt.forms.forked import forked_frame, forked_start
from bridgeopt.forms.selfweight import (FREE_MARGIN, check_self_weight, self_weight_sag,
                                        single_element_reach)
from bridgeopt.forms.specs import ANCHOR_ZONE, ArchForm, CableStayedForm, FormSpec, SuspensionForm
from bridgeopt.forms.suspension import suspension_frame

__all__ = ["form_problem", "form_crossing", "build_form", "CLEARANCE", "START_SPAN_TO_HEIGHT",
           "START_SAG_RATIO", "START_RISE_RATIO", "LEAST_RATIO", "self_weight_sag",
           "single_element_reach"]  # the last two from forms/selfweight.py, as before

#: Least clearance between deck and cable or crown, as a part of the available height. [-]
CLEARANCE = 0.01
#: Starting geometry of a free dimension (common practice, from memory): pylon
#: spacing about 5 times the pylon height above the deck, cable sag about span/10,
#: arch rise about span/6.
START_SPAN_TO_HEIGHT = 5.0
START_SAG_RATIO = 0.1
START_RISE_RATIO = 1.0 / 6.0
#: Least free pylon height, sag and rise, as a part of the length they serve. [-]
LEAST_RATIO = 0.05


def _pylon_positions(bridge: BridgeScenario, pylons: int) -> list[float]:
    step = bridge.span / pylons
    return [j * step for j in range(pylons) if j * step <= 0.5 * bridge.span * (1 + 1e-12)]


def form_crossing(bridge: BridgeScenario, spec: FormSpec) -> BridgeScenario:
    """The crossing ``spec`` stands on: ``bridge``, or it with the foundations a form needs.

    A deck arch on repeating spans springs from the pier foundations at the
    bottom of the envelope, so its crossing has them there whatever
    ``bridge.foundation_depth`` says.

    Parameters
    ----------
    bridge : BridgeScenario
        The crossing as given.
    spec : FormSpec
        The form.

    Returns
    -------
    BridgeScenario
    """
    if isinstance(spec, ArchForm) and spec.variant == "deck-arch" \
            and bridge.arrangement == "repeating" and bridge.depth_cells:
        depth = bridge.depth_cells * bridge.spacing
        if abs(bridge.foundation_level + depth) > 1e-9 * bridge.spacing:
            return dataclasses.replace(bridge, foundation_depth=depth)
    return bridge


def form_problem(bridge: BridgeScenario, spec: FormSpec) -> Problem:
    """The half-span problem on which ``spec`` and its reference are both solved.

    The bridge's own problem (its supports: piers, abutments and back-span anchor
    points), plus the piers of intermediate pylons (see the module docstring).

    Parameters
    ----------
    bridge : BridgeScenario
        The crossing (span, rise, depth, deck load, materials, arrangement).
    spec : FormSpec
        The form; its pylon count and type decide the extra supports.

    Returns
    -------
    Problem
        The half-span problem (``copies = 2``), with the form's supports.

    Raises
    ------
    InputError
        Intermediate pylons that do not stand on grid nodes (``form.pylons``
        must divide ``bridge.divisions``); a single-span cable-stayed or
        suspension form without back spans.
    """
    piers: list[float] = []
    if isinstance(spec, CableStayedForm) and spec.pylons > 1:
        if bridge.divisions % spec.pylons:
            raise InputError("form.pylons", spec.pylons,
                             f"a divisor of bridge.divisions = {bridge.divisions} (each "
                             "intermediate pylon's pier stands on a grid node)")
        piers = _pylon_positions(bridge, spec.pylons)[1:]
    if isinstance(spec, (CableStayedForm, SuspensionForm)) and bridge.arrangement == "single" \
            and bridge.back_cells == 0:
        raise InputError("bridge.back_span", bridge.back_span,
                         f">= one grid step ({bridge.spacing:.6g} m) and a rise above the deck "
                         f"for a single-span {spec.type} form (the back stays or the main "
                         "cable's back span need the anchor points at the end of the back span)")
    return form_crossing(bridge, spec).to_problem(piers=piers)


def _stays(bridge: BridgeScenario, reach: float) -> int:
    """Stays per side so that they meet the deck once per grid step (at most 200)."""
    n = max(1, round(reach / bridge.spacing))
    if n > 200:
        raise InputError("form.stays", None, "given (at most 200): one stay per grid step "
                         f"would need {n}")
    return n


def _panels(bridge: BridgeScenario, spacing: float | None) -> int:
    half = 0.5 * bridge.span
    if spacing is None:
        return bridge.divisions // 2
    n = max(1, round(half / spacing))
    if n > 200:
        raise InputError("form.spacing", spacing, f">= {half / 200:.6g} m (at most 200 panels "
                         "in the half span)")
    return n


def _free(start: float, low: float, high: float, field: str, value, what: str):
    """(start, bounds) of a free dimension; InputError when the domain is too small."""
    if high <= low:
        raise InputError(field, value, f"a scenario with room for {what} (needs more than "
                         f"{low:.6g} m, the design domain gives {high:.6g} m)")
    return min(max(start, low), high), (low, high)


def _shaped(make, shape: str, problem: Problem, x: np.ndarray, start: float, end: float,
            line_sense: str, drop_sense: str):
    """The frame of ``make(profile)``.  For a funicular or free shape the profile is the
    exactly funicular polygon of the form's own loads (deck load, hanger or column and
    line self-weight); a parabola when none is found (the LP then reports the trouble)."""
    if shape == "parabolic":
        return make(None)
    q = problem.line_loads[0].intensity
    loads = q * np.diff(x)
    loads[-1] *= 0.5                        # the mirror node's share of the half model
    loads[:-1] = 0.5 * (loads[:-1] + q * np.diff(x)[1:])
    z = funicular_heights(x, start=start, end=end, node_loads=loads,
                          k_line=problem.k(line_sense), line_sense=line_sense,
                          k_drop=problem.k(drop_sense), drop_base=deck_level(problem)[2])
    return make(None if z is None else (z - start) / (end - start))


def build_form(bridge: BridgeScenario, spec: FormSpec, problem: Problem | None = None, *,
               start: Mapping[str, float] | None = None) -> tuple[Frame, NodeMoves | None]:
    """The starting frame of ``spec`` and its free geometry on the form's problem.

    ``start`` sets the starting value of free dimensions, by the names of
    :attr:`FormResult.geometry` (``pylon_height``, ``sag``, ``tower_height``,
    ``rise``) [m]; the defaults are :data:`START_SPAN_TO_HEIGHT`,
    :data:`START_SAG_RATIO`, :data:`START_RISE_RATIO` and towers just tall
    enough for the sag and the least clearance; values are clipped to the bounds.

    Parameters
    ----------
    bridge : BridgeScenario
        The crossing (span, rise, depth, divisions, deck load, materials).
    spec : FormSpec
        A cable-stayed, suspension or arch form (the reference has no frame).
    problem : Problem, optional
        The form's problem; default :func:`form_problem` of ``bridge`` and ``spec``.
    start : mapping of str to float, optional
        Starting values of free dimensions by name (``pylon_height``, ``sag``,
        ``tower_height``, ``rise``). [m]

    Returns
    -------
    Frame
        Nodes and members of the form, with senses and element groups.
    NodeMoves or None
        The free geometric parameters (None when every dimension is fixed).

    Raises
    ------
    InputError
        The form does not fit in the design domain (a key named in the message).
    """
    problem = form_problem(bridge, spec) if problem is None else problem
    start = dict(start or {})
    rise, depth = available_heights(problem)
    xs, xe, zd = deck_level(problem)
    span = bridge.span
    if isinstance(spec, CableStayedForm):
        reach = 0.5 * span / spec.pylons
        if spec.span_to_height is not None:
            h = 2 * reach / spec.span_to_height
            if h > rise * (1 + 1e-9):
                raise InputError("form.span_to_height", spec.span_to_height,
                                 f">= {2 * reach / rise:.6g} (the pylon, {h:.6g} m above the "
                                 f"deck, must fit within the rise of {rise:.6g} m)")
            bounds = anchor_bounds = None
        else:
            h, bounds = _free(start.get("pylon_height", 2 * reach / START_SPAN_TO_HEIGHT),
                              LEAST_RATIO * reach, rise, "bridge.rise", bridge.rise,
                              "a pylon above the deck")
            anchor_bounds = (CLEARANCE * rise, rise) if spec.anchors == "free" else None
        if spec.pylon == "forked":
            pylons_x = _pylon_positions(bridge, spec.pylons)
            h, lean, head = forked_start(problem, pylons_x=pylons_x, reach=reach, rise=rise,
                                         height=start.get("pylon_height"))
            return forked_frame(problem, pylons_x=pylons_x, reach=reach, height=h,
                                anchor_bounds=anchor_bounds, lean=lean, head=head)
        return with_back_spans(*cable_stayed_frame(
            problem, pylons_x=_pylon_positions(bridge, spec.pylons), reach=reach,
            pattern=spec.pattern, stays=spec.stays or _stays(bridge, reach), height=h,
            anchor_zone=spec.anchor_zone or ANCHOR_ZONE, height_bounds=bounds,
            anchor_bounds=anchor_bounds))
    if isinstance(spec, SuspensionForm):
        least = CLEARANCE * rise
        tower_bounds = sag_bounds = height_bounds = None
        if spec.sag_ratio is not None:
            sag = spec.sag_ratio * span
        if spec.tower_height is not None:
            tower = spec.tower_height
            if not least < tower <= rise * (1 + 1e-9):
                raise InputError("form.tower_height", tower,
                                 f"a height in ({least:.6g}, {rise:.6g}] m (the towers must fit "
                                 "within the rise of the design domain)")
        if spec.sag_ratio is not None and spec.sag_ratio * span > \
                (rise if spec.tower_height is None else tower) - least:
            top = rise if spec.tower_height is None else tower
            raise InputError("form.sag_ratio", spec.sag_ratio,
                             f"<= {(top - least) / span:.6g} (the cable's lowest point must stay "
                             f"above the deck under towers at most {top:.6g} m high)")
        need = self_weight_sag(problem, "tension", span)
        if spec.sag_ratio is not None:
            check_self_weight(sag, need, span, "a cable sag", "form.sag_ratio",
                               single_element_reach(problem, "tension"))
        else:
            top = rise if spec.tower_height is None else tower
            low = max(LEAST_RATIO * 0.5 * span, FREE_MARGIN * need)
            check_self_weight(top - least, need, span, "a cable sag", "bridge.rise",
                               single_element_reach(problem, "tension"), FREE_MARGIN)
            sag, sag_bounds = _free(start.get("sag", max(START_SAG_RATIO * span, 1.5 * need)),
                                    low, top - least, "bridge.rise", bridge.rise, "a cable sag")
        if spec.tower_height is None:
            # the tower height is free: it starts as low as the sag and the least clearance
            # allow (lifting the whole cable only lengthens hangers and towers)
            if rise - (sag + least) > 1e-9 * span:
                tower, _ = _free(start.get("tower_height", sag + least), sag + least, rise,
                                 "bridge.rise", bridge.rise, "towers")
                tower_bounds = (sag + least, rise)  # moves the whole cable (its clearance)
            else:
                # the sag starts as deep as the rise allows: towers at the full rise (a free
                # sag then lowers the cable under them)
                tower = rise
            if spec.shape == "free":
                tower_bounds = (least, rise)
        if spec.shape == "free":
            height_bounds = (least, rise)
        n = _panels(bridge, spec.spacing)
        if spec.tower_legs >= n:
            raise InputError("form.tower_legs", spec.tower_legs,
                             f"a whole number from 0 to {n - 1} (the hangers of a half span "
                             f"between tower and mid-span, spacing {(xe - xs) / n:.6g} m)")

        def make(profile):
            return with_back_spans(*suspension_frame(
                problem, panels=n, tower=tower, sag=sag, shape=spec.shape, profile=profile,
                sag_bounds=sag_bounds, tower_bounds=tower_bounds, height_bounds=height_bounds,
                lean=spec.hanger_lean, legs=spec.tower_legs))
        x = xs + (xe - xs) * np.arange(n + 1) / n
        return _shaped(make, spec.shape, problem, x, zd + tower, zd + tower - sag, "tension",
                       "tension")
    if isinstance(spec, ArchForm):
        through = spec.variant == "through-arch"
        room = rise if through else depth * (1 - CLEARANCE)
        field, value = ("bridge.rise", bridge.rise) if through else ("bridge.depth", bridge.depth)
        if room <= 0:
            raise InputError("form.variant", spec.variant,
                             f"{'deck-arch' if through else 'through-arch'} here ({field} "
                             f"= {value:g} m, clipped to whole grid steps of "
                             f"{bridge.spacing:.6g} m, leaves no room for a "
                             f"{'through arch above' if through else 'deck arch below'} the deck)")
        springing = zd if through else zd - depth
        rise_bounds = height_bounds = None
        need = self_weight_sag(problem, "compression", span)
        if spec.rise_ratio is not None:
            f = spec.rise_ratio * span
            if f > room * (1 + 1e-9):
                raise InputError("form.rise_ratio", spec.rise_ratio,
                                 f"<= {room / span:.6g} (the arch must fit within "
                                 f"{field} = {value:g} m)")
            check_self_weight(f, need, span, "an arch rise", "form.rise_ratio",
                               single_element_reach(problem, "compression"))
        else:
            low = max(LEAST_RATIO * 0.5 * span, FREE_MARGIN * need)
            check_self_weight(room, need, span, "an arch rise", field,
                               single_element_reach(problem, "compression"), FREE_MARGIN)
            f, rise_bounds = _free(start.get("rise", max(START_RISE_RATIO * span, 1.5 * need)),
                                   low, room, field, value, "an arch")
        if spec.shape == "free":
            height_bounds = ((zd + CLEARANCE * rise, zd + rise) if through
                             else (springing, springing + room))
        n = _panels(bridge, spec.spacing)

        def make(profile):
            return arch_frame(problem, panels=n, variant=spec.variant, springing=springing,
                              rise=f, shape=spec.shape, profile=profile,
                              rise_bounds=rise_bounds, height_bounds=height_bounds)
        x = xs + (xe - xs) * np.arange(n + 1) / n
        return _shaped(make, spec.shape, problem, x, springing, springing + f, "compression",
                       "tension" if through else "compression")
    raise InputError("form.type", getattr(spec, "type", spec),
                     "'cable-stayed', 'suspension' or 'arch' (the reference has no frame)")
