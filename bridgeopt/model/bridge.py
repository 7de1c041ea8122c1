"""Bridge scenarios: span, rise, depth, deck load and arrangement -> a layout problem.

Two arrangements:

* ``"repeating"``: the central span of a long run of equal spans under the
  same load.  The pier line and the mid-span line are mirror planes, so only
  the half span between them is modelled (nodes on both lines are held
  horizontally); the pier's foundation, at the foot of the pier line at the
  bottom of the domain, takes the vertical reaction.
* ``"single"``: one span between anchored abutments.  The mid-span line is a
  mirror plane; the abutment face below the deck (from the deck down to the
  bottom of the domain) is held in both directions.

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

__all__ = ["ARRANGEMENTS", "BridgeScenario"]

ARRANGEMENTS = ("repeating", "single")


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
                                        high=DECK_LOAD[1], unit="N/m"),
            "divisions": checked_whole("bridge.divisions", self.divisions, low=2, high=240,
                                       even=True),
        }
        for name, value in numbers.items():  # plain floats and ints (numpy scalars accepted)
            object.__setattr__(self, name, value)
        if self.arrangement not in ARRANGEMENTS:
            raise InputError("bridge.arrangement", self.arrangement,
                             "one of " + ", ".join(map(repr, ARRANGEMENTS)))
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
        return int(math.floor(self.depth / self.spacing + 1e-9))

    def to_problem(self) -> Problem:
        """The symmetric half-span layout problem, reported as one whole span."""
        s = self.spacing
        half = 0.5 * self.span
        top, bottom = self.rise_cells * s, -self.depth_cells * s
        domain = Domain.rectangle((0.0, half), (bottom, top))
        deck = LineLoad((0.0, 0.0), (half, 0.0), self.deck_load)
        if self.arrangement == "repeating":
            supports = (Support((0.0, bottom), "z"),)
            mirrors = (0.0, half)
        else:
            supports = tuple(Support((0.0, -j * s), "xz") for j in range(self.depth_cells + 1))
            mirrors = (half,)
        return Problem(domain=domain, spacing=s, material=self.material, supports=supports,
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
