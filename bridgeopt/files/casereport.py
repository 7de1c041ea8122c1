"""Text summary and JSON-ready dict of a multi-case design (:class:`~bridgeopt.solver.multicase.CaseDesign`).

The JSON (schema ``bridgeopt.cases/1``) has the keys ``bridgeopt_version``,
``schema``, ``name``, ``kind``, ``source``, ``status``, ``message``, ``volume``
[m3], ``cost`` [currency], ``currency``, ``weight`` [N], ``copies``,
``cases`` (per case: name, total applied load [N], members governed),
``group_volume`` [m3], ``nodes``, ``members`` (ends, group, area [m2], length
[m], volume [m3], forces per case [N], governing case), ``reactions`` (per
case), ``stats``, ``inputs``, ``units`` and the cautions.
"""

from __future__ import annotations

from bridgeopt.cautions import CAUTION_LINES, CAUTIONS
from bridgeopt.files.design_json import UNITS, plain_json
from bridgeopt.model.materials import GRAVITY

__all__ = ["CASES_SCHEMA", "format_case_summary", "case_design_to_dict"]

CASES_SCHEMA = "bridgeopt.cases/1"


def _g(v: float) -> str:
    return f"{v:,.5g}" if abs(v) < 1e12 else f"{v:.4e}"


def _currency(design) -> str:
    costs = design.study.costs
    return costs.currency if costs is not None else "m3 (no [cost] table: cost = volume)"


def format_case_summary(design, *, header: list[str], inputs: list[str],
                        wall_seconds: float | None = None) -> str:
    """The text summary of a multi-case design, ending with the cautions.

    Parameters
    ----------
    design : CaseDesign
        A solved multi-case design (:func:`~bridgeopt.solver.multicase.optimize_cases`).
    header : list of str
        Opening lines (title, source), as the single-case summary starts.
    inputs : list of str
        Input lines (span, heights, material ...), as in the single-case summary.
    wall_seconds : float, optional
        Total time including reading and checking, reported as ``total time``. [s]

    Returns
    -------
    str
        Lines joined by newlines: inputs, the cases (load in N, members each
        governs), volume (m3), cost, volume per group, weight (N), solve, cautions.
    """
    study = design.study
    row = lambda label, text: f"  {label:<22} {text}"  # noqa: E731
    lines = list(header) + ["Inputs"] + list(inputs)
    if study.costs is not None:
        lines.append(row("unit costs", f"tension {_g(study.costs.tension)}, compression "
                         f"{_g(study.costs.compression)} {study.costs.currency} per m3"))
    lines.append(row("load cases", f"{len(study.cases)} (permanent loads in every case)"
                     if study.permanent else f"{len(study.cases)}"))
    counts = design.governing_counts()
    for k, case in enumerate(study.cases):
        lines.append(row(f"  {case.name}", f"applied load {_g(study.total_load(k))} N; "
                         f"governs {counts[case.name]} member(s)"))
    lines.append(f"Result: {design.message}")
    lines.append(row("volume", f"{_g(design.volume)} m3"))
    ref = design.stats.get("reference")
    if ref:
        lines.append(row("single-case reference", f"{_g(ref['volume'])} m3 for case "
                         f"{ref['case']!r} alone (equal-strength elements); this design "
                         f"{100 * (design.volume / ref['volume'] - 1):+.2f} %"))
    lines.append(row("cost", f"{_g(design.cost)} {_currency(design)}"))
    for g in sorted(set(design.group)):
        lines.append(row(f"  {g} volume", f"{_g(float(design.member_volume[design.group == g].sum()) * design.copies)} m3"))
    lines.append(row("weight", f"{_g(design.weight)} N (mass {_g(design.weight / GRAVITY / 1e3)} t)"))
    lines.append(row("members", f"{len(design.start)}; self-weight lumped at member ends"))
    st = design.stats
    lines.append(row("solve", f"{st.get('seconds', 0.0):.2f} s, {st.get('rounds', 0)} LP round(s), "
                     f"{st.get('columns', 0)} of {st.get('candidates', 0)} candidate members"))
    if wall_seconds is not None:
        lines.append(row("total time", f"{wall_seconds:.2f} s"))
    lines.append(row("equilibrium error", f"{st.get('equilibrium_error', 0.0):.1e} of the largest "
                     "case load (worst case)"))
    lines.append(CAUTIONS)
    return "\n".join(lines)


def case_design_to_dict(design, *, scenario=None, wall_seconds: float | None = None) -> dict:
    """A JSON-ready dict of a multi-case design (SI units; keys in the module docstring).

    Parameters
    ----------
    design : CaseDesign
        A solved multi-case design.
    scenario : Scenario, optional
        The scenario it was solved from: adds its name, kind, source and inputs.
    wall_seconds : float, optional
        Total time, recorded in ``stats``. [s]

    Returns
    -------
    dict
        Plain JSON values, schema :data:`CASES_SCHEMA`.
    """
    from bridgeopt import __version__

    study = design.study
    counts = design.governing_counts()
    names = design.case_names
    members = [{
        "id": i, "start": int(design.start[i]), "end": int(design.end[i]),
        "group": str(design.group[i]), "area": float(design.area[i]),
        "length": float(design.length[i]), "volume": float(design.member_volume[i]),
        "forces": {n: float(design.forces[i, k]) for k, n in enumerate(names)},
        "governing_case": names[int(design.governing[i])],
    } for i in range(len(design.start))]
    reactions = {n: [{"node": int(r[0]), "rx": float(r[1]), "rz": float(r[2])}
                     for r in design.reactions[k]] for k, n in enumerate(names)}
    stats = dict(design.stats)
    if wall_seconds is not None:
        stats["wall_seconds"] = wall_seconds
    out = {
        "bridgeopt_version": __version__, "schema": CASES_SCHEMA,
        "name": getattr(scenario, "name", study.problem.name),
        "kind": getattr(scenario, "kind", "layout"), "source": getattr(scenario, "source", None),
        "status": design.status, "message": design.message, "volume": design.volume,
        "cost": design.cost, "currency": _currency(design), "weight": design.weight,
        "copies": design.copies,
        "cases": [{"name": c.name, "applied_load": study.total_load(k), "governs": counts[c.name]}
                  for k, c in enumerate(study.cases)],
        "group_volume": {str(g): float(design.member_volume[design.group == g].sum())
                         * design.copies for g in sorted(set(design.group))},
        "nodes": [{"x": float(x), "z": float(z)} for x, z in design.nodes],
        "members": members, "reactions": reactions, "stats": stats,
        "inputs": scenario.to_dict() if scenario is not None else {},
        "units": dict(UNITS, area="m2", cost="currency of [cost]"),
        "cautions": list(CAUTION_LINES), "caution": CAUTIONS,
    }
    return plain_json(out)
