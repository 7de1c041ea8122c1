"""Form specifications: the ``[form]`` table of a bridge scenario file, checked.

Each practical bridge form has a frozen, keyword-only specification whose
fields are the keys of the ``[form]`` table (besides ``type``).  A bad value
raises :class:`~bridgeopt.errors.InputError` naming the key as written in a
scenario file (``form.stays``).  ``docs/scenario.md`` lists every key with its
unit, default and range.

Ratios (span-to-height, sag, rise) are dimensionless; spacings are in m.  A
ratio left out (``None``) makes that dimension a free variable, chosen by the
geometry optimization within the design domain.
"""

from __future__ import annotations

import dataclasses
import difflib
import math
import numbers
from dataclasses import dataclass
from typing import Mapping

from bridgeopt.errors import InputError

__all__ = ["FORM_TYPES", "ReferenceForm", "CableStayedForm", "SuspensionForm", "ArchForm",
           "FormSpec", "parse_form", "form_keys"]

FORM_TYPES = ("reference", "cable-stayed", "suspension", "arch")
STAY_PATTERNS = ("fan", "semi-fan", "harp")
ANCHOR_RULES = ("free", "pattern")
PYLON_SHAPES = ("vertical", "forked")
SHAPES = ("funicular", "parabolic", "free")
ARCH_VARIANTS = ("deck-arch", "through-arch")

#: Most stays per side, hangers or columns per half span (LP size stays small).
MAX_PANELS = 200
#: Semi-fan anchorage zone when none is given, as a part of the pylon height. [-]
ANCHOR_ZONE = 0.25
#: Most pylons per span.
MAX_PYLONS = 20
#: Largest lean of an inclined suspension hanger, in hanger panels. [-]
MAX_LEAN = 10.0


def _whole(field: str, value: object, low: int, high: int, what: str) -> int:
    if isinstance(value, bool) or not isinstance(value, numbers.Integral) \
            or not low <= value <= high:
        raise InputError(field, value, f"a whole number from {low} to {high} ({what})")
    return int(value)


def _ratio(field: str, value: object, valid: str, high: float = math.inf) -> float | None:
    """None (free), or a finite number in (0, high)."""
    if value is None:
        return None
    if isinstance(value, bool) or not isinstance(value, numbers.Real) \
            or not math.isfinite(value) or not 0 < value < high:
        raise InputError(field, value, valid)
    return float(value)


def _choice(field: str, value: object, choices: tuple[str, ...]) -> str:
    if value not in choices:
        raise InputError(field, value, "one of " + ", ".join(map(repr, choices)))
    return value


def _spacing(field: str, value: object) -> float | None:
    return _ratio(field, value, "a number > 0 m, or left out (the grid step span/divisions)")


@dataclass(frozen=True, kw_only=True)
class ReferenceForm:
    """The reference optimum itself (layout optimization on the ground structure)."""

    type = "reference"

    def to_dict(self) -> dict:
        """The ``[form]`` table of the reference: ``{"type": "reference"}``."""
        return {"type": self.type}


