"""Types along the critical line: how necklace counts and candidate bounds grow.

Inside
------
- :func:`sweep` -- types along the critical line ``d^k ≈ A`` for a range of
  ``x`` to :class:`Sweep`: one row per type, the fitted growth rate of the
  necklace counts against the theoretical ``ρ``, and the smallest ``x`` from
  which the proved candidate bound stays below the necklace count.
- :func:`critical_lengths` -- the lengths a sweep uses for one ``x``.
- :func:`rho` -- the theoretical growth rate ``ρ = 2^(t H(1/t))``, ``t = log2 a``.

References
----------
.. [1] J. C. Lagarias, "The 3x+1 problem and its generalizations", Amer.
   Math. Monthly 92 (1985) 3-23 (the heuristic count of cycles).
"""

from __future__ import annotations

import itertools
import math
import time
from collections.abc import Iterable, Sequence
from dataclasses import dataclass

from cyclewright.maps import Map, as_map

from .counting import (
    DEFAULT_SWEEP_LIMIT,
    TypeCount,
    _check_limit,
    _count_content,
)
from .errors import InputError
from .labels import CERTIFIED, EXACT, HEURISTIC, PROVED, ROUNDED
from .limits import (
    MAX_EXTRA_LENGTHS,
    MAX_SWEEP_SECONDS,
    MAX_TYPE_LENGTH,
    check_members,
    check_range,
    check_type_length,
    limits_lifted,
)
from .presentation import Presentable, Table, duration_text
from .progress import ProgressCallback, report
from .sides import DEFAULT_SIDE, PerSide, Side, on_sides, parse_side

__all__ = [
    "rho",
    "rho_exact",
    "critical_lengths",
    "Sweep",
    "sweep",
    "DEFAULT_ODD",
]

#: The odd steps ``x`` a sweep covers by default (study files read it too).
DEFAULT_ODD = range(1, 101)


# ------------------------------------------------------------------ sweep
def rho_exact(m: Map | str) -> str | None:
    """The exact form of :func:`rho` and what it assumes (None where :func:`rho` is None).

    >>> from cyclewright import maps
    >>> rho_exact(maps.get("3x+1"))
    't^t / (t-1)^(t-1), t = log_2 3'
    >>> rho_exact(maps.get("3x+1-undivided"))
    't^t / (t-1)^(t-1), t = log_2 6 (assumes every itinerary is realized, which fails: 6 shares a factor with 2)'
    """
    m = as_map(m)
    if rho(m) is None:
        return None
    a = m.branches[1].multiplier
    text = f"t^t / (t-1)^(t-1), t = log_2 {a}"
    if a % 2 == 0:
        text += f" (assumes every itinerary is realized, which fails: {a} shares a factor with 2)"
    return text


def rho(m: Map | str) -> float | None:
    """The theoretical growth rate of necklaces along the critical line (a float).

    For a two-branch map with residue-0 branch ``n/2`` and multiplier ``a > 2``:
    the critical line is ``k ≈ t x`` with ``t = log2 a`` and
    ``C(k, x) ≈ ρ^x`` with ``ρ = 2^(t H(1/t))``, ``H`` the binary entropy in
    bits (Stirling). None for other maps.

    >>> from cyclewright import maps
    >>> round(rho(maps.get("3x+1")), 6)   # equals t^t / (t-1)^(t-1)
    2.839514
    """
    m = as_map(m)
    if m.divisor != 2 or tuple(m.branches[0]) != (1, 0):
        return None
    a = m.branches[1].multiplier
    if a <= 2:
        return None
    t = math.log2(a)
    p = 1 / t
    H = -p * math.log2(p) - (1 - p) * math.log2(1 - p)
    return 2 ** (t * H)


def _offset_sign(m: Map) -> int:
    signs = {b > 0 for b in m.offsets if b}
    if signs == {True}:
        return 1
    if signs == {False}:
        return -1
    return 0


