"""Trace of member adding, round by round, for the reference optimum.

Scenario (invented for benchmarking, as in ``bench_reference.py``): 1000 m
repeating span, rise = span/2, no depth below the deck, deck load 200 kN/m,
S355 steel with self-weight.

Usage::

    python bench/trace_rounds.py               # 60 divisions
    python bench/trace_rounds.py --divisions 40

Wraps :meth:`bridgeopt.solver.lpmodel.LayoutModel.run_once` and ``.price`` (the
solver itself is not changed) and, after one warm-up run, prints a Markdown table
of one run: grid nodes, columns in the LP, HiGHS's wall time, simplex and
interior-point iterations, the objective, the violated candidates found at that
round's duals, and the proven lower bound of those duals (the objective divided
by the largest work/cost, :func:`bridgeopt.solver.adding.proven_gap`).  The
bound is exact only where the solve gives vertex duals (every level of a
simplex-sized grid); a low bound with a good objective is a round of unstable
duals.
"""

from __future__ import annotations

import argparse
import time


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--divisions", type=int, default=60,
                        help="grid divisions of the span (even, >= 4; default 60)")
    args = parser.parse_args()

    from bridgeopt import PRESETS, BridgeScenario, optimize_layout
    from bridgeopt.solver import lpmodel

    problem = BridgeScenario(span=1000.0, rise=500.0, depth=0.0, deck_load=2e5,
                             material=PRESETS["steel"], divisions=args.divisions).to_problem()
    rows: list[dict] = []
    run_once, price = lpmodel.LayoutModel.run_once, lpmodel.LayoutModel.price

    def traced_run(self):
        t = time.perf_counter()
        status = run_once(self)
        info = self.h.getInfo()
        rows.append({"nodes": len(self.data.xz), "columns": self.h.getNumCol(),
                     "seconds": time.perf_counter() - t,
                     "simplex": info.simplex_iteration_count, "ipm": info.ipm_iteration_count,
                     "objective": info.objective_function_value, "violated": "-", "bound": "-"})
        return status

    def traced_price(self):
        found = price(self)
        objective = rows[-1]["objective"]
        if found is None:
            rows[-1].update(violated=0, bound=f"{objective:.6f}")
        else:
            rows[-1].update(violated=len(found[0]),
                            bound=f"{objective / max(1.0, float(found[2].max())):.6f}")
        return found

    lpmodel.LayoutModel.run_once, lpmodel.LayoutModel.price = traced_run, traced_price
    optimize_layout(problem)  # warm-up: imports, caches
    rows.clear()
    t = time.perf_counter()
    design = optimize_layout(problem)
    total = time.perf_counter() - t

    print("| nodes | columns | HiGHS [s] | simplex iterations | ipm iterations | objective [-] "
          "| violated | bound [-] |")
    print("|---|---|---|---|---|---|---|---|")
    for r in rows:
        print(f"| {r['nodes']} | {r['columns']} | {r['seconds']:.3f} | {r['simplex']} | {r['ipm']} "
              f"| {r['objective']:.6f} | {r['violated']} | {r['bound']} |")
    print(f"\n{args.divisions} divisions: {total:.2f} s in all, HiGHS "
          f"{sum(r['seconds'] for r in rows):.2f} s in {len(rows)} solves; "
          f"volume {design.stats['lp_volume']:.3f} m3, gap {design.stats['gap']:.1e}")


if __name__ == "__main__":
    main()
