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
  jumps of :mod:`cycles.sieve`, then the exact continuation of every start
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
reference (:mod:`cycles.reference`) follows them step by step.

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
from numba import njit

__all__ = [
    "DROP",
    "CYCLE",
    "OTHER",
    "OPEN",
    "COEFF_LIMIT",
    "INT64_MAX",
    "KernelMap",
    "RangeOutcome",
    "classify_range",
    "classify_starts",
    "warm_up",
]

DROP, CYCLE, OTHER, OPEN = 0, 1, 2, 3
_HARD = 4  # internal: the fast pass hands the start to the exact continuation

INT64_MAX = 2**63 - 1
#: |a_r|, |b_r| and d must stay below this for the compiled path (limb products fit in int64).
COEFF_LIMIT = 2**30
_MASK = (1 << 32) - 1
_HASH_P = 2**31 - 1  # prime
_TOP_SMALL = 1 << 31  # a 2-limb magnitude below 2^63 has its top limb below this

# Output buffers of one fast-pass call; the wrapper calls again when one fills.
_CYCLE_BUF = 4096
_HARD_BUF = 1 << 16


# --------------------------------------------------------------------------- fast pass
_RUN = 8  # steps taken without overflow checks when |v| <= KernelMap.safe


@njit(cache=True, nogil=True)
def _cont2(s, v, i, cap, tie, a0, b0, a1, b1, vm0, vm1, safe):
    """Follow ``v = T^i(s)`` of a d = 2 map in int64 until a drop, a return, the cap or the ceiling.

    Returns ``(code, steps)`` with code DROP, CYCLE or _HARD. While
    ``|v| <= safe`` the next ``_RUN`` steps provably fit int64 and run
    without overflow checks (the drop and return checks stay at every step).
    """
    while i < cap:
        if i + _RUN <= cap and abs(v) <= safe:
            for _ in range(_RUN):
                if v & 1:
                    v = (a1 * v + b1) >> 1
                else:
                    v = (a0 * v + b0) >> 1
                i += 1
                if abs(v) <= s:
                    if v == s:
                        return CYCLE, i
                    if v != -s or tie:
                        return DROP, i
        else:
            if v & 1:
                if abs(v) > vm1:
                    return _HARD, i
                v = (a1 * v + b1) >> 1
            else:
                if abs(v) > vm0:
                    return _HARD, i
                v = (a0 * v + b0) >> 1
            i += 1
            if abs(v) <= s:
                if v == s:
                    return CYCLE, i
                if v != -s or tie:
                    return DROP, i
    return _HARD, i


@njit(cache=True, nogil=True)
def _contg(s, v, i, cap, tie, d, ma, mb, vmax, safe):
    """As :func:`_cont2` for any divisor (coefficients read by residue)."""
    while i < cap:
        if i + _RUN <= cap and abs(v) <= safe:
            for _ in range(_RUN):
                r = v % d
                v = (ma[r] * v + mb[r]) // d
                i += 1
                if abs(v) <= s:
                    if v == s:
                        return CYCLE, i
                    if v != -s or tie:
                        return DROP, i
        else:
            r = v % d
            if abs(v) > vmax[r]:
                return _HARD, i
            v = (ma[r] * v + mb[r]) // d
            i += 1
            if abs(v) <= s:
                if v == s:
                    return CYCLE, i
                if v != -s or tie:
                    return DROP, i
    return _HARD, i


@njit(cache=True, nogil=True, inline="always")
def _up2(v, a0, b0, a1, b1):
    """One step of a d = 2 map (the branch chosen by a select, not a jump)."""
    o = v & 1
    return ((a1 if o else a0) * v + (b1 if o else b0)) >> 1


@njit(cache=True, nogil=True)
def _settle2(s, v, i, cap, tie, a0, b0, a1, b1, vm0, vm1, safe):
    """The outcome of a lane that stopped at ``v = T^i(s)`` (an event, the cap or the ceiling)."""
    if v <= s:
        return (CYCLE if v == s else DROP), i
    return _cont2(s, v, i, cap, tie, a0, b0, a1, b1, vm0, vm1, safe)