@dataclass(frozen=True, kw_only=True)
class CableStayedForm:
    """A cable-stayed form: pylons, straight stays, deck.

    Parameters
    ----------
    pattern : {"fan", "semi-fan", "harp"}
        Stay arrangement: all stays from the pylon top (fan); spread over the
        top ``anchor_zone`` of the pylon, the farthest stay highest (semi-fan);
        parallel stays, anchors evenly up the whole pylon (harp).
    stays : int, optional
        Stays on each side of each pylon; left out: one per grid step
        (span/divisions) of the deck, as finely as the reference is loaded. [-]
    pylons : int
        Pylons per span: 1 puts a pylon at every pier only; more adds
        intermediate pylons, evenly spaced inside the span, each on its own pier
        (as in multi-span cable-stayed crossings). [-]
    span_to_height : float, optional
        Distance between neighbouring pylons (span / pylons) over the pylon's
        height above the deck; left out: the height is free (optimized). [-]
    anchor_zone : float, optional
        Semi-fan only: the part of the pylon height, from the top down, over
        which the stays anchor; left out: 0.25. [-]
    anchors : {"free", "pattern"}
        With a free pylon height (``span_to_height`` left out): "free" makes the
        pattern only the start, every stay's anchor height on its pylon being
        optimized too (the anchors keep their order up the pylon); "pattern"
        keeps the pattern, the pylon height its one free dimension.  A given
        ``span_to_height`` keeps the pattern either way.
    pylon : {"vertical", "forked"}
        "vertical": one vertical pylon column, one straight stay per deck grid
        point (the ``pattern``).  "forked": a vertical mast and, on each side,
        an inclined leg from the same pylon foot leaning over that side's deck,
        its head tied back to the mast top; the stays are chosen by the LP among
        candidates from every mast level and the leg heads to every deck grid
        point, then every anchor height, the mast top and the leg heads are
        optimized (:mod:`bridgeopt.forms.forked`).  With "forked", ``pattern``
        is not used and ``stays``, ``span_to_height`` and ``anchor_zone`` are
        left out, ``anchors = "free"``.
    """

    type = "cable-stayed"
    pattern: str = "fan"
    stays: int | None = None
    pylons: int = 1
    span_to_height: float | None = None
    anchor_zone: float | None = None
    anchors: str = "free"
    pylon: str = "vertical"

    def __post_init__(self) -> None:
        _choice("form.pattern", self.pattern, STAY_PATTERNS)
        _choice("form.anchors", self.anchors, ANCHOR_RULES)
        _choice("form.pylon", self.pylon, PYLON_SHAPES)
        if self.pylon == "forked":
            for key, value, why in (
                    ("stays", self.stays, "the LP chooses the stays"),
                    ("span_to_height", self.span_to_height, "the mast height is free"),
                    ("anchor_zone", self.anchor_zone, "the LP chooses the anchors")):
                if value is not None:
                    raise InputError(f"form.{key}", value,
                                     f"left out with pylon = 'forked' ({why})")
            if self.anchors != "free":
                raise InputError("form.anchors", self.anchors,
                                 "'free' with pylon = 'forked' (every anchor is optimized)")
        if self.stays is not None:
            _whole("form.stays", self.stays, 1, MAX_PANELS, "stays per side of a pylon")
        _whole("form.pylons", self.pylons, 1, MAX_PYLONS, "pylons per span")
        _ratio("form.span_to_height", self.span_to_height,
               "a number > 0 (pylon spacing over pylon height), or left out (height free)")
        _ratio("form.anchor_zone", self.anchor_zone,
               "a number in (0, 1] (part of the pylon height holding stay anchors)", 1.0 + 1e-12)
        if self.anchor_zone is not None and self.pattern != "semi-fan":
            raise InputError("form.anchor_zone", self.anchor_zone,
                             "left out unless pattern = 'semi-fan' (fan stays all anchor at the "
                             "pylon top, harp stays evenly up the pylon)")

    def to_dict(self) -> dict:
        """The ``[form]`` table of this spec: ``type`` and the keys given (not None).

        With a forked pylon the stay pattern and the anchor rule are not used (the LP
        chooses the stays, every anchor is free), so they are left out; read back, the
        table gives the same spec (both are at their defaults).
        """
        table = {"type": self.type, **_fields(self)}
        if self.pylon == "forked":
            table.pop("pattern", None)
            table.pop("anchors", None)
        return table


@dataclass(frozen=True, kw_only=True)
class SuspensionForm:
    """A suspension form: main cable, hangers, towers, deck.

    Parameters
    ----------
    spacing : float, optional
        Hanger spacing along the deck, rounded to divide the half span into
        whole panels; left out: the grid step span/divisions. [m]
    sag_ratio : float, optional
        Main-cable sag over span; left out: the sag is free (optimized). [-]
    tower_height : float, optional
        Height of the tower tops (main-cable saddles) above the deck; left
        out: free (optimized within the rise of the design domain). [m]
    shape : {"funicular", "parabolic", "free"}
        Cable nodes on the funicular polygon of the form's own loads (deck load
        and self-weight), or on a parabola, with the sag as the one free
        parameter; or each cable node's height free (starting from the funicular).
    hanger_lean : float
        With every cable node free (``shape = "free"``, or the free stage after
        a free sag and tower height): how far, in hanger panels, each hanger's
        cable node may move from above its deck point towards the tower
        (inclined hangers; the deck points stay on the grid); 0 keeps the
        hangers vertical.  Above 1 the free stage starts from the one-panel
        optimum and continues round by round (:mod:`bridgeopt.forms.hangers`;
        with ``shape = "free"`` the continuation starts from the full box's moves);
        the hangers nearest the tower then act as stays from its top (a hybrid
        with a cable-stayed fan). [-]
    tower_legs : int
        0: vertical towers.  From 1: V-shaped towers in elevation, each with an
        inclined compression leg on either side from the tower foot to the main
        cable at the ``tower_legs``-th hanger from the tower (fewer than the
        hangers of a half span), beside the vertical tower. [-]
    """

    type = "suspension"
    spacing: float | None = None
    sag_ratio: float | None = None
    tower_height: float | None = None
    shape: str = "funicular"
    hanger_lean: float = 1.0
    tower_legs: int = 0

    def __post_init__(self) -> None:
        _spacing("form.spacing", self.spacing)
        _ratio("form.sag_ratio", self.sag_ratio,
               "a number in (0, 1) (sag over span), or left out (sag free)", 1.0)
        _ratio("form.tower_height", self.tower_height,
               "a number > 0 m, or left out (the rise of the design domain)")
        _choice("form.shape", self.shape, SHAPES)
        if isinstance(self.hanger_lean, bool) or not isinstance(self.hanger_lean, numbers.Real) \
                or not 0 <= self.hanger_lean <= MAX_LEAN:
            raise InputError("form.hanger_lean", self.hanger_lean,
                             f"a number of hanger panels from 0 (vertical hangers) to {MAX_LEAN:g}")
        _whole("form.tower_legs", self.tower_legs, 0, MAX_PANELS - 1,
               "0 for vertical towers, or the hanger from the tower at which a V-shaped "
               "tower's inclined leg meets the cable")

    def to_dict(self) -> dict:
        """The ``[form]`` table of this spec: ``type`` and the keys given (not None)."""
        return {"type": self.type, **_fields(self)}


