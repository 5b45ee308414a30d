"""Records and step statistics over a range of starts, for any map.

Inside
------
- :func:`records` -- follow every start of ``[start, to]`` (positive starts,
  negative starts ``-to .. -start``, or both) to the minimum of the cycle it
  enters, and report: the record holders and their values for the steps to
  the cycle (*delay*), the stopping time (*glide*: first step below the
  start) and the largest value on the path (*peak*), each in the divided
  count and, for ``ax+b`` maps, the classic undivided count
  (``full = steps + odd steps``); the exact distributions of delays and
  glides (counts per value); basin sizes per cycle; the unresolved starts,
  counted and listed; the drift model's expectation for comparison
  (``heuristic``).
- :class:`RangeRecords`, :class:`SideRecords`, :class:`Record` -- the result.
- :func:`glide_model` -- the random-walk model's distribution of stopping
  times (heuristic).
- :func:`start_figures` -- the figures of one start, in plain exact Python
  (the definition the compiled walk is tested against).

Definitions
-----------
For a start ``s`` and ``v_i = T^i(s)``, with the step cap ``C`` (``max_steps``):

- *resolved*: the orbit enters a cycle of length at most ``C`` and first
  reaches the cycle's minimum (least ``|value|``, the negative one on a tie)
  at step ``delay <= C``. Other starts are *unresolved*: counted, listed,
  and left out of every record and distribution (a table over a range with
  unresolved starts says so).
- *delay*: that step (for 3x+1, the steps to reach 1; OEIS A006577 in the
  undivided count).
- *glide*: the least ``i >= 1`` with ``|v_i| < |s|``; starts whose orbit
  never gets below ``|s|`` (cycle minima, for one) have none.
- *peak*: the value of largest absolute value among ``v_0 .. v_delay`` (the
  first one on a tie, so that the two sides mirror each other).
- undivided (``ax+b`` maps): *full delay* = delay + odd steps among them,
  *full glide* likewise, *full peak* also over ``a v + b`` before each halving.
- a *record holder* is a resolved start whose value is larger than that of
  every resolved start of smaller absolute value in the range.

The walk is compiled (numba, :mod:`cyclewright.cycles.records_kernel`) with
int64 overflow checks; a start whose values would pass int64 continues in
exact Python integers, so every figure is exact at any size. Memory does not
grow with the range: a fixed table of small starts, histograms up to the cap,
a few record holders, the first unresolved starts.

References
----------
.. [1] R. Terras, "A stopping time problem on the positive integers",
   Acta Arithmetica 30 (1976) 241-252 (stopping time, its distribution).
.. [2] J. C. Lagarias, "The 3x+1 problem and its generalizations",
   American Mathematical Monthly 92 (1985) 3-23 (the drift heuristic).
.. [3] G. T. Leavens and M. Vermeulen, "3x+1 search programs", Computers and
   Mathematics with Applications 24 (1992) 79-99 (delay and path records).
"""

from __future__ import annotations

import functools
import itertools
import math
import time
from dataclasses import dataclass, field
from fractions import Fraction

import numpy as np

from cyclewright.maps import Map
from cyclewright.maps.registry import as_map

from .errors import InputError
from .labels import EXACT, HEURISTIC, HEURISTIC_CAUTION, ROUNDED
from .limits import (
    DEFAULT_MAX_STEPS,
    MAX_RECORDS_MINUTES,
    MAX_RECORDS_STEP_CAP,
    MAX_RECORDS_TO,
    check_range,
)
from .presentation import Presentable, Table
from .progress import ProgressCallback, report
from .sides import DEFAULT_SIDE, Side, parse_side, sides_of

__all__ = [
    "records",
    "RangeRecords",
    "SideRecords",
    "Record",
    "glide_model",
    "start_figures",
    "LISTED_UNRESOLVED",
    "KINDS",
    "RECORDS_STORE_ABOVE",
    "store_for_part",
]

#: How many unresolved starts a result lists per side (all are counted).
LISTED_UNRESOLVED = 1000

#: A records run made as part of a larger run (a comparison, a study) over fewer
#: starts than this keeps no records store unless one is asked for: it takes
#: seconds, so there is nothing worth resuming, and a file nobody asked for would
#: be left behind. The same rule as a family census's members
#: (:data:`cyclewright.cycles.census.FAMILY_STORE_ABOVE`, the same size).
RECORDS_STORE_ABOVE = 10**7


def store_for_part(store, starts: int, asked: bool | None = None):
    """The ``store`` argument of a records run inside a larger run (compare, a study).

    Parameters
    ----------
    store : path, None or False
        The store the larger run was given (None: none named, the default).
    starts : int
        How many starts the records run walks (all sides together).
    asked : bool, optional
        True: keep a store whatever the size (``store``, or the default
        store when None); False: keep none; None (default): keep one when
        ``store`` names one, or when ``starts`` is at least
        :data:`RECORDS_STORE_ABOVE`.

    Returns
    -------
    path, None or False
        What to pass as :func:`records`'s ``store``.

    Examples
    --------
    >>> store_for_part(None, 10**5), store_for_part(None, 10**8), store_for_part("out", 10)
    (False, None, 'out')
    >>> store_for_part(None, 10, asked=True), store_for_part("out", 10**8, asked=False)
    (None, False)
    """
    if asked is False or store is False:
        return False
    if asked or store is not None or starts >= RECORDS_STORE_ABOVE:
        return store
    return False


#: The record kinds: divided counts, then the undivided ("full") ones of ax+b maps.
KINDS = ("delay", "full_delay", "glide", "full_glide", "peak", "full_peak")
KIND_TITLES = {
    "delay": "steps to the cycle (delay)",
    "full_delay": "steps to the cycle, undivided count",
    "glide": "stopping time (glide)",
    "full_glide": "stopping time, undivided count",
    "peak": "largest value (peak)",
    "full_peak": "largest value, undivided path",
}
_TABLE_CONTRACTING = 2**20
_TABLE_EXPANDING = 2**10
_REC_BUF = 512
_BUF = 4096
_CYC_BUF = 256
_CACHE = 2**17  # results of hard starts kept per chunk (bounded: memory stays flat)


