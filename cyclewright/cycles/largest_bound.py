"""The largest proved bound on a cycle minimum over every type up to a length.

Inside
------
- :class:`LargestBound`, :func:`largest_bound_up_to`, :func:`bound_for_length`
  -- the largest minimum bound over every type of length ``<= K`` (the number
  a census must scan to), with a float prefilter that is safe by an explicit
  error budget and an exact confirmation of the winner.

References
----------
.. [1] S. Eliahou, "The 3x+1 problem: new lower bounds on nontrivial cycle
   lengths", Discrete Mathematics 118 (1993) 45-56 (the product argument).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from cyclewright.maps import Map

from .errors import InputError
from .intervals import SIDES
from .labels import PROVED
from .minimum_bound import MinimumBound, _bound_of_content

__all__ = [
    "LargestBound",
    "largest_bound_up_to",
    "bound_for_length",
]


# ------------------------------------------------------- largest over lengths
@dataclass(frozen=True)
class LargestBound:
    """The largest proved minimum bound over every type with length in a range.

    Attributes
    ----------
    map_label, side : str
    lengths : tuple of (int, int)
        The lengths considered, as ``(first, last)``.
    applies : bool
        False when some type in range has offsets of mixed signs (``witness``
        says which): then no finite scan covers every cycle.
    integer : int or None
        ``max M`` over the types (0 when no type allows a cycle).
    content : tuple of int or None
        A type attaining it (the shortest when several do).
    bound : MinimumBound or None
        The full bound of that type.
    types_considered : int
        Types looked at by the float prefilter.
    exact_checks : int
        Types whose integer bound was computed exactly.
    method : str
    witness : tuple or None
        A content for which the bound does not apply.
    label : str
        ``"proved"``.
    """

    map_label: str
    side: str
    lengths: tuple[int, int]
    applies: bool
    integer: int | None
    content: tuple[int, ...] | None
    bound: MinimumBound | None
    types_considered: int
    exact_checks: int
    method: str
    witness: tuple[int, ...] | None = None
    label: str = PROVED.value

    @property
    def length(self) -> int | None:
        return sum(self.content) if self.content else None

    @property
    def odd(self) -> int | None:
        return self.content[1] if self.content and len(self.content) == 2 else None

    def to_dict(self) -> dict:
        return {
            "map": self.map_label,
            "side": self.side,
            "lengths": list(self.lengths),
            "applies": self.applies,
            "integer": self.integer,
            "content": list(self.content) if self.content else None,
            "length": self.length,
            "bound": self.bound.to_dict() if self.bound else None,
            "types_considered": self.types_considered,
            "exact_checks": self.exact_checks,
            "method": self.method,
            "witness": list(self.witness) if self.witness else None,
            "label": self.label,
        }

    def __repr__(self) -> str:
        lo, hi = self.lengths
        span = f"k={lo}" if lo == hi else f"k={lo}..{hi}"
        if not self.applies:
            return f"LargestBound({self.map_label}, {self.side}, {span}: does not apply (content {list(self.witness or ())}))"
        return (
            f"LargestBound({self.map_label}, {self.side}, {span}: |min| <= {self.integer} "
            f"at content {list(self.content) if self.content else None} (proved))"
        )


_PREFILTER_METHOD = (
    "float prefilter: for each type an upper bound M_hi = [max|β| if shrinking] + "
    "sum c_r|β_r| / (|Λ_float| - err) on the real bound M* (from ln(1+y) <= y, or "
    "ln(1+y) >= y/(1+y)), with err = (4d+16) 2^-53 (k ln d + sum c_r ln a_r) covering "
    "every rounding in Λ_float; types are confirmed exactly in decreasing M_hi order "
    "until M_hi < best + 1, so no type whose integer bound could exceed the "
    "winner's is skipped; types with |Λ_float| <= 2 err are checked exactly"
)


def largest_bound_up_to(m: Map, K: int, side: str = "positive") -> LargestBound:
    """The largest proved bound on a cycle minimum over all types of length ``1..K``.

    Every integer cycle on ``side`` of length ``<= K`` has ``|minimum| <=``
    the returned ``integer``: the range a census must scan.

    For maps whose residue-0 branch is ``n/d`` with ``d = 2`` (``ax+b`` and
    undivided forms) the best type of each length is known in closed form
    (the largest ``x`` with ``a^x < 2^k`` on the growing side, the smallest
    ``x`` with ``a^x > 2^k`` on the other: ``M*`` is monotone in ``x``), so
    the work is one float evaluation per length (vectorised) plus a few exact
    confirmations; ``K = 100000`` takes well under a second. Otherwise every
    content of every length is prefiltered (refused above 5 million contents).

    Parameters
    ----------
    m : Map
    K : int
        Largest length, ``>= 1``.
    side : {"positive", "negative"}

    Returns
    -------
    LargestBound

    Examples
    --------
    >>> from cyclewright import maps
    >>> lb = largest_bound_up_to(maps.get("3x+1"), 100)
    >>> lb.integer, lb.length, lb.odd
    (1192, 65, 41)
    >>> largest_bound_up_to(maps.get("mod3-4x"), 3).applies
    False

    Notes
    -----
    Why the prefilter is safe: see ``_PREFILTER_METHOD`` in the source (also
    in ``LargestBound.method``). The float value of ``Λ`` is computed with an
    explicit error budget, ``M_hi`` is a rigorous upper bound of ``M*``
    whenever ``|Λ_float| > err``, and a type is discarded only when
    ``M_hi < best + 1`` for a ``best`` that has been confirmed exactly.
    """
    if isinstance(K, bool) or not isinstance(K, int) or K < 1:
        raise InputError(f"the largest length K must be an integer >= 1, got {K!r}")
    return _largest(m, 1, K, side)


def bound_for_length(m: Map, k: int, side: str = "positive") -> LargestBound:
    """The largest proved minimum bound over the types of one length ``k``.

    >>> from cyclewright import maps
    >>> b = bound_for_length(maps.get("3x+1"), 13)
    >>> b.integer, b.odd
    (11, 8)
    """
    if isinstance(k, bool) or not isinstance(k, int) or k < 1:
        raise InputError(f"the length k must be an integer >= 1, got {k!r}")
    return _largest(m, k, k, side)


def _halving_two_branch(m: Map) -> bool:
    return (
        m.divisor == 2
        and tuple(m.branches[0]) == (1, 0)
        and m.branches[1].multiplier > 0
        and m.branches[1].offset != 0
    )


def _largest(m: Map, k_lo: int, k_hi: int, side: str) -> LargestBound:
    if side not in SIDES:
        raise InputError(f"side must be 'positive' or 'negative', got {side!r}")
    if _halving_two_branch(m):
        cands, considered = _candidates_halving(m, k_lo, k_hi, side)
        witness = None
    else:
        cands, considered, witness = _candidates_general(m, k_lo, k_hi, side)
    label = m.label
    if witness is not None:
        return LargestBound(
            label,
            side,
            (k_lo, k_hi),
            False,
            None,
            None,
            None,
            considered,
            0,
            _PREFILTER_METHOD,
            witness,
        )
    # cands: list of (M_hi, k, content) sorted by decreasing M_hi
    best = 0
    best_bound = None
    best_content = None
    checks = 0
    for M_hi, _k, content in cands:
        if best_bound is not None and M_hi < best + 1:
            break
        b = _bound_of_content(m, content, side, with_interval=False)
        checks += 1
        if not (b.applies and b.possible):
            continue
        if (
            best_bound is None
            or b.integer > best
            or (b.integer == best and sum(content) < sum(best_content))
        ):
            best = b.integer
            best_bound = b
            best_content = content
    if best_bound is not None:
        best_bound = _bound_of_content(m, best_content, side)  # with its certified interval
    return LargestBound(
        label,
        side,
        (k_lo, k_hi),
        True,
        best,
        best_content,
        best_bound,
        considered,
        checks,
        _PREFILTER_METHOD,
    )


_EPS = 2.0**-53


def _candidates_halving(m: Map, k_lo: int, k_hi: int, side: str):
    """d = 2, branch 0 = n/2: one best x per k (M* monotone in x). Vectorised."""
    import numpy as np

    a, b = m.branches[1]
    eps = 1 if side == "positive" else -1
    beff = eps * b
    growth = beff > 0
    ks = np.arange(k_lo, k_hi + 1, dtype=np.float64)
    if a == 1:
        xs = ks.copy() if growth else np.full_like(ks, -1.0)
    elif a == 2:
        xs = ks - 1 if growth else np.full_like(ks, -1.0)
    else:
        t = math.log2(a)
        q = ks / t
        xs = np.ceil(q) - 1 if growth else np.floor(q) + 1
        # near-integer k/t: decide a^x vs 2^k exactly
        frac = q - np.floor(q)
        tol = 1e-9 + 1e-12 * ks  # |error of q| <= k * 2^-50 with room to spare
        near = np.nonzero((frac < tol) | (frac > 1 - tol))[0]
        for i in near:
            k = int(ks[i])
            if growth:  # largest x with a^x < 2^k
                x = int(math.floor(q[i])) + 1
                while x >= 0 and a**x >= 2**k:
                    x -= 1
            else:  # smallest x with a^x > 2^k
                x = max(int(math.floor(q[i])) - 1, 0)
                while a**x <= 2**k:
                    x += 1
            xs[i] = x
        xs = np.minimum(xs, ks)
    ok = (xs >= 1) & (xs <= ks)
    ks, xs = ks[ok], xs[ok]
    ln2, lna = math.log(2.0), math.log(a)
    lam = ks * ln2 - xs * lna
    err = 24 * _EPS * (ks * ln2 + xs * lna) + 1e-300
    absb = abs(b) / a
    beta_max = absb if not growth else 0.0
    safe = np.abs(lam) > 2 * err
    with np.errstate(divide="ignore"):
        m_hi = np.where(safe, beta_max + xs * absb / (np.abs(lam) - err), np.inf)
    m_hi = m_hi * (1 + 1e-12) + 1e-9
    order = np.argsort(-m_hi, kind="stable")
    cands = [(float(m_hi[i]), int(ks[i]), (int(ks[i] - xs[i]), int(xs[i]))) for i in order]
    return cands, len(ks)


def _compositions(k: int, parts: int):
    if parts == 1:
        yield (k,)
        return
    for first in range(k + 1):
        for rest in _compositions(k - first, parts - 1):
            yield (first, *rest)


def _candidates_general(m: Map, k_lo: int, k_hi: int, side: str):
    d = m.divisor
    total = sum(math.comb(k + d - 1, d - 1) for k in range(k_lo, k_hi + 1))
    if total > 5_000_000:
        raise InputError(
            f"{total} contents of lengths {k_lo}..{k_hi} for divisor {d}: too many to prefilter; "
            "use a smaller largest length"
        )
    eps = 1 if side == "positive" else -1
    branches = tuple(m.branches)
    logs = [math.log(abs(a)) for a, _b in branches]
    lnd = math.log(d)
    cands = []
    considered = 0
    for k in range(k_lo, k_hi + 1):
        for content in _compositions(k, d):
            considered += 1
            signs = set()
            neg = False
            S = []
            for (a, b), c in zip(branches, content):
                if not c:
                    continue
                if a < 0:
                    neg = True
                if b:
                    S.append((a, eps * b, c))
                    signs.add(eps * b > 0)
            if neg or len(signs) > 1:
                return [], considered, content
            if not S:
                continue
            growth = True in signs
            lam = k * lnd - sum(c * lg for lg, c in zip(logs, content))
            err = (4 * d + 16) * _EPS * (k * lnd + sum(c * lg for lg, c in zip(logs, content)))
            if abs(lam) <= 2 * err:
                cands.append((math.inf, k, content))
                continue
            if (lam > 0) != growth:
                continue
            tot = sum(abs(b) * c / a for a, b, c in S)
            bmax = 0.0 if growth else max(abs(b) / a for a, b, c in S)
            cands.append(((bmax + tot / (abs(lam) - err)) * (1 + 1e-12) + 1e-9, k, content))
    cands.sort(key=lambda t: -t[0])
    return cands, considered, None
