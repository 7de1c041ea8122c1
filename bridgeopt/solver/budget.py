"""What a ground structure will cost before it is built: candidate members, memory and time.

A grid of ``n`` nodes has about ``6/pi^2 * n(n-1)/2`` candidate members once pairs
that pass through another node are left out (the share of lattice offsets whose
components are coprime tends to 6/pi^2; G.H. Hardy & E.M. Wright, *An Introduction to
the Theory of Numbers*, Thm. 332).  Memory and time per candidate were measured on the
2-core reference machine (docs/benchmarks.md, docs/limits.md); a solve that would not
fit in this machine's available memory is refused before any of it is allocated, with
the finest grid that would fit.
"""

from __future__ import annotations

import logging
import math
import os

from bridgeopt.errors import InputError
from bridgeopt.model.problem import Problem

__all__ = ["COPRIME_SHARE", "BYTES_PER_CANDIDATE", "BASE_BYTES", "candidates", "needed_bytes",
           "expected_seconds", "available_bytes", "check_fits"]

log = logging.getLogger("bridgeopt.progress")

#: Share of lattice pairs kept by the gcd filter, 6/pi^2. [-]
COPRIME_SHARE = 6.0 / math.pi ** 2
#: Peak memory per candidate pair: about 75 bytes measured at 4.2 million pairs (415 MB at
#: 120 divisions), doubled and more for the transient arrays of generation and pricing. [B]
BYTES_PER_CANDIDATE = 200.0
#: Memory of the process before the ground structure (Python, numpy, HiGHS). [B]
BASE_BYTES = 150e6
#: Share of the available memory a solve may plan to use. [-]
MEMORY_SHARE = 0.6
#: Measured member-adding time at 60 divisions (280,916 pairs) and the growth exponent
#: fitted between 60 and 120 divisions on the reference machine. [s], [-]
SECONDS_AT, PAIRS_AT, TIME_EXPONENT = 3.8, 280_916, 1.2


def candidates(problem: Problem) -> int:
    """Candidate pairs of ``problem``'s full ground structure (estimate, from its grid shape).

    Parameters
    ----------
    problem : Problem
        Its domain and spacing set the grid.

    Returns
    -------
    int
        About ``6/pi^2 n(n-1)/2`` for ``n`` grid nodes (an upper bound when the domain is
        not a rectangle). [-]
    """
    nx, nz = problem.grid_shape()
    n = (nx + 1) * (nz + 1)
    return int(COPRIME_SHARE * n * (n - 1) / 2)


def needed_bytes(pairs: int) -> float:
    """Peak memory of a solve over ``pairs`` candidates. [B]

    Parameters
    ----------
    pairs : int
        Candidate pairs. [-]

    Returns
    -------
    float
        ``BASE_BYTES + BYTES_PER_CANDIDATE * pairs``. [B]
    """
    return BASE_BYTES + BYTES_PER_CANDIDATE * pairs


def expected_seconds(pairs: int) -> float:
    """Member-adding time over ``pairs`` candidates on the 2-core reference machine. [s]

    Parameters
    ----------
    pairs : int
        Candidate pairs. [-]

    Returns
    -------
    float
        Expected seconds, scaled from the measured time by ``TIME_EXPONENT``. [s]
    """
    return SECONDS_AT * (max(pairs, 1) / PAIRS_AT) ** TIME_EXPONENT


def available_bytes() -> float:
    """Memory this machine has available now (``MemAvailable``, else physical memory). [B]

    Returns
    -------
    float
        Bytes available; infinite when neither can be read. [B]
    """
    try:
        with open("/proc/meminfo", encoding="ascii") as fh:
            for line in fh:
                if line.startswith("MemAvailable:"):
                    return float(line.split()[1]) * 1024.0
    except OSError:
        pass
    try:
        return float(os.sysconf("SC_PAGE_SIZE") * os.sysconf("SC_PHYS_PAGES"))
    except (ValueError, OSError, AttributeError):
        return math.inf


def check_fits(problem: Problem, *, copies_of_pairs: int = 1) -> int:
    """Refuse a ground structure that would not fit in memory; log the time it will take.

    Parameters
    ----------
    problem : Problem
        The problem about to be solved.
    copies_of_pairs : int
        Columns kept per candidate pair beyond the usual (several load cases keep
        more). [-]

    Returns
    -------
    int
        The estimated candidate pairs. [-]

    Raises
    ------
    InputError
        Naming ``domain.spacing``: the grid needs more memory than this machine has
        available, with the least spacing that fits.
    """
    pairs = candidates(problem)
    need = needed_bytes(pairs * copies_of_pairs)
    budget = MEMORY_SHARE * available_bytes()
    if need > budget:
        fit_pairs = max((budget - BASE_BYTES) / (BYTES_PER_CANDIDATE * copies_of_pairs), 1.0)
        fit_nodes = math.sqrt(2.0 * fit_pairs / COPRIME_SHARE)
        nx, nz = problem.grid_shape()
        factor = math.sqrt((nx + 1) * (nz + 1) / fit_nodes)
        raise InputError("domain.spacing", problem.spacing, f"at least {problem.spacing * factor:.4g} "
                         f"m on this machine: this grid has about {pairs:,} candidate members "
                         f"and needs about {need / 1e9:.1f} GB, where {budget / 1e9:.1f} GB "
                         f"can be used (for a bridge, about {1 / factor:.0%} of the divisions)")
    seconds = expected_seconds(pairs * copies_of_pairs)
    if seconds > 10:
        log.info("a ground structure of about %s candidate members: expected about %.0f s on "
                 "the 2-core reference machine", f"{pairs:,}", seconds)
    return pairs
