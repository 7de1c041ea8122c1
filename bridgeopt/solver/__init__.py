"""Layout optimization: ground structure, element coefficients, the LP with member
adding (HiGHS), single- and multi-case layouts, frame sizing and the immutable
:class:`Design` they return.  Knows problems, not bridges."""

from bridgeopt.solver.design import Design, Members, equilibrium_residual
from bridgeopt.solver.frame import Frame, size_frame
from bridgeopt.solver.layout import optimize_layout
from bridgeopt.solver.multicase import CaseDesign, optimize_cases, single_case_reference

__all__ = ["Design", "Members", "equilibrium_residual", "Frame", "size_frame",
           "optimize_layout", "CaseDesign", "optimize_cases", "single_case_reference"]
