"""Command-line interface: ``bridgeopt <command> ...`` (also ``python -m bridgeopt``).

Commands
--------
``solve FILE.toml [--json OUT.json] [--full-ground-structure] [--geometry-optimization]``
    Solve a scenario file and print a short summary (with the cautions).
``demo [--json OUT.json] [--full-ground-structure]``
    Solve the bundled demo crossing.
``check FILE.toml``
    Read and check a scenario file without solving it.
``sweep SWEEP.toml -o DIR [--jobs N] [--scheduler ADDRESS] [--retry-failed]``
    Solve every combination of a sweep file; one row per case in DIR/results.csv
    and DIR/results.parquet; resumable.
``export FILE.toml|DESIGN.json -o DIR [--formats csv,json,svg,dxf]``
    Write a solved design as CSV tables, JSON, SVG and DXF drawings.
``judge FILE.toml LAYOUT [--members MEMBERS.csv]``
    Size a proposed layout with the same LP and compare it with the reference optimum.
``report NOTEBOOK.ipynb -o FILE.html [--param NAME=VALUE ...] [--show-code]``
    Execute a study notebook and write one self-contained HTML report.

Exit status: 0 success; 2 bad input (a key, value or file; also a bad command
line); 3 the solve failed (:class:`~bridgeopt.errors.SolveError`); 1 an
internal error.  Errors are one line on stderr, ``bridgeopt: error: ...``,
never a traceback (set ``BRIDGEOPT_DEBUG=1`` to see one for an internal error).

Adding a command: write ``_add_<name>(subparsers)`` that creates its parser
and sets ``func`` to a ``run(args) -> int``, and list it in :data:`COMMANDS`.
"""

from __future__ import annotations

import argparse
import logging
import math
import os
import sys
import time
from importlib import resources
from pathlib import Path

import numpy as np

from bridgeopt import __version__
from bridgeopt.cautions import CAUTIONS
from bridgeopt.solver.design import Design
from bridgeopt.errors import BridgeoptError, InputError, SolveError
from bridgeopt.files.design_json import design_to_dict, write_json
from bridgeopt.forms import form_problem, solve_form
from bridgeopt.geometry.optimize import optimize_geometry
from bridgeopt.solver.layout import optimize_layout
from bridgeopt.model.materials import GRAVITY, Material
from bridgeopt.files.scenario import Scenario, load_scenario, solve_scenario

__all__ = ["main", "build_parser", "format_summary", "format_inputs", "demo_path", "COMMANDS"]

#: Exit statuses.
EXIT_OK, EXIT_INTERNAL, EXIT_INPUT, EXIT_SOLVE = 0, 1, 2, 3


class _Parser(argparse.ArgumentParser):
    """ArgumentParser whose usage errors are one line and exit 2."""

    def error(self, message: str):  # noqa: D102
        _say_error(f"{message} (see '{self.prog} --help')")
        raise SystemExit(EXIT_INPUT)


def _say_error(message: str) -> None:
    print("bridgeopt: error: " + " ".join(str(message).split()), file=sys.stderr)


# ---------------------------------------------------------------- formatting

def _g(value: float, digits: int = 5) -> str:
    """A number with ``digits`` significant figures and thousands separators."""
    if not math.isfinite(value):
        return str(value)
    if value != 0 and (abs(value) >= 1e12 or abs(value) < 1e-3):
        return f"{value:.{digits - 1}e}"
    if abs(value) >= 10 ** digits:
        return f"{value:,.0f}"
    return format(value, f",.{digits}g")


def _material_text(m: Material) -> str:
    if m.tension_strength == m.compression_strength:
        stress = f"{_g(m.tension_strength / 1e6)} MPa"
    else:
        stress = (f"{_g(m.tension_strength / 1e6)} MPa tension, "
                  f"{_g(m.compression_strength / 1e6)} MPa compression")
    dens = "weightless (density 0)" if m.weightless else f"{_g(m.density)} kg/m3"
    return f"{m.name}: {stress}, {dens}"


def _row(label: str, text: str) -> str:
    return f"  {label:<22} {text}"


