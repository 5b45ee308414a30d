"""The fast int64 pass of the scan (numba): residue sieve, K-step jumps, four-orbit lanes.

Every start it cannot decide in int64 is handed to the exact continuation
(:mod:`cyclewright.cycles.scan.limbs`) as *hard*; see
:mod:`cyclewright.cycles.scan.kernel` for what each outcome means.
"""

from __future__ import annotations

import numpy as np
from numba import njit

from .codes import _HARD, CYCLE, DROP

__all__ = []


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
            # The argument list mirrors _lanes2's parameters (no logic is repeated): the
            # compiled kernels take flat scalars and arrays, one numba signature each.
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
                # No event in steps 1..K-1 (cyclewright.cycles.scan.sieve proves it); land on T^K(s).
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
