"""Self-weight limits of one equal-strength cable or arch: least sag or rise, longest span.

These bound a single element (a main cable, an arch rib), not a structure: a
structure of several members can span further (the reference optimum solves far
beyond :func:`single_element_reach` with a deep balanced truss).
"""

from __future__ import annotations

import math

from bridgeopt.errors import SolveError
from bridgeopt.model.problem import Problem

__all__ = ["self_weight_sag", "single_element_reach", "check_self_weight", "FREE_MARGIN"]

def self_weight_sag(problem: Problem, sense: str, span: float) -> float:
    """Least sag (or rise) of an equal-strength cable (or arch) over ``span``. [m]

    Exact statics of the equal-strength element (area proportional to its
    force, so its weight per unit length is k T, k = rho g / sigma): with
    horizontal force H and a deck load w per unit length, H z'' = w + k H
    (1 + z'^2).  As H grows the shape tends to z'' = k (1 + z'^2), z' = tan(k x)
    from the lowest point, z = ln(sec(k x))/k: a sag of ln(sec(k L/2))/k, the
    least with which the element carries its own weight; any deck load needs
    more.  It is finite only for k L/2 < pi/2, i.e. a single such element spans
    less than pi*sigma/(rho*g) (a structure of several members can span more).
    The parabolic estimate k L^2/8 (common practice statics) is a few per cent
    lower (677 m against 714 m for steel at 5 km).

    Parameters
    ----------
    problem : Problem
        Gives the self-weight parameter k = rho g / sigma of its materials.
    sense : {"tension", "compression"}
        A cable (tension) or an arch (compression).
    span : float
        Span the cable or arch crosses. [m]

    Returns
    -------
    float
        Least sag (cable) or rise (arch), ln(sec(k L/2))/k; 0 without
        self-weight, inf when k L/2 >= pi/2. [m]
    """
    k = problem.k(sense)
    if k <= 0:
        return 0.0
    t = 0.5 * k * span
    return -math.log(math.cos(t)) / k if t < 0.5 * math.pi else math.inf


def single_element_reach(problem: Problem, sense: str) -> float:
    """pi*sigma/(rho*g): the longest span of one equal-strength cable or arch. [m]

    Parameters
    ----------
    problem : Problem
        Gives k = rho g / sigma of its materials.
    sense : {"tension", "compression"}
        A cable (tension) or an arch (compression).

    Returns
    -------
    float
        pi / k (inf without self-weight).  A structure of several members is not
        bound by it. [m]
    """
    k = problem.k(sense)
    return math.pi / k if k > 0 else math.inf


#: A free sag or rise keeps this factor above the least one that carries its own weight, so
#: that the search starts from an element that can hang (or stand) at all. [-]
FREE_MARGIN = 1.02


def check_self_weight(value: float, need: float, span: float, what: str, key: str,
                       reach: float = math.inf, margin: float = 1.0) -> None:
    """SolveError "span-limit" when ``what`` ("a cable sag", "an arch rise") is too small.

    Parameters
    ----------
    value : float
        The sag or rise asked for. [m]
    need : float
        The exact least sag or rise (:func:`self_weight_sag`). [m]
    span : float
        The span crossed. [m]
    what : str
        "a cable sag" or "an arch rise", for the message.
    key : str
        The input to raise, for the message (``form.sag_ratio`` ...).
    reach : float
        :func:`single_element_reach`, for the message. [m]
    margin : float
        ``value`` must exceed ``margin * need``. [-]

    Raises
    ------
    SolveError
        Status ``span-limit``, the exact least value and the margin in the message.
    """
    if value > margin * need:
        return
    if need <= 0:
        raise SolveError("span-limit", f"{what} of {value:.6g} m is too small")
    element = "cable" if "sag" in what else "arch"
    kept = (f"; a free {what.split()[-1]} is kept {margin - 1:.0%} above it, at "
            f"{margin * need:.6g} m" if margin > 1 else "")
    least = (f"more than ln(sec(k L/2))/k = {need:.6g} m (k = rho*g/sigma){kept}"
             if math.isfinite(need)
             else "an impossible sag: the span is beyond the reach of one equal-strength "
                  f"{element}")
    raise SolveError("span-limit",
                     f"{what} of {value:.6g} m cannot carry its own weight and the deck over a "
                     f"{span:.6g} m span: an equal-strength {element} needs {least}, and no "
                     f"single equal-strength {element} spans more than pi*sigma/(rho*g) = "
                     f"{reach:.6g} m (a structure of several members can); raise the "
                     f"{what.split()[-1]} ({key}), shorten the span or use a stronger, lighter "
                     "material")
