"""Exit statuses, error lines and the text formatting shared by the commands."""

from __future__ import annotations

import math
import re
import os
import sys
from pathlib import Path

from bridgeopt import __version__
from bridgeopt.cautions import CAUTIONS
from bridgeopt.errors import InputError
from bridgeopt.files.io import written_by_bridgeopt
from bridgeopt.files.scenario import Scenario
from bridgeopt.model.materials import GRAVITY, Material
from bridgeopt.solver.design import Design
from bridgeopt.forms.quantities import dimension_lines

__all__ = ["EXIT_OK", "EXIT_INTERNAL", "EXIT_INPUT", "EXIT_SOLVE", "say_error", "number_text",
           "material_text", "row", "format_inputs", "format_form", "format_summary",
           "check_json_target", "form_crossing"]

#: Exit statuses.
EXIT_OK, EXIT_INTERNAL, EXIT_INPUT, EXIT_SOLVE = 0, 1, 2, 3


#: Terminal colour and cursor codes (a kernel's traceback carries them): never in our lines.
_ANSI = re.compile(r"\x1b\[[0-9;?]*[ -/]*[@-~]")


def say_error(message: str) -> None:
    """Print ``bridgeopt: error: MESSAGE`` on stderr, on one line, without colour codes.

    Parameters
    ----------
    message : str
        The error; runs of white space (line breaks included) become one space.
    """
    text = _ANSI.sub("", str(message))
    print("bridgeopt: error: " + " ".join(text.split()), file=sys.stderr)


def number_text(value: float, digits: int = 5) -> str:
    """A number with ``digits`` significant figures and thousands separators.

    Parameters
    ----------
    value : float
        The number, in whatever unit the caller prints after it. [any]
    digits : int
        Significant figures. [-]

    Returns
    -------
    str
        Plain or with thousands separators; in exponent form below 1e-3 and from 1e12.
    """
    if not math.isfinite(value):
        return str(value)
    if value != 0 and (abs(value) >= 1e12 or abs(value) < 1e-3):
        return f"{value:.{digits - 1}e}"
    if abs(value) >= 10 ** digits:
        return f"{value:,.0f}"
    return format(value, f",.{digits}g")


def material_text(m: Material) -> str:
    """One line naming a material, its design stresses (MPa) and density (kg/m3).

    Parameters
    ----------
    m : Material
        The material.

    Returns
    -------
    str
    """
    if m.tension_strength == m.compression_strength:
        stress = f"{number_text(m.tension_strength / 1e6)} MPa"
    else:
        stress = (f"{number_text(m.tension_strength / 1e6)} MPa tension, "
                  f"{number_text(m.compression_strength / 1e6)} MPa compression")
    dens = "weightless (density 0)" if m.weightless else f"{number_text(m.density)} kg/m3"
    return f"{m.name}: {stress}, {dens}"


def row(label: str, text: str) -> str:
    """One indented line of a summary: ``label`` in a column 22 wide, then ``text``.

    Parameters
    ----------
    label : str
        What the line gives (``"span"``).
    text : str
        The value with its unit (``"1,200 m"``).

    Returns
    -------
    str
    """
    return f"  {label:<22} {text}"


