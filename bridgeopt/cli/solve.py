"""``bridgeopt solve``, ``demo`` and ``check``: a scenario file solved (or only checked) and summarised."""

from __future__ import annotations

import argparse
import time
from importlib import resources
from pathlib import Path

import numpy as np

from bridgeopt import __version__
from bridgeopt.cautions import CAUTIONS
from bridgeopt.cli.common import (EXIT_OK, check_json_target, form_crossing, format_inputs,
                                  format_summary, row)
from bridgeopt.errors import InputError, SolveError
from bridgeopt.files.design_json import design_to_dict, write_json
from bridgeopt.files.scenario import Scenario, load_scenario
from bridgeopt.study.solve import solve_scenario

__all__ = ["demo_path", "solve_design", "add_solve_options", "add_solve", "add_demo",
           "add_check"]

def demo_path() -> Path:
    """The bundled demo scenario (package data, or the repository's studies folder).

    Returns
    -------
    Path
        ``bridgeopt/data/demo.toml`` when installed, else ``studies/scenarios/demo.toml``.

    Raises
    ------
    InputError
        Naming ``demo`` when neither file exists.
    """
    try:
        data = resources.files("bridgeopt").joinpath("data", "demo.toml")
        if data.is_file():
            return Path(str(data))
    except (ModuleNotFoundError, OSError, TypeError):
        pass
    repo = Path(__file__).resolve().parents[2] / "studies" / "scenarios" / "demo.toml"
    if repo.is_file():
        return repo
    raise InputError("demo", "demo.toml", "a bridgeopt installation that includes "
                     "bridgeopt/data/demo.toml or studies/scenarios/demo.toml")


def solve_design(scenario: Scenario, *, geometry_optimization: bool = False):
    """(scenario, design, form or None): a scenario solved as ``bridgeopt solve`` solves it.

    Parameters
    ----------
    scenario : Scenario
        The scenario read.
    geometry_optimization : bool
        ``--geometry-optimization``: rationalise the layout even when the file's
        ``[solve]`` does not ask for it.

    Returns
    -------
    scenario : Scenario
        The scenario as solved.
    design : Design or CaseDesign
        The design (a :class:`CaseDesign` for load cases or costs).
    form : FormResult or None
        The solved form set against its reference, for a ``[form]`` other than the
        reference.
    """
    solved = solve_scenario(scenario, geometry_optimization=geometry_optimization or None)
    return solved.scenario, solved.design, solved.form


def solve_and_report(scenario: Scenario, args, t0: float) -> int:
    out = check_json_target(args.json, force=args.force)
    if args.full_ground_structure:
        scenario = scenario.with_solve(member_adding=False)
    scenario, design, form = solve_design(scenario,
                                           geometry_optimization=args.geometry_optimization)
    wall = time.perf_counter() - t0
    if scenario.study is not None:
        return report_cases(scenario, design, out, wall)
    if out is not None:
        try:
            write_json(out, design_to_dict(design, scenario=scenario, wall_seconds=wall,
                                           form=form, crossing=form_crossing(scenario, form)))
        except OSError as err:
            raise InputError("--json", str(out), f"a writable file ({err.strerror})") from None
    print(format_summary(scenario, design, wall, form=form))
    if out is not None:
        print(f"JSON written to {out}")
    return EXIT_OK


