"""The crossing as the solver sees it: materials, the general problem, loads and load
cases, and the bridge scenarios that build problems.

Data flows one way through the package::

    model -> solver -> geometry -> forms -> files -> study -> sweep -> workbook -> cli

Nothing here solves anything or imports a higher room.
"""

from bridgeopt.model.bridge import ARRANGEMENTS, BridgeScenario
from bridgeopt.model.crossing import deck_extent, full_span_problem
from bridgeopt.model.loads import PATTERNS, CaseStudy, LoadCase, UnitCosts, traffic_load
from bridgeopt.model.materials import GRAVITY, PRESETS, Material, material_from_name
from bridgeopt.model.problem import Domain, LineLoad, PointLoad, Problem, Support

__all__ = [
    "ARRANGEMENTS", "BridgeScenario", "deck_extent", "full_span_problem", "PATTERNS",
    "CaseStudy", "LoadCase", "UnitCosts", "traffic_load", "GRAVITY", "PRESETS", "Material",
    "material_from_name", "Domain", "LineLoad", "PointLoad", "Problem", "Support",
]
