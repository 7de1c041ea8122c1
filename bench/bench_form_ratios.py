"""Benchmark: form ratios to the reference at 1, 2.5 and 5 km, repeating steel spans.

Scenario (the acceptance case of issue 11, invented for benchmarking): repeating
spans, rise = span/2 above the deck, no depth below it, deck load 200 kN/m, S355
steel (355 MPa, 7850 kg/m3) with self-weight, 30 divisions across the span.  For
each span the reference optimum is solved once; the cable-stayed fan, semi-fan
and harp patterns (every anchor height, every stay's deck point and the pylon
height free), the forked pylon (``pylon = "forked"``: stays chosen by the LP,
then every anchor, the mast top and the leg heads free) and the suspension form
(every cable node's height, the tower height and the hanger positions free:
inclined hangers, each cable node up to one panel towards the tower from its
deck point), and the same with V-shaped towers (an inclined leg from each tower
foot to the cable at the 4th hanger), and the suspension form with hangers
leaning up to 4 or 6 panels (``hanger_lean``, the lean continuation of
``bridgeopt/forms/hangers.py``) are sized, geometry-optimized and compared
with it.

Usage::

    python bench/bench_form_ratios.py [SPAN_M ...]

Prints a Markdown table and the total wall time.
"""

from __future__ import annotations

import sys
import time

import numpy as np

from bridgeopt import PRESETS, BridgeScenario, SolveError, optimize_layout
from bridgeopt.forms import CableStayedForm, SuspensionForm, form_problem, solve_form

SPANS = (1000.0, 2500.0, 5000.0)
FORMS = {
    "cable-stayed fan": CableStayedForm(pattern="fan"),
    "cable-stayed semi-fan": CableStayedForm(pattern="semi-fan"),
    "cable-stayed harp": CableStayedForm(pattern="harp"),
    "cable-stayed forked pylon": CableStayedForm(pylon="forked"),
    "suspension": SuspensionForm(),
    "suspension, V-towers (tower_legs 4)": SuspensionForm(tower_legs=4),
    "suspension, hanger_lean 4 (continuation)": SuspensionForm(hanger_lean=4.0),
    "suspension, hanger_lean 6 (continuation)": SuspensionForm(hanger_lean=6.0),
}


def crossing(span: float) -> BridgeScenario:
    return BridgeScenario(span=span, rise=0.5 * span, depth=0.0, deck_load=2e5,
                          material=PRESETS["steel"], arrangement="repeating", divisions=30,
                          name=f"bench {span / 1000:g} km")


COLUMNS = ("span [m]", "form", "start volume [m3]", "volume [m3]", "start ratio", "ratio",
           "final dimensions", "time [s]")


def _cells(values, formats) -> str:
    """A Markdown table row; None shows as '-'."""
    return "| " + " | ".join("-" if v is None else format(v, f)
                             for v, f in zip(values, formats)) + " |"


def main(spans=SPANS) -> None:
    t_all = time.perf_counter()
    formats = (".0f", "s", ",.0f", ",.0f", ".3f", ".3f", "s", ".1f")
    lines = ["| " + " | ".join(COLUMNS) + " |", "|" + "---|" * len(COLUMNS)]
    with np.errstate(over="ignore"):
        for span in spans:
            b = crossing(span)
            ref = optimize_layout(form_problem(b, FORMS["suspension"]))
            lines.append(_cells((span, "reference optimum", ref.volume, ref.volume, 1.0, 1.0,
                                 "", 0.0), formats))
            for label, spec in FORMS.items():
                t = time.perf_counter()
                try:
                    r = solve_form(b, spec, reference=ref)
                except SolveError as err:
                    lines.append(_cells((span, label, None, None, None, None,
                                         f"impossible ({err.status})",
                                         time.perf_counter() - t), formats))
                    continue
                dims = [f"{k.replace('_', ' ')} {v:.4g} m" for k, v in r.geometry.items()
                        if k != "deck_panel"]
                dims += [f"{k.replace('_', ' ')} {r.dimensions[k]:.4g}"
                         for k in ("span_to_height", "span_to_sag") if k in r.dimensions]
                if "anchor_move_largest_m" in r.dimensions:
                    dims.append(f"anchors moved up to {r.dimensions['anchor_move_largest_m']:.4g} m")
                lines.append(_cells((span, label, r.start_volume, r.volume,
                                     r.start_volume / ref.volume, r.ratio, ", ".join(dims),
                                     time.perf_counter() - t), formats))
    print("\n".join(lines))
    print(f"\ntotal wall time {time.perf_counter() - t_all:.1f} s")


if __name__ == "__main__":
    main(tuple(float(s) for s in sys.argv[1:]) or SPANS)
