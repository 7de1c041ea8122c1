"""Solve a bridge form and set it against the reference optimum of the same scenario.

:func:`solve_form` builds the form's fixed topology on the scenario's half-span
problem (:meth:`~bridgeopt.bridge.BridgeScenario.to_problem`: same domain,
deck load, materials, mirror lines and copies as the reference), sizes it with
the layout-optimization LP (:func:`~bridgeopt.frame.size_frame`, equal-strength
self-weight elements included), improves its free geometry (pylon height, sag,
rise, or every cable or rib node's height) with
:func:`~bridgeopt.geometry.optimize_geometry`, and solves the reference optimum
(:func:`~bridgeopt.layout.optimize_layout`) on the same problem.

Supports, chosen so that the reference stays a fair lower bound: when a form
needs a support the bridge problem does not have, the reference for that
comparison is solved with it too (:func:`form_problem`):

* intermediate pylons (``pylons > 1``) stand on piers: a vertical support at the
  bottom of the domain under each, for the form and the reference alike;
* a single span's cable-stayed pylon or suspension tower is held horizontally at
  its top by back stays or the main cable's back span running to an anchorage
  behind the abutment, outside the modelled domain.  This is modelled as a free
  horizontal reaction along the whole abutment line x = 0 (as on a mirror line),
  which the reference gets as well; the anchorage and back stays themselves are
  not sized, in the form or in the reference.

Heights kept clear: the suspension cable's lowest point and a deck arch's crown
stay at least :data:`CLEARANCE` of the available height away from the deck, so
that every hanger and column has a length.
"""

from __future__ import annotations

import dataclasses
import logging
import math
from dataclasses import dataclass
from typing import Mapping

import numpy as np

from ..bridge import BridgeScenario
from ..design import Design
from ..errors import InputError, SolveError
from ..frame import Frame, size_frame
from ..geometry import NodeMoves, optimize_geometry
from ..layout import optimize_layout
from ..materials import GRAVITY
from ..problem import Problem, Support
from .arch import arch_frame
from .builder import available_heights, deck_level, funicular_heights
from .cable_stayed import cable_stayed_frame
from .specs import ArchForm, CableStayedForm, FormSpec, ReferenceForm, SuspensionForm
from .suspension import suspension_frame

__all__ = ["FormResult", "form_problem", "build_form", "solve_form", "GROUPS", "CLEARANCE",
           "START_SPAN_TO_HEIGHT", "START_SAG_RATIO", "START_RISE_RATIO"]

log = logging.getLogger(__name__)

#: Element groups reported for each form, in report order.
GROUPS = {
    "reference": ("member",),
    "cable-stayed": ("stay", "pylon", "deck", "pier"),
    "suspension": ("cable", "hanger", "tower", "deck", "pier"),
    "deck-arch": ("arch rib", "column", "deck", "pier"),
    "through-arch": ("arch rib", "hanger", "deck", "pier"),
}
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


def form_problem(bridge: BridgeScenario, spec: FormSpec) -> Problem:
    """The half-span problem on which ``spec`` and its reference are both solved.

    The bridge's own problem, plus the supports the form needs (see the module
    docstring): piers under intermediate pylons, and the horizontal anchorage of
    a single span's pylon or tower tops.

    Raises
    ------
    InputError
        Intermediate pylons that do not stand on grid nodes (``form.pylons``
        must divide ``bridge.divisions``).
    """
    problem = bridge.to_problem()
    extra: list[Support] = []
    if isinstance(spec, CableStayedForm) and spec.pylons > 1:
        if bridge.divisions % spec.pylons:
            raise InputError("form.pylons", spec.pylons,
                             f"a divisor of bridge.divisions = {bridge.divisions} (each "
                             "intermediate pylon's pier stands on a grid node)")
        bottom = problem.domain.bounds[2]
        extra = [Support((x, bottom), "z") for x in _pylon_positions(bridge, spec.pylons)[1:]]
    mirrors = problem.mirror_lines
    if isinstance(spec, (CableStayedForm, SuspensionForm)) and bridge.arrangement == "single":
        mirrors = (0.0,) + tuple(mirrors)
    if extra or mirrors != problem.mirror_lines:
        problem = dataclasses.replace(problem, supports=problem.supports + tuple(extra),
                                      mirror_lines=mirrors)
    return problem