def format_inputs(scenario: Scenario) -> list[str]:
    """Lines listing a scenario's inputs with units."""
    p = scenario.problem
    lines = []
    if scenario.bridge is not None:
        b = scenario.bridge
        lines += [
            _row("arrangement", {"repeating": "repeating spans (central span of a long run)",
                                 "single": "single span between anchored abutments"}
                 [b.arrangement]),
            _row("span", f"{_g(b.span)} m"),
            _row("rise above deck", f"{_g(b.rise)} m"),
            _row("depth below deck", f"{_g(b.depth)} m"),
            _row("deck load", f"{_g(b.deck_load)} N/m ({_g(b.deck_load / 1e3)} kN/m)"),
            _row("divisions", f"{b.divisions} across the span (grid step {_g(b.spacing)} m; "
                 f"{'whole-span' if scenario.full_span else 'half-span'} model)"),
        ]
        tension, comp = b.material, b.compression_material
    else:
        x0, x1, z0, z1 = p.domain.bounds
        shape = "rectangle" if p.domain.is_box else f"polygon of {len(p.domain.outline)} points"
        zones = f", {len(p.domain.excluded)} excluded zone(s)" if p.domain.excluded else ""
        nx, nz = p.grid_shape()
        lines += [
            _row("domain", f"{shape}, x {_g(x0)} to {_g(x1)} m, z {_g(z0)} to {_g(z1)} m{zones}"),
            _row("spacing", f"{_g(p.spacing)} m (grid {nx} x {nz} cells)"),
            _row("supports", f"{len(p.supports)}"),
            _row("loads", f"{len(p.loads)} point, {len(p.line_loads)} line; total "
                 f"{_g(p.total_applied_load())} N on the model"),
        ]
        if p.mirror_lines:
            lines.append(_row("mirror lines", "x = " + ", ".join(f"{_g(m)}" for m in p.mirror_lines)
                              + " m"))
        if p.copies != 1:
            lines.append(_row("copies", f"{_g(p.copies)} (reported = copies x model)"))
        tension, comp = p.material, p.compression_material
    if comp is None:
        lines.append(_row("material", _material_text(tension)))
    else:
        lines.append(_row("tension material", _material_text(tension)))
        lines.append(_row("compression material", _material_text(comp)))
    if getattr(scenario, "form", None) is not None:
        keys = ", ".join(f"{k} = {v!r}" for k, v in scenario.form.to_dict().items() if k != "type")
        lines.append(_row("form", scenario.form.type + (f" ({keys})" if keys else "")
                          + ("" if scenario.form.type == "reference"
                             else ", compared with the reference optimum")))
    if scenario.bridge is not None:
        ns = scenario.bridge.normalised_span
        lines.append(_row("normalised span", f"{_g(ns, 4)} (span / (sigma/(rho g)), tension)"))
    return lines


def format_form(result) -> list[str]:
    """Lines setting a solved bridge form against the reference optimum."""
    keys = ", ".join(f"{k} = {v!r}" for k, v in result.spec.to_dict().items() if k != "type")
    lines = [f"Form: {result.form_type}" + (f" ({keys})" if keys else ""),
             _row("form volume", f"{_g(result.volume)} m3 (starting geometry "
                  f"{_g(result.start_volume)} m3)"),
             _row("reference optimum", f"{_g(result.reference_volume)} m3 (layout "
                  + ("and geometry " if "history" in result.reference.stats else "")
                  + "optimization, same domain and supports)"),
             _row("volume ratio", f"{_g(result.ratio, 4)} (form / reference)")]
    for name, value in result.geometry.items():
        lines.append(_row(name.replace("_", " "), f"{_g(value)} m"))
    lines.append("  quantities per element group (whole span):")
    for group, q in result.quantities.items():
        lines.append(f"    {group:<10} {q['members']:>4} members  {_g(q['volume_m3']):>12} m3  "
                     f"{_g(q['weight_N'] / 1e3):>12} kN  "
                     f"largest force {_g(q['largest_force_N'])} N")
    return lines


