"""Trend studies of the option comparison: against span, allowed rise and pylon count.

Each returns one long :class:`pandas.DataFrame` with the columns of
:func:`bridgeopt.study.options.compare` plus the swept quantities, in SI units.  A form
that fails or is not registered at some point gives a row saying so; the sweep
carries on.  Also available as ``bridgeopt.study.span_sweep`` etc.
"""

from __future__ import annotations

import dataclasses
import math
from typing import Any, Callable, Iterable, Mapping

from bridgeopt.model.bridge import BridgeScenario
from bridgeopt.errors import InputError
from bridgeopt.model.limits import checked_number
from bridgeopt.model.loads import UnitCosts
from bridgeopt.study.options import REFERENCE, comparison_rows, solve_options

__all__ = ["span_sweep", "height_sweep", "pylon_sweep", "pylon_costs"]


def _sweep(cases, forms, options, progress, extra):
    """Rows of :func:`compare` for each (bridge, label-dict) in ``cases``."""
    import pandas as pd

    cases = list(cases)
    rows = []
    for i, (bridge, labels) in enumerate(cases):
        for row in comparison_rows(bridge, solve_options(bridge, forms, options)):
            rows.append({**labels, **extra(bridge), **row})
        if progress is not None:
            progress(i + 1, len(cases))
    return pd.DataFrame(rows)


def _bridge_columns(bridge: BridgeScenario) -> dict:
    return {"span_m": bridge.span, "rise_m": bridge.rise, "depth_m": bridge.depth,
            "normalised_span": bridge.normalised_span}


def span_sweep(bridge: BridgeScenario, spans: Iterable[float], forms: Iterable[str] = (),
               options: Mapping[str, Any] | None = None, *, keep_proportions: bool = True,
               progress: Callable[[int, int], None] | None = None):
    """:func:`compare` at each span, in one long table.

    Parameters
    ----------
    bridge : BridgeScenario
        The base scenario (material, load, arrangement, divisions).
    spans : iterable of float
        Spans to solve. [m]
    forms : iterable of str
        Form names (see :func:`~bridgeopt.study.options.available_forms`); the
        reference is always solved.
    options : mapping, optional
        Passed to every form's solver (e.g. ``{"pylons": 2}``).
    keep_proportions : bool
        Scale rise and depth with the span (same rise/span and depth/span as
        ``bridge``); otherwise keep them fixed.
    progress : callable, optional
        ``progress(done, total)`` after each span.

    Returns
    -------
    pandas.DataFrame
        :func:`compare`'s columns plus ``span_m`` [m], ``rise_m`` [m],
        ``depth_m`` [m] and ``normalised_span`` [-] (span / (sigma/(rho g))).
    """
    forms = tuple(forms)

    def cases():
        for s in spans:
            f = s / bridge.span if keep_proportions else 1.0
            yield dataclasses.replace(bridge, span=float(s), rise=bridge.rise * f,
                                      depth=bridge.depth * f), {}
    return _sweep(cases(), forms, options, progress, _bridge_columns)


def height_sweep(bridge: BridgeScenario, rises: Iterable[float], forms: Iterable[str] = (),
                 options: Mapping[str, Any] | None = None, *,
                 progress: Callable[[int, int], None] | None = None):
    """:func:`compare` at each allowed rise above the deck.

    Parameters
    ----------
    bridge : BridgeScenario
        The base scenario (span, depth, material, load, arrangement, divisions).
    rises : iterable of float
        Heights allowed above the deck. [m]
    forms : iterable of str
        Form names (see :func:`~bridgeopt.study.options.available_forms`); the
        reference is always solved.
    options : mapping, optional
        Passed to every form's solver (e.g. ``{"pylons": 2}``).
    progress : callable, optional
        ``progress(done, total)`` after each rise.

    Returns
    -------
    pandas.DataFrame
        :func:`span_sweep`'s columns plus ``span_to_rise`` [-].  A rise the
        scenario refuses (below one grid step with no depth) gives a
        ``"failed"`` row with the message.
    """
    forms = tuple(forms)
    rows = []
    rises = list(rises)
    import pandas as pd

    for i, r in enumerate(rises):
        try:
            b = dataclasses.replace(bridge, rise=float(r))
        except InputError as err:
            for name in (REFERENCE,) + forms:
                rows.append({**_bridge_columns(bridge), "rise_m": float(r), "option": name,
                             "status": "failed", "volume_m3": math.nan, "weight_N": math.nan,
                             "ratio_to_reference": math.nan, "normalised_volume": math.nan,
                             "seconds": 0.0, "message": f"{name}: {err}"})
        else:
            rows += [{**_bridge_columns(b), **row}
                     for row in comparison_rows(b, solve_options(b, forms, options))]
        if progress is not None:
            progress(i + 1, len(rises))
    df = pd.DataFrame(rows)
    if len(df):
        df["span_to_rise"] = df["span_m"] / df["rise_m"].where(df["rise_m"] > 0)
    return df


