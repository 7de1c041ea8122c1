"""Drawings of a solved design: SVG (plain XML text) and DXF for CAD (with ezdxf).

Both draw the modelled part of a design (for a bridge, the half span) in its own
coordinates: x to the right, z upwards, in m.  A member is drawn along its
centreline (:attr:`~bridgeopt.solver.design.Members.curves`): a straight member as one
line, a cable or arch that sags under its own weight as a polyline through its
centreline points.  Tension is drawn blue, compression red.

DXF: one layer per element group (``design.members.group``: ``MEMBER`` for a
layout optimum; ``STAY``, ``PYLON``, ``DECK``, ``CABLE`` ... for a form), named
:func:`layer_name`; straight members are LINE entities, curved ones LWPOLYLINE;
drawing units metres; the cautions and the volume are an MTEXT on layer ``NOTES``.
SVG: one ``<g>`` per element group, with the cautions as a text element and a
comment.
"""

from __future__ import annotations

import re
from pathlib import Path
from xml.sax.saxutils import escape

import numpy as np

from bridgeopt.cautions import CAUTIONS
from bridgeopt.solver.design import Design
from bridgeopt.forms.quantities import dimension_lines

__all__ = ["design_svg", "write_svg", "write_dxf", "layer_name", "NOTES_LAYER"]

NOTES_LAYER = "NOTES"
_COLOURS = {"tension": "#1f5fbf", "compression": "#c0392b"}
#: AutoCAD colour index per sense (5 blue, 1 red).
_ACI = {"tension": 5, "compression": 1}


def layer_name(group: str) -> str:
    """The DXF layer of an element group: upper case, characters DXF refuses replaced by ``_``.

    Parameters
    ----------
    group : str
        Element-group label (``"stay"``, ``"arch rib"`` ...).

    Returns
    -------
    str
        The layer name (``"MEMBER"`` for an empty label).
    """
    name = re.sub(r"[<>/\\\":;?*|=',\s]+", "_", str(group).strip()).upper()
    return name or "MEMBER"


def _curves(design: Design) -> list[np.ndarray]:
    m = design.members
    out = []
    for i in range(len(m)):
        c = np.asarray(m.curves[i], dtype=float)
        if len(c) < 2:
            c = design.nodes[[m.start[i], m.end[i]]]
        out.append(c)
    return out


def _widths(design: Design, lo: float, hi: float) -> np.ndarray:
    """Stroke widths growing with each member's cross-section area (volume / length)."""
    m = design.members
    length = np.array([np.hypot(*np.diff(c, axis=0).T).sum() for c in _curves(design)])
    area = np.divide(m.volume, length, out=np.zeros(len(m)), where=length > 0)
    if not len(area) or area.max() <= 0:
        return np.full(len(m), lo)
    return lo + (hi - lo) * np.sqrt(area / area.max())


