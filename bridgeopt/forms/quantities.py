"""Quantities and final dimensions of a solved form, for the whole structure.

:func:`group_quantities` is the one quantities table of the package (members,
length, volume, weight and largest force per element group, SI units); a
member on a mirror line is one member of the whole structure
(:func:`on_mirror_line`).  :func:`form_geometry` and :func:`form_dimensions`
measure a form's final dimensions (pylon height, sag, anchor heights, ratios,
how far the anchors moved from the starting pattern); :func:`dimension_lines`
and :func:`dimension_columns` show them in text and in study tables, from the one
table of dimension columns :data:`DIMENSION_TABLE` (sweep rows take it all).
"""

from __future__ import annotations

import numpy as np

from bridgeopt.forms.builder import deck_level
from bridgeopt.model.bridge import BridgeScenario
from bridgeopt.model.materials import GRAVITY
from bridgeopt.solver.design import Design

__all__ = ["GROUPS", "group_quantities", "on_mirror_line", "form_geometry", "form_dimensions",
           "dimension_lines", "dimension_columns", "dimension_values", "DIMENSION_TABLE",
           "DIMENSION_COLUMNS", "SWEEP_DIMENSION_COLUMNS"]


#: Element groups reported for each form, in report order.
GROUPS = {
    "reference": ("member",),
    "cable-stayed": ("stay", "pylon", "deck", "pier"),
    "suspension": ("cable", "hanger", "tower", "deck", "pier"),
    "deck-arch": ("arch rib", "column", "deck", "pier"),
    "through-arch": ("arch rib", "hanger", "deck", "pier"),
}


def group_quantities(design: Design, groups=(), *, by_sense: bool = False) -> dict:
    """Members, length, volume, weight and largest force per element group (whole structure).

    The one quantities table of the package, in SI units (N, m, m3); a table shown
    to people converts at display.

    Parameters
    ----------
    design : Design
        A solved design (its members' ``group``, ``sense``, ``volume`` [m3],
        ``axial_force`` [N] and centreline ``curves`` [m]).
    groups : iterable of str, optional
        Groups reported first, in this order, with zeros when they carry nothing;
        any other group present follows.
    by_sense : bool
        One entry per (group, sense) present, keyed by the pair, in sorted order
        (``groups`` is then not used).

    Returns
    -------
    dict
        ``{group: {"members": int, "length_m": float, "volume_m3": float,
        "weight_N": float, "largest_force_N": float}}`` (keys ``(group, sense)``
        with ``by_sense``).  Whole-structure figures: lengths (along the
        centrelines) [m], volumes [m3] and weights [N] count ``design.copies``
        copies of the model, except that a member on a mirror line (shared by the
        model and its mirror image) counts its length once; the largest force [N]
        is the largest axial force of a whole member (tension positive; twice the
        model's force on a mirror line); member counts are per model.
    """
    m = design.members
    prob = design.problem
    dens_t = prob.material.density if prob is not None else 0.0
    dens_c = prob.compression.density if prob is not None else 0.0
    sense = np.asarray(m.sense, dtype=str)
    group = np.asarray(m.group, dtype=str)
    volume = np.asarray(m.volume, dtype=float)
    weight = np.where(sense == "tension", dens_t, dens_c) * volume * GRAVITY
    length = np.array([_curve_length(c) for c in m.curves], dtype=float)
    force = np.asarray(m.axial_force, dtype=float)
    if by_sense:
        keys = sorted(set(zip(group.tolist(), sense.tolist())))
        selections = [(k, (group == k[0]) & (sense == k[1])) for k in keys]
    else:
        names = list(groups) + [g for g in dict.fromkeys(group.tolist()) if g not in groups]
        selections = [(g, group == g) for g in names]
    c = design.copies
    # a member on a mirror line is one member of the whole structure, half of it in each
    # model: its length counts once and its force twice
    on = on_mirror_line(design)
    length = np.where(on, length, length * c)
    force = np.where(on, force * 2.0, force)
    return {key: {"members": int(sel.sum()), "length_m": float(length[sel].sum()),
                  "volume_m3": float(volume[sel].sum()) * c,
                  "weight_N": float(weight[sel].sum()) * c,
                  "largest_force_N": float(force[sel].max()) if sel.any() else 0.0}
            for key, sel in selections}


def on_mirror_line(design: Design) -> np.ndarray:
    """True for each member whose two ends lie on one mirror line of the design's problem.

    Parameters
    ----------
    design : Design
        A solved design (its nodes [m], members and problem).

    Returns
    -------
    ndarray of bool, shape (members,)
        Such a member is shared by the model and its mirror image: the model
        carries half its force over its whole length.
    """
    m, prob = design.members, design.problem
    out = np.zeros(len(m.start), dtype=bool)
    if prob is None or not prob.mirror_lines:
        return out
    tol = 1e-6 * max(1.0, float(np.ptp(design.nodes[:, 0])) if len(design.nodes) else 1.0)
    xa, xb = design.nodes[m.start, 0], design.nodes[m.end, 0]
    for x in prob.mirror_lines:
        out |= (np.abs(xa - x) <= tol) & (np.abs(xb - x) <= tol)
    return out


