"""One solve, one registry, one status vocabulary, one quantities table (bridgeopt.study.solve,
bridgeopt.forms.registry, bridgeopt.forms.solve.group_quantities), and a file reader that
only reads."""

import ast
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

from bridgeopt import PRESETS, BridgeScenario, InputError, SolveError, optimize_layout, study
from bridgeopt.files.scenario import parse_scenario
from bridgeopt.forms import FORM_SOLVERS, CableStayedForm, group_quantities, solve_form
from bridgeopt.solver.multicase import CaseDesign
from bridgeopt.study.solve import (CASE_STATUSES, OPTION_STATUS, STATUSES, Solved, case_status,
                                   form_reference, solve_scenario)
from bridgeopt.sweep import cases

ROOT = Path(__file__).resolve().parents[2]


def two_bar() -> dict:
    """Load P = 100 kN at (1, 0) m between pins at (0, 1) and (2, 1) m, sigma = 100 MPa."""
    return {"domain": {"x": [0.0, 2.0], "z": [0.0, 1.0], "spacing": 0.5},
            "material": {"strength": 1.0e8, "density": 0.0},
            "support": [{"at": [0.0, 1.0]}, {"at": [2.0, 1.0]}],
            "load": [{"at": [1.0, 0.0], "force": [0.0, -1.0e5]}]}


def bridge_file(**form) -> dict:
    out = {"name": "test crossing",
           "bridge": {"span": 600.0, "rise": 240.0, "depth": 60.0, "deck_load": 1.5e5,
                      "divisions": 10},
           "material": {"preset": "steel"}}
    if form:
        out["form"] = form
    return out


def test_a_layout_is_solved_with_its_options():
    """Two bars at 45 degrees: V = 2 P a / sigma (statics, method of joints; Michell's bound,
    A.G.M. Michell 1904, Phil. Mag. 8:589-597)."""
    scenario = parse_scenario(two_bar())
    solved = solve_scenario(scenario)
    assert isinstance(solved, Solved) and solved.form is None
    assert solved.scenario == scenario
    assert solved.design.volume == pytest.approx(2 * 1.0e5 * 1.0 / 1.0e8, rel=1e-9)
    full = solve_scenario(scenario, member_adding=False)
    assert full.scenario.solve.member_adding is False
    assert full.design.stats["rounds"] == 1
    assert full.design.volume == pytest.approx(solved.design.volume, rel=1e-7)
    assert scenario.solve.member_adding is True  # the input is not changed


def test_load_cases_give_a_case_design():
    data = two_bar()
    del data["load"]  # no permanent load: the cases alone
    data["load_case"] = [{"name": "down", "load": [{"at": [1.0, 0.0], "force": [0.0, -1.0e5]}]},
                         {"name": "up", "load": [{"at": [1.0, 0.0], "force": [0.0, 1.0e5]}]}]
    solved = solve_scenario(parse_scenario(data))
    assert isinstance(solved.design, CaseDesign) and solved.form is None
    # a load and its reverse on the same pins: each bar sized for both senses, same volume
    # as the single load (common practice: equal and opposite loads need no more material)
    assert solved.design.volume == pytest.approx(2 * 1.0e5 / 1.0e8, rel=1e-6)


def test_a_bridge_without_a_form_is_the_reference_optimum():
    scenario = parse_scenario(bridge_file())
    solved = solve_scenario(scenario)
    with np.errstate(over="ignore"):
        plain = optimize_layout(scenario.bridge.to_problem())
    assert solved.design.volume == pytest.approx(plain.volume, rel=1e-12)
    assert study.solve_reference(scenario.bridge).volume == pytest.approx(plain.volume,
                                                                           rel=1e-12)