def report_cases(scenario: Scenario, design, out: Path | None, wall: float) -> int:
    """Summary and JSON of a multi-case (or priced) design (:mod:`bridgeopt.files.casereport`)."""
    import dataclasses

    from bridgeopt.files.casereport import case_design_to_dict, format_case_summary
    from bridgeopt.solver.multicase import single_case_reference

    try:
        with np.errstate(over="ignore"):
            k, ref = single_case_reference(design.study)
        stats = dict(design.stats, reference={"case": design.case_names[k],
                                              "volume": ref.volume})
        design = dataclasses.replace(design, stats=stats)
    except (SolveError, InputError):
        pass  # no single-case reference (the case alone cannot be carried): not reported

    if out is not None:
        try:
            write_json(out, case_design_to_dict(design, scenario=scenario, wall_seconds=wall))
        except OSError as err:
            raise InputError("--json", str(out), f"a writable file ({err.strerror})") from None
    header = [f"bridgeopt {__version__}: {scenario.name} ({scenario.kind} scenario, "
              + ("whole-span model, " if scenario.full_span else "") + "load cases)"]
    if scenario.source and scenario.source != "<dict>":
        header.append(f"  source: {scenario.source}")
    inputs = format_inputs(scenario)
    if scenario.full_span:
        if scenario.piers or scenario.anchorages:
            inputs.append(row("piers, anchorages", f"x = {list(scenario.piers)} m; "
                               f"{[list(p) for p in scenario.anchorages]} m"))
        if scenario.channels:
            inputs.append(row("channels", f"{len(scenario.channels)} clearance envelope(s)"))
    print(format_case_summary(design, header=header, inputs=inputs, wall_seconds=wall))
    if out is not None:
        print(f"JSON written to {out}")
    return EXIT_OK


def add_solve_options(p: argparse.ArgumentParser) -> None:
    """Add the options shared by ``solve`` and ``demo``.

    Parameters
    ----------
    p : argparse.ArgumentParser
        The command's parser.
    """
    p.add_argument("--json", metavar="OUT.json",
                   help="also write the design as JSON (written atomically)")
    p.add_argument("--full-ground-structure", action="store_true",
                   help="solve the full ground structure in one LP (member adding off; same "
                        "optimum, slower; for checks)")
    p.add_argument("--geometry-optimization", action="store_true",
                   help="then move, merge and prune the nodes for a cleaner, lighter layout "
                        "(same as [solve] geometry_optimization = true)")
    p.add_argument("--force", action="store_true",
                   help="replace an existing --json file even if bridgeopt did not write it")


def run_solve(args) -> int:
    t0 = time.perf_counter()
    return solve_and_report(load_scenario(args.file), args, t0)


def add_solve(sub) -> None:
    """Add the ``solve`` command to the command line.

    Parameters
    ----------
    sub : argparse._SubParsersAction
        The sub-command parsers of ``bridgeopt``.
    """
    p = sub.add_parser("solve", help="solve a scenario file and print a summary",
                       description="Solve a TOML scenario file (see docs/scenario.md) and print "
                                   "a summary with the cautions.")
    p.add_argument("file", metavar="FILE.toml", help="scenario file")
    add_solve_options(p)
    p.set_defaults(func=run_solve)


def run_demo(args) -> int:
    t0 = time.perf_counter()
    return solve_and_report(load_scenario(demo_path()), args, t0)


def add_demo(sub) -> None:
    """Add the ``demo`` command to the command line.

    Parameters
    ----------
    sub : argparse._SubParsersAction
        The sub-command parsers of ``bridgeopt``.
    """
    p = sub.add_parser("demo", help="solve the bundled demo crossing",
                       description="Solve the bundled demo: a fictional single-span steel "
                                   "crossing (studies/scenarios/demo.toml).")
    add_solve_options(p)
    p.set_defaults(func=run_demo)


def run_check(args) -> int:
    scenario = load_scenario(args.file)
    print(f"bridgeopt {__version__}: {scenario.name} ({scenario.kind} scenario): inputs are valid")
    print(f"  source: {scenario.source}")
    print("\n".join(format_inputs(scenario)))
    print(CAUTIONS)
    return EXIT_OK


def add_check(sub) -> None:
    """Add the ``check`` command to the command line.

    Parameters
    ----------
    sub : argparse._SubParsersAction
        The sub-command parsers of ``bridgeopt``.
    """
    p = sub.add_parser("check", help="check a scenario file without solving",
                       description="Read and check a TOML scenario file; print its inputs.")
    p.add_argument("file", metavar="FILE.toml", help="scenario file")
    p.set_defaults(func=run_check)
