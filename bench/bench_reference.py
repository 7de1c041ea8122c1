"""Benchmark: repeating-span reference optimum with self-weight.

Scenario (invented for benchmarking): 1000 m repeating span, rise = span/2,
no depth below the deck, deck load 200 kN/m, S355 steel with self-weight.
Each case runs in its own process so that its peak memory is its own.

Usage::

    python bench/bench_reference.py            # 30, 60, 120 divisions + full at 30, 60
    python bench/bench_reference.py --quick    # 30 and 60 only
    python bench/bench_reference.py --divisions 60 120 --no-full --methods
    python bench/bench_reference.py --divisions 60 --no-full --repeat 3   # fastest of 3

Prints a Markdown table: wall time of optimize_layout, HiGHS's own time on the
final member set solved alone (the columns of member adding's last LP, loaded
into a fresh HiGHS with the options member adding uses at that size; the lower
bound of any member-adding scheme on that set) and the ratio of the two, LP
rounds, columns in the final LP, candidate columns, peak resident memory of the
process (taken before the final set is solved alone), the proven gap, whether the
answer is a vertex, how many columns left the LP for staying at zero force and how
the first LP was seeded (``Design.stats["start"]``).  ``--methods`` also times
the final set alone with each HiGHS method (dual simplex; interior point without
crossover), the measurement behind the method chosen per size.  ``--repeat N``
runs each member-adding case N times and keeps the fastest (the machine is
shared; the full ground structure runs once).
"""

from __future__ import annotations

import argparse
import json
import subprocess
import sys

CASE = r"""
import json, resource, sys, time
import numpy as np
from bridgeopt import BridgeScenario, PRESETS, optimize_layout
from bridgeopt.solver import lp, pricing
from bridgeopt.solver.highs import add_columns, new_highs, unit_columns

n, full, methods = int(sys.argv[1]), sys.argv[2] == "full", sys.argv[3] == "methods"
sc = BridgeScenario(span=1000.0, rise=500.0, depth=0.0, deck_load=2e5,
                    material=PRESETS["steel"], divisions=n)
problem = sc.to_problem()

# record the columns in the LP each time member adding prices (the last call of the
# largest LP sees its final member set)
calls = []
original = pricing.price_offsets
def recording(data, in_lp, u, **kw):
    calls.append((data, in_lp.copy()))
    return original(data, in_lp, u, **kw)
for mod in list(sys.modules.values()):
    if getattr(mod, "__name__", "").startswith("bridgeopt") and \
            getattr(mod, "price_offsets", None) is original:
        mod.price_offsets = recording

t = time.perf_counter()
d = optimize_layout(problem, member_adding=not full)
dt = time.perf_counter() - t
peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024


def alone(data, in_lp, solver):
    # seconds of h.run() on the final member set, with the driver's HiGHS options
    h = new_highs(ipm=solver == "ipm")
    n2 = 2 * len(data.xz)
    rhs = -np.asarray(data.load, dtype=float)
    h.addRows(n2, rhs, rhs, 0, np.zeros(n2, dtype=np.int32), np.zeros(0, dtype=np.int32),
              np.zeros(0))
    add_columns(h, unit_columns(data.fixed, n2))
    for s in range(2):
        add_columns(h, lp.lp_columns(data, np.nonzero(in_lp[:, s])[0], s)[1])
    t = time.perf_counter()
    h.run()
    return time.perf_counter() - t, h.getInfo().objective_function_value


out = dict(divisions=n, method="full" if full else "member adding", seconds=dt,
           volume=d.volume, rounds=d.stats["rounds"], columns=d.stats["columns"],
           candidates=d.stats["candidates"], peak_mb=peak, gap=d.stats["gap"],
           normalised=sc.normalised_volume(d.volume))
largest = max((len(c[0].a) for c in calls), default=0)
calls = [c for c in calls if len(c[0].a) == largest]
used = "ipm" if calls and 2 * len(calls[0][0].xz) > lp.IPM_ROWS else "simplex"
if used == "ipm" and d.stats["vertex"]:
    calls = calls[:-1]  # the last pricing checked the vertex re-solve's duals
out["vertex"], out["dropped"] = d.stats["vertex"], d.stats["dropped"]
out["start"] = d.stats["start"]
if not full and calls:
    data, in_lp = calls[-1]
    out["alone_method"] = used
    out["alone"], _ = alone(data, in_lp, used)
    if methods:
        for solver in ("simplex", "ipm"):
            out[solver] = out["alone"] if solver == used else alone(data, in_lp, solver)[0]
print(json.dumps(out))
"""