@njit(cache=True, nogil=True)
def _lanes2(
    q,
    jlo,
    jhi,
    dK,
    K,
    sc,
    sA,
    sC,
    cap,
    tie,
    a0,
    b0,
    a1,
    b1,
    vm0,
    vm1,
    safe,
    cyc_s,
    cyc_len,
    ncyc,
    hard_s,
    nhard,
):
    """Survivors ``jlo <= j < jhi`` of block ``q``, four orbits at a time.

    For d = 2 maps with ``a_r >= 1`` and ``a_r + b_r >= 1`` (3x+1, 3x-1,
    5x+1, ...), every value of a positive orbit is positive, so the only
    events are ``v < s`` (drop) and ``v = s`` (return); ``v = -s`` cannot
    occur. One orbit's steps form a chain of dependent multiplications; four
    independent orbits advanced together keep the processor's units busy. A
    lane stops at an event, at the cap or before a value could pass the
    int64 ceiling (``vm`` is the smaller branch limit); the last two hand the
    orbit, at the exact step reached, to :func:`_cont2`, which decides it
    (or marks it hard) exactly as the one-orbit path would. The caller
    guarantees room in the buffers for ``jhi - jlo`` entries. Returns the new
    ``(ncyc, nhard)``.
    """
    vm = vm0 if vm0 < vm1 else vm1
    base = q * dK
    j = jlo
    s0 = s1 = s2 = s3 = 0
    v0 = v1 = v2 = v3 = 0
    i0 = i1 = i2 = i3 = 0
    act0 = act1 = act2 = act3 = False
    while True:
        # fill the idle lanes with the next survivors that do not decide at their landing value
        for lane in range(4):
            if (
                (lane == 0 and act0)
                or (lane == 1 and act1)
                or (lane == 2 and act2)
                or (lane == 3 and act3)
            ):
                continue
            while j < jhi:
                s = base + sc[j]
                v = sA[j] * q + sC[j]
                j += 1
                if v > s:
                    if lane == 0:
                        s0, v0, i0, act0 = s, v, K, True
                    elif lane == 1:
                        s1, v1, i1, act1 = s, v, K, True
                    elif lane == 2:
                        s2, v2, i2, act2 = s, v, K, True
                    else:
                        s3, v3, i3, act3 = s, v, K, True
                    break
                if v == s:
                    cyc_s[ncyc] = s
                    cyc_len[ncyc] = K
                    ncyc += 1
        if not (act0 or act1 or act2 or act3):
            return ncyc, nhard
        # idle lanes (only at the end of the block) sit on a value that stops the loop at once
        if not act0:
            s0, v0, i0 = 0, 0, 0
        if not act1:
            s1, v1, i1 = 0, 0, 0
        if not act2:
            s2, v2, i2 = 0, 0, 0
        if not act3:
            s3, v3, i3 = 0, 0, 0
        while v0 <= vm and v1 <= vm and v2 <= vm and v3 <= vm:
            v0 = _up2(v0, a0, b0, a1, b1)
            v1 = _up2(v1, a0, b0, a1, b1)
            v2 = _up2(v2, a0, b0, a1, b1)
            v3 = _up2(v3, a0, b0, a1, b1)
            i0 += 1
            i1 += 1
            i2 += 1
            i3 += 1
            if v0 <= s0 or v1 <= s1 or v2 <= s2 or v3 <= s3:
                break
            if i0 >= cap or i1 >= cap or i2 >= cap or i3 >= cap:
                break
        for lane in range(4):
            if lane == 0:
                if not act0 or (v0 > s0 and v0 <= vm and i0 < cap):
                    continue
                s, v, i = s0, v0, i0
                act0 = False
            elif lane == 1:
                if not act1 or (v1 > s1 and v1 <= vm and i1 < cap):
                    continue
                s, v, i = s1, v1, i1
                act1 = False
            elif lane == 2:
                if not act2 or (v2 > s2 and v2 <= vm and i2 < cap):
                    continue
                s, v, i = s2, v2, i2
                act2 = False
            else:
                if not act3 or (v3 > s3 and v3 <= vm and i3 < cap):
                    continue
                s, v, i = s3, v3, i3
                act3 = False
            code, steps = _settle2(s, v, i, cap, tie, a0, b0, a1, b1, vm0, vm1, safe)
            if code == CYCLE:
                cyc_s[ncyc] = s
                cyc_len[ncyc] = steps
                ncyc += 1
            elif code != DROP:
                hard_s[nhard] = s
                nhard += 1


