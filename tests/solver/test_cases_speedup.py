"""The multi-case LP in one live HiGHS instance (solver/casemodel.py, issue 12).

Reference for the optimum: member adding ends at the full ground structure's optimum when no
candidate out of the LP violates the dual check (M. Gilbert, A. Tyas 2003, Engineering
Computations 20(8):1044-1064; for several load cases T.J. Pritchard, M. Gilbert, A. Tyas 2005,
6th WCSMO); members taken out of the LP are candidates like any other, so removing them does not
change the optimum.  The textbook LP (W.S. Hemp 1973, Optimum Structures, ch. 4: areas, one
force per case, both stress rows per case) is transcribed here independently and solved by
scipy's linprog, to check that leaving out the stress rows that repeat a bound is exact.
"""

import numpy as np
import pytest
from scipy import sparse
from scipy.optimize import linprog

from bridgeopt import PRESETS, BridgeScenario
from bridgeopt.model.crossing import full_span_problem
from bridgeopt.model.loads import CaseStudy, LoadCase, UnitCosts, traffic_load
from bridgeopt.solver import casemodel, multicase
from bridgeopt.solver.multicase import GAP_TOL, optimize_cases
from helpers import fail_after_removal

REL = 2e-6  # same optimum: member adding stops at a proven gap below 1e-6 (multicase.GAP_TOL)


def _study(divisions=8, cases=("full", "half", "central"), costs=True, material="steel"):
    b = BridgeScenario(span=480.0, rise=120.0, depth=40.0, deck_load=1.0e5,
                       material=PRESETS[material], divisions=divisions)
    loads = tuple(LoadCase(c, line_loads=(traffic_load(c, intensity=4.0e4, deck=(0.0, 480.0)),))
                  for c in cases)
    return CaseStudy(full_span_problem(b), loads,
                     UnitCosts(9000.0, 12000.0, "EUR") if costs else None)


def _textbook_objective(study) -> float:
    """Hemp's multi-case LP with every stress row, over every (pair, group), by linprog."""
    _, _, d, _ = multicase._data(study)
    K, n2 = d.loads.shape
    P, G = len(d.a), len(d.groups)
    length, unit = casemodel.geometry(d.xz, d.a, d.b)
    M = P * G                                   # members: group-major
    pair = np.tile(np.arange(P), G)
    grp = np.repeat(np.arange(G), P)
    st, sc, kw, price = (np.array([g[j] for g in d.groups])[grp] for j in range(1, 5))
    L, u = length[pair], unit[pair]
    nfix = len(d.fixed)
    n_var = M + K * M + K * nfix                # [a] [q case 0] ... [r case 0] ...
    eq_r, eq_c, eq_v = [], [], []
    ub_r, ub_c, ub_v = [], [], []
    m = np.arange(M)
    for k in range(K):
        off, qk = k * n2, M + k * M + m
        ea, eb = d.a[pair], d.b[pair]
        for rows, cols, vals in ((off + 2 * ea + 1, m, -0.5 * kw * L),
                                 (off + 2 * eb + 1, m, -0.5 * kw * L),
                                 (off + 2 * ea, qk, u[:, 0]), (off + 2 * ea + 1, qk, u[:, 1]),
                                 (off + 2 * eb, qk, -u[:, 0]), (off + 2 * eb + 1, qk, -u[:, 1]),
                                 (off + d.fixed, M + K * M + k * nfix + np.arange(nfix),
                                  np.ones(nfix))):
            eq_r.append(rows), eq_c.append(cols), eq_v.append(vals)
        # q - st a <= 0 and -(q + sc a) <= 0, both for every member and case
        t_row, c_row = 2 * (k * M + m), 2 * (k * M + m) + 1
        ub_r += [t_row, t_row, c_row, c_row]
        ub_c += [qk, m, qk, m]
        ub_v += [np.ones(M), -st, -np.ones(M), -sc]
    a_eq = sparse.csr_matrix((np.concatenate(eq_v), (np.concatenate(eq_r),
                              np.concatenate(eq_c))), shape=(K * n2, n_var))
    a_ub = sparse.csr_matrix((np.concatenate(ub_v), (np.concatenate(ub_r),
                              np.concatenate(ub_c))), shape=(2 * K * M, n_var))
    cost = np.concatenate([price * L, np.zeros(n_var - M)])
    bounds = [(0, None)] * M + [(None, None)] * (n_var - M)
    res = linprog(cost, A_ub=a_ub, b_ub=np.zeros(2 * K * M), A_eq=a_eq,
                  b_eq=-d.loads.ravel(), bounds=bounds, method="highs")
    assert res.status == 0, res.message
    return float(res.fun)