def _boundary_length(d: int, a0: int, x: int, P: int) -> int:
    """Smallest k >= max(x, 1) with d^k > a0^(k-x) P (0 < a0 < d)."""
    k = max(x, 1)
    # float estimate of the crossing, then exact correction
    if P > 0:
        est = (math.log(P) - x * math.log(a0)) / (math.log(d) - math.log(a0))
        k = max(k, int(math.floor(est)) - 1)
    while d**k <= a0 ** (k - x) * P:
        k += 1
    while k - 1 >= max(x, 1) and d ** (k - 1) > a0 ** (k - 1 - x) * P:
        k -= 1
    return k


def critical_lengths(
    m: Map | str, content_rest: Sequence[int], extra_lengths: int = 0, side: str = "positive"
) -> list[int]:
    """The lengths a sweep uses for one content of the non-zero residues.

    ``content_rest`` = ``(c_1, ..., c_{d-1})`` (for two-branch maps ``(x,)``).
    On the side whose cycles need ``D > 0`` (positive side when the offsets
    the content uses are ``>= 0``, negative side when they are ``<= 0``): the
    smallest ``k`` with ``d^k > A`` and the next ``extra_lengths``; on the
    other side the largest ``k`` with ``d^k < A`` and the ``extra_lengths``
    below it (never below ``x``). Contents whose offsets have mixed signs
    (no bound applies) follow the map's overall offset sign, or ``D > 0`` on
    the positive side when that is mixed too.

    >>> from cyclewright import maps
    >>> critical_lengths(maps.get("3x+1"), (8,), 2)
    [13, 14, 15]
    >>> critical_lengths(maps.get("3x+1"), (7,), 1, side="negative")
    [11, 10]
    """
    m = as_map(m)
    d = m.divisor
    a0 = m.branches[0].multiplier
    if not 0 < a0 < d:
        raise InputError(
            f"a sweep follows the critical line d^k ≈ A, which needs 0 < a_0 < d; this map has a_0 = {a0}"
        )
    if any(a <= 0 for a in m.multipliers):
        raise InputError("a sweep needs positive multipliers (the critical line d^k ≈ A)")
    parse_side(side, allow_both=False)
    x = sum(content_rest)
    P = 1
    for (a, _b), cr in zip(m.branches[1:], content_rest):
        P *= a**cr
    kb = _boundary_length(d, a0, x, P)
    # The sign of the offsets this content uses (residue 0 is used whenever k > x).
    used = [m.branches[0].offset] + [b for (_a, b), cr in zip(m.branches[1:], content_rest) if cr]
    signs = {b > 0 for b in used if b}
    sgn = (1 if signs == {True} else -1) if len(signs) == 1 else (_offset_sign(m) or 1)
    need_positive_D = (sgn > 0) == (side == "positive")
    if need_positive_D:
        return [kb + j for j in range(extra_lengths + 1)]
    out = []
    for j in range(extra_lengths + 1):
        kk = kb - 1 - j
        if kk < max(x, 1):
            break
        out.append(kk)
    return out


def _contents_rest(d: int, x: int):
    if d == 2:
        yield (x,)
        return

    # every way to write x as d - 1 counts, the first count falling from x to 0 (descending
    # lexicographic order); iterative, so a divisor of 1000 is no deeper than one of 3
    parts = d - 1
    comp = [x] + [0] * (parts - 1)
    while True:
        yield tuple(comp)
        i = parts - 2
        while i >= 0 and comp[i] == 0:
            i -= 1
        if i < 0:
            return
        comp[i] -= 1
        comp[i + 1] = sum(comp[i + 1 :]) + 1
        for j in range(i + 2, parts):
            comp[j] = 0