@dataclass(frozen=True, kw_only=True)
class ArchForm:
    """An arch form: arch rib, spandrel columns or hangers, deck.

    Parameters
    ----------
    variant : {"deck-arch", "through-arch"}
        Arch below the deck carrying it on spandrel columns (springing at the
        bottom of the domain), or above it carrying it on hangers (springing at
        deck level).
    spacing : float, optional
        Column or hanger spacing, rounded to divide the half span into whole
        panels; left out: the grid step span/divisions. [m]
    rise_ratio : float, optional
        Arch rise (springing to crown) over span; left out: free (optimized). [-]
    shape : {"funicular", "parabolic", "free"}
        Rib nodes on the funicular polygon of the form's own loads, or on a
        parabola, with the rise as the one free parameter; or each rib node's
        height free (starting from the funicular).
    """

    type = "arch"
    variant: str = "through-arch"
    spacing: float | None = None
    rise_ratio: float | None = None
    shape: str = "funicular"

    def __post_init__(self) -> None:
        _choice("form.variant", self.variant, ARCH_VARIANTS)
        _spacing("form.spacing", self.spacing)
        _ratio("form.rise_ratio", self.rise_ratio,
               "a number in (0, 1) (rise over span), or left out (rise free)", 1.0)
        _choice("form.shape", self.shape, SHAPES)

    def to_dict(self) -> dict:
        """The ``[form]`` table of this spec: ``type`` and the keys given (not None)."""
        return {"type": self.type, **_fields(self)}


FormSpec = ReferenceForm | CableStayedForm | SuspensionForm | ArchForm

_SPECS = {cls.type: cls for cls in (ReferenceForm, CableStayedForm, SuspensionForm, ArchForm)}


def _fields(spec) -> dict:
    return {f.name: getattr(spec, f.name) for f in dataclasses.fields(spec)
            if getattr(spec, f.name) is not None}


def form_keys(form_type: str) -> tuple[str, ...]:
    """Keys of the ``[form]`` table for ``form_type``, ``type`` first.

    Parameters
    ----------
    form_type : {"reference", "cable-stayed", "suspension", "arch"}
        One of :data:`FORM_TYPES`.

    Returns
    -------
    tuple of str
    """
    return ("type",) + tuple(f.name for f in dataclasses.fields(_SPECS[form_type]))


def parse_form(raw: object) -> FormSpec:
    """Check a ``[form]`` table (a mapping as TOML gives it) and return its spec.

    Parameters
    ----------
    raw : mapping
        The ``[form]`` table: ``type`` and that form's keys, values in the units
        of ``docs/scenario.md``.

    Returns
    -------
    FormSpec
        The checked, frozen specification.

    Raises
    ------
    InputError
        Missing or unknown ``type``, a key the form does not have (with a hint),
        or a value out of range.
    """
    if not isinstance(raw, Mapping):
        raise InputError("form", "{...}" if isinstance(raw, dict) else raw,
                         "a table [form] with a key type")
    if "type" not in raw:
        raise InputError("form.type", None, "one of " + ", ".join(map(repr, FORM_TYPES))
                         + " (required)")
    kind = _choice("form.type", raw["type"], FORM_TYPES)
    keys = form_keys(kind)
    for key, value in raw.items():
        if key in keys:
            continue
        owners = [t for t in FORM_TYPES if t != kind and key in form_keys(t)]
        if owners:
            hint = f"; {key!r} is a key of type = {owners[0]!r}"
        else:
            close = difflib.get_close_matches(key, keys, n=1)
            hint = f" (did you mean {close[0]!r}?)" if close else ""
        raise InputError(f"form.{key}", value if not isinstance(value, Mapping) else "{...}",
                         f"one of the keys of [form] with type = {kind!r}: "
                         + ", ".join(keys) + hint)
    return _SPECS[kind](**{k: v for k, v in raw.items() if k != "type"})