# --------------------------------------------------------------------------- plain definition
def start_figures(m: Map | str, s: int, max_steps: int = DEFAULT_MAX_STEPS) -> dict | None:
    """The figures of one start, computed plainly with exact integers (None if unresolved).

    Parameters
    ----------
    m : Map
    s : int
        A nonzero start (negative starts are on the negative side).
    max_steps : int
        The step cap ``C``: resolved means ``delay <= C`` and a cycle of length ``<= C``.

    Returns
    -------
    dict or None
        ``delay, odd, glide, peak, full_peak, cycle_min`` (``glide`` None when
        the orbit never gets below ``|s|``; ``full_peak`` None unless ``ax+b``).

    Examples
    --------
    >>> from cyclewright import maps
    >>> f = start_figures(maps.get("3x+1"), 27)
    >>> f["delay"], f["delay"] + f["odd"], f["glide"], f["full_peak"]   # OEIS A006577: 111
    (70, 111, 59, 9232)
    >>> start_figures(maps.get("5x+1"), 7, 100) is None
    True
    """
    m = as_map(m)
    seen: dict[int, int] = {}
    vals = []
    v = s
    for i in range(3 * max_steps + 4):
        if v in seen:
            break
        seen[v] = i
        vals.append(v)
        v = m.step(v)
    else:
        return None
    mu = seen[v]
    cyc = vals[mu:]
    if len(cyc) > max_steps:
        return None
    cmin = min(cyc, key=lambda q: (abs(q), q))
    delay = vals.index(cmin)
    if delay > max_steps:
        return None
    path = vals[: delay + 1]
    glide = next((i for i, q in enumerate(vals) if i and abs(q) < abs(s)), None)
    ab = m.ax_b
    odd = sum(1 for q in path[:-1] if q % 2) if ab else 0

    peak = max(path, key=abs)  # the first of largest |value|
    full_peak = None
    if ab:
        seq = []
        for q in path[:-1]:
            seq.append(q)
            if q % 2:
                seq.append(ab[0] * q + ab[1])
        seq.append(path[-1])
        full_peak = max(seq, key=abs)
    return {
        "delay": delay,
        "odd": odd,
        "glide": glide,
        "glide_odd": (sum(1 for q in vals[:glide] if q % 2) if ab and glide else 0),
        "peak": peak,
        "full_peak": full_peak,
        "cycle_min": cmin,
    }


# --------------------------------------------------------------------------- results
@dataclass(frozen=True)
class Record:
    """One record holder: the start and its value (exact)."""

    start: int
    value: int

    def to_dict(self) -> dict:
        return {"start": self.start, "value": self.value}


@dataclass(frozen=True)
class SideRecords:
    """Records and distributions of one side of a range (all exact, except ``heuristic``).

    Attributes
    ----------
    side : str
    starts, resolved, unresolved : int
    unresolved_first : tuple of int
        The first unresolved starts (signed), at most :data:`LISTED_UNRESOLVED`.
    records : dict
        Kind (see :data:`KINDS`) -> tuple of :class:`Record`, by ``|start|``.
    delays, full_delays, glides, full_glides : dict
        Value -> number of resolved starts with it.
    no_glide : int
        Resolved starts whose orbit never gets below ``|start|``.
    basins : dict
        Cycle minimum -> number of starts of the range that end in that cycle.
    heuristic : dict
        The drift model's expectations (floats, labelled heuristic).
    """

    side: str
    starts: int
    resolved: int
    unresolved: int
    unresolved_first: tuple
    records: dict
    delays: dict
    full_delays: dict
    glides: dict
    full_glides: dict
    no_glide: int
    basins: dict
    heuristic: dict = field(default_factory=dict)

    def mean(self, which: str) -> Fraction | None:
        """Exact mean of ``delays``, ``full_delays``, ``glides`` or ``full_glides``."""
        counts = getattr(self, which)
        n = sum(counts.values())
        if not n:
            return None
        return Fraction(sum(k * c for k, c in counts.items()), n)

    def holder(self, kind: str) -> Record | None:
        """The last (largest) record of a kind, or None."""
        recs = self.records.get(kind) or ()
        return recs[-1] if recs else None

    def to_dict(self) -> dict:
        return {
            "side": self.side,
            "starts": self.starts,
            "resolved": self.resolved,
            "unresolved": self.unresolved,
            "unresolved_first": list(self.unresolved_first),
            "unresolved_listed_all": len(self.unresolved_first) == self.unresolved,
            "records": {k: [r.to_dict() for r in v] for k, v in self.records.items()},
            "delays": {str(k): v for k, v in sorted(self.delays.items())},
            "full_delays": {str(k): v for k, v in sorted(self.full_delays.items())},
            "glides": {str(k): v for k, v in sorted(self.glides.items())},
            "full_glides": {str(k): v for k, v in sorted(self.full_glides.items())},
            "no_glide": self.no_glide,
            "means": {k: self.mean(k) for k in ("delays", "full_delays", "glides", "full_glides")},
            "basins": [{"cycle_minimum": k, "starts": v} for k, v in self.basins.items()],
            "heuristic": self.heuristic,
        }


