"""Several load cases in the workbook: traffic patterns on top of the deck load, solved on
the whole-span model and set beside the heaviest case alone."""

from __future__ import annotations

from functools import lru_cache

from bridgeopt.errors import InputError
from bridgeopt.files.scenario import Scenario, parse_scenario
from bridgeopt.model.bridge import BridgeScenario
from bridgeopt.solver.multicase import single_case_reference
from bridgeopt.study.solve import solve_scenario

__all__ = ["TRAFFIC", "TRAFFIC_DIVISIONS", "solve_traffic"]


#: Traffic patterns the workbook offers on top of the deck load (each a set of load cases).
TRAFFIC = {
    "none": (),
    "full and half span": ({"name": "full", "pattern": "full"},
                           {"name": "left half", "pattern": "half", "side": "left"}),
    "full, half and central": ({"name": "full", "pattern": "full"},
                               {"name": "left half", "pattern": "half", "side": "left"},
                               {"name": "central", "pattern": "central"}),
}
#: Grid of the several-load-case study in the workbook (whole-span model, kept coarse so
#: that a slider change stays interactive).
TRAFFIC_DIVISIONS = 16


@lru_cache(maxsize=64)
def solve_traffic(bridge: BridgeScenario, traffic: str, intensity: float):
    """The reference optimum that carries the deck load plus each traffic case of ``traffic``.

    Parameters
    ----------
    bridge : BridgeScenario
    traffic : str
        A key of :data:`TRAFFIC` other than ``"none"``.
    intensity : float
        Traffic load on the loaded part of the deck, per case. [N/m]

    Returns
    -------
    (CaseDesign, Design)
        The several-case design (whole-span model, members sized over all cases,
        self-weight lumped at member ends, :data:`TRAFFIC_DIVISIONS` divisions)
        and the optimum for its heaviest case alone.

    Raises
    ------
    InputError, SolveError
    """
    if traffic not in TRAFFIC or not TRAFFIC[traffic]:
        raise InputError("traffic", traffic, "one of " + ", ".join(
            repr(k) for k in TRAFFIC if TRAFFIC[k]))
    data = Scenario(name=bridge.name, bridge=bridge).to_dict()
    data["bridge"]["divisions"] = min(bridge.divisions, TRAFFIC_DIVISIONS)
    data["load_case"] = [{**case, "intensity": float(intensity)} for case in TRAFFIC[traffic]]
    scenario = parse_scenario(data)
    design = solve_scenario(scenario).design
    _, single = single_case_reference(scenario.study)
    return design, single

