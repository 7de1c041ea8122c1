"""Bridge scenarios: span, rise, depth, deck load and arrangement -> a layout problem.

Two arrangements:

* ``"repeating"``: the central span of a long run of equal spans under the
  same load.  The pier line and the mid-span line are mirror planes, so only
  the half span between them is modelled (nodes on both lines are held
  horizontally); the pier's foundation, on the pier line at the foundation
  level ``foundation_depth`` below the deck, takes the vertical reaction.
* ``"single"``: one span between abutments, with a back span of length
  ``back_span`` behind each (default :data:`BACK_SPAN_RATIO` of the span, common
  practice for single-span cable-stayed and suspension bridges).  The mid-span
  line is a mirror plane; the abutment face below the deck (from the deck down
  to the bottom of the domain) is held in both directions, and an anchor point
  at ground (deck) level at the far end of the back span is held in both
  directions.  The envelope extends over the back span above ground (from the
  deck level up to the rise); the back span's own deck is not part of the model
  (it carries no load here).  These are the crossing's only supports: no free
  horizontal reaction along the abutment line above the deck.

The foundation level is its own input, independent of the envelope: a pier's
foundation lies ``foundation_depth`` below the deck (default 0, the deck's support
level at the pier).  When it lies below the envelope's bottom, the envelope gets a
pier shaft's slot one grid step wide down to it (:func:`crossing_outline`), so the
pier shaft is a member of the structure, for the forms and the reference alike.
Extra piers (:meth:`BridgeScenario.to_problem` ``piers``, the piers of
intermediate pylons) stand at the same foundation level.

Volume and weight are reported for one whole span (two half models).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from bridgeopt.errors import InputError
from bridgeopt.model.limits import (DECK_LOAD, DENSITY, HEIGHT_PER_SPAN, SPAN, STRENGTH,
                                    checked_number, checked_whole)
from bridgeopt.model.materials import Material
from bridgeopt.model.problem import Domain, LineLoad, Problem, Support

__all__ = ["ARRANGEMENTS", "BridgeScenario", "BACK_SPAN_RATIO", "crossing_outline"]

ARRANGEMENTS = ("repeating", "single")

#: Back span over main span of a single-span crossing by default (common practice,
#: from memory: about 0.3 to 0.5 for cable-stayed and suspension bridges). [-]
BACK_SPAN_RATIO = 0.4


def _clean(points: list) -> tuple:
    """``points`` without repeats and without vertices in the middle of a straight edge."""
    out: list = []
    for p in points:
        if not out or (abs(p[0] - out[-1][0]) > 0 or abs(p[1] - out[-1][1]) > 0):
            out.append(p)
    if len(out) > 1 and out[0] == out[-1]:
        out.pop()
    changed = True
    while changed and len(out) > 3:
        changed = False
        for i in range(len(out)):
            a, b, c = out[i - 1], out[i], out[(i + 1) % len(out)]
            cross = (b[0] - a[0]) * (c[1] - b[1]) - (b[1] - a[1]) * (c[0] - b[0])
            if cross == 0:
                del out[i]
                changed = True
                break
    return tuple(out)


def crossing_outline(*, left: float, right: float, deck_from: float, deck_to: float,
                     bottom: float, top: float, slots=(), foundation: float = 0.0,
                     step: float = 1.0) -> tuple:
    """Outline of a crossing's envelope: below the deck, above it, back spans and pier slots.

    Parameters
    ----------
    left, right : float
        x-extent of the envelope above the deck (back spans included). [m]
    deck_from, deck_to : float
        x-extent of the envelope below the deck (the span between abutments or piers). [m]
    bottom, top : float
        Lowest and highest z of the envelope; the deck is at z = 0. [m]
    slots : sequence of float
        x of the left edge of each pier slot (one ``step`` wide), reaching down to
        ``foundation`` where it lies below ``bottom``. [m]
    foundation : float
        z of the pier foundations. [m]
    step : float
        Width of a pier slot (the grid step). [m]

    Returns
    -------
    tuple of (x, z)
        The polygon's vertices, anticlockwise. [m]
    """
    pts = [(deck_from, bottom)]
    if foundation < bottom:
        merged: list[list[float]] = []     # slots that touch or overlap make one wider slot
        for a in sorted(set(slots)):
            if merged and a <= merged[-1][1] + 1e-9 * step:
                merged[-1][1] = max(merged[-1][1], a + step)
            else:
                merged.append([a, a + step])
        for a, b in merged:
            pts += [(a, bottom), (a, foundation), (b, foundation), (b, bottom)]
    pts.append((deck_to, bottom))
    if right > deck_to:
        pts += [(deck_to, 0.0), (right, 0.0)]
    pts += [(right, top), (left, top)]
    if left < deck_from:
        pts += [(left, 0.0), (deck_from, 0.0)]
    return _clean(pts)


def _bridge_material(field: str, value: object) -> None:
    """A bridge's material must be a :class:`Material` within the practical ranges."""
    if not isinstance(value, Material):
        raise InputError(field, value, "a Material, e.g. PRESETS['steel'] or "
                         "material_from_name('steel')")
    for name in ("tension_strength", "compression_strength"):
        checked_number(f"{field}.{name}", getattr(value, name), low=STRENGTH[0],
                       high=STRENGTH[1], unit="Pa")
    checked_number(f"{field}.density", value.density, low=DENSITY[0], high=DENSITY[1],
                   unit="kg/m3", zero_ok=True)