@dataclass(frozen=True)
class RangeRecords(Presentable):
    """What :func:`records` returns: one :class:`SideRecords` per side.

    Figures are ``exact`` except the ``heuristic`` entries (the drift model).
    Records, distributions and basins count resolved starts only; the
    unresolved ones are counted and listed per side.
    """

    map: Map
    start: int
    to: int
    max_steps: int
    sides: dict
    undivided: bool
    seconds: float = 0.0
    store: str | None = None
    chunks_total: int = 0
    chunks_reused: int = 0
    chunks_damaged: int = 0
    starts_reused: int = 0
    labels: dict = field(
        default_factory=lambda: {
            "records": EXACT.value,
            "distributions": EXACT.value,
            "basins": EXACT.value,
            "unresolved": EXACT.value,
            "heuristic": HEURISTIC.value,
        }
    )

    @property
    def kinds(self) -> tuple[str, ...]:
        """The record kinds this map has (the undivided ones only for ``ax+b`` maps)."""
        return KINDS if self.undivided else tuple(k for k in KINDS if not k.startswith("full"))

    @property
    def unresolved(self) -> int:
        return sum(s.unresolved for s in self.sides.values())

    @property
    def store_use(self):
        """What came from the records store and what this run computed
        (a :class:`~cyclewright.cycles.scan.result.StoreUse`, as the scans give)."""
        from .scan.result import StoreUse

        starts = (self.to - self.start + 1) * len(self.sides)
        return StoreUse(
            self.chunks_reused,
            self.chunks_total - self.chunks_reused,
            self.starts_reused,
            starts - self.starts_reused,
            stored=self.store is not None,
        )

    @property
    def caution(self) -> str:
        text = HEURISTIC_CAUTION
        if self.unresolved:
            text += (
                f" {self.unresolved} start(s) stayed unresolved within {self.max_steps} steps; "
                "they are left out of the records and distributions (a record after the first "
                "unresolved start holds among resolved starts only)."
            )
        return text

    def record_rows(self) -> list[dict]:
        """One row per record holder: side, kind, start, value."""
        rows = []
        for sd in self.sides.values():
            for k in self.kinds:
                for r in sd.records.get(k, ()):
                    rows.append({"side": sd.side, "kind": k, "start": r.start, "value": r.value})
        return rows

    def summary_rows(self) -> list[dict]:
        """One row per side and kind: the record holder, its value, the exact mean, the model's."""
        rows = []
        for sd in self.sides.values():
            for k in self.kinds:
                h = sd.holder(k)
                dist = {"delay": "delays", "full_delay": "full_delays", "glide": "glides"}.get(
                    k, "full_glides" if k == "full_glide" else None
                )
                rows.append(
                    {
                        "side": sd.side,
                        "kind": k,
                        "holder": h.start if h else None,
                        "value": h.value if h else None,
                        "records": len(sd.records.get(k, ())),
                        "mean": sd.mean(dist) if dist else None,
                        "model_mean": sd.heuristic.get(f"{k}_mean"),
                        "unresolved": sd.unresolved,
                    }
                )
        return rows

    def to_dict(self) -> dict:
        return {
            "map": self.map.label,
            "map_key": self.map.key,
            "start": self.start,
            "to": self.to,
            "max_steps": self.max_steps,
            "undivided": self.undivided,
            "sides": {k: v.to_dict() for k, v in self.sides.items()},
            "store": {
                "path": self.store,
                "chunks": self.chunks_total,
                "reused": self.chunks_reused,
                "starts_reused": self.starts_reused,
                "computed": self.chunks_total - self.chunks_reused,
                "damaged_recomputed": self.chunks_damaged,
            },
            "labels": self.labels,
            "caution": self.caution,
        }

    def table(self) -> Table:
        """The summary: per side and kind, the record holder, its value, the means (labelled)."""
        cols = (
            "side",
            "record of",
            "holder",
            "value",
            "records",
            "mean",
            "model mean",
            "unresolved",
        )
        rows = tuple(
            (
                r["side"],
                KIND_TITLES[r["kind"]],
                r["holder"],
                r["value"],
                r["records"],
                r["mean"],
                r["model_mean"],
                r["unresolved"],
            )
            for r in self.summary_rows()
        )
        return Table(
            f"{self.map.label}: records over the starts {self.start}..{self.to} "
            f"(step cap {self.max_steps})",
            cols,
            rows,
            {
                "holder": EXACT.value,
                "value": EXACT.value,
                "records": EXACT.value,
                "mean": EXACT.value,
                "model mean": HEURISTIC.value,
                "unresolved": EXACT.value,
            },
            "Records, means and distributions over the resolved starts; model means from the "
            "drift and random-walk model. " + self.caution,
        )

    def tables(self) -> list[Table]:
        """The summary, every record holder, and the basins."""
        holders = Table(
            f"{self.map.label}: record holders",
            ("side", "record of", "start", "value"),
            tuple(
                (r["side"], KIND_TITLES[r["kind"]], r["start"], r["value"])
                for r in self.record_rows()
            ),
            {"start": EXACT.value, "value": EXACT.value},
        )
        basins = Table(
            f"{self.map.label}: basin sizes",
            ("side", "cycle minimum", "starts in basin"),
            tuple(
                (sd.side, cmin, n) for sd in self.sides.values() for cmin, n in sd.basins.items()
            ),
            {"starts in basin": EXACT.value},
        )
        return [self.table(), holders, basins]

    def overview(self, show: int = 5, one_row_per_holder: bool = False) -> list[Table]:
        """The condensed view a terminal or a LaTeX page shows.

        The summary with its means rounded, per side the last ``show`` record
        holders of each kind (the count of earlier ones in the cell), and the
        basins with their shares of the resolved starts. Every figure comes
        from :meth:`table` and :meth:`record_rows`; nothing is recomputed.

        Parameters
        ----------
        show : int
            How many of the last record holders of each kind to list.
        one_row_per_holder : bool
            List each holder in a row of its own (start and value as numbers,
            as a page wants them) instead of one cell of ``start:value`` pairs
            per kind (as a terminal wants them).

        Returns
        -------
        list of Table
            The summary, then per side its record holders and its basins.

        Examples
        --------
        >>> r = records("3x+1", 30, workers=1, store=False)
        >>> dict(r.overview(2)[1].rows)["stopping time (glide)"]
        '7:7 27:59 (+2 earlier)'
        """
        base = self.table()

        def rounded(v, digits):
            return None if v is None else round(float(v), digits)

        summary = Table(
            "Records (exact; mean rounded, model mean heuristic)",
            base.columns,
            tuple(
                tuple(
                    rounded(v, 3) if c == "mean" else rounded(v, 2) if c == "model mean" else v
                    for c, v in zip(base.columns, row, strict=True)
                )
                for row in base.rows
            ),
            {**base.labels, "mean": ROUNDED.value, "model mean": HEURISTIC.value},
            "mean: exact over the resolved starts, shown rounded (exact fractions in --json); "
            "model mean: drift / random-walk model (heuristic)",
        )
        n = max(show, 0)
        tables = [summary]
        for sd in self.sides.values():
            rows, earlier = [], []
            for k in self.kinds:
                recs = list(sd.records.get(k, ()))
                shown = recs[-n:] if n else []
                if one_row_per_holder:
                    rows.extend((KIND_TITLES[k], x.start, x.value) for x in shown)
                    cell = ""
                else:
                    cell = " ".join(f"{_brief(x.start)}:{_brief(x.value)}" for x in shown)
                if len(recs) > len(shown):
                    earlier.append(f"{KIND_TITLES[k]} {len(recs) - len(shown)}")
                    cell += f" (+{len(recs) - len(shown)} earlier)"
                if not one_row_per_holder:
                    rows.append((KIND_TITLES[k], cell.strip()))
            if one_row_per_holder:
                holders = Table(
                    f"{sd.side}: the last {n} record holders of each kind",
                    ("record of", "start", "value"),
                    tuple(rows),
                    {"start": EXACT.value, "value": EXACT.value},
                    ("earlier holders, in --json: " + "; ".join(earlier)) if earlier else "",
                )
            else:
                holders = Table(
                    f"{sd.side}: record holders (start:value, exact)",
                    ("record of", "holders"),
                    tuple(rows),
                    {"holders": EXACT.value},
                    "every holder with all digits in --json and --csv",
                )
            tables.append(holders)
            tables.append(
                Table(
                    f"{sd.side}: basins (exact)",
                    ("cycle minimum", "starts", "share"),
                    tuple(
                        (cmin, cnt, f"{100 * cnt / sd.starts:.2f}%")
                        for cmin, cnt in sd.basins.items()
                    ),
                    {"starts": EXACT.value, "share": ROUNDED.value},
                )
            )
        return tables

    def to_pandas(self):
        """The record holders as a pandas DataFrame (pandas is optional; never installed by us)."""
        try:
            import pandas as pd
        except ImportError:
            raise ImportError(
                "to_pandas() needs pandas, which cyclewright does not install; use record_rows()"
            ) from None
        return pd.DataFrame(self.record_rows())

    def _repr_html_(self) -> str:
        """The summary table as HTML (Jupyter shows it); :meth:`tables` has them all."""
        return self.table()._repr_html_()

    def __repr__(self) -> str:
        parts = []
        for sd in self.sides.values():
            h = sd.holder("delay")
            parts.append(
                f"{sd.side}: {sd.resolved} resolved, {sd.unresolved} unresolved, "
                f"delay record {h.value if h else None} at {h.start if h else None}"
            )
        return f"RangeRecords({self.map.label}, {self.start}..{self.to}; " + "; ".join(parts) + ")"


