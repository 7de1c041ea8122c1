"""The ``[bridge]`` table of a scenario file -> a checked :class:`~bridgeopt.model.bridge.BridgeScenario`.

Key by key, with the one-line errors of :mod:`bridgeopt.files.fields`; every key, unit and
range is in ``docs/scenario.md``.
"""

from __future__ import annotations

import math
from typing import Mapping

from bridgeopt.errors import InputError
from bridgeopt.files.fields import (KEYS, check_keys, is_whole, number, required, short,
                                    string, table)
from bridgeopt.files.sections import parse_materials
from bridgeopt.model.bridge import ARRANGEMENTS, BridgeScenario
from bridgeopt.model.problem import MAX_CELLS
from bridgeopt.model.limits import DECK_LOAD, HEIGHT_PER_SPAN, SPAN

__all__ = ["largest_divisions", "parse_bridge"]


def largest_divisions(span: float, rise: float, depth: float) -> int:
    """Most even divisions for which the half-span grid stays within ``MAX_CELLS``.

    Parameters
    ----------
    span, rise, depth : float
        The bridge's span, rise above and depth below the deck. [m]

    Returns
    -------
    int
        The largest even number of divisions from 2 to 240 that fits, 0 if none does. [-]
    """
    best = 0
    for d in range(2, 241, 2):
        s = span / d
        cells = (d // 2) * max(1, math.floor(rise / s + 1e-9) + math.floor(depth / s + 1e-9))
        if cells <= MAX_CELLS:
            best = d
    return best


def parse_bridge(data: Mapping, name: str) -> BridgeScenario:
    """The ``[bridge]`` table and the materials of a bridge file.

    Parameters
    ----------
    data : mapping
        The whole file.
    name : str
        The bridge's name unless ``[bridge]`` gives one.

    Returns
    -------
    BridgeScenario
        The checked crossing (lengths [m], deck load [N/m], materials).
    """
    check_keys(data, "bridge-file", "", "a bridge scenario file")
    raw = table("bridge", data["bridge"], "a table [bridge] with keys "
                + ", ".join(KEYS["bridge"]))
    check_keys(raw, "bridge", "bridge", "[bridge]")
    if "name" in raw:
        inner = string("bridge.name", raw["name"])
        if "name" in data and data["name"] != inner:
            raise InputError("bridge.name", inner, f"left out, or the same as the top-level "
                             f"name {data['name']!r}")
        name = inner
    # the same ranges, in the same words, as BridgeScenario's own check (model/limits.py)
    span_valid = f"a number from {SPAN[0]:g} to {SPAN[1]:g} m"
    span = number("bridge.span", required("bridge", raw, "span", span_valid), span_valid,
                  lambda v: SPAN[0] <= v <= SPAN[1])
    tall = HEIGHT_PER_SPAN * span
    height_valid = f"a number from 0 to {tall:g} m ({HEIGHT_PER_SPAN:g} spans)"
    rise = number("bridge.rise", required("bridge", raw, "rise", height_valid), height_valid,
                  lambda v: 0 <= v <= tall)
    depth = number("bridge.depth", required("bridge", raw, "depth", height_valid),
                   height_valid, lambda v: 0 <= v <= tall)
    load_valid = f"a number from {DECK_LOAD[0]:g} to {DECK_LOAD[1]:g} N/m (downwards)"
    deck_load = number("bridge.deck_load",
                       required("bridge", raw, "deck_load", load_valid), load_valid,
                       lambda v: DECK_LOAD[0] <= v <= DECK_LOAD[1])
    arrangement = raw.get("arrangement", "repeating")
    if arrangement not in ARRANGEMENTS:
        raise InputError("bridge.arrangement", short(arrangement),
                         "one of " + ", ".join(map(repr, ARRANGEMENTS)))
    divisions = raw.get("divisions", 30)
    if not is_whole(divisions) or divisions < 2 or divisions > 240 or divisions % 2:
        raise InputError("bridge.divisions", short(divisions),
                         "an even whole number from 2 to 240")
    divisions = int(divisions)
    back_span = raw.get("back_span")
    if back_span is not None:
        back_span = number("bridge.back_span", back_span, "a number >= 0 m (at most the span)",
                           lambda v: 0 <= v <= span)
    foundation = number("bridge.foundation_depth", raw.get("foundation_depth", 0.0),
                        "a number >= 0 m below the deck", lambda v: v >= 0)
    material, comp = parse_materials(data)
    bridge = BridgeScenario(span=span, rise=rise, depth=depth, deck_load=deck_load,
                            material=material, arrangement=arrangement, divisions=divisions,
                            name=name, compression_material=comp, back_span=back_span,
                            foundation_depth=foundation)
    try:
        bridge.to_problem()
    except InputError as err:
        if err.field != "domain.spacing":
            raise
        most = largest_divisions(span, rise, depth)
        if most < 2:
            raise InputError("bridge.rise", rise, f"a smaller rise + depth for this span (the "
                             f"half-span grid would exceed {MAX_CELLS} cells)") from None
        raise InputError("bridge.divisions", divisions,
                         f"an even whole number from 2 to {most} for this span, rise and depth "
                         f"(at most {MAX_CELLS} grid cells in the half-span model)") from None
    return bridge