def run(n: int, method: str, methods: bool) -> dict:
    out = subprocess.run([sys.executable, "-c", CASE, str(n), method,
                          "methods" if methods else "-"], check=True, capture_output=True,
                         text=True)
    return json.loads(out.stdout.strip().splitlines()[-1])


def _cell(r: dict, key: str) -> str:
    return f"{r[key]:.2f}" if key in r else "-"


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true", help="30 and 60 divisions only")
    ap.add_argument("--divisions", type=int, nargs="+", help="these divisions only")
    ap.add_argument("--no-full", action="store_true", help="skip the full ground structure")
    ap.add_argument("--methods", action="store_true",
                    help="also time the final member set alone with simplex and with ipm")
    ap.add_argument("--repeat", type=int, default=1,
                    help="runs of each member-adding case; the fastest is shown")
    args = ap.parse_args()
    sizes = args.divisions or ([30, 60] if args.quick else [30, 60, 120])
    cases = []
    for n in sizes:
        cases.append((n, "adding"))
        if n <= 60 and not args.no_full:
            cases.append((n, "full"))
    rows = []
    for n, m in cases:
        tries = [run(n, m, args.methods) for _ in range(args.repeat if m == "adding" else 1)]
        rows.append(min(tries, key=lambda r: r["seconds"]))
        if len(tries) > 1:
            rows[-1]["tries"] = sorted(r["seconds"] for r in tries)
    extra = " simplex alone [s] | ipm alone [s] |" if args.methods else ""
    print("| divisions | method | time [s] | HiGHS alone on final set [s] | ratio | LP rounds "
          "| columns in LP | candidate columns | peak memory [MB] | volume [m3] "
          f"| V sigma/(w L^2) | gap | vertex | columns dropped | start |{extra}")
    print("|---" * (15 + 2 * args.methods) + "|")
    for r in rows:
        ratio = f"{r['seconds'] / r['alone']:.2f}" if "alone" in r else "-"
        alone = f"{r['alone']:.2f} ({r['alone_method']})" if "alone" in r else "-"
        more = f" {_cell(r, 'simplex')} | {_cell(r, 'ipm')} |" if args.methods else ""
        print(f"| {r['divisions']} | {r['method']} | {r['seconds']:.2f} | {alone} | {ratio} | "
              f"{r['rounds']} | {r['columns']} | {r['candidates']} | {r['peak_mb']:.0f} | "
              f"{r['volume']:.3f} | {r['normalised']:.5f} | {r['gap']:.1e} | "
              f"{r.get('vertex', '-')} | {r.get('dropped', '-')} | {r.get('start', '-')} |{more}")
    for r in rows:
        if "tries" in r:
            print(f"\n{r['divisions']} divisions, member adding, {len(r['tries'])} runs [s]: "
                  + ", ".join(f"{t:.2f}" for t in r["tries"]))
    by = {(r["divisions"], r["method"]): r for r in rows}
    for n in sizes:
        if (n, "full") in by:
            ratio = by[(n, "full")]["seconds"] / by[(n, "member adding")]["seconds"]
            print(f"\nmember adding at {n} divisions: {ratio:.1f}x faster than the full "
                  "ground structure")


if __name__ == "__main__":
    main()