def _brief(v: int) -> str:
    """An integer for a cell of holders: all digits up to 12, else its ends and digit count."""
    t = str(v)
    digits = len(t.lstrip("-"))
    return t if digits <= 12 else f"{t[: len(t) - digits + 4]}...{t[-4:]} ({digits} digits)"


# --------------------------------------------------------------------------- heuristic
def _log_steps(m: Map) -> list[float]:
    d = m.divisor
    return [math.log(abs(a) / d) for a in m.multipliers]


def glide_model(m: Map | str, max_k: int = 1000, tol: float = 1e-13) -> dict | None:
    """The random-walk model's stopping-time distribution (heuristic).

    Each step multiplies by ``|a_r| / d`` with probability ``1/d``; the model's
    glide is the first step where the product falls below 1. For ``ax+b`` maps
    the undivided count adds the steps on residue 1.

    Parameters
    ----------
    m : Map
    max_k : int
        Longest glide followed.
    tol : float
        Stop once the probability still in play is below this.

    Returns
    -------
    dict or None
        ``{"p": {k: prob}, "mean", "sd", "full_mean", "full_sd", "tail"}``
        (floats), or None for a map that does not contract on average.

    Examples
    --------
    >>> from cyclewright import maps
    >>> g = glide_model(maps.get("3x+1"))
    >>> round(g["p"][1], 3), round(g["p"][2], 3), round(g["mean"], 2)   # Terras 1976: 1/2, 1/4
    (0.5, 0.25, 3.49)

    References
    ----------
    Terras 1976 (the density of stopping times); see the module docstring.
    """
    m = as_map(m)
    if m.drift_ratio() >= 1:
        return None
    d = m.divisor
    xs = _log_steps(m)
    undiv = m.ax_b is not None
    # state: counts per residue -> probability
    states = {tuple([0] * d): 1.0}
    p: dict[int, float] = {}
    pf: dict[int, float] = {}
    eps = 1e-9
    k = 0
    while states and k < max_k:
        k += 1
        nxt: dict[tuple, float] = {}
        for c, pr in states.items():
            q = pr / d
            for r in range(d):
                c2 = list(c)
                c2[r] += 1
                c2 = tuple(c2)
                pos = sum(n * x for n, x in zip(c2, xs))
                if pos < -eps:
                    p[k] = p.get(k, 0.0) + q
                    if undiv:
                        f = k + c2[1]
                        pf[f] = pf.get(f, 0.0) + q
                else:
                    nxt[c2] = nxt.get(c2, 0.0) + q
        states = {c: v for c, v in nxt.items() if v > tol * 1e-3}
        if sum(states.values()) < tol or len(states) > 200_000:
            break
    tail = max(0.0, 1.0 - sum(p.values()))
    mean = sum(k * v for k, v in p.items())
    sd = math.sqrt(max(0.0, sum(k * k * v for k, v in p.items()) - mean * mean))
    out = {"p": p, "mean": mean, "sd": sd, "tail": tail}
    if undiv:
        fm = sum(k * v for k, v in pf.items())
        out["full_p"] = pf
        out["full_mean"] = fm
        out["full_sd"] = math.sqrt(max(0.0, sum(k * k * v for k, v in pf.items()) - fm * fm))
    return out


def _heuristic(m: Map, lo: int, hi: int) -> dict:
    """Drift-model expectations for a side (floats; empty for non-contracting maps)."""
    xs = _log_steps(m)
    d = m.divisor
    delta = sum(xs) / d
    if delta >= 0:
        return {"note": "the map does not contract on average; the drift model predicts escape"}
    var = sum(x * x for x in xs) / d - delta * delta
    n = hi - lo + 1
    mean_log = (math.lgamma(hi + 1) - math.lgamma(lo)) / n
    out = {
        "drift": delta,
        "delay_mean": mean_log / -delta,
        "delay_sd": math.sqrt(max(mean_log, 0.0) * var / (-delta) ** 3),
    }
    if m.ax_b is not None:
        # the model's share of odd steps on a descending path: tilt 1/2 by the drift
        out["full_delay_mean"] = out["delay_mean"] * (1 + 1 / d)
        out["full_delay_sd"] = out["delay_sd"] * (1 + 1 / d)
    g = glide_model(m)
    if g is not None:
        out["glide_mean"] = g["mean"]
        out["glide_sd"] = g["sd"]
        out["glide_p"] = {k: v for k, v in g["p"].items() if v > 1e-15}
        if "full_mean" in g:
            out["full_glide_mean"] = g["full_mean"]
            out["full_glide_sd"] = g["full_sd"]
            out["full_glide_p"] = {k: v for k, v in g["full_p"].items() if v > 1e-15}
    return out


# --------------------------------------------------------------------------- tables and chunks
def _side_map(m: Map, side: str) -> Map:
    return m if side == "positive" else m.conjugate()


def _kernel_arrays(mm: Map):
    from .scan.kernel import KernelMap

    km = KernelMap.from_map(mm)
    return km