@pytest.mark.parametrize("costs", [True, False])
def test_rows_left_out_match_the_textbook_lp(costs):
    """Two element groups (prices differ) and one group (no prices): the same optimum."""
    study = _study(divisions=6, cases=("full", "half"), costs=costs)
    full = optimize_cases(study, member_adding=False)
    assert full.stats["lp_objective"] == pytest.approx(_textbook_objective(study), rel=1e-7)


@pytest.mark.parametrize("variant", [
    {},                                             # the default: ipm rounds, then simplex
    {"IPM_ROUNDS": False},                          # every round simplex, removal from round 2
    {"ENVELOPE_SEED": False},                       # nearest neighbours only
    {"SWITCH": False},                              # ipm to the end, then crossover
])
def test_every_path_reaches_the_full_ground_structure_optimum(monkeypatch, variant):
    for name, value in variant.items():
        monkeypatch.setattr(multicase, name, value)
    study = _study()
    full = optimize_cases(study, member_adding=False)
    d = optimize_cases(study)
    assert d.cost == pytest.approx(full.cost, rel=REL)
    assert d.volume == pytest.approx(full.volume, rel=1e-4)  # cost ties may move volume
    assert 0.0 <= d.stats["gap"] <= GAP_TOL
    assert d.stats["vertex"] is True and full.stats["vertex"] is True


def test_forced_removal_keeps_the_optimum_and_the_gap(monkeypatch):
    """Every round by warm dual simplex, small batches: members leave and the optimum stays."""
    monkeypatch.setattr(multicase, "IPM_ROUNDS", False)
    study = _study()
    full = optimize_cases(study, member_adding=False)
    d = optimize_cases(study, batch=50)
    assert d.stats["dropped"] > 0
    assert d.cost == pytest.approx(full.cost, rel=REL)
    assert 0.0 <= d.stats["gap"] <= GAP_TOL


@pytest.mark.parametrize("failures", [1, 2])
def test_members_come_back_when_a_solve_after_removal_fails(monkeypatch, failures):
    """Should HiGHS not call the LP optimal after a removal, the members come back
    (after two failures: every member ever removed) and the optimum is the same."""
    monkeypatch.setattr(multicase, "IPM_ROUNDS", False)
    study = _study()
    full = optimize_cases(study, member_adding=False)
    state = fail_after_removal(monkeypatch, casemodel.CaseModel, casemodel, failures)
    d = optimize_cases(study, batch=50)
    assert state["left"] == 0
    assert d.cost == pytest.approx(full.cost, rel=REL)


def test_a_seed_that_cannot_carry_the_loads_widens_to_the_neighbours(monkeypatch):
    """The first LP of the seed alone is infeasible: the nearest neighbours join it."""
    monkeypatch.setattr(multicase, "START_REACH", 0)
    monkeypatch.setattr(multicase, "_envelope", lambda study: np.array([0]))
    study = _study(divisions=6, cases=("full", "half"))
    full = optimize_cases(study, member_adding=False)
    seen, solve = [], casemodel.CaseModel.solve

    def recording(self):
        seen.append((int(self.in_lp.sum()), solve(self)))
        return seen[-1][1]

    monkeypatch.setattr(casemodel.CaseModel, "solve", recording)
    d = optimize_cases(study)
    assert seen[0] == (2, "infeasible")     # pair 0 in the tension and the compression group
    assert seen[1][1] == "optimal" and seen[1][0] > seen[0][0]
    assert d.cost == pytest.approx(full.cost, rel=REL)


def test_envelope_holds_each_case_alone_optimum_pairs():
    """The seed is the union of the cases' single-case optimum pairs, within the candidates."""
    study = _study(divisions=6, cases=("full", "half"))
    seed = multicase._envelope(study)
    _, _, d, _ = multicase._data(study)
    assert len(seed) > 0 and seed.max() < len(d.a)
    assert np.array_equal(seed, np.unique(seed))