def format_inputs(scenario: Scenario) -> list[str]:
    """Lines listing a scenario's inputs with units.

    Parameters
    ----------
    scenario : Scenario
        A parsed scenario (layout or bridge, with or without a form).

    Returns
    -------
    list of str
        One line per input, as :func:`row` gives them.
    """
    p = scenario.problem
    lines = []
    if scenario.bridge is not None:
        b = scenario.bridge
        lines += [
            row("arrangement", {"repeating": "repeating spans (central span of a long run)",
                                 "single": "single span between anchored abutments"}
                 [b.arrangement]),
            row("span", f"{number_text(b.span)} m"),
            row("rise above deck", f"{number_text(b.rise)} m"),
            row("depth below deck", f"{number_text(b.depth)} m"),
            row("deck load", f"{number_text(b.deck_load)} N/m ({number_text(b.deck_load / 1e3)} kN/m)"),
            row("divisions", f"{b.divisions} across the span (grid step {number_text(b.spacing)} m; "
                 f"{'whole-span' if scenario.full_span else 'half-span'} model)"),
        ]
        tension, comp = b.material, b.compression_material
    else:
        x0, x1, z0, z1 = p.domain.bounds
        shape = "rectangle" if p.domain.is_box else f"polygon of {len(p.domain.outline)} points"
        zones = f", {len(p.domain.excluded)} excluded zone(s)" if p.domain.excluded else ""
        nx, nz = p.grid_shape()
        lines += [
            row("domain", f"{shape}, x {number_text(x0)} to {number_text(x1)} m, z {number_text(z0)} to {number_text(z1)} m{zones}"),
            row("spacing", f"{number_text(p.spacing)} m (grid {nx} x {nz} cells)"),
            row("supports", f"{len(p.supports)}"),
            row("loads", f"{len(p.loads)} point, {len(p.line_loads)} line; total "
                 f"{number_text(p.total_applied_load())} N on the model"),
        ]
        if p.mirror_lines:
            lines.append(row("mirror lines", "x = " + ", ".join(f"{number_text(m)}" for m in p.mirror_lines)
                              + " m"))
        if p.copies != 1:
            lines.append(row("copies", f"{number_text(p.copies)} (reported = copies x model)"))
        tension, comp = p.material, p.compression_material
    if comp is None:
        lines.append(row("material", material_text(tension)))
    else:
        lines.append(row("tension material", material_text(tension)))
        lines.append(row("compression material", material_text(comp)))
    if getattr(scenario, "form", None) is not None:
        keys = ", ".join(f"{k} = {v!r}" for k, v in scenario.form.to_dict().items() if k != "type")
        lines.append(row("form", scenario.form.type + (f" ({keys})" if keys else "")
                          + ("" if scenario.form.type == "reference"
                             else ", compared with the reference optimum")))
    if scenario.bridge is not None:
        ns = scenario.bridge.normalised_span
        lines.append(row("normalised span", f"{number_text(ns, 4)} (span / (sigma/(rho g)), tension)"))
    return lines


def form_crossing(scenario: Scenario, form) -> str:
    """How the crossing of a solved form differs from its scenario's own ("" when the same).

    Parameters
    ----------
    scenario : Scenario
        The scenario solved.
    form : FormResult
        Its solved form.

    Returns
    -------
    str
        ``"2 piers"``, ``"foundations 60 m below the deck"`` ... (see
        :func:`bridgeopt.study.crossings.crossing_name`).
    """
    from bridgeopt.study.crossings import crossing_name

    if scenario.bridge is None or form is None:
        return ""
    return crossing_name(getattr(form.reference, "problem", None), scenario.bridge.to_problem())


def format_form(result, crossing: str = "") -> list[str]:
    """Lines setting a solved bridge form against the reference optimum.

    Parameters
    ----------
    result : FormResult
        A solved form (:func:`~bridgeopt.forms.solve_form`).
    crossing : str
        How the form's crossing differs from the scenario's own (``"2 piers"``), or
        ``""`` when it stands on the scenario's supports.

    Returns
    -------
    list of str
        Volumes (m3), ratio, main dimensions (m) and quantities per element group.
    """
    keys = ", ".join(f"{k} = {v!r}" for k, v in result.spec.to_dict().items() if k != "type")
    lines = [f"Form: {result.form_type}" + (f" ({keys})" if keys else ""),
             row("form volume", f"{number_text(result.volume)} m3 (starting geometry "
                  f"{number_text(result.start_volume)} m3)"),
             row("reference optimum" + (f" ({crossing})" if crossing else ""),
                 f"{number_text(result.reference_volume)} m3 (layout "
                 + ("and geometry " if "history" in result.reference.stats else "")
                 + "optimization, same domain and supports as the form"
                 + (f": the scenario's crossing with {crossing}" if crossing else "") + ")"),
             row("volume ratio", f"{number_text(result.ratio, 4)} (form / reference)")]
    for name, value in result.geometry.items():
        lines.append(row(name.replace("_", " "), f"{number_text(value)} m"))
    lines.extend(dimension_lines(getattr(result, "dimensions", {})))
    lines.append("  quantities per element group (whole span):")
    for group, q in result.quantities.items():
        lines.append(f"    {group:<10} {q['members']:>4} members  {number_text(q['volume_m3']):>12} m3  "
                     f"{number_text(q['weight_N'] / 1e3):>12} kN  "
                     f"largest force {number_text(q['largest_force_N'])} N")
    return lines


