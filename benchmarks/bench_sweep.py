"""Benchmark: ``sweep`` of 3x+1 along the critical line, against plain implementations.

Run from the repository root::

    .venv/bin/python benchmarks/bench_sweep.py            # full (about a minute)
    .venv/bin/python benchmarks/bench_sweep.py --quick    # plain sweep on x <= 400 only

What is compared (both sides measured in the same run, same machine):

1. **Sweep, closed forms.** ``cycles.sweep(3x+1, x = 1..X)`` (default X = 2000,
   enumeration limit 10^4 as in the CLI) against a *plain sweep* computing a
   subset of the same exact columns the textbook way: necklace and Lyndon
   counts by the Burnside / Möbius sums with ``math.comb`` and trial-division
   phi / mu, ``D = 2^k - 3^x``, and the exact integer bound on the cycle
   minimum by bisection of ``2^k m^x <= (3m + 1)^x`` on ``[0, 2^64]`` (no
   float starting point). The plain sweep does *less* work per row than ours
   (no certified intervals, no linear-forms bounds, no enumeration), so the
   ratio understates our advantage on equal work.
2. **Enumeration.** ``cycles.count(3x+1, k, x)`` (fixed-content necklace
   generation with the composite numerator carried along the tree) against
   *enumerate-and-solve*: every one of the ``C(k, x)`` words, deduplicated by
   least rotation, each solved from scratch with ``cycles.solve``, cycle-minimum
   numerators taken from the solved elements. Both produce the same smallest
   and largest cycle-minimum numerators, candidates and integer cycles
   (asserted).

The figures quoted in docs/counting.md come from this script.
"""

from __future__ import annotations

import argparse
import itertools
import math
import platform
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from cyclewright import maps  # noqa: E402
from cyclewright.cycles.counting import count  # noqa: E402
from cyclewright.cycles.itinerary import least_rotation  # noqa: E402
from cyclewright.cycles.solver import solve  # noqa: E402
from cyclewright.cycles.sweep import sweep  # noqa: E402


# ----------------------------------------------------------------- plain code
def _phi(n: int) -> int:
    result, m, p = n, n, 2
    while p * p <= m:
        if m % p == 0:
            while m % p == 0:
                m //= p
            result -= result // p
        p += 1
    if m > 1:
        result -= result // m
    return result


def _mu(n: int) -> int:
    m, p, sign = n, 2, 1
    while p * p <= m:
        if m % p == 0:
            m //= p
            if m % p == 0:
                return 0
            sign = -sign
        p += 1
    if m > 1:
        sign = -sign
    return sign


