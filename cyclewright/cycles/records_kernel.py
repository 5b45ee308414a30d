"""Compiled walks behind :mod:`cyclewright.cycles.records` (numba, ``cache=True``).

Inside
------
- :func:`walk_chunk` -- follow every start of ``[lo, hi]`` (positive side of
  the given branches) to its cycle's minimum, in int64 with an overflow
  check before every multiplication, and accumulate: histograms of steps to
  the cycle (delay) and of stopping times (glide), in the divided and, for
  ``ax+b`` maps, the undivided count; candidate record holders; basin counts
  per cycle minimum; unresolved starts; starts handed to the exact Python
  continuation (*hard*: a value would pass int64, or the basin buffer is
  full).
- :func:`jump_tables`, :func:`hot_table`, :func:`new_table` -- the fixed-size
  tables the walk reads (see *Skipping work*).
- Codes of a table entry: :data:`T_UNRESOLVED`, :data:`T_UNKNOWN`.

Definitions (``v_0 = s > 0``, ``v_i = T^i(s)``, cap ``C``)
---------------------------------------------------------
A start is *resolved* when its orbit enters a cycle of length ``lam <= C``
and first reaches that cycle's minimum (least ``|value|``, the negative one
on a tie) at a step ``delay <= C``. Its *glide* is the least ``i >= 1`` with
``|v_i| < s`` (none when the orbit never gets below ``s``); its *peak* the
value of largest ``|value|`` among ``v_0 .. v_delay`` (the first on a tie); for ``ax+b`` maps the
undivided counts add the odd steps (``full = steps + odd steps``) and the
undivided peak also sees ``a v + b`` before each halving.

How a start is followed
-----------------------
The walk runs Brent's cycle detection alongside, and consults a table of
the starts ``1 .. T-1`` computed before (delay, odd steps, peaks, cycle
minimum): at the first value ``0 < v < min(s, T)`` the rest of the path is
the table's. This is exact: no earlier value can be the cycle's minimum
(each earlier value is at least ``min(s, T) > v`` and ``v`` lies on the
same orbit after it, so an earlier minimum would be on the cycle with ``v``
and smaller than ``v``). A walk that meets a value ``<= 0`` restarts without
the table and compares absolute values. Brent's method sees every cycle with
``mu + lam <= 2C`` within ``3C + 3`` steps, and a resolved start has
``mu <= delay <= C`` and ``lam <= C``; after ``3C + 3`` steps without an
answer the start is unresolved. With a detected cycle the minimum is found
by walking the cycle once, and the delay, peaks and odd steps by walking the
path again from ``s``.

Skipping work
-------------
For ``ax+b`` maps with ``d = 2`` whose values stay positive (``a`` odd,
``a >= 1``, ``a + b >= 1``: 3x+1 and its negative side 3x-1, 3x+5, 5x+1, ...)
the walk uses, besides the table, the jump tables of :func:`jump_tables`
(``2^K`` rows, ``K = 16`` unless ``a^K`` passes ``2^40``). They rest on one
identity: for ``n = 2^K q + r`` and ``0 <= i <= K``,
``T^i(n) = a^(c_i) 2^(K-i) q + T^i(r)`` with ``c_i`` the odd steps among the
first ``i`` steps of ``r``, because the parity of ``T^i(n)`` is that of
``T^i(r)`` for ``i < K`` (the first term is even) [2]_. Each shortcut below
gives the same figures as the step-by-step walk:

1. *Jumps.* ``T^K(n) = a^(c_K) q + T^K(r)``, ``K`` steps and ``c_K`` odd
   steps at once. A jump is exact while ``a^(c_K) q + T^K(r) < 2^63``; the
   walk jumps only from values with ``q`` at most every row's limit (checked
   on the largest value a jump starts from), else it falls back.
2. *Landing in the table.* The jumps go on until a value ``v < T``; the
   delay, odd steps and cycle of ``v`` come from a packed copy of the table
   (:func:`hot_table`). The delay of the start is the steps jumped plus the
   table's, unless ``v`` lies on its cycle (then a value inside a jump may be
   the cycle's minimum, reached earlier): such starts take the exact walk.
   Off the cycle no earlier value can be on it (a value on a cycle stays on
   it), so the minimum is first reached after ``v``.
3. *The glide from the residue.* With ``j`` the first ``i`` where
   ``a^(c_i) < 2^i``, ``T^i(n) - n = (a^(c_i) 2^(K-i) - 2^K) q + T^i(r) - r``
   is ``>= 0`` for ``i < j`` and ``< 0`` for ``i = j`` exactly when ``q`` is
   at least a threshold ``qmin(r)`` (linear inequalities in ``q``, solved
   exactly in integers). So for ``q >= qmin(r)`` the glide is ``j`` and its
   odd steps ``c_j``, read in one look-up. Residues with no such ``j <= K``
   (about 3% for 3x+1) leave the glide open: it is at most the steps to the
   landing value (``v < T <= s``), so at most the delay, and :func:`_glide` finds it by
   whole jumps while no value of the jump can be below ``s``
   (``T^i(n) >= min_i(a^(c_i) 2^(K-i)) q``) and single steps otherwise.
4. *Peaks skipped.* Every value of a jump from ``n`` is at most ``G q + L``
   (``G``, ``L`` the largest ``a^(c_i) 2^(K-i)`` and ``T^i(r)`` over all rows
   and ``i``), and an undivided value ``a v + b = 2 T(v)`` at most twice
   that. A peak only matters when it beats the chunk's running record (the
   record holders are the starts whose value beats every smaller start's),
   so when ``G (top >> K) + L`` is at most the running peak record (and twice
   it at most the undivided one), and the table's peaks of ``v`` are too, the
   peaks are not computed: the start can set no peak record. Otherwise the
   start takes the exact walk.
5. *Four at a time.* :func:`_block` follows four consecutive starts side by
   side, one jump of each per round, with no branches in the round (a start
   below ``T`` stays put), so the four chains of dependent table loads
   overlap. It only changes the order of the work; the records are tallied
   start by start in increasing order afterwards (a record holder must be
   compared with every smaller start's value first).

Starts a shortcut does not settle take the exact walks, in this order: a
start-by-start walk to the glide with jumps after it (:func:`_one_fast`,
exact peaks when they can set a record), Brent's walk above (:func:`_one`),
then the exact Python continuation. The delay, glide and odd-step counts, the
distributions, the basins and the record holders are the same as the plain
definition's (tests compare every shortcut and the whole walk with plain
integers, and the walk with and without jumps).

Fixed sizes (whatever the range): the table of ``2^20`` starts (40 MiB,
five int64 per start) and its packed copy (8 MiB), the jump tables
(``2^16`` rows, 2 MiB), the histograms up to the cap and the buffers.

References
----------
.. [1] R. P. Brent, "An improved Monte Carlo factorization algorithm",
   BIT 20 (1980) 176-184.
.. [2] R. Terras, "A stopping time problem on the positive integers",
   Acta Arith. 30 (1976) 241-252 (the first ``K`` parities of ``n`` depend
   on ``n mod 2^K`` only).
"""

