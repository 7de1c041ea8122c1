"""Benchmark: several load cases on a whole-span model (multi-case LP, member adding).

Scenario (invented for benchmarking): 1200 m repeating span, 300 m rise, 60 m depth, permanent
deck load 180 kN/m, traffic 40 kN/m on the whole span / left half / central half, S355 steel
with self-weight, prices 9000 (tension) and 12000 (compression) per m3.  Each run is its own
process so that its peak memory is its own.

Usage::

    python bench/bench_cases.py              # 20 and 30 divisions, 1, 2 and 3 cases
    python bench/bench_cases.py --quick      # 20 divisions only
    python bench/bench_cases.py --divisions 30 --cases 3 --repeat 3   # issue 12's target alone

Prints a Markdown table.
"""

from __future__ import annotations

import argparse
import json
import subprocess
import sys

RUN = r"""
import json, resource, sys, time
from bridgeopt import (BridgeScenario, PRESETS, CaseStudy, LoadCase, UnitCosts,
                       full_span_problem, optimize_cases, traffic_load)
n, k = int(sys.argv[1]), int(sys.argv[2])
sc = BridgeScenario(span=1200.0, rise=300.0, depth=60.0, deck_load=180e3,
                    material=PRESETS["steel"], divisions=n)
p = full_span_problem(sc)
cases = [LoadCase(name, line_loads=(traffic_load(name, intensity=40e3, deck=(0.0, 1200.0)),))
         for name in ("full", "half", "central")][:k]
t = time.perf_counter()
d = optimize_cases(CaseStudy(p, tuple(cases), UnitCosts(9000.0, 12000.0, "EUR")))
dt = time.perf_counter() - t
peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
print(json.dumps(dict(divisions=n, cases=k, seconds=dt, rounds=d.stats["rounds"],
                      columns=d.stats["columns"], candidates=d.stats["candidates"],
                      peak_mb=peak, volume=d.volume, cost=d.cost,
                      governs=d.governing_counts())))
"""


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--quick", action="store_true")
    ap.add_argument("--divisions", type=int, nargs="+", help="grid sizes (default 20 30)")
    ap.add_argument("--cases", type=int, nargs="+", choices=(1, 2, 3), default=(1, 2, 3),
                    help="numbers of load cases (default 1 2 3)")
    ap.add_argument("--repeat", type=int, default=1, help="runs of each, one process each")
    args = ap.parse_args()
    sizes = args.divisions or ((20,) if args.quick else (20, 30))
    print("| divisions | cases | time [s] | LP rounds | members in LP | candidates | "
          "peak memory [MB] | volume [m3] | cost [EUR] | members governed |")
    print("|---|---|---|---|---|---|---|---|---|---|")
    for n in sizes:
        for k in [k for k in args.cases for _ in range(args.repeat)]:
            out = subprocess.run([sys.executable, "-c", RUN, str(n), str(k)], check=True,
                                 capture_output=True, text=True).stdout
            r = json.loads(out.strip().splitlines()[-1])
            gov = ", ".join(f"{a}: {b}" for a, b in r["governs"].items())
            print(f"| {n} | {k} | {r['seconds']:.2f} | {r['rounds']} | {r['columns']} | "
                  f"{r['candidates']} | {r['peak_mb']:.0f} | {r['volume']:.3f} | "
                  f"{r['cost']:.4g} | {gov} |")


if __name__ == "__main__":
    main()