@dataclass(frozen=True)
class BridgeScenario:
    """A bridge concept study's inputs.

    Parameters
    ----------
    span : float
        Span between pier (or abutment) centrelines. [m]
    rise : float
        Height allowed above the deck for structure (pylons, arches). [m]
    depth : float
        Depth allowed below the deck (clearance to foundations or water). [m]
    deck_load : float
        Uniform load at deck level, deck self-weight and traffic. [N/m]
    material : Material
        Material of the tension elements (and of the compression elements unless
        ``compression_material`` is given).
    arrangement : {"repeating", "single"}
        ``"repeating"``: the central span of a long run of equal spans (pier lines
        held horizontally); ``"single"``: one span between anchored abutments.
    divisions : int
        Nodal divisions across the full span (even; the half model has half). [-]
    name : str
        Label of the crossing for reports.
    compression_material : Material, optional
        Different material for compression elements.
    back_span : float, optional
        ``"single"`` only: length of the back span behind each abutment, from the
        abutment to the anchor point at ground (deck) level, in [0, span]; clipped
        to whole grid steps; 0 for none.  Default :data:`BACK_SPAN_RATIO` x span
        (common practice). [m]
    foundation_depth : float
        Depth of the pier foundations below the deck (deck height above the water,
        water depth and founding depth together), in [0, 10 spans]; clipped to
        whole grid steps.  Default 0: the deck's support level at the pier. [m]
    """

    span: float
    rise: float
    depth: float
    deck_load: float
    material: Material
    arrangement: str = "repeating"
    divisions: int = 30
    name: str = "bridge"
    compression_material: Material | None = None
    back_span: float | None = None
    foundation_depth: float = 0.0

    def __post_init__(self) -> None:
        span = checked_number("bridge.span", self.span, low=SPAN[0], high=SPAN[1], unit="m")
        tall = HEIGHT_PER_SPAN * span
        numbers = {
            "span": span,
            "rise": checked_number("bridge.rise", self.rise, low=0.0, high=tall,
                                   unit=f"m ({HEIGHT_PER_SPAN:g} spans)"),
            "depth": checked_number("bridge.depth", self.depth, low=0.0, high=tall,
                                    unit=f"m ({HEIGHT_PER_SPAN:g} spans)"),
            "deck_load": checked_number("bridge.deck_load", self.deck_load, low=DECK_LOAD[0],
                                        high=DECK_LOAD[1], unit="N/m (downwards)"),
            "foundation_depth": checked_number("bridge.foundation_depth", self.foundation_depth,
                                               low=0.0, high=tall, zero_ok=True,
                                               unit=f"m ({HEIGHT_PER_SPAN:g} spans)"),
            "divisions": checked_whole("bridge.divisions", self.divisions, low=2, high=240,
                                       even=True),
        }
        for name, value in numbers.items():  # plain floats and ints (numpy scalars accepted)
            object.__setattr__(self, name, value)
        if self.arrangement not in ARRANGEMENTS:
            raise InputError("bridge.arrangement", self.arrangement,
                             "one of " + ", ".join(map(repr, ARRANGEMENTS)))
        if self.back_span is not None:
            if self.arrangement != "single":
                raise InputError("bridge.back_span", self.back_span, "left out for "
                                 "arrangement = 'repeating' (back spans belong to a single span)")
            object.__setattr__(self, "back_span", checked_number(
                "bridge.back_span", self.back_span, low=0.0, high=span, unit="m (one span)",
                zero_ok=True))
        _bridge_material("material", self.material)
        if self.compression_material is not None:
            _bridge_material("compression_material", self.compression_material)
        if not isinstance(self.name, str):
            raise InputError("bridge.name", self.name, "a text string")
        if self.rise + self.depth <= 0:
            raise InputError("bridge.rise", self.rise, "> 0 m when depth is 0 (the domain needs height)")
        if self.rise < self.spacing * (1 - 1e-9) and self.depth < self.spacing * (1 - 1e-9):
            raise InputError("bridge.rise", self.rise,
                             f">= one grid step ({self.spacing:.6g} m) above or below the deck "
                             "(raise rise or depth, or use more divisions)")

    @property
    def spacing(self) -> float:
        """Grid step span/divisions. [m]"""
        return self.span / self.divisions

    @property
    def rise_cells(self) -> int:
        """Whole grid steps that fit in the rise (the domain is clipped to them)."""
        return int(math.floor(self.rise / self.spacing + 1e-9))

    @property
    def depth_cells(self) -> int:
        """Whole grid steps that fit in the depth below the deck."""
        return int(math.floor(self.depth / self.spacing + 1e-9))

    @property
    def back_cells(self) -> int:
        """Whole grid steps of each back span (0 for repeating spans or a deck at z = rise 0)."""
        if self.arrangement != "single" or self.rise_cells == 0:
            return 0
        back = BACK_SPAN_RATIO * self.span if self.back_span is None else self.back_span
        return int(math.floor(back / self.spacing + 1e-9))

    @property
    def back_length(self) -> float:
        """Length of each back span in the model (whole grid steps). [m]"""
        return self.back_cells * self.spacing

    @property
    def foundation_level(self) -> float:
        """z of the pier foundations (whole grid steps below the deck, z = 0). [m]"""
        return -math.floor(self.foundation_depth / self.spacing + 1e-9) * self.spacing

    def to_problem(self, piers=()) -> Problem:
        """The symmetric half-span layout problem, reported as one whole span.

        Parameters
        ----------
        piers : sequence of float
            x of extra piers in the half span (grid nodes in (0, span/2]), each a
            vertical support at the foundation level. [m]
        """
        s = self.spacing
        half = 0.5 * self.span
        top, bottom = self.rise_cells * s, -self.depth_cells * s
        fz = self.foundation_level
        lines = [float(x) for x in piers]
        for i, x in enumerate(lines):
            j = round(x / s)
            if not (0 < x <= half * (1 + 1e-12) and abs(j * s - x) <= 1e-6 * s):
                raise InputError(f"piers[{i}]", x, f"a grid node in (0, {half:g}] m (a "
                                 f"multiple of the grid step {s:.6g} m)")
        supports = []
        if self.arrangement == "repeating":
            supports.append(Support((0.0, fz), "z"))
            mirrors = (0.0, half)
            lines = [0.0] + lines
        else:
            supports += [Support((0.0, -j * s), "xz") for j in range(self.depth_cells + 1)]
            if self.back_cells:
                supports.append(Support((-self.back_length, 0.0), "xz"))
            mirrors = (half,)
        supports += [Support((x, fz), "z") for x in lines if x > 0]
        slots = [min(x, half - s) for x in lines]
        outline = crossing_outline(left=-self.back_length, right=half, deck_from=0.0,
                                   deck_to=half, bottom=bottom, top=top, slots=slots,
                                   foundation=fz, step=s)
        domain = Domain(outline)
        deck = LineLoad((0.0, 0.0), (half, 0.0), self.deck_load)
        return Problem(domain=domain, spacing=s, material=self.material, supports=tuple(supports),
                       line_loads=(deck,), mirror_lines=mirrors,
                       compression_material=self.compression_material, copies=2.0,
                       name=self.name)

    def normalised_volume(self, volume: float) -> float:
        """volume / (deck_load * span^2 / tension strength). [-]

        Parameters
        ----------
        volume : float
            Material volume of the whole span. [m3]
        """
        return volume * self.material.tension_strength / (self.deck_load * self.span ** 2)

    @property
    def normalised_span(self) -> float:
        """span / (sigma / (rho g)): span over the self-supporting length. [-]"""
        return self.span / self.material.self_supporting_length("tension")
