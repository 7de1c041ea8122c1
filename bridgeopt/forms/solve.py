"""Solve a bridge form and set it against the reference optimum of the same scenario.

:func:`solve_form` builds the form (:mod:`bridgeopt.forms.build`) on the
scenario's half-span problem with the supports it needs, sizes it with the
layout-optimization LP (:func:`~bridgeopt.solver.frame.size_frame`, equal-strength
self-weight elements included), improves its free geometry (pylon height, sag,
tower height, rise, or every cable or rib node's height) with
:func:`~bridgeopt.geometry.optimize.optimize_geometry`, and solves the reference optimum
(:func:`~bridgeopt.solver.layout.optimize_layout`) on the same problem.  The geometry
stages live in :mod:`bridgeopt.forms.stages`.
"""

from __future__ import annotations

import dataclasses
import logging
import math
from dataclasses import dataclass, field

import numpy as np

from bridgeopt.model.bridge import BridgeScenario
from bridgeopt.cautions import CAUTIONS
from bridgeopt.solver.design import Design, below_reference
from bridgeopt.errors import InputError, SolveError
from bridgeopt.solver.frame import Frame, size_frame
from bridgeopt.solver.layout import optimize_layout
from bridgeopt.forms.build import build_form, form_problem, self_weight_sag, single_element_reach
from bridgeopt.forms.builder import deck_level
from bridgeopt.forms.stages import improve_form
from bridgeopt.forms.quantities import (GROUPS, dimension_lines, form_dimensions, form_geometry,
                                        group_quantities, on_mirror_line)
from bridgeopt.forms.specs import CableStayedForm, FormSpec, ReferenceForm

__all__ = ["FormResult", "solve_form", "group_quantities", "on_mirror_line", "start_spec",
           "GROUPS"]

log = logging.getLogger(__name__)

@dataclass(frozen=True)
class FormResult:
    """A solved bridge form set against the reference optimum of the same scenario.

    Parameters
    ----------
    spec : FormSpec
        The form solved (its ``[form]`` keys; lengths [m]).
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
    reference_volume : float
        Volume of the reference optimum (whole span; nan when not compared). [m3]
    ratio : float
        volume / reference_volume. [-]
    quantities : dict
        Per element group: members, volume [m3], weight [N] ... (see
        :func:`group_quantities`).
    geometry : dict
        Main dimensions of the final form: ``pylon_height``, ``tower_height``,
        ``sag`` or ``rise``, a forked pylon's ``leg_lean`` and
        ``leg_head_height``, and ``deck_panel``, the largest distance between
        the deck's loaded nodes (where stays, hangers or columns hold it). [m]
    dimensions : dict
        Ratios and per-member dimensions of the final form: cable-stayed
        ``span_to_height`` [-] (pylon spacing over pylon height),
        ``anchor_heights_m`` and ``stay_deck_x_m`` (per stay of the model, by deck
        x) [m], ``start_pattern`` (``"chosen"`` for a forked pylon), and how far
        the optimized anchors moved from the pattern at its best pylon height
        (a forked pylon: from the stays the LP chose), ``anchor_move_largest_m``,
        ``anchor_move_mean_m``, ``deck_point_move_largest_m`` [m]; suspension
        ``sag_ratio`` and ``span_to_sag`` [-]; arch ``rise_ratio`` and
        ``span_to_rise`` [-].
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
    dimensions: dict = field(default_factory=dict)

    @property
    def form_type(self) -> str:
        """The form's type, ``spec.type`` (``"cable-stayed"``, ``"suspension"`` ...)."""
        return self.spec.type

    def to_frame(self):
        """Quantities per element group as a :class:`pandas.DataFrame` (SI units in the names)."""
        import pandas as pd

        df = pd.DataFrame.from_dict(self.quantities, orient="index")
        df.index.name = "group"
        return df

    def summary(self) -> str:
        """A few lines for the engineer, ending with the cautions."""
        lines = [f"{self.form_type} form: volume {self.volume:.6g} m3 (start "
                 f"{self.start_volume:.6g}"
                 f" m3), weight {self.weight:.6g} N; reference optimum {self.reference_volume:.6g}"
                 f" m3; ratio {self.ratio:.4f}"]
        for g, q in self.quantities.items():
            lines.append(f"  {g}: {q['members']} members, {q['volume_m3']:.6g} m3")
        lines.extend(dimension_lines(self.dimensions))
        lines.append(CAUTIONS)
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
            need = self_weight_sag(problem, line[1], span)
            if np.ptp(z) < 2 * need:
                raise SolveError(
                    "span-limit",
                    f"the {spec.type} form cannot carry its loads: its {line[2]} of "
                    f"{np.ptp(z):.6g} m is close to the least with which an equal-strength "
                    f"{line[0]} carries its own weight over {span:.6g} m, ln(sec(k L/2))/k = "
                    f"{need:.6g} m (k = rho*g/sigma), and the deck, hangers or columns need "
                    "more; raise it, shorten the span or use a stronger, lighter material (no "
                    f"single equal-strength {line[0]} spans more than pi*sigma/(rho*g) = "
                    f"{single_element_reach(problem, line[1]):.6g} m; a structure of several "
                    "members can)") from None
        if part[i] < REACH_WARNING:
            raise
        raise SolveError(
            "span-limit",
            f"the {spec.type} form cannot carry its loads: its {frame.group[i]} members reach "
            f"up to {lx[i]:.6g} m horizontally, {100 * part[i]:.0f}% of the reach "
            f"pi*sigma/(rho*g) = {math.pi / k[i]:.6g} m of a single equal-strength element, "
            "and an element that long sags too far under its own weight to carry the deck as "
            "well; shorten the reach (more pylons, closer hangers, a shorter span), steepen it (a "
            "taller pylon, more sag or rise) or use a stronger, lighter material") from None