def plain_row(k: int, x: int) -> tuple[int, int, int, int]:
    g = math.gcd(k, x)
    divs = [j for j in range(1, g + 1) if g % j == 0]
    neck = sum(_phi(j) * math.comb(k // j, x // j) for j in divs) // k
    lyn = sum(_mu(j) * math.comb(k // j, x // j) for j in divs) // k
    D = 2**k - 3**x
    lo, hi = 0, 2**64  # allowed(lo) (or lo = 0), not allowed(hi)
    while hi - lo > 1:
        mid = (lo + hi) // 2
        if 2**k * mid**x <= (3 * mid + 1) ** x:
            lo = mid
        else:
            hi = mid
    return neck, lyn, D, lo


def plain_sweep(xs) -> list[tuple[int, int, int, int, int]]:
    out = []
    for x in xs:
        k = (3**x).bit_length()  # smallest k with 2^k > 3^x
        out.append((x, k, *plain_row(k, x)))
    return out


def plain_enumerate(m, k: int, x: int):
    reps = set()
    for ones in itertools.combinations(range(k), x):
        w = [0] * k
        for i in ones:
            w[i] = 1
        reps.add(least_rotation(tuple(w)))
    D = 2**k - 3**x
    mins = []
    integral = []
    for w in reps:
        rc = solve(m, w)
        nums = [abs(int(e * D)) for e in rc.elements]
        mins.append(min(nums))
        if rc.integral:
            integral.append(int(rc.minimum))
    return len(reps), min(mins), max(mins), max(mins) // abs(D), sorted(integral)


# ---------------------------------------------------------------- measuring
def clear_caches() -> None:
    """Empty every memo table of the counting code, so that each run starts cold."""
    import cyclewright.cycles.bounds as b

    import cyclewright.cycles.necklaces as n

    for fn in (
        b._log_form,
        b._setup_cached,
        b._linear_form_bound,
        b._factor,
        n._burnside,
        n._divisor_weights,
    ):
        fn.cache_clear()


def best_of(fn, repeat: int):
    best = math.inf
    result = None
    for _ in range(repeat):
        clear_caches()
        t0 = time.perf_counter()
        result = fn()
        best = min(best, time.perf_counter() - t0)
    return best, result


def main(argv=None) -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--max-x", type=int, default=2000)
    ap.add_argument("--quick", action="store_true", help="plain sweep on x <= 400 only")
    ap.add_argument("--repeat", type=int, default=3)
    args = ap.parse_args(argv)
    m = maps.get("3x+1")
    print(
        f"python {platform.python_version()} on {platform.machine()}, {platform.processor() or '?'}"
    )

    t0 = time.perf_counter()
    import sympy  # noqa: F401  (one-time import cost, reported separately)

    print(f"one-time sympy import: {time.perf_counter() - t0:.2f} s")
    sweep(m, range(1, 20))  # warm caches of imports

    X = args.max_x
    t_ours, s = best_of(lambda: sweep(m, range(1, X + 1)), args.repeat)
    print(
        f"\n[1] sweep 3x+1, x = 1..{X} ({len(s)} rows, enumeration limit {s.limit}): "
        f"{t_ours:.2f} s (best of {args.repeat}, caches emptied before each run)"
    )
    print(
        f"    fitted rate {s.fitted_rate:.6f}, corrected {s.fitted_rate_corrected:.6f}, "
        f"rho {s.rho:.6f}; crossover x = {s.crossover_x}, with linear forms x = "
        f"{s.crossover_x_linear_forms}"
    )
    PX = min(X, 400) if args.quick else X
    t_ours_px, s_px = best_of(lambda: sweep(m, range(1, PX + 1)), 1) if PX != X else (t_ours, s)
    t_plain, plain = best_of(lambda: plain_sweep(range(1, PX + 1)), 1)
    for row, (x, k, neck, lyn, D, M) in zip(s_px.rows, plain):
        assert (row.odd, row.length, row.necklaces, row.primitive_necklaces) == (x, k, neck, lyn)
        assert row.denominator == D and row.min_bound.integer == M
    print(
        f"    plain sweep (Burnside with math.comb, trial-division phi/mu, bisection bound), "
        f"x = 1..{PX}: {t_plain:.2f} s vs ours {t_ours_px:.2f} s -> ratio {t_plain / t_ours_px:.1f}x "
        "(plain computes fewer columns)"
    )

    print("\n[2] enumeration of one type: count() vs enumerate-and-solve (same figures asserted)")
    for k, x in [(16, 10), (19, 12), (21, 13)]:
        t_c, tc = best_of(lambda k=k, x=x: count(m, k, x), args.repeat)
        t_p, pl = best_of(lambda k=k, x=x: plain_enumerate(m, k, x), 1)
        n, lo, hi, cand, ints = pl
        assert (tc.necklaces, tc.smallest_min_numerator, tc.largest_min_numerator) == (n, lo, hi)
        assert tc.candidates == cand and sorted(c.minimum for c in tc.integer_cycles) == ints
        print(
            f"    k={k}, x={x}: {n} necklaces ({math.comb(k, x)} words): count {t_c:.3f} s, "
            f"enumerate-and-solve {t_p:.2f} s -> ratio {t_p / t_c:.0f}x"
        )
    for k, x in [(27, 17)]:
        t_c, tc = best_of(lambda k=k, x=x: count(m, k, x), 1)
        print(
            f"    k={k}, x={x}: {tc.necklaces} necklaces, count {t_c:.2f} s "
            f"({t_c / tc.necklaces * 1e6:.1f} us per necklace; plain not run: {math.comb(k, x)} solves)"
        )


if __name__ == "__main__":
    main()
