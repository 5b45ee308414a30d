"""The drift of a map: the mean change of ``ln |n|`` per step, exactly.

Inside
------
- :func:`residue_frequencies` -- how often, in the long run, a step goes
  through each residue, for a start drawn from the d-adic integers (Haar
  measure): the stationary distribution of the residue Markov chain.
- :func:`drift_exact` -- the drift as ``(1/L) ln Q`` with ``L`` an integer
  and ``Q`` a rational.

Why a Markov chain
------------------
For ``n`` uniform in the class ``s + N Z_d`` the image ``T(n)`` is uniform
in a class ``c + M Z_d`` (multiplication by ``a_r`` carries Haar measure
to Haar measure on its image), so the classes form a Markov chain. When every
multiplier is prime to ``d`` each step's residue is uniform and independent
of the past, and the drift is ``(1/d) sum ln(|a_r|/d)``. When a multiplier
shares a factor with ``d`` the residues are not uniform: for the undivided
3x+1 map (``n/2``, ``3n+1``) a step through residue 1 always lands in
residue 0, the frequencies are ``2/3, 1/3`` and the drift is
``(1/3) ln(3/4)``, not ``(1/2) ln(3/2)``.

The chain's states are the classes ``s mod N`` with ``N`` built from the
primes of ``d``; from a state, the class is refined to ``lcm(N, d)`` to
know the residue, and each refinement is carried to the class of its image.
The states reachable from the whole ring are explored (a cap keeps this
finite); with one closed class its stationary distribution is found exactly
(rational Gaussian elimination).

References
----------
.. [1] K. R. Matthews and A. M. Watts, "A generalization of Hasse's
   generalization of the Syracuse algorithm", Acta Arithmetica 43 (1984)
   167-175; "A Markov approach to the generalized Syracuse algorithm", Acta
   Arithmetica 45 (1985) 29-42 (the Markov chain of residues; from memory).
"""

from __future__ import annotations

import functools
import math
from fractions import Fraction
from types import SimpleNamespace

__all__ = ["residue_frequencies", "drift_exact", "MAX_STATES"]

#: Largest number of chain states explored before giving up (the uniform frequencies are then assumed).
MAX_STATES = 2_000


def _dpart(n: int, primes: tuple[int, ...]) -> int:
    """The part of ``n`` made of the primes of ``d``."""
    out = 1
    n = abs(n)
    for p in primes:
        while n % p == 0:
            n //= p
            out *= p
    return out


def _primes(d: int) -> tuple[int, ...]:
    out = []
    q = d
    p = 2
    while p * p <= q:
        if q % p == 0:
            out.append(p)
            while q % p == 0:
                q //= p
        p += 1
    if q > 1:
        out.append(q)
    return tuple(out)