def format_summary(scenario: Scenario, design: Design, wall_seconds: float | None = None,
                   form=None) -> str:
    """The text summary of a solved scenario, ending with the cautions.

    With ``form`` (a :class:`~bridgeopt.forms.FormResult` whose design is
    ``design``), the form is set against the reference optimum.

    Parameters
    ----------
    scenario : Scenario
        The scenario solved.
    design : Design
        Its solved design.
    wall_seconds : float, optional
        Total time including reading and checking. [s]
    form : FormResult, optional
        The solved form when the scenario has a ``[form]`` table.

    Returns
    -------
    str
        Inputs, result, solve statistics, then the cautions, one per line.
    """
    m = design.members
    n_t = int((m.sense == "tension").sum())
    whole = " (whole span)" if scenario.bridge is not None else (
        f" ({number_text(design.copies)} copies of the model)" if design.copies != 1 else "")
    lines = [f"bridgeopt {__version__}: {scenario.name} ({scenario.kind} scenario)"]
    if scenario.source and scenario.source != "<dict>":
        lines.append(f"  source: {scenario.source}")
    lines.append("Inputs")
    lines += format_inputs(scenario)
    lines.append(f"Result: {design.message}")
    lines.append(row("volume", f"{number_text(design.volume)} m3{whole}"))
    mass_t = design.weight / GRAVITY / 1e3
    lines.append(row("weight", f"{number_text(design.weight)} N = {number_text(design.weight / 1e3)} kN "
                      f"(mass {number_text(mass_t)} t)"))
    applied = scenario.problem.total_applied_load() * design.copies
    if applied > 0 and design.weight > 0:
        lines.append(row("weight / applied load", f"{number_text(design.weight / applied, 4)}"))
    if scenario.bridge is not None:
        nv = scenario.bridge.normalised_volume(design.volume)
        lines.append(row("normalised volume", f"{number_text(nv, 6)} (volume sigma / (deck_load span^2))"))
    lines.append(row("members", f"{len(m)} ({n_t} tension, {len(m) - n_t} compression)"))
    lines.append(row("nodes", f"{len(design.nodes)} used of {design.stats.get('grid_nodes', '?')} "
                      "grid nodes"))
    st = design.stats
    how = "member adding" if scenario.solve.member_adding else "full ground structure"
    lines.append(row("solve", f"{st.get('seconds', 0.0):.2f} s in HiGHS, {st.get('rounds', 0)} "
                      f"LP round(s), {st.get('columns', 0)} of {st.get('candidates', 0)} candidate "
                      f"columns ({how})"))
    if wall_seconds is not None:
        lines.append(row("total time", f"{wall_seconds:.2f} s"))
    gap = st.get("gap") or 0.0
    if gap > 0:
        lines.append(row("optimality gap", f"{gap:.1e} (proven bound on how far the volume "
                          "may lie above the optimum)"))
    if "history" in st:
        start = st["history"][0]
        lines.append(row("geometry optimization",
                          f"volume {number_text(start['volume'])} -> {number_text(design.volume)} m3, nodes "
                          f"{start['nodes']} -> {len(design.nodes)}, members {start['members']} "
                          f"-> {len(m)} ({len(st['history']) - 1} stages)"))
    lines.append(row("equilibrium error", f"{design.equilibrium_error:.1e} of the applied load"))
    if form is not None:
        lines += format_form(form, form_crossing(scenario, form))
    lines.append(CAUTIONS)
    return "\n".join(lines)


def check_json_target(path: str | None, *, force: bool = False) -> Path | None:
    """Fail before the solve when the JSON cannot be written where asked.

    An existing file is replaced only when bridgeopt wrote it, or with ``force``.

    Parameters
    ----------
    path : str, optional
        The ``--json`` argument (None when not given).
    force : bool
        Replace an existing file bridgeopt did not write.

    Returns
    -------
    Path or None
        ``path`` as a :class:`~pathlib.Path`.

    Raises
    ------
    InputError
        A directory, a missing or a read-only parent directory, or a file of the user's
        (without ``force``).
    """
    if path is None:
        return None
    out = Path(path)
    parent = out.parent if str(out.parent) else Path(".")
    if out.is_dir():
        raise InputError("--json", path, "a file path, not a directory")
    if out.exists() and not force and not written_by_bridgeopt(out):
        raise InputError("--json", path, "a new file, or a JSON file bridgeopt wrote (this one "
                         "exists and is not bridgeopt output; add --force to replace it)")
    if not parent.is_dir():
        raise InputError("--json", path, f"a path in an existing directory ({parent} does not "
                         "exist)")
    if not os.access(parent, os.W_OK):
        raise InputError("--json", path, f"a path in a writable directory ({parent})")
    return out
