"""``bridgeopt export``: a solved design written as CSV, JSON, SVG and DXF."""

from __future__ import annotations

import time
from pathlib import Path

from bridgeopt import __version__
from bridgeopt.cautions import CAUTIONS
from bridgeopt.cli.common import EXIT_OK, number_text
from bridgeopt.cli.solve import solve_design
from bridgeopt.errors import InputError
from bridgeopt.files.scenario import load_scenario

__all__ = ["add_export"]


def run_export(args) -> int:
    from bridgeopt.files.export import (check_export_target, export_design, parse_formats,
                                        read_design_json)

    t0 = time.perf_counter()
    formats = parse_formats(args.formats)
    out = Path(args.output)
    check_export_target(out, formats, force=args.force)  # before the solve
    scenario = form = None
    if Path(args.file).suffix.lower() == ".json":
        design = read_design_json(args.file)
        print(f"bridgeopt {__version__}: export of the solved design {args.file}")
    else:
        scenario, design, form = solve_design(load_scenario(args.file),
                                               geometry_optimization=args.geometry_optimization)
        print(f"bridgeopt {__version__}: {scenario.name} ({scenario.kind} scenario) solved: "
              f"volume {number_text(design.volume)} m3, {len(design.members)} members"
              + (f"; {form.form_type} form, ratio {number_text(form.ratio, 4)} to the reference optimum"
                 if form is not None else ""))
    try:
        written = export_design(design, out, formats, scenario=scenario, form=form,
                                force=args.force,
                                wall_seconds=time.perf_counter() - t0)
    except OSError as err:
        raise InputError("--output", str(out), f"a writable folder ({err.strerror})") from None
    for path in written:
        print(f"  written: {path}")
    print(CAUTIONS)
    return EXIT_OK


def add_export(sub) -> None:
    """Register ``bridgeopt export FILE -o DIR`` (solve or read a design, then write it).

    Parameters
    ----------
    sub : argparse._SubParsersAction
        What ``ArgumentParser.add_subparsers`` returned for ``bridgeopt``.
    """
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
    p.add_argument("--force", action="store_true",
                   help="replace files at the export's names that bridgeopt did not write")
    p.set_defaults(func=run_export)