@njit(cache=True, nogil=True)
def _fast_pass(
    lo,
    hi,
    tie,
    d2,
    d,
    ma,
    mb,
    vmax,
    safe,
    cap,
    K,
    dK,
    sc,
    sjump,
    sA,
    sC,
    sqmax,
    qfast,
    lanes,
    cyc_s,
    cyc_len,
    hard_s,
):
    """Classify ``[lo, hi]`` until an output buffer fills.

    ``qfast``: every class may jump for blocks ``q <= qfast`` (-1: not so).
    ``lanes``: such blocks go to :func:`_lanes2` (see :func:`_lanes_apply`;
    the buffers then hold at least one block's survivors).

    Returns ``(done, next_start, n_cycles, n_hard, n_jumped)``: when not done,
    every start below ``next_start`` is classified. Starts not listed as a
    cycle or as hard have dropped (skipped sieve classes included).
    """
    ncyc = 0
    nhard = 0
    njump = 0
    cyc_cap = cyc_s.shape[0]
    hard_cap = hard_s.shape[0]
    # coefficients of a d = 2 map as scalars (the branch-free generic path reads arrays)
    a0 = ma[0]
    b0 = mb[0]
    a1 = ma[1 % d]
    b1 = mb[1 % d]
    vm0 = vmax[0]
    vm1 = vmax[1 % d]
    # Part 1: starts below d^K (or every start when there is no sieve) one by one.
    plain_hi = hi
    if K > 0 and dK - 1 < hi:
        plain_hi = dK - 1
    s = lo
    while s <= plain_hi:
        if d2:
            code, steps = _cont2(s, s, 0, cap, tie, a0, b0, a1, b1, vm0, vm1, safe)
        else:
            code, steps = _contg(s, s, 0, cap, tie, d, ma, mb, vmax, safe)
        if code != DROP:
            if code == CYCLE:
                cyc_s[ncyc] = s
                cyc_len[ncyc] = steps
                ncyc += 1
            else:
                hard_s[nhard] = s
                nhard += 1
            if s != hi and (ncyc == cyc_cap or nhard == hard_cap):
                return False, s + 1, ncyc, nhard, njump
        if s == hi:
            return True, s, ncyc, nhard, njump
        s += 1
    if K == 0 or hi < dK:
        return True, hi, ncyc, nhard, njump
    # Part 2: blocks of d^K starts; only the surviving classes are visited.
    first = lo
    if first < dK:
        first = dK
    q_first = first // dK
    q_last = hi // dK
    nsurv = sc.shape[0]
    for q in range(q_first, q_last + 1):
        base = q * dK
        jlo = 0
        jhi = nsurv
        if base < first:
            jlo = np.searchsorted(sc, first - base)
        if hi - base < dK - 1:
            jhi = np.searchsorted(sc, hi - base, side="right")
        if lanes and q <= qfast:
            if ncyc + (jhi - jlo) > cyc_cap or nhard + (jhi - jlo) > hard_cap:
                # no room for a whole block: every start below this one is classified
                nxt = base if base > first else first
                return False, nxt, ncyc, nhard, njump
            njump += jhi - jlo
            ncyc, nhard = _lanes2(
                q,
                jlo,
                jhi,
                dK,
                K,
                sc,
                sA,
                sC,
                cap,
                tie,
                a0,
                b0,
                a1,
                b1,
                vm0,
                vm1,
                safe,
                cyc_s,
                cyc_len,
                ncyc,
                hard_s,
                nhard,
            )
            continue
        if d2 and q <= qfast:
            # every class jumps and every jump fits int64 (the common case)
            njump += jhi - jlo
            for j in range(jlo, jhi):
                s = base + sc[j]
                v = sA[j] * q + sC[j]
                if abs(v) > s:
                    code, steps = _cont2(s, v, K, cap, tie, a0, b0, a1, b1, vm0, vm1, safe)
                    if code == DROP:
                        continue
                elif v == s:
                    code, steps = CYCLE, K
                elif v != -s or tie:
                    continue
                else:
                    code, steps = _cont2(s, v, K, cap, tie, a0, b0, a1, b1, vm0, vm1, safe)
                    if code == DROP:
                        continue
                if code == CYCLE:
                    cyc_s[ncyc] = s
                    cyc_len[ncyc] = steps
                    ncyc += 1
                else:
                    hard_s[nhard] = s
                    nhard += 1
                if s != hi and (ncyc == cyc_cap or nhard == hard_cap):
                    return False, s + 1, ncyc, nhard, njump - (jhi - j - 1)
            continue
        for j in range(jlo, jhi):
            s = base + sc[j]
            if sjump[j] and q <= sqmax[j]:
                # No event in steps 1..K-1 (cycles.sieve proves it); land on T^K(s).
                njump += 1
                v = sA[j] * q + sC[j]
                if abs(v) <= s:
                    steps = K
                    if v == s:
                        code = CYCLE
                    elif v != -s or tie:
                        code = DROP
                    else:
                        code = _HARD  # v = -s on the negative side: go on
                if abs(v) > s or code == _HARD:
                    if d2:
                        code, steps = _cont2(s, v, K, cap, tie, a0, b0, a1, b1, vm0, vm1, safe)
                    else:
                        code, steps = _contg(s, v, K, cap, tie, d, ma, mb, vmax, safe)
            elif d2:
                code, steps = _cont2(s, s, 0, cap, tie, a0, b0, a1, b1, vm0, vm1, safe)
            else:
                code, steps = _contg(s, s, 0, cap, tie, d, ma, mb, vmax, safe)
            if code != DROP:
                if code == CYCLE:
                    cyc_s[ncyc] = s
                    cyc_len[ncyc] = steps
                    ncyc += 1
                else:
                    hard_s[nhard] = s
                    nhard += 1
                if s != hi and (ncyc == cyc_cap or nhard == hard_cap):
                    return False, s + 1, ncyc, nhard, njump
    return True, hi, ncyc, nhard, njump