@functools.lru_cache(maxsize=8)
def _table(divisor: int, branches: tuple, cap: int, size: int):
    """The table of starts ``1 .. size-1`` of the map given by its branches (per process).

    Returns ``(tab, fast)``: the table (see :func:`records_kernel.new_table`) and
    what the fast walk reads (:func:`_fast_parts`).
    """
    from .records_kernel import new_table

    mm = Map(divisor, [tuple(b) for b in branches])
    km = _kernel_arrays(mm)
    tab = new_table(max(size, 1))
    if km is None or size <= 1:
        return tab, _fast_parts(mm, tab, False)
    acc = _Accumulator(cap, mm.ax_b is not None)
    pos = 1
    while pos < size:
        pos = acc.call(km, pos, size - 1, tab, _fast_parts(mm, tab, False), True)
        acc.drain(None, None)
    return tab, _fast_parts(mm, tab, True)


#: Steps of one jump of the fast walk (fewer for multipliers whose powers grow fast).
_JUMP = 16


def _fast_parts(mm: Map, tab, built: bool) -> tuple:
    """``(hot, tcmin, tmax, jt, gt, bnd, K)`` for the fast walk (one-row arrays: none).

    The tables are fixed in size (``2^K`` rows of the jump tables, the packed
    copy of the table of small starts), whatever the range.
    """
    from .records_kernel import hot_table, jump_tables

    none = (
        np.zeros(1, np.int64),
        np.zeros(1, np.int64),
        np.zeros(2, np.int64),
        np.zeros((1, 2), np.int64),
        np.zeros((1, 2), np.int64),
        np.ones(3, np.int64),
        1,
    )
    ab = mm.ax_b
    if not built or ab is None or mm.divisor != 2 or tab.shape[0] <= 1:
        return none
    a, b = ab
    if a < 1 or a + b < 1 or a % 2 == 0 or _JUMP < 1 or abs(b) >= 2**20:
        return none
    k = _JUMP
    while k > 1 and a**k > 2**40:
        k -= 1
    jt, gt, bnd = jump_tables(a, b, k)
    if (jt[:, 1] & ((1 << 48) - 1)).max() >= 2**47 or (gt[:, 0] >> 16).max() >= 2**46:
        return none
    hot, tcmin, tmax = hot_table(tab, mm.step)
    return hot, tcmin, tmax, jt, gt, bnd, k


class _Accumulator:
    """The buffers of the compiled walk and what one chunk has gathered so far."""

    def __init__(self, cap: int, undiv: bool):
        self.cap = cap
        self.undiv = undiv
        self.hist_del = np.zeros(cap + 1, np.int64)
        self.hist_udel = np.zeros(2 * cap + 2, np.int64)
        self.hist_gl = np.zeros(cap + 1, np.int64)
        self.hist_ugl = np.zeros(2 * cap + 2, np.int64)
        self.sums = np.zeros(8, np.int64)
        self.best = np.full(6, -1, np.int64)
        self.rec_s = np.zeros((6, _REC_BUF), np.int64)
        self.rec_v = np.zeros((6, _REC_BUF), np.int64)
        self.rec_n = np.zeros(6, np.int64)
        self.cyc_min = np.zeros(_CYC_BUF, np.int64)
        self.cyc_cnt = np.zeros(_CYC_BUF, np.int64)
        self.ncyc = np.zeros(1, np.int64)
        self.hard = np.zeros(_BUF, np.int64)
        self.nhard = np.zeros(1, np.int64)
        self.unres = np.zeros(_BUF, np.int64)
        self.nunres = np.zeros(1, np.int64)
        self.candidates: list[list[tuple[int, int]]] = [[] for _ in KINDS]
        self.unresolved_first: list[int] = []
        self.unresolved_extra = 0
        self.hard_starts: list[int] = []

    def call(self, km, lo: int, hi: int, tab, fast: tuple, build: bool) -> int:
        from .records_kernel import walk_chunk

        hot, tcmin, tmax, jt, gt, bnd, k = fast
        return int(
            walk_chunk(
                lo,
                hi,
                km.divisor,
                km.multipliers,
                km.offsets,
                km.vmax,
                self.cap,
                self.undiv,
                tab.shape[0],
                tab,
                build,
                hot,
                tcmin,
                tmax,
                jt,
                gt,
                bnd,
                k,
                self.hist_del,
                self.hist_udel,
                self.hist_gl,
                self.hist_ugl,
                self.sums,
                self.best,
                self.rec_s,
                self.rec_v,
                self.rec_n,
                self.cyc_min,
                self.cyc_cnt,
                self.ncyc,
                self.hard,
                self.nhard,
                self.unres,
                self.nunres,
            )
        )

    def drain(self, hard_out: list | None, unres_out: list | None) -> None:
        """Move the buffers' contents into Python lists (None: discard)."""
        for k in range(6):
            n = int(self.rec_n[k])
            if n:
                self.candidates[k].extend(
                    zip(self.rec_s[k, :n].tolist(), self.rec_v[k, :n].tolist())
                )
            self.rec_n[k] = 0
        nh = int(self.nhard[0])
        if hard_out is not None and nh:
            hard_out.extend(self.hard[:nh].tolist())
        self.nhard[0] = 0
        nu = int(self.nunres[0])
        if unres_out is not None and nu:
            room = LISTED_UNRESOLVED - len(unres_out)
            unres_out.extend(self.unres[: min(nu, max(room, 0))].tolist())
            self.unresolved_extra += max(0, nu - max(room, 0))
        self.nunres[0] = 0


def _odd_steps(mm: Map, s: int, n: int) -> int:
    """Steps on residue 1 among the first ``n`` steps from ``s``."""
    v, odd = s, 0
    for _ in range(n):
        if v % mm.divisor == 1:
            odd += 1
        v = mm.step(v)
    return odd