def format_summary(scenario: Scenario, design: Design, wall_seconds: float | None = None,
                   form=None) -> str:
    """The text summary of a solved scenario, ending with the cautions.

    With ``form`` (a :class:`~bridgeopt.forms.FormResult` whose design is
    ``design``), the form is set against the reference optimum.
    """
    m = design.members
    n_t = int((m.sense == "tension").sum())
    whole = " (whole span)" if scenario.bridge is not None else (
        f" ({_g(design.copies)} copies of the model)" if design.copies != 1 else "")
    lines = [f"bridgeopt {__version__}: {scenario.name} ({scenario.kind} scenario)"]
    if scenario.source and scenario.source != "<dict>":
        lines.append(f"  source: {scenario.source}")
    lines.append("Inputs")
    lines += format_inputs(scenario)
    lines.append(f"Result: {design.message}")
    lines.append(_row("volume", f"{_g(design.volume)} m3{whole}"))
    mass_t = design.weight / GRAVITY / 1e3
    lines.append(_row("weight", f"{_g(design.weight)} N = {_g(design.weight / 1e3)} kN "
                      f"(mass {_g(mass_t)} t)"))
    applied = scenario.problem.total_applied_load() * design.copies
    if applied > 0 and design.weight > 0:
        lines.append(_row("weight / applied load", f"{_g(design.weight / applied, 4)}"))
    if scenario.bridge is not None:
        nv = scenario.bridge.normalised_volume(design.volume)
        lines.append(_row("normalised volume", f"{_g(nv, 6)} (volume sigma / (deck_load span^2))"))
    lines.append(_row("members", f"{len(m)} ({n_t} tension, {len(m) - n_t} compression)"))
    lines.append(_row("nodes", f"{len(design.nodes)} used of {design.stats.get('grid_nodes', '?')} "
                      "grid nodes"))
    st = design.stats
    how = "member adding" if scenario.solve.member_adding else "full ground structure"
    lines.append(_row("solve", f"{st.get('seconds', 0.0):.2f} s in HiGHS, {st.get('rounds', 0)} "
                      f"LP round(s), {st.get('columns', 0)} of {st.get('candidates', 0)} candidate "
                      f"columns ({how})"))
    if wall_seconds is not None:
        lines.append(_row("total time", f"{wall_seconds:.2f} s"))
    gap = st.get("gap") or 0.0
    if gap > 0:
        lines.append(_row("optimality gap", f"{gap:.1e} (proven bound on how far the volume "
                          "may lie above the optimum)"))
    if "history" in st:
        start = st["history"][0]
        lines.append(_row("geometry optimization",
                          f"volume {_g(start['volume'])} -> {_g(design.volume)} m3, nodes "
                          f"{start['nodes']} -> {len(design.nodes)}, members {start['members']} "
                          f"-> {len(m)} ({len(st['history']) - 1} stages)"))
    lines.append(_row("equilibrium error", f"{design.equilibrium_error:.1e} of the applied load"))
    if form is not None:
        lines += format_form(form)
    lines.append(CAUTIONS)
    return "\n".join(lines)


# ---------------------------------------------------------------- commands

def demo_path() -> Path:
    """The bundled demo scenario (package data, or the repository's studies folder)."""
    try:
        data = resources.files("bridgeopt").joinpath("data", "demo.toml")
        if data.is_file():
            return Path(str(data))
    except (ModuleNotFoundError, OSError, TypeError):
        pass
    repo = Path(__file__).resolve().parents[1] / "studies" / "scenarios" / "demo.toml"
    if repo.is_file():
        return repo
    raise InputError("demo", "demo.toml", "a bridgeopt installation that includes "
                     "bridgeopt/data/demo.toml or studies/scenarios/demo.toml")


def _check_json_target(path: str | None) -> Path | None:
    """Fail before the solve when the JSON cannot be written where asked."""
    if path is None:
        return None
    out = Path(path)
    parent = out.parent if str(out.parent) else Path(".")
    if out.is_dir():
        raise InputError("--json", path, "a file path, not a directory")
    if not parent.is_dir():
        raise InputError("--json", path, f"a path in an existing directory ({parent} does not "
                         "exist)")
    if not os.access(parent, os.W_OK):
        raise InputError("--json", path, f"a path in a writable directory ({parent})")
    return out


def _solve_and_report(scenario: Scenario, args, t0: float) -> int:
    out = _check_json_target(args.json)
    if args.full_ground_structure:
        scenario = scenario.with_solve(member_adding=False)
    scenario, design, form = _solve_design(scenario,
                                           geometry_optimization=args.geometry_optimization)
    wall = time.perf_counter() - t0
    if scenario.study is not None:
        return _report_cases(scenario, design, out, wall)
    if out is not None:
        try:
            write_json(out, design_to_dict(design, scenario=scenario, wall_seconds=wall,
                                           form=form))
        except OSError as err:
            raise InputError("--json", str(out), f"a writable file ({err.strerror})") from None
    print(format_summary(scenario, design, wall, form=form))
    if out is not None:
        print(f"JSON written to {out}")
    return EXIT_OK