from __future__ import annotations

import numpy as np
from numba import njit

__all__ = [
    "walk_chunk",
    "T_UNRESOLVED",
    "T_UNKNOWN",
    "KINDS",
    "new_table",
    "hot_table",
    "jump_tables",
]

#: Table entry: the start is unresolved (so is every start that reaches it first).
T_UNRESOLVED = -1
#: Table entry: not known to the compiled walk (went past int64); walk without it.
T_UNKNOWN = -2

#: Record kinds, in the order of the kernel's record buffers.
KINDS = ("delay", "full_delay", "glide", "full_glide", "peak", "full_peak")

_OK, _HARD, _UNRES = 0, 1, 2
_WALK, _GLIDE = 3, 4  # rows of the fast walk still to finish
_MASK20 = (1 << 20) - 1
_MASK21 = (1 << 21) - 1
_MASK48 = (1 << 48) - 1
#: Starts followed side by side by the fast walk (:func:`_block`), and starts per block.
LANES = 4
BLOCK = 256


def new_table(size: int) -> np.ndarray:
    """An empty table for starts ``1 .. size-1``: one row per start (one cache line).

    Columns: delay (or a ``T_*`` code), odd steps, peak, full peak, cycle minimum.
    """
    tab = np.zeros((max(size, 1), 5), dtype=np.int64)
    tab[:, 0] = T_UNKNOWN
    return tab


def hot_table(tab: np.ndarray, step) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """The packed form of a built table that the fast walk reads for every start.

    Returns ``(hot, tcmin, tmax)``: ``hot[v]`` is ``delay | odd << 20 | i << 40 |
    on_cycle << 61`` (``tcmin[i]`` the cycle minimum of ``v``; ``on_cycle`` when
    ``v`` lies on its cycle), or the table's code when negative; ``tmax`` the
    largest peak and full peak in the table. ``step`` is the map's one step.
    """
    n = tab.shape[0]
    hot = tab[:, 0].copy()
    ok = hot >= 0
    if not ok.any() or tab[ok, 0].max() >= 2**20:
        return hot, np.zeros(1, np.int64), np.zeros(2, np.int64)
    mins, idx = np.unique(tab[ok, 4], return_inverse=True)
    on_cycle = np.zeros(n, np.int64)
    for c in mins.tolist():
        # the cycle through its minimum c: mark its members inside the table
        v = c
        while True:
            if 0 <= v < n:
                on_cycle[v] = 1
            v = step(v)
            if v == c:
                break
    hot[ok] = tab[ok, 0] | (tab[ok, 1] << 20) | (idx.astype(np.int64) << 40) | (on_cycle[ok] << 61)
    tmax = np.array([tab[ok, 2].max(), tab[ok, 3].max()], np.int64)
    return hot, mins.astype(np.int64), tmax