# --------------------------------------------------------------------------- exact continuation
# A big value is a sign (+-1) and a magnitude in L[0:n]: little-endian 32-bit
# limbs held in int64 words, at least 2^63 between steps. Values of magnitude
# below 2^63 are always held as plain int64 (the form is canonical, so equal
# values have equal representations). For the Brent pass a value lives in
# ``st`` (int64[3]: st[0] = 0 small with value st[1]; st[0] = 1 big with sign
# st[1] and st[2] limbs) and its limb array.


@njit(cache=True, nogil=True)
def _big_step(L, n, sign, d2, d, ma, mb):
    """One exact step of ``sign * L[0:n]`` (with ``|a_r v| > |b_r|``); returns ``(r, n, sign)``."""
    if d2:
        r = L[0] & 1  # -v and v have the same parity
    else:
        m = 0
        for k in range(n - 1, -1, -1):
            m = ((m << 32) | L[k]) % d
        r = m if sign > 0 else (d - m) % d
    a = ma[r]
    b = mb[r]
    aa = abs(a)
    nsign = sign if a > 0 else -sign
    # a v + b in sign-magnitude: |a| |v| + c with the signed carry c = +-|b|;
    # |a v| > |b|, so the sign is nsign and the final carry is not negative.
    carry = abs(b) if (b >= 0) == (nsign > 0) else -abs(b)
    if d2:
        # multiply-add and halve in one pass (low limb first, one limb behind)
        t = L[0] * aa + carry
        prev = t & _MASK
        carry = t >> 32
        for k in range(1, n):
            t = L[k] * aa + carry
            low = t & _MASK
            carry = t >> 32
            L[k - 1] = (prev >> 1) | ((low & 1) << 31)
            prev = low
        k = n
        while carry != 0:
            low = carry & _MASK
            carry >>= 32
            L[k - 1] = (prev >> 1) | ((low & 1) << 31)
            prev = low
            k += 1
        L[k - 1] = prev >> 1
        n = k
    else:
        for k in range(n):
            t = L[k] * aa + carry
            L[k] = t & _MASK
            carry = t >> 32
        while carry != 0:
            L[n] = carry & _MASK
            carry >>= 32
            n += 1
        while n > 1 and L[n - 1] == 0:
            n -= 1
        rem = 0
        for k in range(n - 1, -1, -1):
            cur = (rem << 32) | L[k]
            qk = cur // d
            L[k] = qk
            rem = cur - qk * d
    while n > 1 and L[n - 1] == 0:
        n -= 1
    return r, n, nsign