def _self_weight_sag(problem: Problem, sense: str, span: float) -> float:
    """Least sag (or rise) of a cable (or arch) that carries its own weight over ``span``. [m]

    A parabolic estimate (common practice statics): with its own weight k H per
    unit length added to the deck load w, H f = (w + k H) L^2/8, so
    H (1 - k L^2/(8 f)) = w L^2/(8 f), which has a positive H only when
    f > k L^2/8 (k = rho g/sigma).  Hangers or columns add weight, so the true
    limit is a little higher.
    """
    return problem.k(sense) * span ** 2 / 8.0


def _check_self_weight(value: float, need: float, span: float, what: str, key: str) -> None:
    if value <= need:
        raise SolveError("span-limit",
                         f"a {what} of {value:.6g} m cannot carry its own weight and the deck over "
                         f"a {span:.6g} m span: with self-weight it must exceed k L^2/8 = "
                         f"{need:.6g} m (k = rho*g/sigma; the limit of any span is "
                         f"pi*sigma/(rho*g) = {math.pi * span ** 2 / (8 * need):.6g} m)"
                         f"; raise the {what} ({key}) or use a stronger, lighter material"
                         if need > 0 else f"a {what} of {value:.6g} m is too small")


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
    :data:`START_SAG_RATIO`, :data:`START_RISE_RATIO` and towers as high as the
    domain allows; values are clipped to the bounds.

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
            bounds = None
        else:
            h, bounds = _free(start.get("pylon_height", 2 * reach / START_SPAN_TO_HEIGHT), LEAST_RATIO * reach, rise,
                              "bridge.rise", bridge.rise, "a pylon above the deck")
        return cable_stayed_frame(problem, pylons_x=_pylon_positions(bridge, spec.pylons),
                                  reach=reach, pattern=spec.pattern, stays=spec.stays,
                                  height=h, anchor_zone=spec.anchor_zone, height_bounds=bounds)
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
        need = _self_weight_sag(problem, "tension", span)
        if spec.sag_ratio is not None:
            _check_self_weight(sag, need, span, "cable sag", "form.sag_ratio")
        else:
            top = rise if spec.tower_height is None else tower
            low = max(LEAST_RATIO * 0.5 * span, 1.02 * need)
            _check_self_weight(top - least, low, span, "cable sag", "bridge.rise")
            sag, sag_bounds = _free(start.get("sag", max(START_SAG_RATIO * span, 1.5 * need)),
                                    low, top - least, "bridge.rise", bridge.rise, "a cable sag")
        if spec.tower_height is None:
            # the tower height is free: the starting cable hangs from the top of the domain
            tower, _ = _free(start.get("tower_height", rise), sag + least, rise,
                             "bridge.rise", bridge.rise, "towers")
            tower_bounds = (sag + least, rise)  # moves the whole cable (its clearance)
            if spec.shape == "free":
                tower_bounds = (least, rise)
        if spec.shape == "free":
            height_bounds = (least, rise)
        n = _panels(bridge, spec.spacing)

        def make(profile):
            return suspension_frame(problem, panels=n, tower=tower, sag=sag, shape=spec.shape,
                                    profile=profile, sag_bounds=sag_bounds,
                                    tower_bounds=tower_bounds, height_bounds=height_bounds)
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
                             f"= {value:g} m leaves no room for a "
                             f"{'through arch above' if through else 'deck arch below'} the deck)")
        springing = zd if through else zd - depth
        rise_bounds = height_bounds = None
        need = _self_weight_sag(problem, "compression", span)
        if spec.rise_ratio is not None:
            f = spec.rise_ratio * span
            if f > room * (1 + 1e-9):
                raise InputError("form.rise_ratio", spec.rise_ratio,
                                 f"<= {room / span:.6g} (the arch must fit within "
                                 f"{field} = {value:g} m)")
            _check_self_weight(f, need, span, "arch rise", "form.rise_ratio")
        else:
            low = max(LEAST_RATIO * 0.5 * span, 1.02 * need)
            _check_self_weight(room, low, span, "arch rise", field)
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


