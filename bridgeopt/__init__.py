"""bridgeopt: minimum-volume layouts for long-span bridge concepts.

Layout optimization on a ground structure (LP solved with HiGHS, member adding
for fine grids), with equal-strength self-weight elements; bridge scenarios
build the problems.

CAUTION: concept-stage estimates only.  Buckling, dynamics, aerodynamics,
fatigue, deflection and construction stages are not checked.  Defer to local
codes and licensed engineers.
"""

from .bridge import ARRANGEMENTS, BridgeScenario
from .cautions import CAUTIONS
from .design import Design, Members
from .errors import BridgeoptError, InputError, SolveError
from .forms import (ArchForm, CableStayedForm, FormResult, ReferenceForm, SuspensionForm,
                    parse_form, solve_form)
from .frame import Frame, size_frame
from .geometry import NodeMoves, optimize_geometry
from .layout import optimize_layout
from .loadcases import CaseStudy, LoadCase, UnitCosts, traffic_load
from .multicase import CaseDesign, optimize_cases
from .crossing import full_span_problem
from .materials import GRAVITY, PRESETS, Material, material_from_name
from .problem import Domain, LineLoad, PointLoad, Problem, Support

__all__ = [
    "ARRANGEMENTS", "BridgeScenario", "CAUTIONS", "Design", "Members", "BridgeoptError",
    "InputError", "SolveError", "optimize_layout", "GRAVITY", "PRESETS", "Material",
    "material_from_name", "Domain", "LineLoad", "PointLoad", "Problem", "Support",
    "Frame", "size_frame", "NodeMoves", "optimize_geometry", "ArchForm", "CableStayedForm",
    "FormResult", "ReferenceForm", "SuspensionForm", "parse_form", "solve_form",
    "CaseStudy", "LoadCase", "UnitCosts", "traffic_load", "CaseDesign", "optimize_cases",
    "full_span_problem",
]

__version__ = "0.1.0"
