"""Members at zero area leave right after the crossover (casemodel.EARLY_DROP, issue 12).

Reference for the optimum: member adding ends at the full ground structure's optimum when no
candidate out of the LP violates the dual check (M. Gilbert, A. Tyas 2003, Engineering
Computations 20(8):1044-1064; several load cases: T.J. Pritchard, M. Gilbert, A. Tyas 2005, 6th
WCSMO).  A member whose columns are all nonbasic at zero leaves without changing the basis or
the duals, and comes back if it violates the dual check, so the optimum stays the same.
"""

import pytest

from bridgeopt import PRESETS, BridgeScenario
from bridgeopt.model.crossing import full_span_problem
from bridgeopt.model.loads import CaseStudy, LoadCase, UnitCosts, traffic_load
from bridgeopt.solver import casemodel
from bridgeopt.solver.adding import DROP_AFTER
from bridgeopt.solver.multicase import GAP_TOL, optimize_cases

REL = 2e-6  # same optimum: member adding stops at a proven gap below 1e-6 (multicase.GAP_TOL)


def _study(divisions=10):
    b = BridgeScenario(span=480.0, rise=120.0, depth=40.0, deck_load=1.0e5,
                       material=PRESETS["steel"], divisions=divisions)
    loads = tuple(LoadCase(c, line_loads=(traffic_load(c, intensity=4.0e4, deck=(0.0, 480.0)),))
                  for c in ("full", "half", "central"))
    return CaseStudy(full_span_problem(b), loads, UnitCosts(9000.0, 12000.0, "EUR"))


def _record(monkeypatch):
    """Method of each solve (True: interior point) and the solves before each removal."""
    solves, removals = [], []
    run, remove = casemodel.CaseModel.run_once, casemodel.CaseModel.remove_due

    def running(self):
        solves.append(self.ipm)
        return run(self)

    def removing(self):
        gone = remove(self)
        if len(gone[0]):
            removals.append(len(solves))
        return gone

    monkeypatch.setattr(casemodel.CaseModel, "run_once", running)
    monkeypatch.setattr(casemodel.CaseModel, "remove_due", removing)
    return solves, removals


@pytest.mark.parametrize("early", [True, False])
def test_early_removal_keeps_the_full_ground_structure_optimum(monkeypatch, early):
    monkeypatch.setattr(casemodel, "EARLY_DROP", early)
    study = _study()
    full = optimize_cases(study, member_adding=False)
    solves, removals = _record(monkeypatch)
    d = optimize_cases(study, batch=5)       # few members a round: the rounds cross over early
    assert d.cost == pytest.approx(full.cost, rel=REL)
    assert 0.0 <= d.stats["gap"] <= GAP_TOL
    assert d.stats["vertex"] is True
    warm = solves.index(False)               # solves before the first one after the crossover
    assert removals and d.stats["dropped"] > 0
    if early:
        assert removals[0] == warm           # right before the first warm solve
    else:
        assert removals[0] >= warm + DROP_AFTER   # after DROP_AFTER warm solves at zero area