@njit(cache=True, nogil=True)
def _fits(L, n):
    """Whether the magnitude ``L[0:n]`` is below 2^63."""
    return n == 1 or (n == 2 and L[1] < _TOP_SMALL)


@njit(cache=True, nogil=True)
def _value(L, n, sign):
    v = L[0]
    if n == 2:
        v = v | (L[1] << 32)
    return sign * v


@njit(cache=True, nogil=True)
def _load(L, v):
    """Put ``|v|`` (an int64) in L; returns ``(n, sign)``."""
    av = abs(v)
    L[0] = av & _MASK
    L[1] = av >> 32
    return (2 if L[1] != 0 else 1), (1 if v > 0 else -1)


@njit(cache=True, nogil=True)
def _modp(x):
    """``x mod (2^31 - 1)`` for ``0 <= x < 2^63`` (Mersenne folding)."""
    x = (x & _HASH_P) + (x >> 31)
    x = (x & _HASH_P) + (x >> 31)
    if x >= _HASH_P:
        x -= _HASH_P
    return x


@njit(cache=True, nogil=True)
def _adv(st, L, d2, d, ma, mb, vmax):
    """One exact step of the value held in (st, L); returns the residue used."""
    if st[0] == 0:
        v = st[1]
        if d2:
            r = v & 1
        else:
            r = v % d
        if abs(v) <= vmax[r]:
            if d2:
                st[1] = (ma[r] * v + mb[r]) >> 1
            else:
                st[1] = (ma[r] * v + mb[r]) // d
            return r
        n, sign = _load(L, v)
    else:
        sign = st[1]
        n = st[2]
    r, n, sign = _big_step(L, n, sign, d2, d, ma, mb)
    if _fits(L, n):
        st[0] = 0
        st[1] = _value(L, n, sign)
        st[2] = 0
    else:
        st[0] = 1
        st[1] = sign
        st[2] = n
    return r


@njit(cache=True, nogil=True)
def _same(st1, L1, st2, L2):
    if st1[0] != st2[0] or st1[1] != st2[1]:
        return False
    if st1[0] == 0:
        return True
    n = st1[2]
    if n != st2[2]:
        return False
    for k in range(n):
        if L1[k] != L2[k]:
            return False
    return True


@njit(cache=True, nogil=True)
def _copy(dst_st, dst_L, src_st, src_L):
    dst_st[0] = src_st[0]
    dst_st[1] = src_st[1]
    dst_st[2] = src_st[2]
    if src_st[0] == 1:
        for k in range(src_st[2]):
            dst_L[k] = src_L[k]


@njit(cache=True, nogil=True)
def _set_small(st, v):
    st[0] = 0
    st[1] = v
    st[2] = 0


