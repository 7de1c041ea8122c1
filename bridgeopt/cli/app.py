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

Adding a command: write a module ``bridgeopt/cli/<name>.py`` with ``add_<name>(subparsers)``
that creates its parser and sets ``func`` to a ``run(args) -> int``, and list it in
:data:`COMMANDS`.
"""

from __future__ import annotations

import argparse
import logging
import os
import sys

from bridgeopt import __version__
from bridgeopt.cli.common import EXIT_INPUT, EXIT_INTERNAL, EXIT_SOLVE, say_error
from bridgeopt.cli.export import add_export
from bridgeopt.cli.judge import add_judge
from bridgeopt.cli.report import add_report
from bridgeopt.cli.solve import add_check, add_demo, add_solve
from bridgeopt.cli.sweep import add_sweep
from bridgeopt.errors import BridgeoptError, InputError, SolveError

__all__ = ["main", "build_parser", "COMMANDS"]

class _Parser(argparse.ArgumentParser):
    """ArgumentParser whose usage errors are one line and exit 2."""

    def error(self, message: str):  # noqa: D102
        say_error(f"{message} (see '{self.prog} --help')")
        raise SystemExit(EXIT_INPUT)


#: Command registrars, in the order ``--help`` lists them.
COMMANDS = (add_solve, add_demo, add_check, add_sweep, add_export, add_judge,
            add_report)


def build_parser() -> argparse.ArgumentParser:
    """The argument parser with every command of :data:`COMMANDS`.

    Returns
    -------
    argparse.ArgumentParser
        Usage errors are one line on stderr and exit with status 2.
    """
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


class _ProgressLine(logging.Handler):
    """Progress of a long solve as one line each on stderr: ``bridgeopt: progress: ...``."""

    def emit(self, record: logging.LogRecord) -> None:
        try:
            print("bridgeopt: progress: " + " ".join(record.getMessage().split()),
                  file=sys.stderr, flush=True)
        except Exception:  # pragma: no cover - never let logging break a run
            self.handleError(record)


def _setup_logging() -> None:
    log = logging.getLogger("bridgeopt")
    if not any(isinstance(h, _WarningLine) for h in log.handlers):
        handler = _WarningLine(logging.WARNING)
        log.addHandler(handler)
    progress = logging.getLogger("bridgeopt.progress")
    if not any(isinstance(h, _ProgressLine) for h in progress.handlers):
        progress.addHandler(_ProgressLine(logging.INFO))
        progress.setLevel(logging.INFO)
        progress.propagate = False


def main(argv: list[str] | None = None) -> int:
    """Run the command line ``argv`` (default ``sys.argv[1:]``); return the exit status.

    Parameters
    ----------
    argv : list of str, optional
        The arguments after the program name (default ``sys.argv[1:]``).

    Returns
    -------
    int
        0 success, 2 bad input, 3 the solve failed, 1 an internal error, 130
        interrupted. [-]
    """
    _setup_logging()
    parser = build_parser()
    try:
        args = parser.parse_args(argv)
        if getattr(args, "func", None) is None:
            parser.error("a command is required: " + ", ".join(
                a.__name__.removeprefix("add_") for a in COMMANDS))
        return args.func(args)
    except SystemExit as stop:
        return stop.code if isinstance(stop.code, int) else EXIT_INPUT
    except InputError as err:
        where = err.source or (getattr(args, "file", None) if "args" in locals() else None)
        if err.field == "file" or err.field.startswith("-"):
            where = None
        say_error(f"{err}" + (f" (in {where})" if where else ""))
        return EXIT_INPUT
    except SolveError as err:
        where = getattr(args, "file", None) if "args" in locals() else None
        say_error(f"solve failed ({err.status}): {err.message}" + (f" (in {where})" if where else ""))
        return EXIT_SOLVE
    except BridgeoptError as err:
        say_error(str(err))
        return EXIT_INPUT
    except KeyboardInterrupt:
        say_error("interrupted")
        return 130
    except Exception as err:  # never a traceback for the user
        if os.environ.get("BRIDGEOPT_DEBUG"):
            raise
        say_error(f"internal error: {type(err).__name__}: {err} "
                   "(set BRIDGEOPT_DEBUG=1 for a traceback)")
        return EXIT_INTERNAL


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
