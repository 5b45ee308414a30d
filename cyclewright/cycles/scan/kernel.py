"""Compiled hot loops of the scan (numba, ``cache=True``).

Inside
------
- :class:`KernelMap` -- a map's branches as the int64 arrays the kernels read,
  with the per-branch overflow limits; ``KernelMap.from_map`` returns None for
  maps whose coefficients are too large for the compiled path (the scan then
  classifies with exact Python integers).
- :func:`classify_range` -- classify every start of ``[lo, hi]`` on the
  positive side of a map (the negative side is the positive side of the
  conjugate map): the fast int64 pass with the residue sieve and the K-step
  jumps of :mod:`cyclewright.cycles.scan.sieve`, then the exact continuation of every start
  the fast pass could not decide.
- :func:`classify_starts` -- the exact continuation alone, for given starts.
- :data:`DROP`, :data:`CYCLE`, :data:`OTHER`, :data:`OPEN` -- the outcome codes.

What a start's outcome means
----------------------------
With ``v_0 = s >= 1``, ``v_i = T^i(s)`` and the step cap ``C``:

- ``DROP``: some ``v_i`` with ``i <= C`` comes before ``s`` in the order of
  cycle representatives (``|v_i| < s``; on the positive side also
  ``v_i = -s``, since a cycle through ``s`` and ``-s`` is represented by
  ``-s``). Then ``s`` is no cycle minimum.
- ``CYCLE``: ``v_L = s`` for some ``L <= C`` before any drop: ``s`` is the
  minimum of a cycle of length ``L`` (the first return).
- ``OTHER``: the orbit is eventually periodic with tail ``mu`` and period
  ``lam``, ``mu + lam <= C``, and never drops: it enters a cycle that does not
  contain ``s``.
- ``OPEN``: none of these within ``C`` steps (unresolved; with a cycle-length
  bound ``K = C`` it means "not the minimum of a cycle of length <= K").

These definitions do not depend on how the orbit is followed, so the fast
pass may skip and jump as long as it never skips an event; the plain exact
reference (:mod:`cyclewright.cycles.scan.reference`) follows them step by step.

Exactness
---------
The fast pass works in int64. Before every multiplication it compares
``|v|`` with ``(2^63 - 1 - |b_r|) // |a_r|``; a value that would pass it
makes the start *hard*. Hard starts are re-run from the start by the exact
continuation, which switches between int64 and a sign-magnitude multi-limb
integer (32-bit limbs in int64 words) and never loses a bit. It follows the
orbit up to ``C`` steps checking drops and returns at every step, while
keeping ``v_i mod p`` (``p = 2^31 - 1``, updated with ``d^-1 mod p``). If
``C`` steps pass without an event and ``v_C mod p`` differs from every earlier
``v_i mod p``, then ``v_C`` is a new value, so the orbit has not closed a cycle
within ``C`` steps (``mu + lam <= C`` would make ``v_C`` a repeat): the start
is ``OPEN``. Otherwise Brent's method runs exactly from ``s`` with a budget of
``3C`` steps, enough to see any cycle with ``mu + lam <= C`` (it detects at
``2^k - 1 + lam < 3 (mu + lam)``), and the tail is found by the usual second
pass.

References
----------
.. [1] R. P. Brent, "An improved Monte Carlo factorization algorithm",
   BIT 20 (1980) 176-184.
.. [2] R. Terras, "A stopping time problem on the positive integers",
   Acta Arithmetica 30 (1976) 241-252 (residue classes decide the first steps).
"""

from __future__ import annotations

import functools
from dataclasses import dataclass

import numpy as np

from .codes import _CYCLE_BUF, _HARD_BUF, _HASH_P, COEFF_LIMIT, CYCLE, DROP, INT64_MAX, OTHER
from .fastpass import _RUN, _fast_pass
from .limbs import _resolve_many

__all__ = [
    "KernelMap",
    "RangeOutcome",
    "classify_starts",
    "classify_range",
    "warm_up",
]