def _exact_one(
    mm: Map, s: int, cap: int, tab, size: int, cache: dict | None = None
) -> tuple | None:
    """The exact continuation of one start (Python integers), with the table of small starts.

    Returns ``(delay, odd, glide, full_glide, peak, full_peak, cycle_min)`` or None
    (unresolved); ``glide`` is -1 when there is none. Mirrors the compiled walk.
    ``cache`` maps earlier starts of the same chunk to their results (None:
    unresolved); it is consulted at the glide point ``0 < v < s`` when ``v`` is
    past the table, which is exact for the same reason as the table (every
    earlier value is at least ``s > v``).
    """
    from .records_kernel import T_UNRESOLVED

    d = mm.divisor
    branches = mm.branches
    undiv = mm.ax_b is not None

    def bigger(x, y):
        return abs(x) > abs(y)

    # a resolved start has mu + lam <= delay + lam <= 2C: 2C + 1 distinct values prove otherwise
    budget = 2 * cap + 1
    bound = min(s, size)
    A = [a for a, _ in branches]
    B = [b for _, b in branches]
    v = s
    glide = -1
    seen = {s: 0}
    lam = 0
    i = 0
    positive = use_table = True
    found = False
    hit = None
    # phase 1: the plain walk, every value kept until a repeat (peaks and odd steps come later)
    while i < budget:
        r = v % d
        v = (A[r] * v + B[r]) // d
        i += 1
        if v <= 0:
            positive = False
        if glide < 0 and abs(v) < s:
            glide = i
            if cache is not None and positive and v >= bound and v in cache:
                got = cache[v]
                if got is None or i + got[0] > cap:
                    return None
                hit = (v, got)
                break
        if use_table and positive and v < bound:
            e = int(tab[v, 0])
            if e == T_UNRESOLVED:
                return None
            if e >= 0:
                if i + e > cap:
                    return None
                hit = (v, (e, int(tab[v, 1]), int(tab[v, 2]), int(tab[v, 3]), int(tab[v, 4])))
                break
            use_table = False
        j = seen.get(v)
        if j is not None:
            lam = i - j
            found = True
            break
        seen[v] = i

    def path(stop_at, steps):
        """Walk from s: peaks and odd steps (and glide's odd steps) up to a value or a count."""
        done = (lambda n, v: v == stop_at) if steps is None else (lambda n, v: n == steps)
        vals = [s]  # the values of the path
        seen = [s]  # and, for ax+b maps, a v + b before each halving too
        odd_at = [0]  # odd steps before step n
        v, n = s, 0
        while not done(n, v):
            if steps is None and n >= cap:
                return None
            r = v % d
            lifted = A[r] * v + B[r]
            if undiv and r == 1:
                seen.append(lifted)
            v = lifted // d
            n += 1
            odd_at.append(odd_at[-1] + (undiv and r == 1))
            vals.append(v)
            seen.append(v)
        peak = max(vals, key=abs)  # the first of largest |value|
        top = max(seen, key=abs)
        godd = odd_at[glide] if 0 <= glide <= n else 0
        return n, odd_at[n], peak, top, godd

    uglide = -1
    if hit is not None:
        v, (e, o2, p2, u2, c2) = hit
        n, odd, peak, upk, godd = path(None, i)
        if glide >= 0:
            uglide = glide + godd
        if bigger(p2, peak):
            peak = p2
        if bigger(u2, upk):
            upk = u2
        if bigger(peak, upk):
            upk = peak
        return (i + e, odd + o2, glide, uglide, peak, upk, c2)
    if not found or lam > cap:
        return None
    cmin = w = v
    for _ in range(lam - 1):
        w = mm.step(w)
        if abs(w) < abs(cmin) or (abs(w) == abs(cmin) and w < cmin):
            cmin = w
    walked = path(cmin, None)
    if walked is None:
        return None
    delay, odd, peak, upk, godd = walked
    if glide >= 0:
        # the glide happens at or before the delay (module docstring); its odd steps
        uglide = glide + (godd if glide <= delay else _odd_steps(mm, s, glide))
    return (delay, odd, glide, uglide, peak, upk, cmin)


@dataclass
class _ChunkResult:
    side: str
    lo: int
    hi: int
    hist: tuple  # four int64 arrays
    sums: list
    candidates: list
    basins: dict
    unresolved_first: list
    unresolved: int


def _to_figures(res: _ChunkResult) -> dict:
    """A chunk's result as plain JSON data (for the records store)."""

    def sparse(arr):
        nz = np.nonzero(arr)[0]
        return {str(int(i)): int(arr[i]) for i in nz}

    return {
        "hist": [sparse(h) for h in res.hist],
        "sums": [int(x) for x in res.sums],
        "candidates": [[[int(a), int(b)] for a, b in c] for c in res.candidates],
        "basins": {str(k): int(v) for k, v in res.basins.items()},
        "unresolved_first": [int(x) for x in res.unresolved_first],
        "unresolved": int(res.unresolved),
    }


def _from_figures(side: str, lo: int, hi: int, f: dict, cap: int) -> _ChunkResult:
    """The inverse of :func:`_to_figures`."""
    hist = []
    for i, h in enumerate(f["hist"]):
        arr = np.zeros(cap + 1 if i % 2 == 0 else 2 * cap + 2, np.int64)
        for k, v in h.items():
            arr[int(k)] = v
        hist.append(arr)
    return _ChunkResult(
        side,
        lo,
        hi,
        tuple(hist),
        list(f["sums"]),
        [[(a, b) for a, b in c] for c in f["candidates"]],
        {int(k): v for k, v in f["basins"].items()},
        list(f["unresolved_first"]),
        f["unresolved"],
    )


def _chunk_size(m: Map) -> int:
    return 2**22 if m.drift_ratio() < 1 else 2**12