def group_quantities(design: Design, groups=()) -> dict:
    """Members, volume, weight and largest force per element group, for the whole structure.

    Returns
    -------
    dict
        ``{group: {"members": int, "volume_m3": float, "weight_N": float,
        "largest_force_N": float}}``, every group of ``groups`` first (zero when
        it carries nothing), then any other group present.  Volumes and weights
        count ``design.copies`` copies of the model; member counts are per model.
    """
    m = design.members
    prob = design.problem
    density = np.where(m.sense == "tension", prob.material.density, prob.compression.density)
    force = m.axial_force
    out = {}
    for g in list(groups) + [g for g in dict.fromkeys(m.group.tolist()) if g not in groups]:
        sel = m.group == g
        vol = float(m.volume[sel].sum()) * design.copies
        out[g] = {"members": int(sel.sum()), "volume_m3": vol,
                  "weight_N": float((density[sel] * m.volume[sel]).sum()) * GRAVITY
                  * design.copies,
                  "largest_force_N": float(force[sel].max()) if sel.any() else 0.0}
    return out


def _geometry(design: Design, form_type: str, deck_z: float) -> dict:
    """The form's main dimensions, measured on the (optimized) design. [m]"""
    m, xz = design.members, design.nodes

    def ends(group):
        sel = m.group == group
        return xz[np.concatenate([m.start[sel], m.end[sel]])]

    out = {}
    if form_type == "cable-stayed" and (m.group == "pylon").any():
        out["pylon_height"] = float(ends("pylon")[:, 1].max() - deck_z)
    if form_type == "suspension" and (m.group == "cable").any():
        z = ends("cable")[:, 1]
        out["tower_height"] = float(z.max() - deck_z)
        out["sag"] = float(z.max() - z.min())
    if form_type == "arch" and (m.group == "arch rib").any():
        z = ends("arch rib")[:, 1]
        out["rise"] = float(z.max() - z.min())
    return out


@dataclass(frozen=True)
class FormResult:
    """A solved bridge form set against the reference optimum of the same scenario.

    Attributes
    ----------
    spec : FormSpec
    design : Design
        The form, sized by the LP on its (optimized) geometry.
    start_volume : float
        Volume of the form on its starting geometry. [m3]
    volume : float
        Volume of the form (whole span). [m3]
    weight : float
        Self-weight of the form (whole span). [N]
    reference : Design or None
        The reference optimum (layout optimization) on the same problem (None
        when not compared).
    reference_volume : float [m3]
    ratio : float
        volume / reference_volume. [-]
    quantities : dict
        Per element group (see :func:`group_quantities`).
    geometry : dict
        Main dimensions of the final form: ``pylon_height``, ``tower_height``,
        ``sag`` or ``rise``. [m]
    """

    spec: FormSpec
    design: Design
    start_volume: float
    volume: float
    weight: float
    reference: Design | None
    reference_volume: float
    ratio: float
    quantities: dict
    geometry: dict

    @property
    def form_type(self) -> str:
        return self.spec.type

    def to_frame(self):
        """Quantities per element group as a :class:`pandas.DataFrame` (SI units in the names)."""
        import pandas as pd

        df = pd.DataFrame.from_dict(self.quantities, orient="index")
        df.index.name = "group"
        return df

    def summary(self) -> str:
        """A few lines for the engineer (without the cautions, which the caller adds)."""
        lines = [f"{self.form_type} form: volume {self.volume:.6g} m3 (start {self.start_volume:.6g}"
                 f" m3), weight {self.weight:.6g} N; reference optimum {self.reference_volume:.6g}"
                 f" m3; ratio {self.ratio:.4f}"]
        for g, q in self.quantities.items():
            lines.append(f"  {g}: {q['members']} members, {q['volume_m3']:.6g} m3")
        return "\n".join(lines)