def jump_tables(a: int, b: int, K: int) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """K steps of ``n -> n/2, (a n + b)/2`` at once, per residue ``r = n mod 2^K``.

    For ``n = 2^K q + r`` and ``0 <= i <= K``, ``T^i(n) = a^(c_i) 2^(K-i) q + T^i(r)``
    with ``c_i`` the odd steps among the first ``i`` steps of ``r`` (the
    parities of those steps depend on ``r`` only). Returns ``(jt, gt, bnd)``:

    - ``jt[r, 0] = a^(c_K)`` and ``jt[r, 1] = T^K(r) | c_K << 48``, so
      ``T^K(n) = jt[r, 0] q + T^K(r)`` (both loaded at once: the jump's chain
      of dependent loads is one load long);
    - ``gt[r, 0] = j | c_j << 8 | qmin << 16`` when the glide of every ``n``
      of residue ``r`` with ``q >= qmin`` is ``j <= K`` (``T^i(n) >= n`` for
      ``i < j`` and ``T^j(n) < n``), ``0`` when the first ``K`` steps of ``r``
      do not settle it; ``gt[r, 1]`` the least ``a^(c_i) 2^(K-i)``,
      ``1 <= i <= K``, so that ``T^i(n) >= gt[r, 1] q`` for those ``i``;
    - ``bnd = [G, L, Q]``: every ``T^i(n)``, ``0 <= i <= K``, is at most
      ``G q + L``; ``Q`` the largest ``q`` with ``a^(c_K) q + T^K(r) < 2^63``
      for every row (a jump with ``q <= Q`` never passes int64).

    Needs ``a`` odd, ``a >= 1``, ``a + b >= 1`` (values of positive starts stay
    positive), ``b`` odd and ``a^K < 2^40``, ``|b| < 2^20``.
    """
    n = 1 << K
    r = np.arange(n, dtype=np.int64)
    x = r.copy()
    c = np.zeros(n, np.int64)
    pw = np.array([a**k for k in range(K + 1)], np.int64)
    amax = np.full(n, n, np.int64)
    bmax = x.copy()
    j = np.zeros(n, np.int64)
    cj = np.zeros(n, np.int64)
    qmin = np.zeros(n, np.int64)
    amin = np.full(n, np.iinfo(np.int64).max, np.int64)
    for i in range(1, K + 1):
        o = (x & 1) == 1
        x = np.where(o, (a * x + b) >> 1, x >> 1)
        c += o
        coef = pw[c] << (K - i)  # T^i(2^K q + r) = coef q + x
        amax = np.maximum(amax, coef)
        amin = np.minimum(amin, coef)
        bmax = np.maximum(bmax, x)
        open_ = j == 0
        above = open_ & (coef > n)  # T^i(n) >= n iff (coef - 2^K) q >= r - x
        need = np.where(above & (r > x), -((x - r) // np.maximum(coef - n, 1)), 0)
        qmin = np.maximum(qmin, need)
        drop = open_ & (coef < n)  # T^i(n) < n iff (2^K - coef) q > x - r
        need = np.where(drop & (x >= r), (x - r) // np.maximum(n - coef, 1) + 1, 0)
        qmin = np.where(drop, np.maximum(qmin, need), qmin)
        j = np.where(drop, i, j)
        cj = np.where(drop, c, cj)
    jt = np.zeros((n, 2), np.int64)
    jt[:, 0] = pw[c]
    jt[:, 1] = x | (c << 48)
    gt = np.zeros((n, 2), np.int64)
    gt[:, 0] = np.where(j > 0, j | (cj << 8) | (qmin << 16), 0)
    gt[:, 1] = amin
    bnd = np.array([amax.max(), bmax.max(), ((2**63 - 1 - x) // pw[c]).min()], np.int64)
    return jt, gt, bnd


@njit(cache=True)
def _bigger(x, y):  # pragma: no cover - compiled
    """x replaces y as a peak: strictly larger |x| (the first one stays on a tie)."""
    return abs(x) > abs(y)


@njit(cache=True)
def _step(v, d, ma, mb):  # pragma: no cover - compiled
    """One step of the map (floor division; ``d == 2`` by a shift)."""
    if d == 2:
        r = v & 1
        return (ma[r] * v + mb[r]) >> 1
    r = v % d
    return (ma[r] * v + mb[r]) // d


@njit(cache=True)
def _rewalk(s, cmin, d, ma, mb, cap, undiv):  # pragma: no cover - compiled
    """From ``s`` up to the first visit of ``cmin``: (ok, delay, odd, peak, full peak)."""
    v = s
    peak = s
    upk = s
    odd = 0
    delay = 0
    while v != cmin:
        if undiv and v % d == 1:
            w = ma[1] * v + mb[1]
            if _bigger(w, upk):
                upk = w
            odd += 1
        v = _step(v, d, ma, mb)
        delay += 1
        if _bigger(v, peak):
            peak = v
        if _bigger(v, upk):
            upk = v
        if delay > cap:
            return False, 0, 0, 0, 0
    return True, delay, odd, peak, upk


@njit(cache=True)
def _one(s, d, ma, mb, vmax, cap, undiv, use_table, T, tab):  # pragma: no cover
    """One start: (status, delay, odd, glide, full_glide, peak, full_peak, cycle_min)."""
    budget = 3 * cap + 3
    bound = s if s < T else T
    v = s
    peak = upk = s
    odd = i = 0
    glide = uglide = -1
    tort = s
    power = lam = 1
    positive = True
    found = False
    while i < budget:
        r = (v & 1) if d == 2 else v % d
        if abs(v) > vmax[r]:
            return (_HARD, 0, 0, 0, 0, 0, 0, 0)
        if undiv and r == 1:
            w = ma[1] * v + mb[1]
            if _bigger(w, upk):
                upk = w
            odd += 1
        v = _step(v, d, ma, mb)
        i += 1
        if v <= 0:
            positive = False
        if _bigger(v, peak):
            peak = v
        if _bigger(v, upk):
            upk = v
        if glide < 0 and abs(v) < s:
            glide = i
            uglide = i + odd
        if use_table and positive and v < bound:
            e = tab[v, 0]
            if e == T_UNRESOLVED:
                return (_UNRES, 0, 0, glide, uglide, 0, 0, 0)
            if e >= 0:
                delay = i + e
                if delay > cap:
                    return (_UNRES, 0, 0, glide, uglide, 0, 0, 0)
                if _bigger(tab[v, 2], peak):
                    peak = tab[v, 2]
                if _bigger(tab[v, 3], upk):
                    upk = tab[v, 3]
                if _bigger(peak, upk):
                    upk = peak
                return (_OK, delay, odd + tab[v, 1], glide, uglide, peak, upk, tab[v, 4])
            use_table = False  # an unknown entry: go on without the table
        if v == tort:
            found = True
            break
        if power == lam:
            tort = v
            power *= 2
            lam = 0
        lam += 1
    if not found or lam > cap:
        return (_UNRES, 0, 0, glide, uglide, 0, 0, 0)
    # the cycle through v: its minimum
    cmin = v
    w = v
    for _ in range(lam - 1):
        w = _step(w, d, ma, mb)
        if abs(w) < abs(cmin) or (abs(w) == abs(cmin) and w < cmin):
            cmin = w
    ok, delay, odd, peak, upk = _rewalk(s, cmin, d, ma, mb, cap, undiv)
    if not ok:
        return (_UNRES, 0, 0, glide, uglide, 0, 0, 0)
    return (_OK, delay, odd, glide, uglide, peak, upk, cmin)


@njit(cache=True)
def _one_fast(
    s, a, b, vmax1, cap, T, tab, hot, tcmin, tmax, jt, gt, K, qsafe, qlim, best_pk, best_upk
):  # pragma: no cover - compiled
    """:func:`_one` for ``ax+b`` maps whose values stay positive (a >= 1, a + b >= 1).

    Same figures (see the module docstring, *Skipping work*); status ``-1``
    hands the start back to :func:`_one` (no table entry met within the
    budget, an unknown entry, a value near int64, a landing on a cycle, or a
    peak that may set a record while part of the path was jumped over). The
    returned peaks are exact when they can beat ``best_pk`` / ``best_upk``;
    otherwise they are lower bounds of the exact ones, which are at most
    ``best_pk`` / ``best_upk``.
    """
    budget = 3 * cap + 3
    jumps = hot.shape[0] > 1 and jt.shape[0] > 1
    mask = (1 << K) - 1
    v = s
    pm = upm = s
    odd = i = 0
    jumped = False
    top = 0  # the largest value a jump starts from
    # up to the glide: a whole jump when no value of it can be below s, else one step
    while v >= s:
        if i >= budget:
            return (-1, 0, 0, 0, 0, 0, 0, 0)
        if jumps:
            r = v & mask
            q = v >> K
            if q <= qsafe and gt[r, 1] * q >= s:
                if v > top:
                    top = v
                e = jt[r, 1]
                v = jt[r, 0] * q + (e & _MASK48)
                odd += e >> 48
                i += K
                jumped = True
                continue
        if v & 1:
            if v > vmax1:
                return (-1, 0, 0, 0, 0, 0, 0, 0)
            w = a * v + b
            if w > upm:
                upm = w
            odd += 1
            v = w >> 1
            if v > pm:
                pm = v
        else:
            v >>= 1
        i += 1
    glide = i
    uglide = i + odd
    if not jumps:
        # the table is being built (or no packed copy): read it directly, no jumps
        if v >= T:
            return (-1, 0, 0, 0, 0, 0, 0, 0)
        e = tab[v, 0]
        if e == T_UNRESOLVED:
            return (_UNRES, 0, 0, glide, uglide, 0, 0, 0)
        if e < 0 or i + e > cap:
            return (-1 if e < 0 else _UNRES, 0, 0, glide, uglide, 0, 0, 0)
        if tab[v, 2] > pm:
            pm = tab[v, 2]
        if tab[v, 3] > upm:
            upm = tab[v, 3]
        if pm > upm:
            upm = pm
        return (_OK, i + e, odd + tab[v, 1], glide, uglide, pm, upm, tab[v, 4])
    # past the table: K steps at a time, n = 2^K q + r -> a^c(r) q + T^K(r)
    while v >= T:
        r = v & mask
        q = v >> K
        if q > qsafe or i > cap:
            return (-1, 0, 0, 0, 0, 0, 0, 0)
        if v > top:
            top = v
        e = jt[r, 1]
        v = jt[r, 0] * q + (e & _MASK48)
        odd += e >> 48
        i += K
        jumped = True
    e = hot[v]
    if e < 0:
        if e == T_UNRESOLVED:
            return (_UNRES, 0, 0, glide, uglide, 0, 0, 0)
        return (-1, 0, 0, 0, 0, 0, 0, 0)
    if jumped and (e >> 61) & 1:
        return (-1, 0, 0, 0, 0, 0, 0, 0)  # landed on a cycle: an earlier value may be its minimum
    delay = i + (e & _MASK20)
    if delay > cap:
        return (_UNRES, 0, 0, glide, uglide, 0, 0, 0)
    odd += (e >> 20) & _MASK20
    cmin = tcmin[(e >> 40) & _MASK21]
    # the peaks: exact when they can matter (the table's peaks only read then)
    if jumped:
        if pm > best_pk or upm > best_upk:
            return (-1, 0, 0, 0, 0, 0, 0, 0)
        # every value inside a jump from v = 2^K q + r is at most G q + L <= best_pk
        # (and twice it at most best_upk) when q <= qlim (see walk_chunk)
        if (top >> K) > qlim:
            return (-1, 0, 0, 0, 0, 0, 0, 0)
        if tmax[0] > best_pk and tab[v, 2] > best_pk:
            return (-1, 0, 0, 0, 0, 0, 0, 0)
        if tmax[1] > best_upk and tab[v, 3] > best_upk:
            return (-1, 0, 0, 0, 0, 0, 0, 0)
        return (_OK, delay, odd, glide, uglide, pm, upm, cmin)
    if tmax[0] > best_pk and tab[v, 2] > pm:
        pm = tab[v, 2]
    if tmax[1] > best_upk and tab[v, 3] > upm:
        upm = tab[v, 3]
    if pm > upm:
        upm = pm
    return (_OK, delay, odd, glide, uglide, pm, upm, cmin)


@njit(cache=True)
def _glide(s, a, b, vmax1, budget, jt, gt, K, qsafe):  # pragma: no cover - compiled
    """The glide of ``s`` and its odd steps for positive ``ax+b`` walks, or ``(-1, 0)``.

    Whole jumps while no value of the jump can be below ``s`` (``gt[r, 1] q
    >= s``), single steps otherwise; ``(-1, 0)`` past ``budget`` steps or near
    int64.
    """
    mask = (1 << K) - 1
    v = s
    i = odd = 0
    while v >= s:
        if i >= budget:
            return -1, 0
        r = v & mask
        q = v >> K
        if q <= qsafe and gt[r, 1] * q >= s:
            e = jt[r, 1]
            v = jt[r, 0] * q + (e & _MASK48)
            odd += e >> 48
            i += K
        elif v & 1:
            if v > vmax1:
                return -1, 0
            v = (a * v + b) >> 1
            odd += 1
            i += 1
        else:
            v >>= 1
            i += 1
    return i, odd


@njit(cache=True, inline="always")
def _lane_jump(v, nj, odd, top, T, K, mask, jt):  # pragma: no cover - compiled
    """One jump of one lane, without branches: ``v >= T`` jumps, else stays.

    ``nj`` counts the jumps, ``top`` is the largest value a jump started from.
    No overflow check: a jump from ``v`` is exact when ``v >> K`` is at most
    ``Q`` (:func:`jump_tables`), which the caller checks on ``top``
    afterwards (a lane past it is not used).
    """
    m = (T - 1 - v) >> 63  # -1 when v >= T, else 0
    r = v & mask
    q = v >> K
    e = jt[r, 1]
    c = e >> 48
    nv = jt[r, 0] * q + (e & _MASK48)
    top = top if top >= v else v
    v = v ^ ((v ^ nv) & m)
    return v, nj - m, odd + (c & m), top


@njit(cache=True)
def _block(s, n, T, K, cap, jt, gt, hot, tcmin, tmax, tab, qlim, qsafe, best_pk, best_upk, out):
    # pragma: no cover - compiled
    """The fast figures of the starts ``s .. s+n-1`` (every one ``>= T``), four side by side.

    Row ``k`` of ``out`` gets ``[status, delay, odd, glide, full_glide, peak,
    full_peak, cycle_min]`` with status ``_OK`` when every figure is known (the
    glide settled by the residue; the peaks are then within the records,
    written as 0), ``_GLIDE`` when all but the glide are (:func:`_exact_rows`
    finds it within ``delay`` steps), ``_WALK`` when the start needs the exact
    walk: an overflow, more than ``cap`` steps, a table entry that is not a
    delay, a landing on a cycle, or a path whose peaks may reach ``best_pk`` /
    ``best_upk`` (jumped values are at most ``G (top >> K) + L``, see
    :func:`jump_tables`; they stay within the records when ``top >> K <=
    qlim``). Every jump is exact when ``top >> K <= qsafe`` (``Q`` of
    :func:`jump_tables`). The four chains of dependent loads overlap; a lane that
    is done stays put while the others jump.
    """
    mask = (1 << K) - 1
    qcut = min(qlim, qsafe)
    table_peaks = tmax[0] > best_pk or tmax[1] > best_upk  # else the table's peaks never matter
    for g in range(0, n, LANES):
        m = min(LANES, n - g)
        v0 = s + g
        v1 = s + g + 1 if m > 1 else 0
        v2 = s + g + 2 if m > 2 else 0
        v3 = s + g + 3 if m > 3 else 0
        i0 = i1 = i2 = i3 = 0
        o0 = o1 = o2 = o3 = 0
        t0, t1, t2, t3 = v0, v1, v2, v3
        steps = 0
        while ((v0 >= T) | (v1 >= T) | (v2 >= T) | (v3 >= T)) & (steps <= cap):
            v0, i0, o0, t0 = _lane_jump(v0, i0, o0, t0, T, K, mask, jt)
            v1, i1, o1, t1 = _lane_jump(v1, i1, o1, t1, T, K, mask, jt)
            v2, i2, o2, t2 = _lane_jump(v2, i2, o2, t2, T, K, mask, jt)
            v3, i3, o3, t3 = _lane_jump(v3, i3, o3, t3, T, K, mask, jt)
            steps += K
        for k in range(m):
            if k == 0:
                v, i, o, t = v0, i0 * K, o0, t0
            elif k == 1:
                v, i, o, t = v1, i1 * K, o1, t1
            elif k == 2:
                v, i, o, t = v2, i2 * K, o2, t2
            else:
                v, i, o, t = v3, i3 * K, o3, t3
            row = g + k
            out[row, 0] = _WALK
            if v >= T or (t >> K) > qcut:
                continue
            e = hot[v]
            if e < 0 or (e >> 61) & 1 or i + (e & _MASK20) > cap:
                continue
            if table_peaks and (tab[v, 2] > best_pk or tab[v, 3] > best_upk):
                continue
            x = s + row
            ge = gt[x & mask, 0]
            settled = ge != 0 and (x >> K) >= (ge >> 16)
            out[row, 0] = _OK if settled else _GLIDE
            out[row, 1] = i + (e & _MASK20)
            out[row, 2] = o + ((e >> 20) & _MASK20)
            out[row, 3] = ge & 255
            out[row, 4] = (ge & 255) + ((ge >> 8) & 255)
            out[row, 5] = 0
            out[row, 6] = 0
            out[row, 7] = tcmin[(e >> 40) & _MASK21]


@njit(cache=True)
def _exact_rows(
    s,
    n,
    out,
    d,
    ma,
    mb,
    vmax,
    cap,
    undiv,
    fast,
    T,
    tab,
    build,
    hot,
    tcmin,
    tmax,
    jt,
    gt,
    K,
    qsafe,
    qlim,
    best_pk,
    best_upk,
):  # pragma: no cover - compiled
    """Fill the rows of ``out`` that :func:`_block` left open (or all, after ``out[:n, 0] = _WALK``).

    ``_GLIDE`` rows get their glide (:func:`_glide`); ``_WALK`` rows the
    figures of :func:`_one_fast` (positive ``ax+b`` walks) or :func:`_one`.
    With ``build`` the starts below ``T`` enter the table as they are done
    (later starts of the block may read them).
    """
    for k in range(n):
        x = s + k
        if out[k, 0] == _GLIDE:
            # the landing value (< T <= x) comes within delay steps: so does the glide
            glide, godd = _glide(x, ma[1], mb[1], vmax[1], out[k, 1], jt, gt, K, qsafe)
            if glide >= 0:
                out[k, 0] = _OK
                out[k, 3] = glide
                out[k, 4] = glide + godd
                continue
            out[k, 0] = _WALK
        if out[k, 0] != _WALK:
            continue
        st = -1
        if fast:
            st, delay, odd, glide, uglide, peak, upk, cmin = _one_fast(
                x,
                ma[1],
                mb[1],
                vmax[1],
                cap,
                T,
                tab,
                hot,
                tcmin,
                tmax,
                jt,
                gt,
                K,
                qsafe,
                qlim,
                best_pk,
                best_upk,
            )
        if st < 0:
            st, delay, odd, glide, uglide, peak, upk, cmin = _one(
                x, d, ma, mb, vmax, cap, undiv, True, T, tab
            )
        out[k, 0] = st
        out[k, 1] = delay
        out[k, 2] = odd
        out[k, 3] = glide
        out[k, 4] = uglide
        out[k, 5] = peak
        out[k, 6] = upk
        out[k, 7] = cmin
        if build and x < T:
            if st == _OK:
                tab[x, 0] = delay
                tab[x, 1] = odd
                tab[x, 2] = peak
                tab[x, 3] = upk
                tab[x, 4] = cmin
            elif st == _UNRES:
                tab[x, 0] = T_UNRESOLVED
            else:
                tab[x, 0] = T_UNKNOWN


@njit(cache=True)
def _candidate(k, s, value, rec_s, rec_v, rec_n):  # pragma: no cover - compiled
    """Append a candidate record holder of kind ``k`` (the caller leaves room)."""
    rec_s[k, rec_n[k]] = s
    rec_v[k, rec_n[k]] = value
    rec_n[k] += 1


@njit(cache=True)
def walk_chunk(
    lo,
    hi,
    d,
    ma,
    mb,
    vmax,
    cap,
    undiv,
    T,
    tab,
    build,
    hot,
    tcmin,
    tmax,
    jt,
    gt,
    bnd,
    K,
    hist_del,
    hist_udel,
    hist_gl,
    hist_ugl,
    sums,
    best,
    rec_s,
    rec_v,
    rec_n,
    cyc_min,
    cyc_cnt,
    ncyc,
    hard,
    nhard,
    unres,
    nunres,
):  # pragma: no cover - compiled
    """Walk ``lo .. hi``; returns the next start to do (``hi + 1`` when done).

    ``sums`` accumulates ``[resolved, unresolved, hard, no_glide, sum_delay,
    sum_full_delay, sum_glide, sum_full_glide]``. A call returns early when a
    record, hard or unresolved buffer is full (the caller empties it and calls
    again from the returned start). With ``build`` the starts below ``T`` fill
    the table ``tab`` (the fast walk then reads ``tab`` itself and never jumps).
    ``jt, gt, bnd, K`` are :func:`jump_tables` (``jt`` of one row: no jumps).
    """
    fast = d == 2 and undiv and ma[0] == 1 and mb[0] == 0 and ma[1] >= 1 and ma[1] + mb[1] >= 1
    lanes = fast and not build and jt.shape[0] > 1 and hot.shape[0] > 1
    out = np.zeros((BLOCK, 8), np.int64)
    cur_min = 0  # the cycle minimum of the last resolved start, its basin slot and the
    cur_slot = -1  # starts counted for it since (added to cyc_cnt on a change and on return)
    cur_cnt = 0
    # the running sums and records in locals (written back on return)
    n_ok, n_unres, n_hard, n_noglide = sums[0], sums[1], sums[2], sums[3]
    s_del, s_udel, s_gl, s_ugl = sums[4], sums[5], sums[6], sums[7]
    b0, b1, b2, b3, b4, b5 = best[0], best[1], best[2], best[3], best[4], best[5]
    s = lo
    while s <= hi:
        # a block never fills a buffer past its end (each start adds at most one entry)
        free = min(
            rec_s.shape[1] - rec_n.max(), hard.shape[0] - nhard[0], unres.shape[0] - nunres[0]
        )
        n = min(BLOCK, hi - s + 1, free)
        if n <= 0:
            break
        # jumped values bounded by G (top >> K) + L stay within the peak records when
        # top >> K <= qlim: G q + L <= b4 and 2 (G q + L) <= b5
        qlim = min((b4 - bnd[1]) // bnd[0], (b5 // 2 - bnd[1]) // bnd[0])
        if lanes and s >= T:
            _block(s, n, T, K, cap, jt, gt, hot, tcmin, tmax, tab, qlim, bnd[2], b4, b5, out)
        else:
            out[:n, 0] = _WALK
        _exact_rows(
            s,
            n,
            out,
            d,
            ma,
            mb,
            vmax,
            cap,
            undiv,
            fast,
            T,
            tab,
            build,
            hot,
            tcmin,
            tmax,
            jt,
            gt,
            K,
            bnd[2],
            qlim,
            b4,
            b5,
        )
        for k in range(n):
            x = s + k
            st = out[k, 0]
            cmin = out[k, 7]
            if st == _OK and not (cur_slot >= 0 and cmin == cur_min):
                # another cycle than the start before: its basin slot
                slot = -1
                for j in range(ncyc[0]):
                    if cyc_min[j] == cmin:
                        slot = j
                        break
                if slot < 0 and ncyc[0] < cyc_min.shape[0]:
                    slot = ncyc[0]
                    cyc_min[slot] = cmin
                    cyc_cnt[slot] = 0
                    ncyc[0] += 1
                if slot < 0:
                    st = _HARD
                else:
                    if cur_slot >= 0:
                        cyc_cnt[cur_slot] += cur_cnt
                    cur_slot = slot
                    cur_min = cmin
                    cur_cnt = 0
            if st == _OK:
                cur_cnt += 1
            if st == _HARD:
                hard[nhard[0]] = x
                nhard[0] += 1
                n_hard += 1
                continue
            if st == _UNRES:
                unres[nunres[0]] = x
                nunres[0] += 1
                n_unres += 1
                continue
            delay = out[k, 1]
            full_delay = delay + out[k, 2]
            glide = out[k, 3]
            n_ok += 1
            hist_del[delay] += 1
            s_del += delay
            if undiv:
                hist_udel[full_delay] += 1
                s_udel += full_delay
            if glide < 0:
                n_noglide += 1
            else:
                hist_gl[glide] += 1
                s_gl += glide
                if undiv:
                    hist_ugl[out[k, 4]] += 1
                    s_ugl += out[k, 4]
            # candidate records (kinds: delay, full_delay, glide, full_glide, peak, full_peak)
            if delay > b0:
                b0 = delay
                _candidate(0, x, delay, rec_s, rec_v, rec_n)
            if undiv and full_delay > b1:
                b1 = full_delay
                _candidate(1, x, full_delay, rec_s, rec_v, rec_n)
            if glide > b2:  # a start with no glide (-1) never sets one
                b2 = glide
                _candidate(2, x, glide, rec_s, rec_v, rec_n)
            if undiv and glide >= 0 and out[k, 4] > b3:
                b3 = out[k, 4]
                _candidate(3, x, b3, rec_s, rec_v, rec_n)
            if abs(out[k, 5]) > b4:
                b4 = abs(out[k, 5])
                _candidate(4, x, out[k, 5], rec_s, rec_v, rec_n)
            if undiv and abs(out[k, 6]) > b5:
                b5 = abs(out[k, 6])
                _candidate(5, x, out[k, 6], rec_s, rec_v, rec_n)
        s += n
    if cur_slot >= 0:
        cyc_cnt[cur_slot] += cur_cnt
    sums[0], sums[1], sums[2], sums[3] = n_ok, n_unres, n_hard, n_noglide
    sums[4], sums[5], sums[6], sums[7] = s_del, s_udel, s_gl, s_ugl
    best[0], best[1], best[2], best[3], best[4], best[5] = b0, b1, b2, b3, b4, b5
    return s
