"""The exact continuation of the scan (numba): multi-limb integers and Brent's method.

A start the fast pass could not decide is followed here without losing a
bit: values switch between int64 and a sign-magnitude multi-limb integer
(32-bit limbs in int64 words). The exactness argument is in
:mod:`cyclewright.cycles.scan.kernel`.

References
----------
.. [1] R. P. Brent, "An improved Monte Carlo factorization algorithm",
   BIT 20 (1980) 176-184.
"""

from __future__ import annotations

import numpy as np
from numba import njit

from .codes import _HASH_P, _MASK, _TOP_SMALL, CYCLE, DROP, OPEN, OTHER

__all__ = []


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
    :mod:`cyclewright.cycles.scan.sieve`). Returns ``(r, n, sign)``; ``r`` is ``v mod d^J``.
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
    # Room for the largest value the cap allows (tens of MB at K = 10^7), but left
    # unwritten: every routine writes a limb before reading it (L[0:n] and the
    # limb a carry adds), so only the pages a value really reaches are touched.
    L = np.empty(nlimbs, np.int64)
    L2 = np.empty(nlimbs, np.int64)
    for k in range(starts.shape[0]):
        # the call mirrors _resolve_one's flat parameters (compiled: scalars and arrays only)
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