def start_spec(spec: FormSpec) -> FormSpec:
    """The spec whose frame is the starting pattern of ``spec`` (free stay anchors: the pattern).

    Parameters
    ----------
    spec : FormSpec
        A form spec.

    Returns
    -------
    FormSpec
        ``spec`` with ``anchors = "pattern"`` for a cable-stayed form, else ``spec``.
    """
    if isinstance(spec, CableStayedForm) and spec.anchors == "free" and spec.pylon == "vertical":
        return dataclasses.replace(spec, anchors="pattern")
    return spec


def solve_form(bridge: BridgeScenario, spec: FormSpec, *, optimize: bool = True,
               reference: Design | None = None, member_adding: bool = True,
               compare: bool = True) -> FormResult:
    """Solve the form ``spec`` of ``bridge`` and its reference optimum.

    Parameters
    ----------
    bridge : BridgeScenario
        The crossing (span, rise, depth [m], deck load [N/m], materials).
    spec : ReferenceForm, CableStayedForm, SuspensionForm or ArchForm
        The form to build (its ``[form]`` keys; lengths [m]).
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
        The sized form, its reference, volumes [m3], weight [N] and ratio [-].

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
    if reference is not None and reference.problem != problem:
        raise InputError("reference", "a design of another problem",
                         "a reference solved on form_problem(bridge, spec) (same domain, loads "
                         "and supports, so that it bounds the form)")
    if isinstance(spec, ReferenceForm):
        ref = reference or optimize_layout(problem, member_adding=member_adding)
        return FormResult(spec=spec, design=ref, start_volume=ref.volume, volume=ref.volume,
                          weight=ref.weight, reference=ref, reference_volume=ref.volume,
                          ratio=1.0, quantities=group_quantities(ref, GROUPS["reference"]),
                          geometry={})
    frame, moves = build_form(bridge, start_spec(spec), problem)
    start = _size_start(frame, spec)
    design = pattern = start
    if optimize and moves is not None and moves.size:
        design, pattern = improve_form(bridge, spec, problem, frame, moves, start)
    ref = None
    if compare:
        ref = reference or optimize_layout(problem, member_adding=member_adding)
        # the caller decides whether to refuse it (the studies and solve_scenario do)
        message = below_reference(f"the {spec.type} form", design.volume, ref.volume)
        if message:
            log.warning("%s", message)
    geometry = form_geometry(design, spec.type, deck_level(problem)[2])
    if geometry.get("deck_panel", 0.0) > 1.01 * bridge.spacing:
        log.warning("the %s form loads its deck only every %.6g m, more coarsely than the "
                    "reference's grid step of %.6g m: the deck is taken to span between them "
                    "without being sized, which favours the form; use more stays or a closer "
                    "spacing", spec.type, geometry["deck_panel"], bridge.spacing)
    ref_volume = ref.volume if ref is not None else math.nan
    dimensions = form_dimensions(design, pattern, spec, bridge, geometry)
    # the final dimensions travel with the design, for drawings and study tables
    design = dataclasses.replace(design, stats={**design.stats, "form": {
        "type": spec.type, "geometry": geometry, "dimensions": dimensions}})
    return FormResult(spec=spec, design=design, start_volume=start.volume, volume=design.volume,
                      weight=design.weight, reference=ref, reference_volume=ref_volume,
                      ratio=design.volume / ref_volume,
                      quantities=group_quantities(design, GROUPS[getattr(spec, "variant",
                                                                         spec.type)]),
                      geometry=geometry, dimensions=dimensions)
