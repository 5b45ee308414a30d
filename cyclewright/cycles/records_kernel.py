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
For ``ax+b`` maps with ``d = 2`` whose values stay positive, a start ``s``
is first walked step by step to its glide (every value before it is at
least ``s``, so the glide, its odd steps and the peaks so far are exact).
From the first value ``v < s`` on, the walk jumps ``K`` steps at a time
(:func:`jump_table`: ``T^K(2^K q + r) = a^c q + T^K(r)``, the parities of the
``K`` steps depending on ``r`` only) until a value below ``T``, whose delay,
odd steps and cycle are read from a packed copy of the table
(:func:`hot_table`). This is exact unless the landing value lies on its
cycle (then an earlier value, inside a jump, may be the cycle's minimum):
such starts are walked step by step. The jumps skip the values the peaks
are taken over; a peak only matters when it beats the chunk's running
record, so the walk bounds every jumped value by ``Amax q + Bmax`` and
walks step by step exactly the starts whose bound reaches the record (and
those whose peak before the glide sets one). The delay, glide and odd-step
counts, the distributions, the basins and the record holders are the same
as the step-by-step walk's (tests compare both, and the plain definition).

References
----------
.. [1] R. P. Brent, "An improved Monte Carlo factorization algorithm",
   BIT 20 (1980) 176-184.
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
    "jump_table",
]

#: Table entry: the start is unresolved (so is every start that reaches it first).
T_UNRESOLVED = -1
#: Table entry: not known to the compiled walk (went past int64); walk without it.
T_UNKNOWN = -2

#: Record kinds, in the order of the kernel's record buffers.
KINDS = ("delay", "full_delay", "glide", "full_glide", "peak", "full_peak")

_OK, _HARD, _UNRES = 0, 1, 2
_MASK20 = (1 << 20) - 1
_MASK21 = (1 << 21) - 1


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


def jump_table(a: int, b: int, K: int) -> np.ndarray:
    """K steps of ``n -> n/2, (a n + b)/2`` at once, per residue ``r = n mod 2^K``.

    Row ``r``: ``A = a^c``, ``B = T^K(r)``, ``c`` (odd steps), the largest
    ``q`` with ``A q + B < 2^63``, and ``Amax``, ``Bmax`` with every value of
    the K steps at most ``Amax q + Bmax``. Then ``T^K(2^K q + r) = A q + B``
    (the parities of the K steps depend on ``r`` only).
    """
    n = 1 << K
    x = np.arange(n, dtype=np.int64)
    c = np.zeros(n, np.int64)
    amax = np.full(n, 1 << K, np.int64)
    bmax = x.copy()
    for i in range(1, K + 1):
        o = (x & 1) == 1
        x = np.where(o, (a * x + b) >> 1, x >> 1)
        c += o
        amax = np.maximum(amax, a**c << (K - i))
        bmax = np.maximum(bmax, x)
    A = a**c
    jt = np.zeros((n, 6), np.int64)
    jt[:, 0] = A
    jt[:, 1] = x
    jt[:, 2] = c
    jt[:, 3] = (2**63 - 1 - x) // A
    jt[:, 4] = amax
    jt[:, 5] = bmax
    return jt


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


@njit(cache=True, inline="always")
def _one_fast(
    s, a, b, vmax1, cap, T, tab, hot, tcmin, tmax, jt, K, grow, lift, best_pk, best_upk
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
    v = s
    pm = upm = s
    odd = i = 0
    # stepwise up to the glide: every value before it is at least s
    while v >= s:
        if i >= budget:
            return (-1, 0, 0, 0, 0, 0, 0, 0)
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
    if hot.shape[0] <= 1:
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
    jumped = False
    top = 0  # the largest value a jump starts from
    mask = (1 << K) - 1
    while v >= T:
        r = v & mask
        q = v >> K
        if q > jt[r, 3] or i > cap:
            return (-1, 0, 0, 0, 0, 0, 0, 0)
        if v > top:
            top = v
        v = jt[r, 0] * q + jt[r, 1]
        odd += jt[r, 2]
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
        # every value inside a jump from v = 2^K q + r is at most Amax(r) q + Bmax(r),
        # so at most grow * top + lift (floats, rounded up by a wide margin)
        ub = (grow * top + lift) * 1.000001 + 2.0
        if ub >= best_pk * 0.999999 or 2.0 * ub >= best_upk * 0.999999:
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
    """
    fast = d == 2 and undiv and ma[0] == 1 and mb[0] == 0 and ma[1] >= 1 and ma[1] + mb[1] >= 1
    grow = 0.0
    lift = 0.0
    if jt.shape[0] > 1:
        grow = jt[:, 4].max() / float(1 << K)
        lift = float(jt[:, 5].max())
    last_min = 0
    last_slot = -1
    val = np.zeros(6, np.int64)
    room = rec_n.max() < rec_s.shape[1]
    for s in range(lo, hi + 1):
        if not room:
            return s
        if nhard[0] >= hard.shape[0] or nunres[0] >= unres.shape[0]:
            return s
        st = -1
        if fast:
            st, delay, odd, glide, uglide, peak, upk, cmin = _one_fast(
                s,
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
                K,
                grow,
                lift,
                best[4],
                best[5],
            )
        if st < 0:
            st, delay, odd, glide, uglide, peak, upk, cmin = _one(
                s, d, ma, mb, vmax, cap, undiv, True, T, tab
            )
        if st == _OK:
            # basin slot
            slot = last_slot
            if slot < 0 or cmin != last_min:
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
                cyc_cnt[slot] += 1
                last_min = cmin
                last_slot = slot
        if build and s < T:
            if st == _OK:
                tab[s, 0] = delay
                tab[s, 1] = odd
                tab[s, 2] = peak
                tab[s, 3] = upk
                tab[s, 4] = cmin
            elif st == _UNRES:
                tab[s, 0] = T_UNRESOLVED
            else:
                tab[s, 0] = T_UNKNOWN
        if st == _HARD:
            hard[nhard[0]] = s
            nhard[0] += 1
            sums[2] += 1
            continue
        if st == _UNRES:
            unres[nunres[0]] = s
            nunres[0] += 1
            sums[1] += 1
            continue
        sums[0] += 1
        full_delay = delay + odd
        hist_del[delay] += 1
        sums[4] += delay
        if undiv:
            hist_udel[full_delay] += 1
            sums[5] += full_delay
        if glide < 0:
            sums[3] += 1
        else:
            hist_gl[glide] += 1
            sums[6] += glide
            if undiv:
                hist_ugl[uglide] += 1
                sums[7] += uglide
        # candidate records (kinds: delay, full_delay, glide, full_glide, peak, full_peak)
        val[0] = delay
        val[1] = full_delay
        val[2] = glide
        val[3] = uglide
        val[4] = peak
        val[5] = upk
        for k in range(6):
            key = abs(val[k])
            if key > best[k] and (undiv or k % 2 == 0) and (glide >= 0 or k // 2 != 1):
                best[k] = key
                rec_s[k, rec_n[k]] = s
                rec_v[k, rec_n[k]] = val[k]
                rec_n[k] += 1
                room = room and rec_n[k] < rec_s.shape[1]
    return hi + 1