#: Reach, as a part of pi*sigma/(rho*g), from which a form that cannot carry its loads is
#: reported as limited by self-weight. [-]
REACH_WARNING = 0.15


def _size_start(frame: Frame, spec) -> Design:
    """size_frame, with a clear message when self-weight makes the form impossible."""
    try:
        return size_frame(frame)
    except SolveError as err:
        if err.status != "infeasible":
            raise
        problem = frame.problem
        lx = np.abs(frame.nodes[frame.end, 0] - frame.nodes[frame.start, 0])
        k = np.where(frame.senses == "compression", problem.k("compression"),
                     problem.k("tension"))
        part = k * lx / math.pi
        i = int(np.argmax(part))
        line = {"suspension": ("cable", "tension", "cable sag"),
                "arch": ("arch rib", "compression", "arch rise")}.get(spec.type)
        if line is not None and (frame.group == line[0]).any():
            on = frame.group == line[0]
            z = frame.nodes[np.concatenate([frame.start[on], frame.end[on]]), 1]
            xs, xe, _ = deck_level(problem)
            span = 2 * (xe - xs)
            need = _self_weight_sag(problem, line[1], span)
            if np.ptp(z) < 2 * need:
                raise SolveError(
                    "span-limit",
                    f"the {spec.type} form cannot carry its loads: its {line[2]} of "
                    f"{np.ptp(z):.6g} m is close to the least that carries its own weight over "
                    f"{span:.6g} m, k L^2/8 = {need:.6g} m (k = rho*g/sigma), and the hangers "
                    "or columns add more; raise it, shorten the span or use a stronger, "
                    "lighter material (no span exceeds pi*sigma/(rho*g) = "
                    f"{math.pi / problem.k(line[1]):.6g} m)") from None
        if part[i] < REACH_WARNING:
            raise
        raise SolveError(
            "span-limit",
            f"the {spec.type} form cannot carry its loads: its {frame.group[i]} members reach "
            f"up to {lx[i]:.6g} m horizontally, {100 * part[i]:.0f}% of the reach "
            f"pi*sigma/(rho*g) = {math.pi / k[i]:.6g} m of an equal-strength element, and an "
            "element that long sags too far under its own weight to carry the deck as well; "
            "shorten the reach (more pylons, closer hangers, a shorter span), steepen it (a "
            "taller pylon, more sag or rise) or use a stronger, lighter material") from None


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
    now = _geometry(start, spec.type, deck_level(problem)[2])[key]
    low, high = now + moves.lower[j], now + moves.upper[j]
    found: dict[float, Design] = {}

    def volume(value: float) -> float:
        try:
            frame, _ = build_form(bridge, spec, problem, start={key: value, "tower_height": 0.0})
            found[value] = size_frame(frame)
        except (SolveError, InputError):
            return math.inf
        return found[value].volume

    minimize_scalar(volume, bounds=(low, high), method="bounded",
                    options={"xatol": 1e-5 * bridge.span})
    if not found:
        return start
    value = min(found, key=lambda v: found[v].volume)
    return found[value] if found[value].volume < start.volume else start