@dataclass
class Sweep(Presentable):
    """Counting figures along the critical line, one row (:class:`TypeCount`) per type.

    Attributes
    ----------
    map : Map
    side : str
    odd : tuple of (int, int)
        The range of ``x`` (steps off residue 0; odd steps for two-branch maps).
    extra_lengths : int
    rows : list of TypeCount
    rho : float or None
        Theoretical growth rate (float).
    fitted_rate : float or None
        ``exp(slope)`` of a least-squares fit of ``ln(necklaces)`` against
        ``x`` over the upper half of the range, on the first length of each
        ``x`` (heuristic; a float).
    fitted_rate_corrected : float or None
        The same fit of ``ln(necklaces) + (3/2) ln x``, removing the
        polynomial factor ``x^(-3/2)`` of ``C(k, x) / k`` (Stirling); it
        approaches ``rho`` much faster (heuristic; a float).
    fit_range : tuple or None
    crossover_x : int or None
        Smallest ``x`` from which, for every row of the sweep, the proved bound
        on ``|minimum|`` (hence on the candidates) is below the necklace count.
    crossover_x_linear_forms : int or None
        The same with the bound obtained from the linear-forms lower bound of
        ``|Λ|`` alone.
    elapsed : float
        Seconds.
    limit : int
    """

    map: Map
    side: str
    odd: tuple[int, int]
    extra_lengths: int
    rows: list[TypeCount]
    rho: float | None
    fitted_rate: float | None
    fitted_rate_corrected: float | None
    fit_range: tuple[int, int] | None
    crossover_x: int | None
    crossover_x_linear_forms: int | None
    elapsed: float
    limit: int

    LABELS = {
        "words": EXACT.value,
        "necklaces": EXACT.value,
        "primitive_necklaces": EXACT.value,
        "denominator": EXACT.value,
        "min_bound": PROVED.value,
        "min_bound_interval": PROVED.value,
        # per row, candidates_label says exact (enumerated) or proved (the bound)
        "candidates": PROVED.value,
        "candidates_linear_forms": PROVED.value,
        "smallest_min_numerator": EXACT.value,
        "largest_min_numerator": EXACT.value,
        "integer_cycles": EXACT.value,
        "heuristic": HEURISTIC.value,
        "heuristic_log10": HEURISTIC.value,
        "lambda": CERTIFIED.value,
        # best approximations of the continued fraction, in interval arithmetic (every
        # type whose published bound applies has two independent bases, so has this one)
        "lambda_lower": CERTIFIED.value,
        "rho": ROUNDED.value,
        "rho_exact": EXACT.value,
        "fitted_rate": HEURISTIC.value,
        "fitted_rate_corrected": HEURISTIC.value,
        "crossover_x": PROVED.value,
        "crossover_x_linear_forms": PROVED.value,
    }

    def __len__(self) -> int:
        return len(self.rows)

    def __iter__(self):
        return iter(self.rows)

    @property
    def columns(self) -> list[str]:
        return list(self.rows[0].row()) if self.rows else []

    def to_dicts(self) -> list[dict]:
        """The rows as a list of flat dicts."""
        return [r.row() for r in self.rows]

    def to_pandas(self):
        """The rows as a pandas DataFrame (needs pandas, which is not a dependency)."""
        try:
            import pandas as pd
        except ImportError:
            raise ImportError(
                "to_pandas() needs pandas, which cyclewright does not install; use to_dicts()"
            ) from None
        return pd.DataFrame(self.to_dicts())

    def summary(self) -> dict:
        return {
            "map": self.map.label,
            "map_key": self.map.key,
            "side": self.side,
            "odd": list(self.odd),
            "extra_lengths": self.extra_lengths,
            "limit": self.limit,
            "rows": len(self.rows),
            "rho": self.rho,
            "rho_exact": rho_exact(self.map),
            "fitted_rate": self.fitted_rate,
            "fitted_rate_corrected": self.fitted_rate_corrected,
            "fit_range": list(self.fit_range) if self.fit_range else None,
            "crossover_x": self.crossover_x,
            "crossover_x_linear_forms": self.crossover_x_linear_forms,
            "integer_cycles_found": sum(len(r.integer_cycles or ()) for r in self.rows),
            "elapsed_seconds": round(self.elapsed, 4),
        }

    def table(self) -> Table:
        """One row per type (x, k, content and the type's figures, labelled)."""
        # the linear-forms column is left to the JSON rows: along a long sweep
        # its bound runs to thousands of digits
        keep = [c for c in TypeCount.table_columns() if c != "candidates from linear forms"]
        first = self.rows[0].table() if self.rows else None
        rows = tuple(
            (r.off_zero, r.length, r.content, *(rec[c] for c in keep))
            for r in self.rows
            for rec in r.table().records()
        )
        labels = {c: v for c, v in (first.labels if first else {}).items() if c in keep}
        return Table(
            f"{self.map.label}, {self.side} side: one row per type",
            ("x", "k", "content", *keep),
            rows,
            {"k": EXACT.value, **labels},
            first.note if first else "",
        )

    def summary_table(self) -> Table:
        """Growth of the necklaces and where the counting argument bites (one row)."""
        return Table(
            "Growth of necklaces and where the counting argument bites",
            (
                "rho (theory)",
                "fitted rate",
                "bound below necklaces from x",
                "linear forms from x",
                "integer cycles found (primitive)",
            ),
            (
                (
                    self.rho,
                    self.fitted_rate_corrected,
                    self.crossover_x,
                    self.crossover_x_linear_forms,
                    sum(len(r.primitive_integer_cycles or ()) for r in self.rows),
                ),
            ),
            {
                "rho (theory)": self.LABELS["rho"],
                "fitted rate": self.LABELS["fitted_rate_corrected"],
                "bound below necklaces from x": self.LABELS["crossover_x"],
                "linear forms from x": self.LABELS["crossover_x_linear_forms"],
                "integer cycles found (primitive)": self.LABELS["integer_cycles"],
            },
            "'bound below necklaces from x': from this x on, within the swept range, the "
            "proved candidate bound stays below the necklace count, so almost no itinerary "
            "of those types closes. 'linear forms from x': the same with a bound on |Λ| uniform "
            "in k: best approximations of the continued fraction (certified, no recalled "
            "constant) wherever Λ has two independent bases.",
        )

    def to_dict(self) -> dict:
        out = self.summary()
        out["labels"] = dict(self.LABELS)
        out["rows"] = self.to_dicts()
        return out

    def __repr__(self) -> str:
        lo, hi = self.odd
        r = f"{self.rho:.4f}" if self.rho else "-"
        f = f"{self.fitted_rate_corrected:.4f}" if self.fitted_rate_corrected else "-"
        return (
            f"Sweep({self.map.label}, {self.side} side, x={lo}..{hi}, {len(self.rows)} rows: "
            f"necklace growth {f} fitted (heuristic) vs rho {r}; candidate bound below the "
            f"necklaces from x={self.crossover_x} (proved), with linear forms only from "
            f"x={self.crossover_x_linear_forms}; {self.elapsed:.2f} s)"
        )


