"""The cautions every output carries (CLI, JSON, notebooks, HTML reports)."""

from __future__ import annotations

__all__ = ["CAUTIONS", "CAUTION_LINES"]

CAUTION_LINES = (
    "Concept-stage estimate of material volume only, from idealised plastic layout optimization.",
    "Not checked: buckling, dynamics, aerodynamics, fatigue, deflection and construction stages.",
    "Loads, materials and geometry are simplified; connections, deck structure and secondary "
    "members are not sized.",
    "Defer to the local design codes and to licensed engineers before any design decision.",
)

#: One paragraph with every caution.
CAUTIONS = "CAUTION: " + " ".join(CAUTION_LINES)