# --------------------------------------------------------------------------- Python side
@dataclass(frozen=True, eq=False)
class KernelMap:
    """A map's branches as the arrays the kernels read (one side: use the conjugate for negatives).

    Attributes
    ----------
    divisor : int
    multipliers, offsets : numpy.ndarray of int64
    vmax : numpy.ndarray of int64
        ``(2^63 - 1 - |b_r|) // |a_r|``: the largest ``|v|`` whose step fits in int64.
    hash_a, hash_b : numpy.ndarray of int64
        The branches reduced mod ``p = 2^31 - 1``.
    dinv : int
        ``d^-1 mod p``.
    amax : int
        ``max |a_r|``.
    safe : int
        While ``|v| <= safe`` the next 8 steps cannot overflow int64.
    branches : tuple
        The branches as given (the jump table :attr:`jump` is built from them).
    """

    divisor: int
    multipliers: np.ndarray
    offsets: np.ndarray
    vmax: np.ndarray
    hash_a: np.ndarray
    hash_b: np.ndarray
    dinv: int
    amax: int
    safe: int
    branches: tuple = ()

    @functools.cached_property
    def jump(self) -> tuple:
        """The multi-step jump table of the exact continuation (built on first use)."""
        return _limb_jumps(self.divisor, self.branches, self.dinv)

    @classmethod
    def from_map(cls, m) -> KernelMap | None:
        """The kernel form of ``m``, or None when a coefficient reaches :data:`COEFF_LIMIT`.

        >>> from cyclewright import maps
        >>> km = KernelMap.from_map(maps.get("3x+1"))
        >>> int(km.vmax[1]) == (2**63 - 2) // 3
        True
        >>> KernelMap.from_map(maps.get("1099511627777x+1")) is None
        True
        """
        d = m.divisor
        if d >= COEFF_LIMIT:
            return None
        for a, b in m.branches:
            if abs(a) >= COEFF_LIMIT or abs(b) >= COEFF_LIMIT:
                return None
        ma = np.array([a for a, _ in m.branches], dtype=np.int64)
        mb = np.array([b for _, b in m.branches], dtype=np.int64)
        vmax = np.array([(INT64_MAX - abs(b)) // abs(a) for a, b in m.branches], dtype=np.int64)
        ha = np.array([a % _HASH_P for a, _ in m.branches], dtype=np.int64)
        hb = np.array([b % _HASH_P for _, b in m.branches], dtype=np.int64)
        amax = max(abs(a) for a, _ in m.branches)
        bmax = max(abs(b) for _, b in m.branches)
        # |v_k| <= safe keeps the next _RUN values within every vmax:
        # |T(v)| <= amax |v| + bmax, walked back from min(vmax).
        safe = int(vmax.min())
        for _ in range(_RUN - 1):
            safe = (safe - bmax) // amax
        dinv = pow(d, -1, _HASH_P)
        return cls(d, ma, mb, vmax, ha, hb, dinv, amax, max(safe, -1), tuple(m.branches))

    def limb_capacity(self, cap: int) -> int:
        """Limbs enough for any value the exact continuation reaches with step cap ``cap``.

        Brent's pass may take ``3 cap + 3`` steps; each step multiplies the
        magnitude by less than ``amax + 1`` (``|a v + b| <= amax |v| + bmax``
        and ``bmax < 2^63 <= |v|`` on the limb path), before dividing by ``d``.
        """
        growth = (self.amax + 1).bit_length()
        return (64 + (3 * cap + 4) * growth) // 32 + 4


def _limb_jumps(d: int, branches, dinv: int) -> tuple:
    """Jump table for big values: ``J`` steps at once by the residue mod ``d^J`` (exact).

    Returns ``(jt, jA, jC, jHA, jHB, jDI)``: ``jt = [J, d^J, n, top]``; for
    each residue ``r``: ``A_J(r)`` and ``T^J(r)`` (both below 2^30 in absolute
    value, so limb products fit int64); for each ``j <= J`` the composite
    ``(A_j, B_j)`` mod ``p`` and ``d^-j mod p``. A magnitude of at least
    ``2^T``, ``T = 64 + J ceil(log2 d)`` (``n`` limbs with top limb ``>= top``,
    or more limbs), is at least ``2^64 d^J``, hence
    ``|T^j(v)| >= |v| / d^j - max|b| > 2^63`` for ``j <= J``
    (``|a v + b| >= |v| - |b|``): nothing skipped can be an event.
    """
    best = _limb_jump_arrays(d, branches)
    if best is None:
        z = np.zeros(1, np.int64)
        return (np.zeros(4, np.int64), z, z, z, z, z)
    J, dJ, jA, jC, HA, HB = best
    T = 64 + J * (d - 1).bit_length()  # (d - 1).bit_length() = ceil(log2 d)
    nmin, topmin = T // 32 + 1, 1 << (T % 32)
    jHA = np.ascontiguousarray((HA % _HASH_P).ravel(), dtype=np.int64)
    jHB = np.ascontiguousarray((HB % _HASH_P).ravel(), dtype=np.int64)
    jDI = np.array([pow(dinv, j, _HASH_P) for j in range(J + 1)], dtype=np.int64)
    return (np.array([J, dJ, nmin, topmin], dtype=np.int64), jA, jC, jHA, jHB, jDI)


def _limb_jump_arrays(d: int, branches):
    """``(J, d^J, A_J, T^J, HA, HB)`` for :func:`_limb_jumps`, or None.

    ``J`` is the largest depth (``d^J <= 4096``) such that every depth up to it
    keeps ``|A_J(r)|`` and ``|T^J(r)|`` below ``COEFF_LIMIT`` for every residue
    ``r < d^J``; ``A_J, T^J`` are indexed by ``r``, ``HA[r, j-1], HB[r, j-1]``
    are the composites ``(A_j, B_j)`` of the first ``j`` steps of ``r``.

    Vectorised over the residues in int64: the orbit of each ``r < d^Jmax``
    for ``J`` steps gives the entries of ``r < d^J`` (its composites and
    ``T^J(r)`` are those of its own orbit). A step is taken only while every
    value is below ``2^31`` in absolute value (``|a| < 2^30``, so every product
    fits int64); otherwise the loop over Python integers decides.
    """
    Jmax = 1
    while Jmax < 16 and d ** (Jmax + 1) <= 4096:
        Jmax += 1
    if Jmax < 2:
        return None
    ma = np.array([int(a) for a, _ in branches], dtype=np.int64)
    mb = np.array([int(b) for _, b in branches], dtype=np.int64)
    n = d**Jmax
    v = np.arange(n, dtype=np.int64)
    A = np.ones(n, np.int64)
    B = np.zeros(n, np.int64)
    As, Bs, vs = [], [], []
    best = None
    for J in range(1, Jmax + 1):
        if max(np.abs(A).max(), np.abs(B).max(), np.abs(v).max()) >= 1 << 31:
            return _limb_jump_arrays_exact(d, branches)
        r = v % d
        a, b = ma[r], mb[r]
        A, B = a * A, a * B + b * d ** (J - 1)
        v = (a * v + b) // d
        As.append(A)
        Bs.append(B)
        vs.append(v)
        if J < 2:
            continue
        dJ = d**J
        if (np.abs(A[:dJ]) >= COEFF_LIMIT).any() or (np.abs(v[:dJ]) >= COEFF_LIMIT).any():
            break
        best = J
    if best is None:
        return None
    dJ = d**best
    HA = np.stack([x[:dJ] for x in As[:best]], axis=1)
    HB = np.stack([x[:dJ] for x in Bs[:best]], axis=1)
    return best, dJ, As[best - 1][:dJ].copy(), vs[best - 1][:dJ].copy(), HA, HB


def _limb_jump_arrays_exact(d: int, branches):
    """:func:`_limb_jump_arrays` over Python integers (any coefficients)."""
    br = [(int(a), int(b)) for a, b in branches]
    best = None
    for J in range(2, 17):
        dJ = d**J
        if dJ > 4096:
            break
        rows = []
        ok = True
        for r in range(dJ):
            A, B, v, pw = 1, 0, r, 1
            steps = []
            for _ in range(J):
                a, b = br[v % d]
                A, B = a * A, a * B + b * pw
                pw *= d
                v = (a * v + b) // d
                steps.append((A, B))
            if abs(A) >= COEFF_LIMIT or abs(v) >= COEFF_LIMIT:
                ok = False
                break
            rows.append((A, v, steps))
        if not ok:
            break
        best = (J, dJ, rows)
    if best is None:
        return None
    J, dJ, rows = best
    jA = np.array([A for A, _, _ in rows], dtype=np.int64)
    jC = np.array([c for _, c, _ in rows], dtype=np.int64)
    # B_j may pass int64 here; only its residue mod p is kept
    HA = np.array([[x % _HASH_P for x, _ in st] for _, _, st in rows], dtype=np.int64)
    HB = np.array([[y % _HASH_P for _, y in st] for _, _, st in rows], dtype=np.int64)
    return J, dJ, jA, jC, HA, HB


@dataclass
class RangeOutcome:
    """Raw classification of a range of positive starts (kernel coordinates).

    Attributes
    ----------
    lo, hi : int
    drops, other : int
        How many starts drop / enter another cycle.
    cycles : list of (start, length)
        Starts that return to themselves before dropping.
    open_starts : list of int
        Unresolved starts (``OPEN``), ascending.
    open_escaped : list of bool
        For each open start: whether its orbit passed 2^63 in absolute value.
    sieved : int
        Starts decided by the sieve alone (never iterated).
    jumped : int
        Starts that took the K-step jump of their residue class.
    """

    lo: int
    hi: int
    drops: int = 0
    other: int = 0
    cycles: list = None
    open_starts: list = None
    open_escaped: list = None
    sieved: int = 0
    jumped: int = 0

    def __post_init__(self):
        self.cycles = [] if self.cycles is None else self.cycles
        self.open_starts = [] if self.open_starts is None else self.open_starts
        self.open_escaped = [] if self.open_escaped is None else self.open_escaped


_EMPTY = np.zeros(0, dtype=np.int64)
_EMPTY_B = np.zeros(0, dtype=np.bool_)


def classify_starts(km: KernelMap, starts, cap: int, tie: bool):
    """Exact outcomes of the given positive starts: arrays ``(code, steps, escaped)``.

    Parameters
    ----------
    km : KernelMap
    starts : array-like of int
        Each in ``[1, 2^63 - 1]``.
    cap : int
        The step cap ``C``.
    tie : bool
        Whether ``v = -s`` counts as a drop (True on the positive side).

    Examples
    --------
    >>> from cyclewright import maps
    >>> km = KernelMap.from_map(maps.get("3x+1"))
    >>> code, steps, esc = classify_starts(km, [1, 7, 2**63 - 1], 1000, True)
    >>> [int(c) for c in code], int(steps[0])
    ([1, 0, 0], 2)
    >>> bool(esc[2])
    True
    """
    arr = np.asarray(starts, dtype=np.int64)
    n = arr.shape[0]
    code = np.empty(n, np.int64)
    steps = np.empty(n, np.int64)
    esc = np.empty(n, np.bool_)
    if n:
        _resolve_many(
            arr,
            int(cap),
            bool(tie),
            km.divisor == 2,
            int(km.divisor),
            km.multipliers,
            km.offsets,
            km.vmax,
            km.hash_a,
            km.hash_b,
            int(km.dinv),
            *km.jump,
            int(km.limb_capacity(cap)),
            code,
            steps,
            esc,
        )
    return code, steps, esc


def classify_range(
    km: KernelMap, lo: int, hi: int, cap: int, tie: bool, table=None
) -> RangeOutcome:
    """Classify every start of ``[lo, hi]`` (``1 <= lo <= hi < 2^63``), exactly.

    Parameters
    ----------
    km : KernelMap
        The map of the side being scanned (the conjugate for negative starts).
    lo, hi : int
    cap : int
        Step cap ``C`` (the cycle-length bound ``K`` in a census).
    tie : bool
        True on the positive side (``v = -s`` counts as a drop).
    table : SieveTable or sequence of SieveTable, optional
        Residue sieves with their K-step jumps (depths at most ``cap``). A
        table of depth ``K`` serves the starts ``>= d^K``; with several
        (:func:`cyclewright.cycles.scan.sieve.sieve_levels`), each start uses the deepest one
        that applies, and starts below the shallowest are iterated one by one.

    Returns
    -------
    RangeOutcome

    Examples
    --------
    >>> from cyclewright import maps
    >>> km = KernelMap.from_map(maps.get("3x+5"))
    >>> out = classify_range(km, 1, 400, 1000, True)
    >>> [s for s, _ in out.cycles]      # OEIS A226607 (k = 5): 1, 19, 23, 187, 347
    [1, 5, 19, 23, 187, 347]
    """
    if not 1 <= lo <= hi <= INT64_MAX:
        raise ValueError(f"range [{lo}, {hi}] is outside [1, 2^63 - 1]")
    if table is None:
        levels = []
    elif hasattr(table, "depth"):
        levels = [table]
    else:
        levels = list(table)
    levels = sorted((t for t in levels if t.depth > 0), key=lambda t: t.depth)
    if any(t.depth > cap for t in levels):
        raise ValueError("a sieve depth exceeds the step cap")
    out = RangeOutcome(lo, hi)
    # segment [bound_i, bound_{i+1} - 1] uses levels[i - 1] (none below the first bound)
    bounds = [1] + [t.modulus for t in levels] + [INT64_MAX + 1]
    for i in range(len(bounds) - 1):
        a, b = max(lo, bounds[i]), min(hi, bounds[i + 1] - 1)
        if a <= b:
            _classify_segment(km, a, b, cap, tie, levels[i - 1] if i else None, out)
    out.cycles.sort()
    return out


def _lanes_apply(km: KernelMap, K: int, cap: int, qfast: int) -> bool:
    """Whether the blocks of a depth-``K`` sieve run in four-orbit lanes (:func:`_lanes2`).

    d = 2, every multiplier ``a_r >= 1`` and ``a_r + b_r >= 1`` (then
    ``a_r v + b_r >= a_r + b_r >= 1`` for every ``v >= 1``: values stay
    positive), a jump shorter than the cap, and every class jumping.
    """
    return bool(
        km.divisor == 2
        and 0 < K < cap
        and qfast >= 0
        and int(km.multipliers.min()) >= 1
        and int((km.multipliers + km.offsets).min()) >= 1
    )


def _classify_segment(km, lo, hi, cap, tie, table, out: RangeOutcome) -> None:
    d = km.divisor
    if table is None:
        K, dK, qfast = 0, 1, -1
        sc = sA = sC = sqmax = _EMPTY
        sjump = _EMPTY_B
    else:
        K, dK, qfast = table.depth, table.modulus, table.qfast
        sc, sjump, sA, sC, sqmax = table.arrays()
    lanes = _lanes_apply(km, K, cap, qfast)
    room = max(_CYCLE_BUF, sc.shape[0]) if lanes else _CYCLE_BUF
    cyc_s = np.empty(room, np.int64)
    cyc_len = np.empty(room, np.int64)
    hard_s = np.empty(max(_HARD_BUF, room), np.int64)
    pos = lo
    iterated = 0
    while True:
        done, nxt, ncyc, nhard, njump = _fast_pass(
            pos,
            hi,
            bool(tie),
            d == 2,
            d,
            km.multipliers,
            km.offsets,
            km.vmax,
            int(km.safe),
            int(cap),
            int(K),
            int(dK),
            sc,
            sjump,
            sA,
            sC,
            sqmax,
            int(qfast),
            lanes,
            cyc_s,
            cyc_len,
            hard_s,
        )
        upto = hi if done else nxt - 1
        processed = upto - pos + 1
        out.jumped += int(njump)
        for k in range(ncyc):
            out.cycles.append((int(cyc_s[k]), int(cyc_len[k])))
        hard_dropped = 0
        if nhard:
            hard_s[:nhard].sort()  # the lanes finish out of order
            code, steps, esc = classify_starts(km, hard_s[:nhard], cap, tie)
            for k in range(nhard):
                c = int(code[k])
                if c == DROP:
                    hard_dropped += 1
                elif c == CYCLE:
                    out.cycles.append((int(hard_s[k]), int(steps[k])))
                elif c == OTHER:
                    out.other += 1
                else:
                    out.open_starts.append(int(hard_s[k]))
                    out.open_escaped.append(bool(esc[k]))
        out.drops += processed - ncyc - nhard + hard_dropped
        iterated += _iterated_count(pos, upto, K, dK, table)
        if done:
            break
        pos = nxt
    out.sieved += (hi - lo + 1) - iterated


def _iterated_count(lo: int, hi: int, K: int, dK: int, table) -> int:
    """How many starts of [lo, hi] the fast pass visits (the rest are sieved)."""
    if K == 0 or hi < dK:
        return hi - lo + 1
    total = 0
    if lo < dK:
        total += dK - lo
        lo = dK
    sc = table.arrays()[0]
    n = sc.shape[0]
    q0, q1 = lo // dK, hi // dK
    if q0 == q1:
        return total + int(
            np.searchsorted(sc, hi - q0 * dK, side="right") - np.searchsorted(sc, lo - q0 * dK)
        )
    total += n - int(np.searchsorted(sc, lo - q0 * dK))
    total += int(np.searchsorted(sc, hi - q1 * dK, side="right"))
    total += (q1 - q0 - 1) * n
    return total


def warm_up(hard: bool = True) -> None:
    """Compile (or load from the cache) the kernels, e.g. before forking workers.

    ``hard=False`` loads only the fast pass; the exact continuation then
    loads on first use (maps like 3x+1 never need it on small ranges).
    """
    from cyclewright import maps

    km = KernelMap.from_map(maps.get("3x+1"))
    classify_range(km, 1, 50, 100, True)
    if hard:
        classify_starts(km, [2**62 + 1], 20, True)
