"""bridgeopt: minimum-volume layouts for long-span bridge concepts.

Layout optimization on a ground structure (LP solved with HiGHS, member adding
for fine grids), with equal-strength self-weight elements; bridge scenarios
build the problems.

CAUTION: concept-stage estimates only.  Buckling, dynamics, aerodynamics,
fatigue, deflection and construction stages are not checked.  Defer to local
codes and licensed engineers.
"""

__version__ = "0.1.0"  # first, so that modules reading it import in any order

from bridgeopt.model.bridge import ARRANGEMENTS, BridgeScenario
from bridgeopt.cautions import CAUTIONS
from bridgeopt.solver.design import Design, Members
from bridgeopt.errors import BridgeoptError, InputError, SolveError
from bridgeopt.forms import (ArchForm, CableStayedForm, FormResult, ReferenceForm, SuspensionForm,
                    parse_form, solve_form)
from bridgeopt.solver.frame import Frame, size_frame
from bridgeopt.geometry import NodeMoves, optimize_geometry
from bridgeopt.solver.layout import optimize_layout
from bridgeopt.model.loads import CaseStudy, LoadCase, UnitCosts, traffic_load
from bridgeopt.solver.multicase import CaseDesign, optimize_cases
from bridgeopt.model.crossing import full_span_problem
from bridgeopt.model.materials import GRAVITY, PRESETS, Material, material_from_name
from bridgeopt.model.problem import Domain, LineLoad, PointLoad, Problem, Support

__all__ = [
    "ARRANGEMENTS", "BridgeScenario", "CAUTIONS", "Design", "Members", "BridgeoptError",
    "InputError", "SolveError", "optimize_layout", "GRAVITY", "PRESETS", "Material",
    "material_from_name", "Domain", "LineLoad", "PointLoad", "Problem", "Support",
    "Frame", "size_frame", "NodeMoves", "optimize_geometry", "ArchForm", "CableStayedForm",
    "FormResult", "ReferenceForm", "SuspensionForm", "parse_form", "solve_form",
    "CaseStudy", "LoadCase", "UnitCosts", "traffic_load", "CaseDesign", "optimize_cases",
    "full_span_problem",
]

