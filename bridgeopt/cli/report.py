"""``bridgeopt report``: a study notebook executed into one self-contained HTML file."""

from __future__ import annotations

import time
from pathlib import Path

from bridgeopt import __version__
from bridgeopt.cautions import CAUTIONS
from bridgeopt.cli.common import EXIT_OK
from bridgeopt.errors import InputError

__all__ = ["add_report"]

def run_report(args) -> int:
    from bridgeopt.workbook.params import check_parameters
    from bridgeopt.workbook.report import write_report

    params = {}
    for item in args.param or ():
        name, sep, value = item.partition("=")
        if not sep or not name.strip():
            raise InputError("--param", item, "NAME=VALUE, e.g. span=2400")
        params[name.strip()] = value
    if params and Path(args.notebook).is_file():
        check_parameters(args.notebook, params)   # before the notebook runs
    t0 = time.perf_counter()
    out = write_report(args.notebook, args.output, parameters=params, show_code=args.show_code,
                       timeout=args.timeout)
    print(f"bridgeopt {__version__}: report written to {out} "
          f"({out.stat().st_size / 1e6:.1f} MB, {time.perf_counter() - t0:.1f} s); "
          "it opens offline in any browser")
    print(CAUTIONS)
    return EXIT_OK


def add_report(sub) -> None:
    """Add the ``report`` command (a study notebook executed into one HTML file).

    Parameters
    ----------
    sub : argparse subparsers
        The command registry of the ``bridgeopt`` parser, to add ``report`` to.
    """
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
    p.set_defaults(func=run_report)