def _report_cases(scenario: Scenario, design, out: Path | None, wall: float) -> int:
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
            inputs.append(_row("piers, anchorages", f"x = {list(scenario.piers)} m; "
                               f"{[list(p) for p in scenario.anchorages]} m"))
        if scenario.channels:
            inputs.append(_row("channels", f"{len(scenario.channels)} clearance envelope(s)"))
    print(format_case_summary(design, header=header, inputs=inputs, wall_seconds=wall))
    if out is not None:
        print(f"JSON written to {out}")
    return EXIT_OK


def _add_solve_options(p: argparse.ArgumentParser) -> None:
    p.add_argument("--json", metavar="OUT.json",
                   help="also write the design as JSON (written atomically)")
    p.add_argument("--full-ground-structure", action="store_true",
                   help="solve the full ground structure in one LP (member adding off; same "
                        "optimum, slower; for checks)")
    p.add_argument("--geometry-optimization", action="store_true",
                   help="then move, merge and prune the nodes for a cleaner, lighter layout "
                        "(same as [solve] geometry_optimization = true)")


def _run_solve(args) -> int:
    t0 = time.perf_counter()
    return _solve_and_report(load_scenario(args.file), args, t0)


def _add_solve(sub) -> None:
    p = sub.add_parser("solve", help="solve a scenario file and print a summary",
                       description="Solve a TOML scenario file (see docs/scenario.md) and print "
                                   "a summary with the cautions.")
    p.add_argument("file", metavar="FILE.toml", help="scenario file")
    _add_solve_options(p)
    p.set_defaults(func=_run_solve)


def _run_demo(args) -> int:
    t0 = time.perf_counter()
    return _solve_and_report(load_scenario(demo_path()), args, t0)


def _add_demo(sub) -> None:
    p = sub.add_parser("demo", help="solve the bundled demo crossing",
                       description="Solve the bundled demo: a fictional single-span steel "
                                   "crossing (studies/scenarios/demo.toml).")
    _add_solve_options(p)
    p.set_defaults(func=_run_demo)


def _run_check(args) -> int:
    scenario = load_scenario(args.file)
    print(f"bridgeopt {__version__}: {scenario.name} ({scenario.kind} scenario): inputs are valid")
    print(f"  source: {scenario.source}")
    print("\n".join(format_inputs(scenario)))
    print(CAUTIONS)
    return EXIT_OK


def _add_check(sub) -> None:
    p = sub.add_parser("check", help="check a scenario file without solving",
                       description="Read and check a TOML scenario file; print its inputs.")
    p.add_argument("file", metavar="FILE.toml", help="scenario file")
    p.set_defaults(func=_run_check)


class _Progress:
    """A progress bar on stderr (one line, redrawn on a terminal; a line per 5 % otherwise)."""

    WIDTH = 30

    def __init__(self, stream=None) -> None:
        self.stream = stream or sys.stderr
        self.tty = hasattr(self.stream, "isatty") and self.stream.isatty()
        self.t0 = time.perf_counter()
        self.start_done: int | None = None
        self.failed = 0
        self.last_step = -1

    def __call__(self, done: int, total: int, case, row: dict) -> None:
        if self.start_done is None:
            self.start_done = done - 1
        if row.get("status") != "ok":
            self.failed += 1
        elapsed = time.perf_counter() - self.t0
        ran = done - self.start_done
        rate = 60.0 * ran / elapsed if elapsed > 0 else 0.0
        left = (total - done) * elapsed / ran if ran else 0.0
        fill = int(self.WIDTH * done / total) if total else self.WIDTH
        text = (f"[{'#' * fill}{'.' * (self.WIDTH - fill)}] {done}/{total} cases, "
                f"{self.failed} failed, {rate:.1f} cases/min, {left / 60:.1f} min left")
        if self.tty:
            print("\r" + text, end="\n" if done == total else "", file=self.stream, flush=True)
        else:
            step = int(20 * done / total) if total else 20
            if step != self.last_step or done == total:
                self.last_step = step
                print(text, file=self.stream, flush=True)


