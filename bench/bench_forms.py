"""Benchmark: every bridge form at 1, 2 and 5 km spans in steel, against the reference.

Scenario (invented for benchmarking): repeating spans, rise = 0.4 span above the
deck, depth = 0.15 span below it, deck load 200 kN/m, S355 steel (355 MPa,
7850 kg/m3) with self-weight, 40 divisions across the span; stays, hangers and
columns meet the deck once per grid step (the defaults).  For each span the
reference optimum is solved once (every form here uses the bridge's own
supports) and each form is built, sized, geometry-optimized and compared.

Usage::

    python bench/bench_forms.py

Prints a Markdown table and the total wall time.
"""

from __future__ import annotations

import time

import numpy as np

from bridgeopt import PRESETS, BridgeScenario, SolveError, optimize_layout
from bridgeopt.forms import ArchForm, CableStayedForm, SuspensionForm, form_problem, solve_form

SPANS = (1000.0, 2000.0, 5000.0)
FORMS = {
    "cable-stayed fan": CableStayedForm(pattern="fan"),
    "cable-stayed harp": CableStayedForm(pattern="harp"),
    "cable-stayed semi-fan, 2 pylons": CableStayedForm(pattern="semi-fan", pylons=2),
    "suspension": SuspensionForm(),
    "through arch": ArchForm(variant="through-arch"),
    "deck arch": ArchForm(variant="deck-arch"),
}


def crossing(span: float) -> BridgeScenario:
    return BridgeScenario(span=span, rise=0.4 * span, depth=0.15 * span, deck_load=2e5,
                          material=PRESETS["steel"], arrangement="repeating", divisions=40,
                          name=f"bench {span / 1000:g} km")


def main() -> None:
    t_all = time.perf_counter()
    rows = []
    with np.errstate(over="ignore"):
        for span in SPANS:
            b = crossing(span)
            t = time.perf_counter()
            refs = {}
            ref_time = time.perf_counter() - t
            for label, spec in FORMS.items():
                t = time.perf_counter()
                problem = form_problem(b, spec)
                key = (problem.supports, problem.mirror_lines)
                if key not in refs:
                    t_ref = time.perf_counter()
                    refs[key] = optimize_layout(problem)
                    ref_time = time.perf_counter() - t_ref
                    rows.append((span, "reference optimum", None, refs[key].volume,
                                 refs[key].volume, 1.0, "", ref_time))
                t = time.perf_counter()
                try:
                    r = solve_form(b, spec, reference=refs[key])
                except SolveError as err:
                    rows.append((span, label, None, None, refs[key].volume, None,
                                 f"impossible ({err.status})", time.perf_counter() - t))
                    continue
                dims = ", ".join(f"{k.replace('_', ' ')} {v:.0f} m" for k, v in r.geometry.items()
                                 if k != "deck_panel")
                rows.append((span, label, r.start_volume, r.volume, r.reference_volume, r.ratio,
                             dims, time.perf_counter() - t))
    total = time.perf_counter() - t_all
    print("| span [m] | form | start volume [m3] | volume [m3] | reference [m3] | ratio "
          "| final dimensions | time [s] |")
    print("|---|---|---|---|---|---|---|---|")

    def g(v, fmt):
        return "-" if v is None else format(v, fmt)
    for span, label, v0, v, ref, ratio, dims, sec in rows:
        print(f"| {span:.0f} | {label} | {g(v0, ',.0f')} | {g(v, ',.0f')} | {ref:,.0f} | "
              f"{g(ratio, '.3f')} | {dims} | {sec:.2f} |")
    print(f"\ntotal wall time {total:.1f} s")


if __name__ == "__main__":
    main()