@njit(cache=True, nogil=True)
def _brent(s, cap, d2, d, ma, mb, vmax, st, L, st2, L2):
    """Exact ``mu + lam`` of the orbit of ``s`` if it is at most ``cap``, else -1 (budget 3 cap)."""
    budget = 3 * cap + 3
    _set_small(st2, s)  # tortoise
    _set_small(st, s)  # hare
    _adv(st, L, d2, d, ma, mb, vmax)
    power = 1
    lam = 1
    steps = 1
    while not _same(st, L, st2, L2):
        if power == lam:
            _copy(st2, L2, st, L)
            power *= 2
            lam = 0
        _adv(st, L, d2, d, ma, mb, vmax)
        lam += 1
        steps += 1
        if steps > budget:
            return -1, 0
    if lam > cap:
        return -1, 0
    _set_small(st2, s)
    _set_small(st, s)
    for _ in range(lam):
        _adv(st, L, d2, d, ma, mb, vmax)
    mu = 0
    while not _same(st, L, st2, L2):
        _adv(st, L, d2, d, ma, mb, vmax)
        _adv(st2, L2, d2, d, ma, mb, vmax)
        mu += 1
        if mu + lam > cap:
            return -1, 0
    return mu, lam


@njit(cache=True, nogil=True)
def _big_jump(L, n, sign, d2, d, J, dJ, jA, jC):
    """``J`` exact steps at once of ``sign * L[0:n]`` by its residue class mod ``d^J``.

    ``T^J(q d^J + r) = A_J(r) q + T^J(r)`` for every integer ``q`` (the lemma of
    :mod:`cycles.sieve`). Returns ``(r, n, sign)``; ``r`` is ``v mod d^J``.
    """
    if d2:
        R = L[0] & (dJ - 1)
        for k in range(n - 1):
            L[k] = (L[k] >> J) | ((L[k + 1] << (32 - J)) & _MASK)
        L[n - 1] = L[n - 1] >> J
    else:
        rem = 0
        for k in range(n - 1, -1, -1):
            cur = (rem << 32) | L[k]
            qk = cur // dJ
            L[k] = qk
            rem = cur - qk * dJ
        R = rem
    while n > 1 and L[n - 1] == 0:
        n -= 1
    # v = q d^J + r with 0 <= r < d^J: for v = -M = -(Q d^J + R), q = -(Q + 1), r = d^J - R
    r = R
    if sign < 0 and R != 0:
        r = dJ - R
        k = 0
        carry = 1
        while carry != 0:
            if k == n:
                L[n] = 0
                n += 1
            t = L[k] + carry
            L[k] = t & _MASK
            carry = t >> 32
            k += 1
    a = jA[r]
    c = jC[r]
    aa = abs(a)
    nsign = sign if a > 0 else -sign
    carry = abs(c) if (c >= 0) == (nsign > 0) else -abs(c)
    for k in range(n):
        t = L[k] * aa + carry
        L[k] = t & _MASK
        carry = t >> 32
    while carry != 0:
        L[n] = carry & _MASK
        carry >>= 32
        n += 1
    while n > 1 and L[n - 1] == 0:
        n -= 1
    return r, n, nsign