def _run_sweep(args) -> int:
    from bridgeopt.sweep import load_sweep, run_sweep

    sweep = load_sweep(args.file)
    if args.jobs is not None and args.jobs < 1:
        raise InputError("--jobs", args.jobs, "a whole number >= 1 (worker processes)")
    out = Path(args.output)
    if out.exists() and not out.is_dir():
        raise InputError("--output", str(out), "a folder (created if missing), not a file")
    print(f"bridgeopt {__version__}: sweep {sweep.name}: {len(sweep)} cases"
          + (f" over {', '.join(sweep.varied)}" if sweep.varied else ""))
    print(f"  source: {sweep.source}")
    where = f"Dask scheduler {args.scheduler}" if args.scheduler else "local processes"
    outcome = run_sweep(sweep, out, jobs=args.jobs, scheduler=args.scheduler,
                        retry_failed=args.retry_failed, progress=_Progress())
    if outcome.skipped:
        print(f"  {outcome.skipped} case(s) already finished in {out}: not run again")
    if outcome.workers:
        print(f"  ran {len(outcome.ran)} case(s) on {where} ({outcome.workers} worker slot(s)) "
              f"in {outcome.seconds:.1f} s ({outcome.cases_per_minute:.1f} cases per minute)")
    elif outcome.ran:
        print(f"  {len(outcome.ran)} case(s) checked and recorded as bad before any solve")
    else:
        print("  nothing left to run")
    missing = outcome.total - sum(outcome.statuses.values())
    print(f"  {outcome.statuses.get('ok', 0)} ok, {outcome.failed} failed (see the status and "
          "error columns)" + (f", {missing} not run yet" if missing else ""))
    print(f"  results: {out / 'results.csv'}, {out / 'results.parquet'} (columns in "
          f"{out / 'README.txt'})")
    print(CAUTIONS)
    if outcome.interrupted:
        _say_error(f"interrupted: {outcome.total - outcome.skipped - len(outcome.ran)} case(s) "
                   "not run; run the same command again to finish them")
        return 130
    if outcome.total and outcome.failed == outcome.total:
        _say_error(f"every case failed; the first: {outcome.first_error}")
        return EXIT_INPUT if set(outcome.statuses) == {"input-error"} else EXIT_SOLVE
    return EXIT_OK


def _add_sweep(sub) -> None:
    p = sub.add_parser("sweep", help="solve every combination of a sweep file",
                       description="Solve every case of a sweep file (a scenario file in which "
                                   "any value may be a list; see docs/formats.md) and write one "
                                   "row per case to DIR/results.csv and DIR/results.parquet. "
                                   "Finished cases are kept: running the same command again "
                                   "solves only the missing ones.")
    p.add_argument("file", metavar="SWEEP.toml", help="sweep file")
    p.add_argument("-o", "--output", metavar="DIR", required=True,
                   help="output folder (created if missing; re-used to resume)")
    p.add_argument("--jobs", type=int, metavar="N",
                   help="local worker processes (default: one per CPU)")
    p.add_argument("--scheduler", metavar="ADDRESS",
                   help="run on a Dask distributed cluster (e.g. tcp://host:8786) instead of "
                        "local processes; needs the 'cluster' extra")
    p.add_argument("--retry-failed", action="store_true",
                   help="also run again the cases that failed in an earlier run")
    p.set_defaults(func=_run_sweep)


def _solve_design(scenario: Scenario, *, geometry_optimization: bool = False):
    """(scenario, design, form or None): a scenario solved as ``bridgeopt solve`` solves it."""
    if geometry_optimization:
        scenario = scenario.with_solve(geometry_optimization=True)
    # exp(k h) overflows for members far beyond the self-weight reach; their costs are
    # infinite and the solver drops them, so numpy's overflow warning is only noise here.
    with np.errstate(over="ignore"):
        if scenario.form is not None and scenario.form.type != "reference":
            # a form's free dimensions are always optimized; [solve] geometry_optimization
            # also rationalises the reference it is compared with
            reference = None
            if scenario.solve.geometry_optimization:
                reference = optimize_geometry(optimize_layout(
                    form_problem(scenario.bridge, scenario.form),
                    member_adding=scenario.solve.member_adding, batch=scenario.solve.batch))
            form = solve_form(scenario.bridge, scenario.form, reference=reference,
                              member_adding=scenario.solve.member_adding)
            return scenario, form.design, form
        return scenario, solve_scenario(scenario), None


