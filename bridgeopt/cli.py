"""Command-line interface: ``bridgeopt <command> ...`` (also ``python -m bridgeopt``).

Commands
--------
``solve FILE.toml [--json OUT.json] [--full-ground-structure]``
    Solve a scenario file and print a short summary (with the cautions).
``demo [--json OUT.json] [--full-ground-structure]``
    Solve the bundled demo crossing.
``check FILE.toml``
    Read and check a scenario file without solving it.
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

from . import __version__
from .cautions import CAUTIONS
from .design import Design
from .errors import BridgeoptError, InputError, SolveError
from .export import design_to_dict, write_json
from .materials import GRAVITY, Material
from .scenario import Scenario, load_scenario, solve_scenario

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
                 f"half-span model)"),
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
    if scenario.bridge is not None:
        ns = scenario.bridge.normalised_span
        lines.append(_row("normalised span", f"{_g(ns, 4)} (span / (sigma/(rho g)), tension)"))
    return lines


def format_summary(scenario: Scenario, design: Design, wall_seconds: float | None = None) -> str:
    """The text summary of a solved scenario, ending with the cautions."""
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
    lines.append(_row("equilibrium error", f"{design.equilibrium_error:.1e} of the applied load"))
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
    # exp(k h) overflows for members far beyond the self-weight reach; their costs are
    # infinite and the solver drops them, so numpy's overflow warning is only noise here.
    with np.errstate(over="ignore"):
        design = solve_scenario(scenario)
    wall = time.perf_counter() - t0
    if out is not None:
        try:
            write_json(out, design_to_dict(design, scenario=scenario, wall_seconds=wall))
        except OSError as err:
            raise InputError("--json", str(out), f"a writable file ({err.strerror})") from None
    print(format_summary(scenario, design, wall))
    if out is not None:
        print(f"JSON written to {out}")
    return EXIT_OK


def _add_solve_options(p: argparse.ArgumentParser) -> None:
    p.add_argument("--json", metavar="OUT.json",
                   help="also write the design as JSON (written atomically)")
    p.add_argument("--full-ground-structure", action="store_true",
                   help="solve the full ground structure in one LP (member adding off; same "
                        "optimum, slower; for checks)")


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


def _run_report(args) -> int:
    from .report import write_report

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
COMMANDS = (_add_solve, _add_demo, _add_check, _add_report)


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