def design_svg(design: Design, *, title: str | None = None, width: float = 1000.0) -> str:
    """An SVG drawing of ``design`` (text of a complete SVG document).

    Parameters
    ----------
    design : Design
        A solved design; curved members are drawn along their centrelines.
    title : str, optional
        Heading drawn above the structure (default: the problem's name).
    width : float
        Drawing width in SVG user units (pixels); the height follows. [px]

    Returns
    -------
    str
        The SVG document.
    """
    xz = np.asarray(design.nodes, dtype=float)
    curves = _curves(design)
    pts = np.vstack([xz, *curves]) if curves else xz
    x0, z0 = pts.min(axis=0)
    x1, z1 = pts.max(axis=0)
    size = max(x1 - x0, z1 - z0, 1e-9)
    margin = 0.05 * size
    scale = width / (x1 - x0 + 2 * margin if x1 > x0 else size + 2 * margin)
    head, foot = (54.0 if isinstance(design.stats, dict) and "form" in design.stats
                  else 40.0), 60.0
    height = (z1 - z0 + 2 * margin) * scale + head + foot

    def sx(x):
        return (x - x0 + margin) * scale

    def sy(z):
        return head + (z1 - z + margin) * scale

    m = design.members
    widths = _widths(design, 0.6, 0.012 * width)
    name = title or getattr(design.problem, "name", "design")
    out = ['<?xml version="1.0" encoding="UTF-8"?>',
           f"<!-- bridgeopt drawing. {escape(CAUTIONS).replace('--', '-')} -->",
           f'<svg xmlns="http://www.w3.org/2000/svg" width="{width:.0f}" height="{height:.0f}" '
           f'viewBox="0 0 {width:.3f} {height:.3f}">',
           f"<title>{escape(name)}</title>",
           '<rect width="100%" height="100%" fill="white"/>',
           f'<text x="10" y="24" font-family="sans-serif" font-size="16">{escape(name)}: volume '
           f"{design.volume:.6g} m3 ({len(m)} members; model drawn, x right, z up, m)</text>"]
    form = design.stats.get("form") if isinstance(design.stats, dict) else None
    if isinstance(form, dict):   # a bridge form's final dimensions under the title
        text = "; ".join(line.strip() for line in dimension_lines(form.get("dimensions", {}))
                         if not line.strip().startswith("anchor heights"))
        sizes = ", ".join(f"{k.replace('_', ' ')} {v:.4g} m"
                          for k, v in form.get("geometry", {}).items() if k != "deck_panel")
        out.append(f'<text x="10" y="38" font-family="sans-serif" font-size="11">'
                   f"{escape('; '.join(t for t in (sizes, text) if t))}</text>")
    for group in dict.fromkeys(m.group.tolist()):
        out.append(f'<g id="group-{escape(layer_name(group).lower())}" '
                   f'data-group="{escape(group, {chr(34): "&quot;"})}" fill="none" '
                   'stroke-linecap="round" stroke-linejoin="round">')
        for i in np.nonzero(m.group == group)[0]:
            c = curves[i]
            points = " ".join(f"{sx(x):.3f},{sy(z):.3f}" for x, z in c)
            out.append(f'<polyline points="{points}" stroke="{_COLOURS[str(m.sense[i])]}" '
                       f'stroke-width="{widths[i]:.3f}" data-member="{i}"/>')
        out.append("</g>")
    out.append('<g id="nodes" fill="black">')
    out += [f'<circle cx="{sx(x):.3f}" cy="{sy(z):.3f}" r="1.5"/>' for x, z in xz]
    out.append("</g>")
    out.append(f'<text x="10" y="{height - 36:.1f}" font-family="sans-serif" font-size="11">'
               f'<tspan x="10">blue: tension, red: compression; line width grows with the '
               f'cross-section.</tspan><tspan x="10" dy="14">{escape(CAUTIONS[:150])}</tspan>'
               f'<tspan x="10" dy="14">{escape(CAUTIONS[150:])}</tspan></text>')
    out.append("</svg>")
    return "\n".join(out) + "\n"


def write_svg(design: Design, path: str | Path, **kwargs) -> Path:
    """Write :func:`design_svg` to ``path``.

    Parameters
    ----------
    design : Design
        A solved design, drawn with its curved centrelines.
    path : path
        The ``.svg`` file to write.
    **kwargs
        ``title`` and ``width`` of :func:`design_svg`.

    Returns
    -------
    Path
        ``path``.
    """
    path = Path(path)
    path.write_text(design_svg(design, **kwargs), encoding="utf-8")
    return path


def write_dxf(design: Design, path: str | Path) -> Path:
    """Write ``design`` as a DXF drawing (R2010) for CAD; see the module docstring.

    Straight members are LINE entities and curved ones LWPOLYLINE through their
    centreline points, each on the layer of its element group, coloured by sense
    (blue tension, red compression).  Coordinates are x and z in m (drawn as
    the drawing's x and y).

    Parameters
    ----------
    design : Design
        A solved design.
    path : path
        The ``.dxf`` file to write.

    Returns
    -------
    Path
        ``path``.
    """
    import ezdxf
    from ezdxf import units

    doc = ezdxf.new("R2010")
    doc.units = units.M
    doc.header["$MEASUREMENT"] = 1  # metric
    msp = doc.modelspace()
    m = design.members
    for group in dict.fromkeys(m.group.tolist()):
        if layer_name(group) not in doc.layers:
            doc.layers.add(layer_name(group))
    doc.layers.add(NOTES_LAYER)
    for i, c in enumerate(_curves(design)):
        attribs = {"layer": layer_name(m.group[i]), "color": _ACI[str(m.sense[i])]}
        if len(c) == 2:
            msp.add_line(tuple(c[0]), tuple(c[1]), dxfattribs=attribs)
        else:
            msp.add_lwpolyline([tuple(p) for p in c], dxfattribs=attribs)
    xz = np.asarray(design.nodes)
    top = float(xz[:, 1].max()) if len(xz) else 0.0
    size = float(np.ptp(xz, axis=0).max()) if len(xz) else 1.0
    name = getattr(design.problem, "name", "design")
    msp.add_mtext(f"{name}: volume {design.volume:.6g} m3, {len(m)} members (model drawn; "
                  f"x, z in m)\\P{CAUTIONS}",
                  dxfattribs={"layer": NOTES_LAYER, "char_height": 0.01 * size,
                              "width": 0.8 * size,
                              "insert": (float(xz[:, 0].min()) if len(xz) else 0.0,
                                         top + 0.1 * size)})
    path = Path(path)
    doc.saveas(path)
    return path