def _steps(m, state):
    """``[(probability, residue, next state)]`` from the class ``state = (s, N)``."""
    s, N = state
    d = m.divisor
    N2 = N * d // math.gcd(N, d)
    primes = _primes(d)
    out = []
    for k in range(N2 // N):
        t = s + k * N
        r = t % d
        a, b = m.branches[r]
        c = (a * t + b) // d
        M = _dpart(a * N2 // d, primes)
        out.append((Fraction(N, N2), r, (c % M, M)))
    return out


def _solve_stationary(states: list, P: dict) -> dict | None:
    """The stationary distribution on one closed class (exact), by Gaussian elimination."""
    idx = {s: i for i, s in enumerate(states)}
    n = len(states)
    # pi (P - I) = 0, sum pi = 1: rows are equations over the unknowns pi_j
    rows = [[Fraction(0)] * (n + 1) for _ in range(n)]
    for i, s in enumerate(states):
        for t, p in P[s].items():
            rows[idx[t]][i] += p
        rows[i][i] -= 1
    rows[-1] = [Fraction(1)] * n + [Fraction(1)]
    for col in range(n):
        piv = next((r for r in range(col, n) if rows[r][col] != 0), None)
        if piv is None:
            return None
        rows[col], rows[piv] = rows[piv], rows[col]
        inv = 1 / rows[col][col]
        rows[col] = [v * inv for v in rows[col]]
        for r in range(n):
            if r != col and rows[r][col] != 0:
                f = rows[r][col]
                rows[r] = [a - f * b for a, b in zip(rows[r], rows[col])]
    return {s: rows[idx[s]][n] for s in states}


def residue_frequencies(m) -> tuple[Fraction, ...] | None:
    """Long-run share of steps through each residue (exact), or None when undecided.

    Parameters
    ----------
    m : Map

    Returns
    -------
    tuple of Fraction or None
        Uniform ``1/d`` when every multiplier is prime to ``d``; otherwise the
        stationary distribution of the residue chain, or None when the chain
        has more than :data:`MAX_STATES` states or several closed classes.

    Examples
    --------
    >>> from cyclewright.maps import Map
    >>> residue_frequencies(Map(2, [(1, 0), (3, 1)]))
    (Fraction(1, 2), Fraction(1, 2))
    >>> residue_frequencies(Map(2, [(1, 0), (6, 2)]))     # n/2, 3n+1
    (Fraction(2, 3), Fraction(1, 3))

    References
    ----------
    Matthews and Watts 1984, 1985 (module docstring).
    """
    return _frequencies(m.divisor, tuple((a, b) for a, b in m.branches))


@functools.lru_cache(maxsize=256)
def _frequencies(d: int, branches: tuple) -> tuple[Fraction, ...] | None:
    if all(math.gcd(a, d) == 1 for a, _b in branches):
        return tuple(Fraction(1, d) for _ in range(d))
    m = SimpleNamespace(divisor=d, branches=branches)
    start = (0, 1)
    P: dict = {}
    R: dict = {}
    todo = [start]
    while todo:
        s = todo.pop()
        if s in P:
            continue
        if len(P) >= MAX_STATES:
            return None
        P[s] = {}
        R[s] = [Fraction(0)] * d
        for p, r, t in _steps(m, s):
            P[s][t] = P[s].get(t, Fraction(0)) + p
            R[s][r] += p
            if t not in P:
                todo.append(t)
    # closed classes: states from which every reachable state reaches back
    reach = {}
    for s in P:
        seen = {s}
        stack = [s]
        while stack:
            u = stack.pop()
            for t in P[u]:
                if t not in seen:
                    seen.add(t)
                    stack.append(t)
        reach[s] = seen
    closed = []
    done: set = set()
    for s in P:
        if s in done:
            continue
        cls = {t for t in reach[s] if s in reach[t]}
        if all(reach[t] <= cls for t in cls):
            closed.append(sorted(cls))
        done |= cls
    if len(closed) != 1:
        return None
    pi = _solve_stationary(closed[0], P)
    if pi is None:
        return None
    freq = [Fraction(0)] * d
    for s, w in pi.items():
        for r in range(d):
            freq[r] += w * R[s][r]
    return tuple(freq)


def drift_exact(m) -> tuple[int, Fraction, bool]:
    """The drift as ``(L, Q, assumed)``: mean change of ``ln|n|`` per step ``= (1/L) ln Q``.

    ``assumed`` is True when the residue frequencies could not be decided and
    uniform ones were assumed.

    Examples
    --------
    >>> from cyclewright.maps import Map
    >>> drift_exact(Map(2, [(1, 0), (3, 1)]))
    (2, Fraction(3, 4), False)
    >>> drift_exact(Map(2, [(1, 0), (6, 2)]))          # undivided 3x+1: (1/3) ln(3/4)
    (3, Fraction(3, 4), False)
    """
    freq = residue_frequencies(m)
    assumed = freq is None
    if freq is None:
        freq = tuple(Fraction(1, m.divisor) for _ in range(m.divisor))
    L = 1
    for w in freq:
        L = L * w.denominator // math.gcd(L, w.denominator)
    Q = Fraction(1)
    for a, w in zip(m.multipliers, freq):
        e = int(w * L)
        Q *= Fraction(abs(a), m.divisor) ** e
    return L, Q, assumed
