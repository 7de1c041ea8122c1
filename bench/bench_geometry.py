"""Benchmark: geometry optimization of the repeating-span reference with self-weight.

Scenario (invented for benchmarking, the same as bench_reference.py): 1000 m
repeating span, rise = span/2, no depth below the deck, deck load 200 kN/m, S355
steel with self-weight.  Each case runs in its own process.

Usage::

    python bench/bench_geometry.py                 # 30 divisions (the target case)
    python bench/bench_geometry.py 16 30 40        # other grids

Prints a Markdown table: layout-optimization time and volume, geometry
optimization time, volume, node and member counts before and after.
"""

from __future__ import annotations

import argparse
import json
import subprocess
import sys

CASE = r"""
import json, sys, time
from bridgeopt import BridgeScenario, PRESETS, optimize_layout
from bridgeopt.geometry.optimize import optimize_geometry
n = int(sys.argv[1])
sc = BridgeScenario(span=1000.0, rise=500.0, depth=0.0, deck_load=2e5,
                    material=PRESETS["steel"], divisions=n)
t = time.perf_counter()
raw = optimize_layout(sc.to_problem())
t_lo = time.perf_counter() - t
t = time.perf_counter()
clean = optimize_geometry(raw)
t_go = time.perf_counter() - t
print(json.dumps(dict(divisions=n, lo_seconds=t_lo, go_seconds=t_go, lo_volume=raw.volume,
                      go_volume=clean.volume, lo_nodes=len(raw.nodes), go_nodes=len(clean.nodes),
                      lo_members=len(raw.members), go_members=len(clean.members),
                      stages=len(clean.stats["history"]) - 1,
                      equilibrium=clean.equilibrium_error)))
"""


def run(n: int) -> dict:
    out = subprocess.run([sys.executable, "-c", CASE, str(n)], check=True, capture_output=True,
                         text=True)
    return json.loads(out.stdout.strip().splitlines()[-1])


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("divisions", nargs="*", type=int, default=[30])
    args = ap.parse_args()
    print("| divisions | layout opt. [s] | geometry opt. [s] | volume before [m3] "
          "| volume after [m3] | change | nodes before -> after | members before -> after "
          "| stages | equilibrium error |")
    print("|---|---|---|---|---|---|---|---|---|---|")
    for n in args.divisions:
        r = run(n)
        change = r["go_volume"] / r["lo_volume"] - 1
        print(f"| {n} | {r['lo_seconds']:.2f} | {r['go_seconds']:.2f} | {r['lo_volume']:.3f} | "
              f"{r['go_volume']:.3f} | {100 * change:+.2f} % | {r['lo_nodes']} -> {r['go_nodes']} "
              f"| {r['lo_members']} -> {r['go_members']} | {r['stages']} | "
              f"{r['equilibrium']:.1e} |")


if __name__ == "__main__":
    main()