def sweep(
    m: Map | str,
    odd: Iterable[int] = DEFAULT_ODD,
    extra_lengths: int = 0,
    side: Side = DEFAULT_SIDE,
    *,
    limit: int = DEFAULT_SWEEP_LIMIT,
    progress: ProgressCallback | None = None,
) -> Sweep | PerSide[Sweep]:
    """Count every type along the critical line for a range of ``x``.

    For each ``x`` (odd steps; for ``d > 2``: steps off residue 0, with one row
    per content of the non-zero residues) the lengths come from
    :func:`critical_lengths`.

    Parameters
    ----------
    m : Map
    odd : iterable of int
        The values of ``x`` (each ``>= 0``).
    extra_lengths : int
        How many further lengths per ``x``.
    side : {"positive", "negative", "both"}
        With ``"both"``, one sweep per side.
    limit : int
        Enumerate a row's necklaces when there are at most this many
        (default ``10**4``, to keep sweeps interactive).
    progress : ProgressCallback, optional
        Called with a :class:`~cyclewright.cycles.progress.ProgressEvent`
        (phase ``"sweep"``, unit ``"types"``, the side as detail) after each row.

    Returns
    -------
    Sweep or PerSide of Sweep
        One :class:`Sweep`; for ``side="both"`` a
        :class:`~cyclewright.cycles.sides.PerSide` with one per side.

    Examples
    --------
    >>> from cyclewright import maps
    >>> s = sweep(maps.get("3x+1"), range(1, 41))
    >>> s.rows[7].type_text(), s.rows[7].necklaces, s.rows[7].candidates
    ('k=13, x=8', 99, 8)
    >>> s.crossover_x
    6
    >>> [len(s) for s in sweep("3x+1", range(1, 11), side="both")]
    [10, 10]

    References
    ----------
    Lagarias 1985 (the heuristic); Eliahou 1993 (the bound); see the module
    docstring.
    """
    m = as_map(m)
    if isinstance(odd, range):
        check_members(odd, "odd", MAX_TYPE_LENGTH)
    elif not limits_lifted():  # any iterable: never more than the limit taken in
        odd = list(itertools.islice(odd, MAX_TYPE_LENGTH + 1))
        if len(odd) > MAX_TYPE_LENGTH:
            raise InputError(
                f"odd has more than {MAX_TYPE_LENGTH} members; "
                f"at most {MAX_TYPE_LENGTH} are taken in one run",
                param="odd",
            )
    xs = sorted(set(int(v) for v in odd))
    if not xs:
        raise InputError("odd is empty: give at least one x", param="odd")
    check_range(xs[0], "odd", minimum=0, lead="the smallest value of ")
    check_type_length(xs[-1], "odd", minimum=0, lead="the largest value of ")
    check_range(extra_lengths, "extra_lengths", minimum=0, maximum=MAX_EXTRA_LENGTHS, liftable=True)
    parse_side(side)
    limit = _check_limit(limit)
    d = m.divisor
    n_rest = sum(math.comb(x + d - 2, d - 2) for x in xs)
    if n_rest * (extra_lengths + 1) > 2_000_000:
        raise InputError(
            f"this sweep would have about {n_rest * (extra_lengths + 1)} rows; narrow the range of x"
        )
    if not limits_lifted():
        _check_time(m, xs, extra_lengths, side, limit)
    return on_sides(side, lambda s: _sweep(m, xs, extra_lengths, s, limit, progress))