@njit(cache=True, nogil=True)
def _resolve_one(
    s, cap, tie, d2, d, ma, mb, vmax, ha, hb, dinv, jt, jA, jC, jHA, jHB, jDI, hist, L, st, st2, L2
):
    """Exact outcome of start ``s``: ``(code, steps, escaped)``.

    ``steps`` is the first-return length for CYCLE, ``mu + lam`` for OTHER.
    ``escaped`` says whether the orbit passed 2^63 in absolute value.
    ``jt = (J, d^J, n, top)``: a big value of at least ``2^(64 + J ceil(log2 d))``
    (``n`` limbs with top limb ``>= top``, or more limbs) takes ``J`` steps at
    once (every value in between stays above 2^63, so no event can be
    skipped); the residues mod p of the skipped values come from ``jHA, jHB, jDI``.
    """
    J = jt[0]
    dJ = jt[1]
    nmin = jt[2]
    topmin = jt[3]
    v = s
    big = False
    n = 0
    sign = 1
    h = _modp(s)
    hist[0] = h
    escaped = False
    i = 0
    while i < cap:
        if big and J > 0 and i + J <= cap and (n > nmin or (n == nmin and L[n - 1] >= topmin)):
            r, n, sign = _big_jump(L, n, sign, d2, d, J, dJ, jA, jC)
            base = r * J
            h0 = h
            for j in range(J):
                h = _modp(_modp(jHA[base + j] * h0 + jHB[base + j]) * jDI[j + 1])
                hist[i + 1 + j] = h
            i += J
            continue
        i += 1
        if big:
            r, n, sign = _big_step(L, n, sign, d2, d, ma, mb)
            if _fits(L, n):
                v = _value(L, n, sign)
                big = False
        else:
            if d2:
                r = v & 1
            else:
                r = v % d
            if abs(v) <= vmax[r]:
                if d2:
                    v = (ma[r] * v + mb[r]) >> 1
                else:
                    v = (ma[r] * v + mb[r]) // d
            else:
                n, sign = _load(L, v)
                r, n, sign = _big_step(L, n, sign, d2, d, ma, mb)
                if _fits(L, n):
                    v = _value(L, n, sign)
                else:
                    big = True
                    escaped = True
        h = _modp(_modp(ha[r] * h + hb[r]) * dinv)
        if not big:
            if abs(v) <= s:
                if v == s:
                    return CYCLE, i, escaped
                if v != -s or tie:
                    return DROP, i, escaped
        hist[i] = h
    # v_C is a new value unless its residue mod p was seen before.
    for i in range(cap):
        if hist[i] == h:
            mu, lam = _brent(s, cap, d2, d, ma, mb, vmax, st, L, st2, L2)
            if mu < 0:
                return OPEN, 0, escaped
            if mu == 0:  # pragma: no cover - the first pass sees every return
                return CYCLE, lam, escaped
            return OTHER, mu + lam, escaped
    return OPEN, 0, escaped


@njit(cache=True, nogil=True)
def _resolve_many(
    starts,
    cap,
    tie,
    d2,
    d,
    ma,
    mb,
    vmax,
    ha,
    hb,
    dinv,
    jt,
    jA,
    jC,
    jHA,
    jHB,
    jDI,
    nlimbs,
    out_code,
    out_len,
    out_esc,
):
    hist = np.empty(cap + 1, np.int64)
    st = np.zeros(3, np.int64)
    st2 = np.zeros(3, np.int64)
    L = np.zeros(nlimbs, np.int64)
    L2 = np.zeros(nlimbs, np.int64)
    for k in range(starts.shape[0]):
        code, steps, esc = _resolve_one(
            starts[k],
            cap,
            tie,
            d2,
            d,
            ma,
            mb,
            vmax,
            ha,
            hb,
            dinv,
            jt,
            jA,
            jC,
            jHA,
            jHB,
            jDI,
            hist,
            L,
            st,
            st2,
            L2,
        )
        out_code[k] = code
        out_len[k] = steps
        out_esc[k] = esc


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

        >>> import maps
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
                a, b = branches[v % d]
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
        z = np.zeros(1, np.int64)
        return (np.zeros(4, np.int64), z, z, z, z, z)
    J, dJ, rows = best
    T = 64 + J * (d - 1).bit_length()  # (d - 1).bit_length() = ceil(log2 d)
    nmin, topmin = T // 32 + 1, 1 << (T % 32)
    jA = np.array([A for A, _, _ in rows], dtype=np.int64)
    jC = np.array([c for _, c, _ in rows], dtype=np.int64)
    jHA = np.array([A % _HASH_P for _, _, st in rows for A, _ in st], dtype=np.int64)
    jHB = np.array([B % _HASH_P for _, _, st in rows for _, B in st], dtype=np.int64)
    jDI = np.array([pow(dinv, j, _HASH_P) for j in range(J + 1)], dtype=np.int64)
    return (np.array([J, dJ, nmin, topmin], dtype=np.int64), jA, jC, jHA, jHB, jDI)


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
    >>> import maps
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
        (:func:`cycles.sieve.sieve_levels`), each start uses the deepest one
        that applies, and starts below the shallowest are iterated one by one.

    Returns
    -------
    RangeOutcome

    Examples
    --------
    >>> import maps
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
    import maps

    km = KernelMap.from_map(maps.get("3x+1"))
    classify_range(km, 1, 50, 100, True)
    if hard:
        classify_starts(km, [2**62 + 1], 20, True)