def pylon_sweep(bridge: BridgeScenario, spans: Iterable[float], pylons: Iterable[int],
                forms: Iterable[str] = (), options: Mapping[str, Any] | None = None, *,
                keep_proportions: bool = True,
                progress: Callable[[int, int], None] | None = None):
    """:func:`span_sweep` for each pylon count (passed to the forms as ``options["pylons"]``).

    Pylons on their own piers (the package's cable-stayed forms): with n pylons
    per span, n - 1 intermediate piers
    stand in the span, their shafts down to the foundation level
    (``bridge.foundation_depth``) members of the form.  Each count is its own
    crossing (``crossing`` ``"2 piers"``), and each form is set against the
    reference optimum on the same piers (``reference_volume_m3``).  The rows of
    the scenario's plain reference (no intermediate pier) are repeated for every
    count.  A form whose intermediate pylons the structure itself carries
    (:data:`bridgeopt.study.LEGS_FORM`, after :func:`bridgeopt.study.register_legs`; the form is in :mod:`bridgeopt.forms.legs`)
    stands on the plain crossing and is set against its plain reference.

    Parameters
    ----------
    bridge : BridgeScenario
        The base scenario.
    spans : iterable of float
        Spans to solve. [m]
    pylons : iterable of int
        Pylon counts per span. [-]
    forms : iterable of str
        Form names (see :func:`~bridgeopt.study.options.available_forms`); the
        reference is always solved.
    options : mapping, optional
        Passed to every form's solver, its ``"pylons"`` set to each count.
    keep_proportions : bool
        Scale rise and depth with the span.
    progress : callable, optional
        ``progress(done, total)`` after each (pylon count, span), over all counts.

    Returns
    -------
    pandas.DataFrame
        :func:`span_sweep`'s columns plus ``pylons`` [-] and ``foundations``
        (pier foundations per span in the water: the crossing's own, 1 for
        repeating spans and 0 between the abutments of a single span, plus one
        per intermediate pier a form stands on) [-].
    """
    import pandas as pd

    pylons = [int(n) for n in pylons]
    spans = list(spans)
    total = len(spans) * len(pylons)
    frames = []
    for j, n in enumerate(pylons):
        opts = {**dict(options or {}), "pylons": n}

        def step(done, _total, j=j):
            if progress is not None:
                progress(j * len(spans) + done, total)
        df = span_sweep(bridge, spans, forms, opts, keep_proportions=keep_proportions,
                        progress=step)
        df.insert(0, "pylons", n)
        own = 1 if bridge.arrangement == "repeating" else 0
        if len(df):
            # pier foundations: the crossing's own, and one per intermediate pier a form
            # stands on (none for pylons carried by the structure itself)
            df["foundations"] = [own + (n - 1 if c else 0) for c in df["crossing"]]
        frames.append(df)
    return pd.concat(frames, ignore_index=True) if frames else pd.DataFrame()


def pylon_costs(table, *, costs: UnitCosts | None = None, foundation_cost: float = 0.0):
    """Volume and cost of superstructure, piers and foundations, per form and pylon count.

    Parameters
    ----------
    table : pandas.DataFrame
        :func:`pylon_sweep` output.
    costs : UnitCosts, optional
        Prices of tension and compression elements per m3 (default 1 each).
        [currency/m3]
    foundation_cost : float
        Price of one pier foundation, in the currency of ``costs``, in [0, 1e15].
        [currency]

    Returns
    -------
    pandas.DataFrame
        One row per solved form, span and pylon count: ``span_m``, ``option``,
        ``pylons``, ``crossing``, ``foundations`` [-], ``superstructure_volume_m3``,
        ``pier_volume_m3``, ``volume_m3`` (their sum) [m3],
        ``superstructure_cost``, ``pier_cost``, ``foundation_cost`` and ``cost``
        (their sum) [currency], ``reference_volume_m3`` (the optimum of the same
        crossing) [m3] and ``cheapest`` (the least cost of its form and span).
    """
    import pandas as pd

    costs = UnitCosts() if costs is None else costs
    if not isinstance(costs, UnitCosts):
        raise InputError("costs", costs, "a UnitCosts (prices per m3)")
    price = checked_number("foundation_cost", foundation_cost, low=0.0, high=1e15,
                           unit="currency per foundation", zero_ok=True)
    rows = table[(table["option"] != REFERENCE) & (table["status"] == "optimal")]
    out = pd.DataFrame({
        "span_m": rows["span_m"], "option": rows["option"], "pylons": rows["pylons"],
        "crossing": rows.get("crossing", ""), "foundations": rows["foundations"],
        "superstructure_volume_m3": rows["volume_m3"] - rows["pier_volume_m3"],
        "pier_volume_m3": rows["pier_volume_m3"], "volume_m3": rows["volume_m3"],
    }).reset_index(drop=True)
    tension = rows["tension_volume_m3"].to_numpy(float)
    compression = rows["compression_volume_m3"].to_numpy(float)
    pier = rows["pier_volume_m3"].to_numpy(float)
    out["superstructure_cost"] = tension * costs.tension + (compression - pier) * costs.compression
    out["pier_cost"] = pier * costs.compression
    out["foundation_cost"] = out["foundations"].to_numpy(float) * price
    out["cost"] = out["superstructure_cost"] + out["pier_cost"] + out["foundation_cost"]
    out["reference_volume_m3"] = rows["reference_volume_m3"].to_numpy(float)
    least = out.groupby(["span_m", "option"])["cost"].transform("min")
    out["cheapest"] = out["cost"] <= least * (1 + 1e-12)
    return out