def _run_export(args) -> int:
    from bridgeopt.files.export import export_design, parse_formats, read_design_json

    t0 = time.perf_counter()
    formats = parse_formats(args.formats)
    out = Path(args.output)
    if out.exists() and not out.is_dir():
        raise InputError("--output", str(out), "a folder (created if missing), not a file")
    scenario = form = None
    if Path(args.file).suffix.lower() == ".json":
        design = read_design_json(args.file)
        print(f"bridgeopt {__version__}: export of the solved design {args.file}")
    else:
        scenario, design, form = _solve_design(load_scenario(args.file),
                                               geometry_optimization=args.geometry_optimization)
        print(f"bridgeopt {__version__}: {scenario.name} ({scenario.kind} scenario) solved: "
              f"volume {_g(design.volume)} m3, {len(design.members)} members"
              + (f"; {form.form_type} form, ratio {_g(form.ratio, 4)} to the reference optimum"
                 if form is not None else ""))
    try:
        written = export_design(design, out, formats, scenario=scenario, form=form,
                                wall_seconds=time.perf_counter() - t0)
    except OSError as err:
        raise InputError("--output", str(out), f"a writable folder ({err.strerror})") from None
    for path in written:
        print(f"  written: {path}")
    print(CAUTIONS)
    return EXIT_OK


def _run_report(args) -> int:
    from bridgeopt.workbook.report import write_report

    params = {}
    for item in args.param or ():
        name, sep, value = item.partition("=")
        if not sep or not name.strip():
            raise InputError("--param", item, "NAME=VALUE, e.g. span=2400")
        params[name.strip()] = value
    t0 = time.perf_counter()
    out = write_report(args.notebook, args.output, parameters=params, show_code=args.show_code,
                       timeout=args.timeout)
    print(f"bridgeopt {__version__}: report written to {out} "
          f"({out.stat().st_size / 1e6:.1f} MB, {time.perf_counter() - t0:.1f} s); "
          "it opens offline in any browser")
    print(CAUTIONS)
    return EXIT_OK


def _add_export(sub) -> None:
    p = sub.add_parser("export", help="write a solved design as CSV, JSON, SVG and DXF",
                       description="Solve a scenario file (or read the JSON of a solve) and "
                                   "write members.csv, nodes.csv, design.json, design.svg and "
                                   "design.dxf (see docs/formats.md).")
    p.add_argument("file", metavar="FILE.toml|DESIGN.json",
                   help="scenario file to solve, or the JSON of a solve")
    p.add_argument("-o", "--output", metavar="DIR", required=True, help="output folder")
    p.add_argument("--formats", default="csv,json,svg,dxf", metavar="LIST",
                   help="comma-separated: csv, json, svg, dxf (default: all)")
    p.add_argument("--geometry-optimization", action="store_true",
                   help="rationalise the layout first (as solve --geometry-optimization)")
    p.set_defaults(func=_run_export)


def _run_judge(args) -> int:
    from bridgeopt.study.judge import judge_problem, judge_proposal
    from bridgeopt.files.proposal import read_proposal

    scenario = load_scenario(args.file)
    proposal = read_proposal(args.layout, args.members)
    judgement = judge_proposal(judge_problem(scenario), proposal)
    print(f"bridgeopt {__version__}: {scenario.name} ({scenario.kind} scenario): a proposed "
          "layout judged against the reference optimum")
    print(f"  source: {scenario.source}")
    print("\n".join(format_inputs(scenario)))
    print(judgement.summary(top=args.top))
    if args.json:
        from bridgeopt.files.design_json import design_to_dict, write_json

        data = design_to_dict(judgement.design, scenario=scenario)
        data.update({"reference_volume": judgement.reference_volume,
                     "volume_ratio": judgement.ratio, "proposal": judgement.proposal.source,
                     "excess": judgement.excess.to_dict(orient="records")})
        write_json(_check_json_target(args.json), data)
        print(f"JSON written to {args.json}")
    return EXIT_OK


