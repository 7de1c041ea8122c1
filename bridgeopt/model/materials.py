"""Materials: design stresses and density.

A :class:`Material` has separate tension and compression design stresses and
one density.  ``density = 0`` is the weightless option.  A problem may use one
material for tension elements and another for compression elements.

The preset values are typical concept-stage figures (common practice), not
code values: replace them with the values your design code gives.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from bridgeopt.errors import InputError
from bridgeopt.model.limits import checked_number

__all__ = ["GRAVITY", "Material", "PRESETS", "material_from_name"]

#: Numeric bounds of any material's design stress [Pa] and non-zero density [kg/m3]: far
#: outside practice, inside what the dimensionless LP resolves (k = rho g / sigma).
STRENGTH_BOUNDS = (1.0e-3, 1.0e13)
DENSITY_BOUNDS = (1.0e-6, 1.0e9)

#: Standard acceleration of gravity [m/s2] (CGPM 1901, ISO 80000-3).
GRAVITY = 9.80665


@dataclass(frozen=True)
class Material:
    """A structural material for layout optimization.

    Parameters
    ----------
    name : str
        Label used in reports.
    tension_strength : float
        Design stress in tension. [Pa]
    compression_strength : float
        Design stress in compression. [Pa]
    density : float
        Mass density; 0 for a weightless study. [kg/m3]
    """

    name: str
    tension_strength: float
    compression_strength: float
    density: float

    def __post_init__(self) -> None:
        # wide numeric bounds (the dimensionless LP's); bridge scenarios hold practical ones
        for field in ("tension_strength", "compression_strength"):
            object.__setattr__(self, field, checked_number(
                f"material.{field}", getattr(self, field), low=STRENGTH_BOUNDS[0],
                high=STRENGTH_BOUNDS[1], unit="Pa"))
        object.__setattr__(self, "density", checked_number(
            "material.density", self.density, low=DENSITY_BOUNDS[0], high=DENSITY_BOUNDS[1],
            unit="kg/m3", zero_ok=True))
        if not isinstance(self.name, str):
            raise InputError("material.name", self.name, "a text string")

    @property
    def weightless(self) -> bool:
        """True when the material has no density."""
        return self.density == 0

    def k(self, sense: str) -> float:
        """Self-weight parameter rho*g/sigma for ``"tension"`` or ``"compression"``. [1/m]

        Parameters
        ----------
        sense : {"tension", "compression"}
            Which design stress sigma divides the unit weight rho*g.
        """
        sigma = self.tension_strength if sense == "tension" else self.compression_strength
        return self.density * GRAVITY / sigma

    def self_supporting_length(self, sense: str) -> float:
        """Length sigma/(rho*g) of a bar that just carries its own weight. [m]

        Infinite for a weightless material.

        Parameters
        ----------
        sense : {"tension", "compression"}
            A tie (tension design stress) or a strut (compression design stress).
        """
        k = self.k(sense)
        return math.inf if k == 0 else 1.0 / k

    def limiting_reach(self, sense: str) -> float:
        """Largest horizontal reach pi*sigma/(rho*g) of an equal-strength element. [m]

        Parameters
        ----------
        sense : {"tension", "compression"}
            A hanging cable (tension) or a standing arch (compression).
        """
        return math.pi * self.self_supporting_length(sense)


#: Concept-stage presets (common practice; check against your design code).
#: steel: S355 structural steel, f_y = 355 MPa (EN 10025-2), 7850 kg/m3.
#: high-strength-steel: S690 quenched and tempered plate, f_y = 690 MPa (EN 10025-6).
#: cable-wire: galvanised bridge wire, f_u about 1770 MPa with a factor of about 2.2
#:   on stays and main cables (common practice, from memory) -> 800 MPa working stress.
#: cfrp: carbon-fibre reinforced polymer, concept values from memory.
PRESETS: dict[str, Material] = {
    "steel": Material("steel", 355e6, 355e6, 7850.0),
    "high-strength-steel": Material("high-strength-steel", 690e6, 690e6, 7850.0),
    "cable-wire": Material("cable-wire", 800e6, 355e6, 7850.0),
    "cfrp": Material("cfrp", 1200e6, 600e6, 1600.0),
    "weightless-steel": Material("weightless-steel", 355e6, 355e6, 0.0),
}


def material_from_name(name: str) -> Material:
    """Return the preset called ``name``; raise :class:`InputError` otherwise.

    Parameters
    ----------
    name : str
        Key of :data:`PRESETS` (``"steel"``, ``"cable-wire"`` ...).

    Returns
    -------
    Material
    """
    try:
        return PRESETS[name]
    except KeyError:
        raise InputError("material.name", name, "one of " + ", ".join(map(repr, PRESETS))) from None
