"""A proposed layout brought by the user: nodes and members, from CSV or JSON.

Two formats (``docs/formats.md``), in the coordinates of the scenario's model
(for a bridge, the half span: x from the pier or abutment line at 0 to
mid-span at span/2, the deck at z = 0, z upwards; m):

* **CSV pair**: ``nodes.csv`` with columns ``id``, ``x_m``, ``z_m`` and
  ``members.csv`` with columns ``start``, ``end`` (node ids) and optionally
  ``group`` (element-group label) and ``sense`` (``tension``, ``compression``
  or ``either``, the default).  Other columns are ignored, so the
  ``nodes.csv`` and ``members.csv`` that ``bridgeopt export`` writes are a
  valid proposal.
* **JSON**: ``{"nodes": [{"id": "A", "x": 0.0, "z": 0.0}, ...], "members":
  [{"start": "A", "end": "B", "group": "deck", "sense": "either"}, ...]}``;
  a node may also be ``[x, z]`` (its id is then its position in the list, from
  0) and a member ``[start, end]``.  The JSON of a solve (``bridgeopt solve
  --json``, ``bridgeopt export``) is also read this way.

Node ids are whole numbers or text; every member end must be a listed id.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from bridgeopt.errors import InputError
from bridgeopt.files.fields import MISSING, Shown
from bridgeopt.files.io import read_input_bytes, read_json

__all__ = ["Proposal", "read_proposal", "proposal_from_dict", "SENSES"]

SENSES = ("tension", "compression", "either")


@dataclass(frozen=True)
class Proposal:
    """A user's layout: node ids and coordinates, members between them.

    Parameters
    ----------
    ids : tuple of str
        Node ids as the user wrote them (for messages).
    nodes : (n, 2) float array
        Node coordinates x, z. [m]
    start, end : (m,) int arrays
        Member end nodes (indices into ``nodes``). [-]
    group : (m,) str array
        Element-group label per member (``"member"`` when not given).
    senses : (m,) str array
        ``"tension"``, ``"compression"`` or ``"either"`` per member.
    source : str
        Where it was read from.
    """

    ids: tuple
    nodes: np.ndarray
    start: np.ndarray
    end: np.ndarray
    group: np.ndarray
    senses: np.ndarray
    source: str = "<dict>"

    def label(self, node: int) -> str:
        """``'id (x = .. m, z = .. m)'`` of node index ``node``.

        Parameters
        ----------
        node : int
            Index into ``nodes``. [-]
        """
        x, z = self.nodes[node]
        return f"{self.ids[node]} (x = {x:.6g} m, z = {z:.6g} m)"


def _id(value, field: str) -> str:
    if isinstance(value, (bool, Shown)) or value is None:
        raise InputError(field, value, "a node id (a whole number or text)")
    if isinstance(value, float):
        if not value.is_integer():
            raise InputError(field, value, "a node id (a whole number or text)")
        value = int(value)
    text = str(value).strip()
    if not text:
        raise InputError(field, value, "a node id (a whole number or text)")
    return text


def _coordinate(value, field: str) -> float:
    try:
        v = float(value)
    except (TypeError, ValueError):
        raise InputError(field, value, "a finite number in m") from None
    if isinstance(value, bool) or not math.isfinite(v):
        raise InputError(field, value, "a finite number in m")
    return v


#: Largest coordinate of a proposed node: far beyond any crossing, well inside what double
#: precision resolves to a millimetre. [m]
MAX_COORDINATE = 1.0e7


def _build(ids, xz, members, source: str) -> Proposal:
    """members: (start id, end id, group, sense, field prefix) tuples."""
    index: dict[str, int] = {}
    for i, node_id in enumerate(ids):
        if node_id in index:
            raise InputError(f"nodes[{i}].id", node_id, "an id not used by another node")
        index[node_id] = i
    if len(ids) < 2:
        raise InputError("nodes", len(ids), "at least 2 nodes")
    if not members:
        raise InputError("members", 0, "at least 1 member")
    xz = np.array(xz, dtype=float).reshape(-1, 2)
    far = np.nonzero(~(np.abs(xz) <= MAX_COORDINATE).all(axis=1))[0]
    if len(far):
        i = int(far[0])
        raise InputError(f"nodes[{i}]", [float(v) for v in xz[i]], f"finite x and z within "
                         f"+-{MAX_COORDINATE:g} m (node {ids[i]})")
    tol = 1e-9 * max(float(np.ptp(xz, axis=0).max()), 1.0)
    order = np.lexsort((xz[:, 1], xz[:, 0]))
    close = np.nonzero(np.hypot(*np.diff(xz[order], axis=0).T) <= tol)[0]
    if len(close):
        a, b = order[close[0]], order[close[0] + 1]
        raise InputError(f"nodes[{max(a, b)}]", ids[max(a, b)], f"a node at its own position "
                         f"(node {ids[min(a, b)]} is at the same point, [{xz[a, 0]:.6g}, "
                         f"{xz[a, 1]:.6g}] m)")
    start, end, group, senses = [], [], [], []
    for a, b, g, s, field in members:
        for key, v in (("start", a), ("end", b)):
            if v not in index:
                raise InputError(f"{field}.{key}", v, "the id of a listed node")
        if a == b:
            raise InputError(f"{field}.end", b, "a node other than its start")
        if s not in SENSES:
            raise InputError(f"{field}.sense", s, "one of " + ", ".join(map(repr, SENSES)))
        start.append(index[a])
        end.append(index[b])
        group.append(g)
        senses.append(s)
    return Proposal(ids=tuple(ids), nodes=np.array(xz, dtype=float).reshape(-1, 2),
                    start=np.array(start, dtype=np.int64), end=np.array(end, dtype=np.int64),
                    group=np.array(group, dtype=str), senses=np.array(senses, dtype=str),
                    source=source)


def _text(value, default: str) -> str:
    if value is None or (isinstance(value, float) and math.isnan(value)):
        return default
    text = str(value).strip()
    return text or default


def proposal_from_dict(data, *, source: str = "<dict>") -> Proposal:
    """A :class:`Proposal` from the JSON format (see the module docstring).

    Parameters
    ----------
    data : dict
        ``{"nodes": [...], "members": [...]}``: nodes as ``{"id", "x", "z"}`` or
        ``[x, z]`` in m, members as ``{"start", "end", "group", "sense"}`` or
        ``[start, end]`` by node id.
    source : str
        Where the data came from, for messages.

    Returns
    -------
    Proposal
        Nodes in the order listed, members by node index.

    Raises
    ------
    InputError
        A missing list, a duplicate or unknown node id, a bad coordinate or sense.
    """
    if not isinstance(data, dict) or "nodes" not in data or "members" not in data:
        raise InputError("layout", "{...}" if isinstance(data, dict) else data,
                         'a JSON object with "nodes" and "members" lists')
    ids, xz = [], []
    for i, node in enumerate(data["nodes"]):
        field = f"nodes[{i}]"
        if isinstance(node, dict):
            x = node.get("x", node.get("x_m", MISSING))
            z = node.get("z", node.get("z_m", MISSING))
            ids.append(_id(node.get("id", i), f"{field}.id"))
        elif isinstance(node, (list, tuple)) and len(node) == 2:
            x, z = node
            ids.append(str(i))
        else:
            raise InputError(field, node, '{"id": .., "x": .., "z": ..} or [x, z] in m')
        xz.append((_coordinate(x, f"{field}.x"), _coordinate(z, f"{field}.z")))
    members = []
    for j, m in enumerate(data["members"]):
        field = f"members[{j}]"
        if isinstance(m, dict):
            members.append((_id(m.get("start", MISSING), f"{field}.start"),
                            _id(m.get("end", MISSING), f"{field}.end"),
                            _text(m.get("group"), "member"),
                            _text(m.get("sense"), "either"), field))
        elif isinstance(m, (list, tuple)) and len(m) == 2:
            members.append((_id(m[0], f"{field}.start"), _id(m[1], f"{field}.end"), "member",
                            "either", field))
        else:
            raise InputError(field, m, '{"start": .., "end": ..} or [start, end] (node ids)')
    return _build(ids, xz, members, source)


def _read_csv(path: Path, required: tuple[str, ...], what: str):
    import io

    import pandas as pd

    data = read_input_bytes(path, f"{what} CSV file")
    try:
        df = pd.read_csv(io.BytesIO(data), comment="#", dtype=str, keep_default_na=False,
                         encoding="utf-8")
    except (OSError, UnicodeDecodeError, pd.errors.ParserError,
            pd.errors.EmptyDataError) as err:
        raise InputError("file", str(path), f"a readable {what} CSV file ({err})") from None
    df.columns = [c.strip() for c in df.columns]
    for col in required:
        if col not in df.columns:
            raise InputError(f"{path.name} columns", list(df.columns),
                             f"a header with {', '.join(required)} ({what})")
    return df


def read_proposal(path: str | Path, members: str | Path | None = None) -> Proposal:
    """Read a proposed layout: a JSON file, a ``nodes.csv`` (with ``members``), or a folder.

    Parameters
    ----------
    path : path
        ``.json`` file; or ``nodes.csv``; or a folder holding ``nodes.csv`` and
        ``members.csv``.
    members : path, optional
        The members CSV (default: ``members.csv`` beside ``nodes.csv``).

    Returns
    -------
    Proposal

    Raises
    ------
    InputError
        A missing file or column, an unknown node id, a bad coordinate or sense.
    """
    path = Path(path)
    if path.suffix.lower() == ".json":
        return proposal_from_dict(read_json(path, "layout JSON file"), source=str(path))
    if path.is_dir():
        path = path / "nodes.csv"
    members_path = Path(members) if members is not None else path.parent / "members.csv"
    nodes = _read_csv(path, ("id", "x_m", "z_m"), "nodes")
    table = _read_csv(members_path, ("start", "end"), "members")
    ids = [_id(v, f"{path.name} row {i + 1} id") for i, v in enumerate(nodes["id"])]
    xz = [(_coordinate(x, f"{path.name} row {i + 1} x_m"),
           _coordinate(z, f"{path.name} row {i + 1} z_m"))
          for i, (x, z) in enumerate(zip(nodes["x_m"], nodes["z_m"]))]
    rows = []
    for j, row in table.iterrows():
        field = f"{members_path.name} row {j + 1}"
        rows.append((_id(row["start"], f"{field} start"), _id(row["end"], f"{field} end"),
                     _text(row.get("group"), "member"), _text(row.get("sense"), "either"),
                     field))
    return _build(ids, xz, rows, f"{path} + {members_path}")