def _add_judge(sub) -> None:
    p = sub.add_parser("judge", help="size a proposed layout and compare it with the optimum",
                       description="Read a proposed layout (nodes and members, CSV or JSON; see "
                                   "docs/formats.md), size it with the same LP and self-weight "
                                   "elements under the scenario's loads, and report its volume, "
                                   "the reference optimum and the members carrying most of the "
                                   "excess.")
    p.add_argument("file", metavar="FILE.toml", help="scenario file (loads, supports, domain)")
    p.add_argument("layout", metavar="LAYOUT",
                   help="layout.json, or nodes.csv (with members.csv beside it), or a folder")
    p.add_argument("--members", metavar="MEMBERS.csv",
                   help="the members CSV (default: members.csv beside nodes.csv)")
    p.add_argument("--top", type=int, default=5, metavar="N",
                   help="members listed by excess (default 5)")
    p.add_argument("--json", metavar="OUT.json", help="also write the sized proposal as JSON")
    p.set_defaults(func=_run_judge)


def _add_report(sub) -> None:
    p = sub.add_parser("report", help="execute a study notebook and write an HTML report",
                       description="Execute a study notebook (studies/*.ipynb) in a fresh "
                                   "kernel and write one self-contained HTML file (plotly.js "
                                   "inlined, no network needed to open it).")
    p.add_argument("notebook", metavar="NOTEBOOK.ipynb", help="study notebook")
    p.add_argument("-o", "--output", metavar="FILE.html", required=True, help="HTML file to write")
    p.add_argument("--param", action="append", metavar="NAME=VALUE",
                   help="override a parameter of the notebook's parameters cell (repeatable; "
                        "lists comma-separated), e.g. --param span=2400")
    p.add_argument("--show-code", action="store_true", help="keep the code cells in the report")
    p.add_argument("--timeout", type=int, default=600, metavar="SECONDS",
                   help="time limit per notebook cell (default 600)")
    p.set_defaults(func=_run_report)


#: Command registrars, in the order ``--help`` lists them.
COMMANDS = (_add_solve, _add_demo, _add_check, _add_sweep, _add_export, _add_judge,
            _add_report)


def build_parser() -> argparse.ArgumentParser:
    """The argument parser with every command of :data:`COMMANDS`."""
    parser = _Parser(prog="bridgeopt",
                     description="Minimum-volume layouts of bridge concepts by linear "
                                 "programming (concept-stage estimates only).",
                     epilog="Exit status: 0 ok, 2 bad input, 3 solve failed.")
    parser.add_argument("--version", action="version", version=f"bridgeopt {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    for add in COMMANDS:
        add(sub)
    return parser


class _WarningLine(logging.Handler):
    """Library warnings as one line each on stderr: ``bridgeopt: warning: ...``."""

    def emit(self, record: logging.LogRecord) -> None:
        try:
            text = " ".join(record.getMessage().split())
            print(f"bridgeopt: {record.levelname.lower()}: {text}", file=sys.stderr)
        except Exception:  # pragma: no cover - never let logging break a run
            self.handleError(record)


def _setup_logging() -> None:
    log = logging.getLogger("bridgeopt")
    if not any(isinstance(h, _WarningLine) for h in log.handlers):
        handler = _WarningLine(logging.WARNING)
        log.addHandler(handler)


def main(argv: list[str] | None = None) -> int:
    """Run the command line ``argv`` (default ``sys.argv[1:]``); return the exit status."""
    _setup_logging()
    parser = build_parser()
    try:
        args = parser.parse_args(argv)
        if getattr(args, "func", None) is None:
            parser.error("a command is required: " + ", ".join(
                a.__name__.removeprefix("_add_") for a in COMMANDS))
        return args.func(args)
    except SystemExit as stop:
        return stop.code if isinstance(stop.code, int) else EXIT_INPUT
    except InputError as err:
        where = getattr(args, "file", None) if "args" in locals() else None
        if err.field == "file" or err.field.startswith("-"):
            where = None
        _say_error(f"{err}" + (f" (in {where})" if where else ""))
        return EXIT_INPUT
    except SolveError as err:
        where = getattr(args, "file", None) if "args" in locals() else None
        _say_error(f"solve failed ({err.status}): {err.message}" + (f" (in {where})" if where else ""))
        return EXIT_SOLVE
    except BridgeoptError as err:
        _say_error(str(err))
        return EXIT_INPUT
    except KeyboardInterrupt:
        _say_error("interrupted")
        return 130
    except Exception as err:  # never a traceback for the user
        if os.environ.get("BRIDGEOPT_DEBUG"):
            raise
        _say_error(f"internal error: {type(err).__name__}: {err} "
                   "(set BRIDGEOPT_DEBUG=1 for a traceback)")
        return EXIT_INTERNAL


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
