"""Benchmark: repeating-span reference optimum with self-weight.

Scenario (invented for benchmarking): 1000 m repeating span, rise = span/2,
no depth below the deck, deck load 200 kN/m, S355 steel with self-weight.
Each case runs in its own process so that its peak memory is its own.

Usage::

    python bench/bench_reference.py            # 30, 60, 120 divisions + full at 30, 60
    python bench/bench_reference.py --quick    # 30 and 60 only

Prints a Markdown table (wall time of optimize_layout, LP rounds, columns in
the final LP, candidate columns, peak resident memory of the process).
"""

from __future__ import annotations

import argparse
import json
import subprocess
import sys

CASE = r"""
import json, resource, sys, time
from bridgeopt import BridgeScenario, PRESETS, optimize_layout
n, full = int(sys.argv[1]), sys.argv[2] == "full"
sc = BridgeScenario(span=1000.0, rise=500.0, depth=0.0, deck_load=2e5,
                    material=PRESETS["steel"], divisions=n)
problem = sc.to_problem()
t = time.perf_counter()
d = optimize_layout(problem, member_adding=not full)
dt = time.perf_counter() - t
peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
print(json.dumps(dict(divisions=n, method="full" if full else "member adding", seconds=dt,
                      volume=d.volume, rounds=d.stats["rounds"], columns=d.stats["columns"],
                      candidates=d.stats["candidates"], peak_mb=peak,
                      normalised=sc.normalised_volume(d.volume))))
"""


def run(n: int, method: str) -> dict:
    out = subprocess.run([sys.executable, "-c", CASE, str(n), method], check=True,
                         capture_output=True, text=True)
    return json.loads(out.stdout.strip().splitlines()[-1])


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true", help="30 and 60 divisions only")
    args = ap.parse_args()
    cases = [(30, "adding"), (30, "full"), (60, "adding"), (60, "full")]
    if not args.quick:
        cases.append((120, "adding"))
    rows = [run(n, m) for n, m in cases]
    print("| divisions | method | time [s] | LP rounds | columns in LP | candidate columns "
          "| peak memory [MB] | volume [m3] | V sigma/(w L^2) |")
    print("|---|---|---|---|---|---|---|---|---|")
    for r in rows:
        print(f"| {r['divisions']} | {r['method']} | {r['seconds']:.2f} | {r['rounds']} | "
              f"{r['columns']} | {r['candidates']} | {r['peak_mb']:.0f} | {r['volume']:.3f} | "
              f"{r['normalised']:.5f} |")
    by = {(r["divisions"], r["method"]): r for r in rows}
    for n in (30, 60):
        ratio = by[(n, "full")]["seconds"] / by[(n, "member adding")]["seconds"]
        print(f"\nmember adding at {n} divisions: {ratio:.1f}x faster than the full ground structure")


if __name__ == "__main__":
    main()