def _run_chunk(task) -> _ChunkResult:
    """Walk one chunk of one side (runs in a worker process)."""
    divisor, branches, side, lo, hi, cap, size = task
    m = Map(divisor, [tuple(b) for b in branches])
    mm = _side_map(m, side)
    undiv = mm.ax_b is not None
    km = _kernel_arrays(mm)
    tab, fast = _table(mm.divisor, tuple(tuple(b) for b in mm.branches), cap, size if km else 1)
    acc = _Accumulator(cap, undiv)
    hard: list[int] = []
    unres: list[int] = []
    unres_all: list[int] = []
    if km is not None:
        pos = lo
        while pos <= hi:
            pos = acc.call(km, pos, hi, tab, fast, False)
            if len(unres_all) < _CACHE:
                unres_all.extend(acc.unres[: int(acc.nunres[0])].tolist())
            acc.drain(hard, unres)
    else:
        hard = list(range(lo, hi + 1))
    basins = {int(acc.cyc_min[j]): int(acc.cyc_cnt[j]) for j in range(int(acc.ncyc[0]))}
    sums = [int(x) for x in acc.sums]
    sums[2] = 0
    extra_unres = acc.unresolved_extra
    # exact continuation of the hard starts
    if hard:
        hard.sort()
        open_mask = _open_filter(km, hard, cap)
        cache = _cache_for(mm, cap)
        for s in unres_all:
            cache[s] = None
        for s, is_open in zip(hard, open_mask):
            out = None if is_open else _exact_one(mm, s, cap, tab, size if km else 1, cache)
            cache[s] = None if out is None else (out[0], out[1], out[4], out[5], out[6])
            if len(cache) > _CACHE:
                for key in list(itertools.islice(cache, _CACHE // 4)):
                    del cache[key]
            if out is None:
                sums[1] += 1
                if len(unres) < LISTED_UNRESOLVED:
                    unres.append(s)
                else:
                    extra_unres += 1
                continue
            delay, odd, glide, uglide, peak, upk, cmin = out
            sums[0] += 1
            _bump(acc.hist_del, delay)
            sums[4] += delay
            if undiv:
                _bump(acc.hist_udel, delay + odd)
                sums[5] += delay + odd
            if glide < 0:
                sums[3] += 1
            else:
                _bump(acc.hist_gl, glide)
                sums[6] += glide
                if undiv:
                    _bump(acc.hist_ugl, uglide)
                    sums[7] += uglide
            basins[cmin] = basins.get(cmin, 0) + 1
            vals = [delay, delay + odd, glide, uglide, peak, upk]
            for k in range(6):
                if (k in (1, 3, 5) and not undiv) or (k in (2, 3) and glide < 0):
                    continue
                acc.candidates[k].append((s, vals[k]))
    unres.sort()
    return _ChunkResult(
        side,
        lo,
        hi,
        (acc.hist_del, acc.hist_udel, acc.hist_gl, acc.hist_ugl),
        sums,
        acc.candidates,
        basins,
        unres,
        sums[1],
    )


_CACHES: dict = {}


def _cache_for(mm: Map, cap: int) -> dict:
    """This process's cache of hard starts' results for one side map and cap (bounded)."""
    key = (mm.divisor, tuple(tuple(b) for b in mm.branches), cap)
    if key not in _CACHES:
        if len(_CACHES) >= 4:
            _CACHES.clear()
        _CACHES[key] = {}
    return _CACHES[key]


def _bump(arr: np.ndarray, k: int) -> None:
    arr[k] += 1


def _open_filter(km, starts: list[int], cap: int) -> list[bool]:
    """True for starts the scan's exact continuation finds open within ``2 cap`` steps.

    Such a start closes no cycle within ``2C`` steps, while a resolved start has
    ``mu + lam <= delay + lam <= 2C``: it is unresolved.
    """
    if km is None:
        return [False] * len(starts)
    from .scan.codes import OPEN
    from .scan.kernel import classify_starts

    code, _, _ = classify_starts(km, starts, 2 * cap, False)
    return [int(c) == OPEN for c in code]


def _merge_records(cands: list[tuple[int, int]], by_abs: bool) -> tuple[Record, ...]:
    out = []
    best = -1
    for s, v in sorted(cands):
        key = abs(v) if by_abs else v
        if key > best:
            best = key
            out.append((s, v))
    return out


# --------------------------------------------------------------------------- the API
def _as_int(value, what: str) -> int:
    if isinstance(value, bool) or not (
        isinstance(value, (int, np.integer)) or type(value).__name__ == "mpz"
    ):
        raise InputError(f"{what} must be an integer, got {value!r}")
    return int(value)


def check_records_to(to: int, what: str = "to") -> int:
    """``to`` if at most :data:`~cyclewright.cycles.limits.MAX_RECORDS_TO`, else :class:`InputError`.

    >>> check_records_to(10**30)
    Traceback (most recent call last):
    ...
    cyclewright.cycles.errors.InputError: to must be at most 2^63-1, got 10^30 (the compiled walk holds starts as int64)
    """
    return check_range(
        to, what, maximum=MAX_RECORDS_TO, why="the compiled walk holds starts as int64"
    )


def check_records_step_cap(max_steps: int, what: str = "max_steps") -> int:
    """``max_steps`` if 1 .. :data:`~cyclewright.cycles.limits.MAX_RECORDS_STEP_CAP`, else :class:`InputError`.

    >>> check_records_step_cap(1000)
    1000
    """
    return check_range(
        max_steps,
        what,
        minimum=1,
        maximum=MAX_RECORDS_STEP_CAP,
        why="the records kernels keep step counts in fields sized for this cap",
    )


def records(
    m: Map | str,
    to: int,
    *,
    start: int = 1,
    side: Side = DEFAULT_SIDE,
    max_steps: int = DEFAULT_MAX_STEPS,
    workers: int | None = 1,
    executor: str = "local",
    scheduler: str | None = None,
    progress: ProgressCallback | None = None,
    chunk_size: int | None = None,
    store=None,
    max_minutes: float | None = MAX_RECORDS_MINUTES,
    rate: float | None = None,
    on_plan=None,
) -> RangeRecords:
    """Records, distributions and basins of every start of ``[start, to]`` (exact).

    Parameters
    ----------
    m : Map or str
        The map (a name or shorthand is resolved with ``as_map``).
    to : int
        Largest absolute value of a start (at most ``2^63 - 1``).
    start : int
        Smallest absolute value of a start (at least 1).
    side : {"positive", "negative", "both"}
    max_steps : int
        The step cap ``C`` (see the module docstring for *resolved*).
    workers : int, optional
        Processes of the local executor (default 1; None: all cores).
    executor : {"local", "dask"}
    scheduler : str, optional
        Dask scheduler address.
    progress : callable, optional
        Receives :class:`~cyclewright.cycles.progress.ProgressEvent` values.
    chunk_size : int, optional
        Starts per chunk (a fixed grid, as in the scan).
    store : path, None or False
        Where finished chunks are kept (:mod:`~cyclewright.cycles.records_store`),
        so that an interrupted run resumes and a repeated run reuses them.
        None: beside the map's scan store in the user data directory
        (``$CYCLEWRIGHT_DATA_DIR`` overrides); a directory or a scan store's
        file name: the records file of this map there; False: keep nothing.
    max_minutes : float or None
        Refuse a run estimated to take longer (wall clock, on ``workers``)
        before it starts, with the estimate (default
        :data:`~cyclewright.cycles.limits.MAX_RECORDS_MINUTES`; None: no
        limit; lifted inside :func:`~cyclewright.cycles.limits.lift_limits`).
        The estimate times this run's own chunk on pieces of the range
        (:func:`~cyclewright.cycles.records_plan.plan_records`, heuristic);
        the memory the exact walk of climbing starts may need is checked
        first.
    rate : float, optional
        Starts per second per worker for the estimate, instead of timing.
    on_plan : callable, optional
        Called with the :class:`~cyclewright.cycles.records_plan.WalkPlan`
        once every refusal check has passed, before any chunk runs.

    Returns
    -------
    RangeRecords
        ``chunks_reused`` of ``chunks_total`` came from the store.

    Raises
    ------
    InputError
        Arguments beyond the limits (docs/limits.md), the memory of the
        exact walk beyond the budget, or an estimate beyond ``max_minutes``:
        one line, before any work.

    Examples
    --------
    >>> r = records("3x+1", 1000, store=False)
    >>> [x.start for x in r.sides["positive"].records["full_delay"]][-3:]   # OEIS A006877
    [649, 703, 871]
    >>> r.sides["positive"].holder("full_peak")                           # OEIS A006884/A006885
    Record(start=703, value=250504)
    >>> r.sides["positive"].basins
    {1: 1000}

    References
    ----------
    Leavens and Vermeulen 1992 (delay and path records of 3x+1); see the module docstring.
    """
    from .scan.chunks import iter_chunks
    from .scan.executors import make_executor

    m = as_map(m)
    to = _as_int(to, "to")
    start = _as_int(start, "start")
    max_steps = _as_int(max_steps, "max_steps")
    side = parse_side(side)
    if start < 1:
        raise InputError(f"the range must start at 1 or above (0 is on neither side), got {start}")
    if to < start:
        raise InputError(f"empty range: {start}..{to}")
    check_records_to(to)
    check_records_step_cap(max_steps)
    from .limits import check_workers
    from .records_plan import check_plan, plan_records

    check_workers(workers)
    from .records_store import RecordsStore, records_path_for

    spot = records_path_for(store, m)  # a store file that is no store of m: refused first
    plan = plan_records(
        m,
        to,
        start=start,
        side=side,
        max_steps=max_steps,
        workers=workers,
        executor=executor,
        rate=rate,
    )  # the memory check first, then the time: refused here, before any chunk
    check_plan(plan, max_minutes)
    if on_plan is not None:
        on_plan(plan)
    t0 = time.perf_counter()
    sides = tuple(sides_of(side))
    csize = chunk_size or _chunk_size(m)
    check_range(csize, "chunk_size", minimum=1)
    size = min((_TABLE_CONTRACTING if m.drift_ratio() < 1 else _TABLE_EXPANDING), to + 1)
    undiv = m.ax_b is not None
    led = RecordsStore(spot, m) if spot is not None else None
    total = (to - start + 1) * len(sides)
    out = {}
    done = 0
    reused = chunks = starts_reused = 0
    need: list[str] = []  # the side whose chunks are about to run

    def prepare() -> None:
        # the tables of small starts and of jumps, built once in the parent: forked
        # workers share them instead of each building its own
        for sd in need:
            mm = _side_map(m, sd)
            if _kernel_arrays(mm) is not None:
                _table(mm.divisor, tuple(tuple(b) for b in mm.branches), max_steps, size)

    try:
        ex = make_executor(executor, workers=workers, scheduler=scheduler, prepare=prepare)
        try:
            for sd in sides:
                config = RecordsStore.config(sd, max_steps)
                acc = _Gathered(max_steps)

                def gather(res: _ChunkResult, acc=acc, sd=sd) -> None:
                    nonlocal done
                    acc.add(res)
                    done += res.hi - res.lo + 1
                    report(progress, "records", done, total, "starts", sd)

                todo = []
                for lo, hi in iter_chunks(start, to, csize):
                    chunks += 1
                    got = led.get(config, lo, hi) if led is not None else None
                    if got is None:
                        todo.append((lo, hi))
                    else:
                        reused += 1
                        starts_reused += hi - lo + 1
                        gather(_from_figures(sd, lo, hi, got, max_steps))
                need[:] = [sd] if todo else []
                tasks = (
                    (m.divisor, tuple(tuple(b) for b in m.branches), sd, lo, hi, max_steps, size)
                    for lo, hi in todo
                )
                for res in ex.map_unordered(_run_chunk, tasks):
                    if led is not None:
                        led.put(config, res.lo, res.hi, _to_figures(res))
                    gather(res)
                out[sd] = _side_result(
                    m, sd, start, to, acc.hist, acc.sums, acc.cands, acc.basins, acc.unres, undiv
                )
        finally:
            ex.close()
    finally:
        damaged = led.damaged if led is not None else 0
        if led is not None:
            led.close()
    return RangeRecords(
        m,
        start,
        to,
        max_steps,
        out,
        undiv,
        time.perf_counter() - t0,
        store=str(spot) if spot is not None else None,
        chunks_total=chunks,
        chunks_reused=reused,
        chunks_damaged=damaged,
        starts_reused=starts_reused,
    )


class _Gathered:
    """What the chunks of one side add up to (records, distributions, basins, unresolved)."""

    def __init__(self, cap: int):
        self.hist = [np.zeros(cap + 1, np.int64), np.zeros(2 * cap + 2, np.int64)]
        self.hist += [np.zeros(cap + 1, np.int64), np.zeros(2 * cap + 2, np.int64)]
        self.sums = [0] * 8
        self.cands: list[list] = [[] for _ in KINDS]
        self.basins: dict[int, int] = {}
        self.unres: list[int] = []

    def add(self, res: _ChunkResult) -> None:
        for h, more in zip(self.hist, res.hist):
            h += more
        self.sums = [a + b for a, b in zip(self.sums, res.sums)]
        for k in range(6):
            self.cands[k].extend(res.candidates[k])
            # keep the candidate lists short: only running records can survive
            if len(self.cands[k]) > 4096:
                self.cands[k] = _merge_records(self.cands[k], k >= 4)
        for c, n in res.basins.items():
            self.basins[c] = self.basins.get(c, 0) + n
        self.unres.extend(res.unresolved_first)
        self.unres.sort()
        del self.unres[LISTED_UNRESOLVED:]


def _side_result(m, sd, start, to, hist, sums, cands, basins, unres, undiv) -> SideRecords:
    sign = 1 if sd == "positive" else -1
    recs = {}
    for k, kind in enumerate(KINDS):
        if kind.startswith("full") and not undiv:
            continue
        merged = _merge_records(cands[k], k >= 4)
        recs[kind] = tuple(Record(sign * s, sign * v if k >= 4 else v) for s, v in merged)

    def counts(arr):
        nz = np.nonzero(arr)[0]
        return {int(i): int(arr[i]) for i in nz}

    bas = {sign * c: n for c, n in basins.items()}
    bas = dict(sorted(bas.items(), key=lambda kv: (abs(kv[0]), kv[0])))
    return SideRecords(
        sd,
        to - start + 1,
        sums[0],
        sums[1],
        tuple(sign * s for s in unres),
        recs,
        counts(hist[0]),
        counts(hist[1]) if undiv else {},
        counts(hist[2]),
        counts(hist[3]) if undiv else {},
        sums[3],
        bas,
        _heuristic(_side_map(m, sd), start, to),
    )