def _check_time(m: Map, xs: list[int], extra_lengths: int, side: str, limit: int) -> None:
    """Refuse a sweep whose estimated time is above :data:`MAX_SWEEP_SECONDS`, before it runs.

    The values of x are cut into at most 16 consecutive groups; the first and
    last x of each group have their first and last rows timed (building the
    rows' lengths too: for large x it costs as much as a row), and a group
    counts as its size times the mean of its two ends. Timing stops after a few
    seconds (the estimate then covers the groups timed so far).
    """
    d = m.divisor
    groups = min(len(xs), 16)
    bounds = [round(i * len(xs) / groups) for i in range(groups + 1)]
    sides = ["positive", "negative"] if side == "both" else [side]
    _count_content(m, (1, *next(_contents_rest(d, 1))), limit, None)  # warm caches, untimed
    cost: dict[int, float] = {}

    def per_x(x: int) -> float:
        if x not in cost:
            n_contents = math.comb(x + d - 2, d - 2) if d > 2 else 1
            total = 0.0
            for s in sides:
                per_content = []
                for rest in itertools.islice(_contents_rest(d, x), 2):
                    t0 = time.perf_counter()
                    lengths = critical_lengths(m, rest, extra_lengths, s)
                    t_lengths = time.perf_counter() - t0
                    picked = sorted({lengths[0], lengths[-1]}) if lengths else []
                    t0 = time.perf_counter()
                    for kk in picked:
                        _count_content(m, (kk - x, *rest), limit, None, side_hint=s)
                    t_rows = (time.perf_counter() - t0) / max(len(picked), 1)
                    per_content.append(t_lengths + t_rows * len(lengths))
                total += n_contents * sum(per_content) / len(per_content)
            cost[x] = total
        return cost[x]

    started = time.perf_counter()
    estimate, complete = 0.0, True
    for g in range(groups):
        first, last = xs[bounds[g]], xs[bounds[g + 1] - 1]
        estimate += (bounds[g + 1] - bounds[g]) * (per_x(first) + per_x(last)) / 2
        if time.perf_counter() - started > 5.0 and g < groups - 1:
            complete = False
            break
    if estimate > MAX_SWEEP_SECONDS:
        raise InputError(
            f"this sweep (x up to {xs[-1]}, {extra_lengths} extra lengths) would take about "
            f"{duration_text(estimate)}{'' if complete else ' or more'} here (estimated from "
            f"rows timed now); one sweep runs at most about {duration_text(MAX_SWEEP_SECONDS)}: "
            "narrow the range of x or split it"
        )


