"""A scenario's inputs written back in the scenario-file schema (the inverse of reading)."""

from __future__ import annotations

from typing import Any

from bridgeopt.model.materials import Material
from bridgeopt.model.problem import Problem

__all__ = ["material_dict", "problem_dict"]


def material_dict(m: Material) -> dict:
    """A material in the file schema (strengths [Pa], density [kg/m3]).

    Parameters
    ----------
    m : Material
        The material (strengths [Pa], density [kg/m3]).

    Returns
    -------
    dict
        ``name``, ``tension_strength`` [Pa], ``compression_strength`` [Pa] and
        ``density`` [kg/m3].
    """
    return {"name": m.name, "tension_strength": m.tension_strength,
            "compression_strength": m.compression_strength, "density": m.density}


def problem_dict(p: Problem) -> dict:
    """A layout problem's keys in the file schema (without name and solve).

    Parameters
    ----------
    p : Problem
        The layout problem (lengths [m], forces [N], intensities [N/m]).

    Returns
    -------
    dict
        ``copies``, ``domain``, ``material`` and, where the problem has them,
        ``compression_material``, ``support``, ``load``, ``line_load`` and ``symmetry``
        (SI units, as in the file).
    """
    d = p.domain
    x0, x1, z0, z1 = d.bounds
    domain: dict[str, Any] = {}
    if d.outline == ((x0, z0), (x1, z0), (x1, z1), (x0, z1)):
        domain["x"], domain["z"] = [x0, x1], [z0, z1]
    else:
        domain["outline"] = [list(pt) for pt in d.outline]
    domain["spacing"] = p.spacing
    if d.excluded:
        domain["excluded"] = [{"outline": [list(pt) for pt in zone]} for zone in d.excluded]
    out: dict[str, Any] = {"copies": p.copies, "domain": domain,
                           "material": material_dict(p.material)}
    if p.compression_material is not None:
        out["compression_material"] = material_dict(p.compression_material)
    if p.supports:
        out["support"] = [{"at": list(s.at), "fix": s.fix} for s in p.supports]
    if p.loads:
        out["load"] = [{"at": list(q.at), "force": list(q.force)} for q in p.loads]
    if p.line_loads:
        out["line_load"] = [{"from": list(q.start), "to": list(q.end),
                             "intensity": q.intensity} for q in p.line_loads]
    if p.mirror_lines:
        out["symmetry"] = [{"x": m} for m in p.mirror_lines]
    return out