def _optimized(bridge, spec, problem, frame, moves, start: Design) -> Design:
    """The form after geometry optimization, never heavier than ``start``.

    A funicular cable or rib with a free sag or rise first gets the sag (rise) of
    the lightest exact funicular (:func:`_funicular_search`); the form's node
    moves (sag or rise, tower height, or every node with the free shape) then
    polish it with :func:`~bridgeopt.geometry.optimize_geometry`.
    """
    best = start
    if getattr(spec, "shape", None) == "funicular":
        best = _funicular_search(bridge, spec, problem, moves, start)
        if best is not start:
            value = _geometry(best, spec.type, deck_level(problem)[2])
            frame, moves = build_form(bridge, spec, problem, start=value)
    try:
        design = optimize_geometry(frame, moves=moves)
    except SolveError as err:  # keep the best geometry found so far
        log.warning("geometry optimization of the %s form stopped: %s", spec.type, err)
        return best
    return design if design.volume < best.volume else best


def solve_form(bridge: BridgeScenario, spec: FormSpec, *, optimize: bool = True,
               reference: Design | None = None, member_adding: bool = True,
               compare: bool = True) -> FormResult:
    """Solve the form ``spec`` of ``bridge`` and its reference optimum.

    Parameters
    ----------
    bridge : BridgeScenario
    spec : ReferenceForm, CableStayedForm, SuspensionForm or ArchForm
    optimize : bool
        Improve the form's free geometry (pylon height, sag, rise ...); without
        it the form keeps its starting geometry.
    reference : Design, optional
        An already solved reference on :func:`form_problem` (saves a solve when
        comparing several forms that share it).
    member_adding : bool
        How the reference is solved (same optimum either way).
    compare : bool
        Solve the reference; without it ``reference`` is None and the reference
        volume and ratio are nan (for sweeps of one form).

    Returns
    -------
    FormResult

    Raises
    ------
    InputError
        The form does not fit in the design domain.
    SolveError
        The form cannot carry the loads, notably when an element's horizontal
        reach reaches pi*sigma/(rho*g), beyond which no equal-strength element
        can carry its own weight.

    References
    ----------
    .. [1] W.S. Dorn, R.E. Gomory, H.J. Greenberg (1964), J. de Mecanique 3:25-52.
    .. [2] H.E. Fairclough, M. Gilbert, A.V. Pichugin, A. Tyas, I. Firth (2018),
       Proc. R. Soc. A 474:20170726 (equal-strength elements; optimal long-span forms).
    .. [3] L. He, M. Gilbert (2015), Struct. Multidisc. Optim. 52:677-694 (geometry
       optimization).
    """
    problem = form_problem(bridge, spec)
    if isinstance(spec, ReferenceForm):
        ref = reference or optimize_layout(problem, member_adding=member_adding)
        return FormResult(spec=spec, design=ref, start_volume=ref.volume, volume=ref.volume,
                          weight=ref.weight, reference=ref, reference_volume=ref.volume,
                          ratio=1.0, quantities=group_quantities(ref, GROUPS["reference"]),
                          geometry={})
    frame, moves = build_form(bridge, spec, problem)
    start = _size_start(frame, spec)
    design = start
    if optimize and moves is not None and moves.size:
        design = _optimized(bridge, spec, problem, frame, moves, start)
    ref = None
    if compare:
        ref = reference or optimize_layout(problem, member_adding=member_adding)
        if design.volume < ref.volume * (1 - 1e-6):
            log.warning("the %s form (%.6g m3) is lighter than the reference optimum on this grid "
                        "(%.6g m3): the grid is too coarse to bound it; use more "
                        "bridge.divisions", spec.type, design.volume, ref.volume)
    ref_volume = ref.volume if ref is not None else math.nan
    return FormResult(spec=spec, design=design, start_volume=start.volume, volume=design.volume,
                      weight=design.weight, reference=ref, reference_volume=ref_volume,
                      ratio=design.volume / ref_volume,
                      quantities=group_quantities(design, GROUPS[getattr(spec, "variant",
                                                                         spec.type)]),
                      geometry=_geometry(design, spec.type, deck_level(problem)[2]))