def _curve_length(curve: np.ndarray) -> float:
    """Length of a polyline. [m]"""
    return float(np.hypot(*np.diff(curve, axis=0).T).sum()) if len(curve) > 1 else 0.0


def form_geometry(design: Design, form_type: str, deck_z: float) -> dict:
    """The form's main dimensions, measured on the (optimized) design. [m]

    Parameters
    ----------
    design : Design
        A form design (members labelled by element group).
    form_type : {"cable-stayed", "suspension", "arch"}
        The form's type.
    deck_z : float
        Height of the deck. [m]

    Returns
    -------
    dict
        ``pylon_height``, ``tower_height``, ``sag``, ``rise`` (those the form has),
        a forked pylon's ``leg_lean`` (largest horizontal reach of a leg from
        its foot) and ``leg_head_height``, and ``deck_panel``, the largest
        distance between loaded deck nodes. [m]
    """
    m, xz = design.members, design.nodes

    def ends(group):
        sel = m.group == group
        return xz[np.concatenate([m.start[sel], m.end[sel]])]

    out = {}
    loaded = np.sort(xz[np.any(design.loads != 0, axis=1), 0])
    if len(loaded) > 1:
        out["deck_panel"] = float(np.diff(loaded).max())
    if form_type == "cable-stayed" and (m.group == "pylon").any():
        out["pylon_height"] = float(ends("pylon")[:, 1].max() - deck_z)
    if form_type == "cable-stayed" and (m.group == "pylon leg").any():
        legs = m.group == "pylon leg"      # forked pylon: foot (lower end) to head
        lean = np.abs(xz[m.end[legs], 0] - xz[m.start[legs], 0])
        out["leg_lean"] = float(lean.max())
        out["leg_head_height"] = float(np.maximum(xz[m.end[legs], 1], xz[m.start[legs], 1]).max()
                                       - deck_z)
    if form_type == "suspension" and (m.group == "cable").any():
        z = ends("cable")[:, 1]
        out["tower_height"] = float(z.max() - deck_z)
        out["sag"] = float(z.max() - z.min())
    if form_type == "arch" and (m.group == "arch rib").any():
        z = ends("arch rib")[:, 1]
        out["rise"] = float(z.max() - z.min())
    return out


#: The one table of a form's final dimensions as table columns: (column, where, key,
#: study), ``where`` being ``"geometry"`` (:func:`form_geometry`) or ``"dimensions"``
#: (:func:`form_dimensions`).  The study tables take the rows with ``study`` True
#: (:data:`DIMENSION_COLUMNS`); sweep rows take every row (:data:`SWEEP_DIMENSION_COLUMNS`,
#: the per-stay lists as JSON text there).  Units in the names: ``_m`` metres, else [-].
DIMENSION_TABLE = (("pylon_height_m", "geometry", "pylon_height", True),
                   ("span_to_height", "dimensions", "span_to_height", True),
                   ("anchor_move_largest_m", "dimensions", "anchor_move_largest_m", True),
                   ("anchor_move_mean_m", "dimensions", "anchor_move_mean_m", False),
                   ("deck_point_move_largest_m", "dimensions", "deck_point_move_largest_m",
                    False),
                   ("stay_end_move_largest_m", "dimensions", "stay_end_move_largest_m", False),
                   ("stay_deck_x_m", "dimensions", "stay_deck_x_m", False),
                   ("anchor_heights_m", "dimensions", "anchor_heights_m", False),
                   ("start_pattern", "dimensions", "start_pattern", False),
                   ("tower_height_m", "geometry", "tower_height", True),
                   ("sag_m", "geometry", "sag", True),
                   ("sag_ratio", "dimensions", "sag_ratio", True),
                   ("span_to_sag", "dimensions", "span_to_sag", True),
                   ("rise_m", "geometry", "rise", True),
                   ("rise_ratio", "dimensions", "rise_ratio", True),
                   ("span_to_rise", "dimensions", "span_to_rise", False),
                   ("deck_panel_m", "geometry", "deck_panel", False))
#: Study-table columns of a form's final dimensions: (column, where, key). [m or -]
DIMENSION_COLUMNS = tuple((col, where, key) for col, where, key, study in DIMENSION_TABLE
                          if study)
#: Sweep-row columns of a form's final dimensions: every row of :data:`DIMENSION_TABLE`.
SWEEP_DIMENSION_COLUMNS = tuple(row[:3] for row in DIMENSION_TABLE)