def _sweep(m: Map, xs: list[int], extra_lengths: int, side: str, limit: int, progress) -> Sweep:
    """The sweep of one side (arguments checked by :func:`sweep`)."""
    d = m.divisor
    t0 = time.perf_counter()
    plan: list[tuple[int, ...]] = []
    for x in xs:
        for rest in _contents_rest(d, x):
            for kk in critical_lengths(m, rest, extra_lengths, side):
                plan.append((kk - x, *rest))
    rows: list[TypeCount] = []
    for i, c in enumerate(plan):
        rows.append(_count_content(m, c, limit, None, side_hint=side))
        report(progress, "sweep", i + 1, len(plan), "types", side)
    elapsed = time.perf_counter() - t0
    fitted, fit_range = _fit_rate(rows, xs, 0.0)
    corrected, _ = _fit_rate(rows, xs, 1.5)
    cross = _crossover(rows, lambda r: r.candidates_bound)
    cross_lf = _crossover(rows, lambda r: r.candidates_linear_forms)
    return Sweep(
        map=m,
        side=side,
        odd=(xs[0], xs[-1]),
        extra_lengths=extra_lengths,
        rows=rows,
        rho=rho(m),
        fitted_rate=fitted,
        fitted_rate_corrected=corrected,
        fit_range=fit_range,
        crossover_x=cross,
        crossover_x_linear_forms=cross_lf,
        elapsed=elapsed,
        limit=limit,
    )


def _fit_rate(rows: list[TypeCount], xs: list[int], power: float):
    """Least-squares slope of ln(total necklaces at the first length) + power ln x against x (upper half)."""
    per_x: dict[int, int] = {}
    first_k: dict[tuple, int] = {}
    for r in rows:
        key = (r.off_zero, r.content[1:])
        if key not in first_k:
            first_k[key] = r.length
            per_x[r.off_zero] = per_x.get(r.off_zero, 0) + r.necklaces
    pts = sorted(
        (x, math.log(n) + power * math.log(x)) for x, n in per_x.items() if n > 0 and x > 0
    )
    if len(pts) < 3:
        return None, None
    mid = (pts[0][0] + pts[-1][0]) / 2
    upper = [p for p in pts if p[0] >= mid]
    if len(upper) < 3:
        upper = pts
    n = len(upper)
    sx = sum(p[0] for p in upper)
    sy = sum(p[1] for p in upper)
    sxx = sum(p[0] ** 2 for p in upper)
    sxy = sum(p[0] * p[1] for p in upper)
    den = n * sxx - sx * sx
    if den == 0:
        return None, None
    slope = (n * sxy - sx * sy) / den
    return math.exp(slope), (upper[0][0], upper[-1][0])


def _crossover(rows: list[TypeCount], bound_of) -> int | None:
    """Smallest x such that every row with x' >= x has bound < necklaces (None if the last fails)."""
    bad: dict[int, bool] = {}
    for r in rows:
        b = bound_of(r)
        fails = b is None or b >= r.necklaces
        bad[r.off_zero] = bad.get(r.off_zero, False) or fails
    answer = None
    for x in sorted(bad, reverse=True):
        if bad[x]:
            break
        answer = x
    return answer
