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

References
----------
.. [1] R. P. Brent, "An improved Monte Carlo factorization algorithm",
   BIT 20 (1980) 176-184.
"""

from __future__ import annotations

import numpy as np
from numba import njit

__all__ = ["walk_chunk", "T_UNRESOLVED", "T_UNKNOWN", "KINDS", "new_table"]

#: Table entry: the start is unresolved (so is every start that reaches it first).
T_UNRESOLVED = -1
#: Table entry: not known to the compiled walk (went past int64); walk without it.
T_UNKNOWN = -2

#: Record kinds, in the order of the kernel's record buffers.
KINDS = ("delay", "full_delay", "glide", "full_glide", "peak", "full_peak")

_OK, _HARD, _UNRES = 0, 1, 2


def new_table(size: int) -> np.ndarray:
    """An empty table for starts ``1 .. size-1``: one row per start (one cache line).

    Columns: delay (or a ``T_*`` code), odd steps, peak, full peak, cycle minimum.
    """
    tab = np.zeros((max(size, 1), 5), dtype=np.int64)
    tab[:, 0] = T_UNKNOWN
    return tab


@njit(cache=True)
def _bigger(x, y):  # pragma: no cover - compiled
    """x replaces y as a peak: strictly larger |x| (the first one stays on a tie)."""
    return abs(x) > abs(y)


@njit(cache=True)
def _one(s, d, ma, mb, vmax, cap, undiv, use_table, T, tab):  # pragma: no cover
    """One start: (status, delay, odd, glide, full_glide, peak, full_peak, cycle_min)."""
    budget = 3 * cap + 3
    bound = s if s < T else T
    v = s
    peak = s
    upk = s
    odd = 0
    glide = -1
    uglide = -1
    tort = s
    power = 1
    lam = 1
    i = 0
    positive = True
    found = False
    d2 = d == 2
    while i < budget:
        r = (v & 1) if d2 else v % d
        a = ma[r]
        b = mb[r]
        av = abs(v)
        if av > vmax[r]:
            return (_HARD, 0, 0, 0, 0, 0, 0, 0)
        if undiv and r == 1:
            w = a * v + b
            if _bigger(w, upk):
                upk = w
            odd += 1
        v = ((a * v + b) >> 1) if d2 else (a * v + b) // d
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
    if not found:
        return (_UNRES, 0, 0, glide, uglide, 0, 0, 0)
    if lam > cap:
        return (_UNRES, 0, 0, glide, uglide, 0, 0, 0)
    # the cycle through v: its minimum
    cmin = v
    w = v
    for _ in range(lam - 1):
        w = (ma[w % d] * w + mb[w % d]) // d
        if abs(w) < abs(cmin) or (abs(w) == abs(cmin) and w < cmin):
            cmin = w
    # walk the path again from s up to the first visit of the minimum
    v = s
    peak = s
    upk = s
    odd = 0
    delay = 0
    while v != cmin:
        r = v % d
        a = ma[r]
        b = mb[r]
        if undiv and r == 1:
            w = a * v + b
            if _bigger(w, upk):
                upk = w
            odd += 1
        v = (a * v + b) // d
        delay += 1
        if _bigger(v, peak):
            peak = v
        if _bigger(v, upk):
            upk = v
        if delay > cap:
            return (_UNRES, 0, 0, glide, uglide, 0, 0, 0)
    return (_OK, delay, odd, glide, uglide, peak, upk, cmin)


@njit(cache=True)
def _one_fast(s, a, b, vmax1, cap, T, tab):  # pragma: no cover - compiled
    """:func:`_one` for ``ax+b`` maps whose values stay positive (a >= 1, a + b >= 1).

    Same results; the walk only ends through the table, and hands every other
    case (no table entry met, an unknown entry, a value near int64) back to
    :func:`_one` (status ``-1``).
    """
    budget = 3 * cap + 3
    bound = s if s < T else T
    v = s
    peak = s
    upk = s
    odd = 0
    glide = -1
    uglide = -1
    i = 0
    while i < budget:
        if v & 1:
            if v > vmax1:
                return (-1, 0, 0, 0, 0, 0, 0, 0)
            w = a * v + b
            if w > upk:
                upk = w
            odd += 1
            v = w >> 1
            i += 1
            if v > peak:
                peak = v
        else:
            v = v >> 1
            i += 1
        if v < s:
            if glide < 0:
                glide = i
                uglide = i + odd
            if v < bound:
                e = tab[v, 0]
                if e == T_UNRESOLVED:
                    return (_UNRES, 0, 0, glide, uglide, 0, 0, 0)
                if e < 0:
                    return (-1, 0, 0, 0, 0, 0, 0, 0)
                delay = i + e
                if delay > cap:
                    return (_UNRES, 0, 0, glide, uglide, 0, 0, 0)
                if tab[v, 2] > peak:
                    peak = tab[v, 2]
                if tab[v, 3] > upk:
                    upk = tab[v, 3]
                if peak > upk:
                    upk = peak
                return (_OK, delay, odd + tab[v, 1], glide, uglide, peak, upk, tab[v, 4])
    return (-1, 0, 0, 0, 0, 0, 0, 0)


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
    again from the returned start).
    """
    R = rec_s.shape[1]
    fast = d == 2 and undiv and ma[0] == 1 and mb[0] == 0 and ma[1] >= 1 and ma[1] + mb[1] >= 1
    for s in range(lo, hi + 1):
        if nhard[0] >= hard.shape[0] or nunres[0] >= unres.shape[0]:
            return s
        full = False
        for k in range(6):
            if rec_n[k] >= R:
                full = True
        if full:
            return s
        st = -1
        if fast:
            st, delay, odd, glide, uglide, peak, upk, cmin = _one_fast(
                s, ma[1], mb[1], vmax[1], cap, T, tab
            )
        if st < 0:
            st, delay, odd, glide, uglide, peak, upk, cmin = _one(
                s, d, ma, mb, vmax, cap, undiv, True, T, tab
            )
        if st == _OK:
            # basin slot
            slot = -1
            for j in range(ncyc[0]):
                if cyc_min[j] == cmin:
                    slot = j
                    break
            if slot < 0:
                if ncyc[0] >= cyc_min.shape[0]:
                    st = _HARD
                else:
                    slot = ncyc[0]
                    cyc_min[slot] = cmin
                    cyc_cnt[slot] = 0
                    ncyc[0] += 1
            if slot >= 0:
                cyc_cnt[slot] += 1
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
        if delay > best[0]:
            best[0] = delay
            rec_s[0, rec_n[0]] = s
            rec_v[0, rec_n[0]] = delay
            rec_n[0] += 1
        if undiv and full_delay > best[1]:
            best[1] = full_delay
            rec_s[1, rec_n[1]] = s
            rec_v[1, rec_n[1]] = full_delay
            rec_n[1] += 1
        if glide >= 0 and glide > best[2]:
            best[2] = glide
            rec_s[2, rec_n[2]] = s
            rec_v[2, rec_n[2]] = glide
            rec_n[2] += 1
        if undiv and glide >= 0 and uglide > best[3]:
            best[3] = uglide
            rec_s[3, rec_n[3]] = s
            rec_v[3, rec_n[3]] = uglide
            rec_n[3] += 1
        if abs(peak) > best[4]:
            best[4] = abs(peak)
            rec_s[4, rec_n[4]] = s
            rec_v[4, rec_n[4]] = peak
            rec_n[4] += 1
        if undiv and abs(upk) > best[5]:
            best[5] = abs(upk)
            rec_s[5, rec_n[5]] = s
            rec_v[5, rec_n[5]] = upk
            rec_n[5] += 1
    return hi + 1