def dimension_values(form: dict, columns=DIMENSION_COLUMNS) -> dict:
    """The values of ``columns`` a form has, as they are: ``{column: value}``.

    Parameters
    ----------
    form : dict
        ``{"geometry": ..., "dimensions": ...}`` (a form design's ``stats["form"]``,
        or :class:`FormResult`'s two dicts); a missing part gives no columns.
    columns : sequence of (column, where, key)
        :data:`DIMENSION_COLUMNS` or :data:`SWEEP_DIMENSION_COLUMNS`.

    Returns
    -------
    dict
        In ``columns`` order; lengths in m, ratios dimensionless, per-stay lists
        and texts as the form gives them.
    """
    return {col: form[where][key] for col, where, key in columns
            if key in (form.get(where) or {})}


def dimension_columns(design: Design | None) -> dict:
    """A form design's final dimensions as study-table columns (:data:`DIMENSION_COLUMNS`).

    Parameters
    ----------
    design : Design or None
        A design from :func:`solve_form` (its ``stats["form"]``); anything else
        gives no columns.

    Returns
    -------
    dict
        ``{column: value}`` for the dimensions the form has; pylon, tower, sag and
        rise in m, ratios dimensionless.
    """
    form = getattr(design, "stats", {}).get("form") if design is not None else None
    if not isinstance(form, dict):
        return {}
    return {col: float(v) for col, v in dimension_values(form, DIMENSION_COLUMNS).items()}


def dimension_lines(dimensions: dict) -> list[str]:
    """Text lines of the ratios and anchor moves of :attr:`FormResult.dimensions`.

    Parameters
    ----------
    dimensions : dict
        ``FormResult.dimensions``.

    Returns
    -------
    list of str
    """
    d = dimensions
    out = [f"  {k.replace('_', ' ')}: {d[k]:.4g}" for k in
           ("span_to_height", "sag_ratio", "span_to_sag", "rise_ratio", "span_to_rise") if k in d]
    if "anchor_move_largest_m" in d:
        start = ("the stays the LP chose at the start" if d["start_pattern"] == "chosen"
                 else f"the {d['start_pattern']} pattern (at its best height)")
        out.append(f"  stay anchors moved from {start} by up to "
                   f"{d['anchor_move_largest_m']:.4g} m (mean "
                   f"{d['anchor_move_mean_m']:.4g} m); deck points by up to "
                   f"{d['deck_point_move_largest_m']:.4g} m")
    if "anchor_heights_m" in d:
        out.append("  anchor heights above the deck [m]: "
                   + ", ".join(f"{z:.4g}" for z in d["anchor_heights_m"]))
    return out


def _stay_anchors(design: Design) -> tuple[np.ndarray, np.ndarray]:
    """(deck x, anchor height z) of every stay, by deck x. [m]"""
    m, xz = design.members, design.nodes
    sel = np.nonzero(m.group == "stay")[0]
    a, b = xz[m.start[sel]], xz[m.end[sel]]
    top = np.where((a[:, 1] >= b[:, 1])[:, None], a, b)
    low = np.where((a[:, 1] >= b[:, 1])[:, None], b, a)
    order = np.lexsort((top[:, 1], low[:, 0]))
    return low[order, 0], top[order, 1]


def form_dimensions(design: Design, pattern: Design, spec, bridge: BridgeScenario,
                geometry: dict) -> dict:
    """Ratios and per-stay dimensions of the final form (:attr:`FormResult.dimensions`).

    Parameters
    ----------
    design : Design
        The final form.
    pattern : Design
        The starting pattern at its best pylon height (anchor moves are measured
        from it).
    spec : FormSpec
        The form's spec.
    bridge : BridgeScenario
        The crossing (its span). [m]
    geometry : dict
        :func:`form_geometry` of ``design``. [m]

    Returns
    -------
    dict
        See :attr:`FormResult.dimensions`.
    """
    out: dict = {}
    deck_z = deck_level(design.problem)[2]
    if spec.type == "cable-stayed" and "pylon_height" in geometry:
        out["span_to_height"] = bridge.span / spec.pylons / geometry["pylon_height"]
        x, z = _stay_anchors(design)
        out["stay_deck_x_m"] = x.tolist()
        out["anchor_heights_m"] = (z - deck_z).tolist()
        x0, z0 = _stay_anchors(pattern)
        # a forked pylon starts from the stays the LP chose, not from a pattern
        out["start_pattern"] = "chosen" if getattr(spec, "pylon", "") == "forked" else spec.pattern
        if len(z0) == len(z) and len(z):
            moved = np.hypot(x - x0, z - z0)
            out["anchor_move_largest_m"] = float(np.abs(z - z0).max())
            out["anchor_move_mean_m"] = float(np.abs(z - z0).mean())
            out["deck_point_move_largest_m"] = float(np.abs(x - x0).max())
            out["stay_end_move_largest_m"] = float(moved.max())
    if spec.type == "suspension" and geometry.get("sag"):
        out["sag_ratio"] = geometry["sag"] / bridge.span
        out["span_to_sag"] = bridge.span / geometry["sag"]
    if spec.type == "arch" and geometry.get("rise"):
        out["rise_ratio"] = geometry["rise"] / bridge.span
        out["span_to_rise"] = bridge.span / geometry["rise"]
    return out