@pytest.mark.slow
def test_a_form_is_solved_against_its_reference_and_geometry_option_reaches_it():
    scenario = parse_scenario(bridge_file(type="cable-stayed", stays=5))
    solved = solve_scenario(scenario)
    assert solved.form is not None and solved.design is solved.form.design
    direct = solve_form(scenario.bridge, CableStayedForm(stays=5))
    assert solved.form.volume == pytest.approx(direct.volume, rel=1e-9)
    assert solved.form.ratio >= 1 - 1e-7
    rationalised = solve_scenario(scenario, geometry_optimization=True)
    assert rationalised.scenario.solve.geometry_optimization is True
    assert rationalised.form.reference_volume == pytest.approx(
        form_reference(rationalised.scenario).volume, rel=1e-9)


def test_statuses_have_one_home():
    assert study.STATUSES is STATUSES and cases.STATUSES is CASE_STATUSES
    assert case_status(None) == "ok"
    assert case_status(InputError("a", 1, "b")) == "input-error"
    assert case_status(SolveError("infeasible", "no")) == "solve-failed"
    assert case_status(ValueError("x")) == "error"
    assert set(OPTION_STATUS) == set(CASE_STATUSES)
    assert set(OPTION_STATUS.values()) <= set(STATUSES)


def test_the_study_uses_the_forms_registry():
    assert study.FORM_SOLVERS is FORM_SOLVERS
    assert set(study.KNOWN_FORMS) <= set(FORM_SOLVERS)

    def stand_in(bridge, options):
        raise SolveError("infeasible", "stand-in")

    study.register_form("stand-in one registry", stand_in)
    try:
        assert FORM_SOLVERS["stand-in one registry"] is stand_in
        assert "stand-in one registry" in study.available_forms()
    finally:
        study.unregister_form("stand-in one registry")
    assert "stand-in one registry" not in FORM_SOLVERS


def test_quantities_are_one_table_in_newtons():
    bridge = BridgeScenario(span=1200.0, rise=300.0, depth=100.0, deck_load=1.5e5,
                            material=PRESETS["steel"], arrangement="single", divisions=12)
    design = study.solve_reference(bridge)
    table = study.quantities(design)
    by_sense = group_quantities(design, by_sense=True)
    parts = table[table["group"] != "total"]
    assert len(parts) == len(by_sense)
    for _, row in parts.iterrows():
        q = by_sense[(row["group"], row["sense"])]
        assert row["weight_N"] == pytest.approx(q["weight_N"], rel=1e-12)
        assert row["largest_force_N"] == pytest.approx(q["largest_force_N"], rel=1e-12)
    total = table[table["group"] == "total"].iloc[0]
    assert total["weight_N"] == pytest.approx(design.weight, rel=1e-9)
    per_group = group_quantities(design)
    assert sum(q["volume_m3"] for q in per_group.values()) == pytest.approx(design.volume,
                                                                            rel=1e-12)


def _imports(path: Path) -> set[str]:
    names = set()
    for node in ast.walk(ast.parse(path.read_text())):
        if isinstance(node, ast.ImportFrom) and node.module:
            names.add(node.module)
        elif isinstance(node, ast.Import):
            names.update(a.name for a in node.names)
    return names


@pytest.mark.parametrize("name", ["fields", "sections", "scenario", "casefile"])
def test_reading_a_file_imports_no_solver(name):
    used = _imports(ROOT / "bridgeopt" / "files" / f"{name}.py")
    banned = {m for m in used if m.startswith(("bridgeopt.geometry", "bridgeopt.solver.multicase",
                                               "bridgeopt.solver.lp", "bridgeopt.forms.solve",
                                               "bridgeopt.study", "bridgeopt.sweep"))}
    assert not banned
    assert "bridgeopt.files.scenario" not in used or name == "scenario"


@pytest.mark.slow
def test_the_command_line_and_package_import_no_tables_or_widgets():
    code = ("import sys, bridgeopt, bridgeopt.cli, bridgeopt.study, bridgeopt.sweep.cases; "
            "print([m for m in ('pandas', 'plotly', 'ipywidgets') if m in sys.modules])")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "[]"
