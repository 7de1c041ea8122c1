"""Studies: the reference optimum against practical bridge forms on the same crossing,
comparison and quantity tables, trend sweeps over span, height and pylon count, several
traffic cases, and judging a proposed layout.  Tables are pandas frames in SI units
(pandas is imported only when a table is made); nothing here draws.
:func:`~bridgeopt.study.solve.solve_scenario` is the one way a scenario is solved.

``from bridgeopt import study`` gives the whole room: ``study.compare``,
``study.span_sweep``, ``study.register_form``, ``study.solve_scenario`` and the rest.
"""

from bridgeopt.study.solve import CASE_STATUSES, Solved, form_reference, solve_scenario
from bridgeopt.study.options import *  # noqa: F401,F403
from bridgeopt.study.options import __all__ as _options
from bridgeopt.study.traffic import TRAFFIC, TRAFFIC_DIVISIONS, solve_traffic
from bridgeopt.forms.legs import NAME as LEGS_FORM, register_legs, solve_legs
from bridgeopt.study.trends import height_sweep, pylon_costs, pylon_sweep, span_sweep

__all__ = [*_options, "TRAFFIC", "TRAFFIC_DIVISIONS", "solve_traffic", "span_sweep",
           "height_sweep", "pylon_sweep", "pylon_costs", "Solved", "solve_scenario", "form_reference",
           "CASE_STATUSES", "LEGS_FORM", "register_legs", "solve_legs"]
