"""Benchmark: the explorer's slider response on the meeting grid (30 divisions).

A slider change re-solves the reference optimum for the new value (not cached)
and rebuilds what the explorer shows: the options drawing, the volume-ratio bar
chart and the quantities table, serialised as the front end receives them.
Each case moves the span slider by one step from the demo crossing (fictional):
1800 m single steel span, 360 m rise, 180 m depth, 200 kN/m.

Usage::

    python bench/bench_workbook.py              # 12 slider steps
    python bench/bench_workbook.py --steps 30
    python bench/bench_workbook.py --form "cable-stayed fan"   # once forms are registered

Prints a Markdown table for docs/benchmarks.md.
"""

from __future__ import annotations

import argparse
import statistics
import time

import plotly.io as pio

from bridgeopt import PRESETS, BridgeScenario, study
from bridgeopt.workbook import plots


_CACHE: dict = {}


def response(bridge: BridgeScenario, form: str) -> tuple[float, float, float]:
    """(solve, draw, total) seconds of one slider change (solves cached like the explorer's)."""
    t0 = time.perf_counter()
    key = (bridge, form)
    if key not in _CACHE:
        _CACHE[key] = study.solve_options(bridge, [form], {"pylons": 2})
    results = _CACHE[key]
    t1 = time.perf_counter()
    table = study.comparison_table(bridge, results)
    figs = [plots.options_figure(results, title=bridge.name), plots.ratio_bar(table)]
    for o in results.values():
        if o.design is not None:
            study.quantities(o.design)
    for f in figs:
        pio.to_json(f, validate=False)
    t2 = time.perf_counter()
    return t1 - t0, t2 - t1, t2 - t0


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--steps", type=int, default=12)
    ap.add_argument("--divisions", type=int, default=30)
    ap.add_argument("--form", default="suspension",
                    help="form solved beside the reference (timed with it once registered)")
    args = ap.parse_args()
    base = dict(rise=360.0, depth=180.0, deck_load=2.0e5, material=PRESETS["steel"],
                arrangement="single", divisions=args.divisions, name="bench crossing")
    response(BridgeScenario(span=1800.0, **base), args.form)  # imports, first figure
    rows = []
    for k in range(1, args.steps + 1):
        rows.append(response(BridgeScenario(span=1800.0 + 50.0 * k, **base), args.form))
    cached = [response(BridgeScenario(span=1800.0 + 50.0 * k, **base), args.form)
              for k in range(1, min(args.steps, 5) + 1)]
    ok = study.solve_option(BridgeScenario(span=1850.0, **base), args.form).status
    print(f"form {args.form!r}: {ok} (its solve time is in the solve column only when solved)")
    print("| case | slider steps | solve median [s] | draw median [s] | total median [s] "
          "| total max [s] |")
    print("|---|---|---|---|---|---|")
    for label, data in (("new value (re-solve)", rows), ("repeated value (cached)", cached)):
        s, d, t = zip(*data)
        print(f"| {label}, {args.divisions} divisions | {len(data)} | {statistics.median(s):.3f} "
              f"| {statistics.median(d):.3f} | {statistics.median(t):.3f} | {max(t):.3f} |")


if __name__ == "__main__":
    main()
