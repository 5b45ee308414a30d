"""Maps side by side, and the counting argument's predictions against what is found.

Inside
------
- :func:`compare` -- one :class:`MapProfile` per map: drift, critical ratio, the
  delay record over the scanned range (:mod:`cyclewright.cycles.records`),
  necklace growth rate, the certified census up to a length on both sides,
  the scan up to ``N`` (share dropping, share unresolved, cycles met, largest
  excursion), the floor given ``N`` (when the scan verified ``N``), and the
  counting figures of the critical type at ``x = X``.
- :func:`predictions` -- for one map, the types where integer cycles were
  found, with found against necklaces, candidates (proved) and the heuristic
  expectation, and the totals over every type up to the length asked. Found
  is never above candidates (a theorem; a violation would be a bug).
- :class:`Comparison`, :class:`MapProfile`, :class:`Predictions`;
  :meth:`Comparison.table` (every figure, one row per map: CSV, JSON, the
  study) and :meth:`Comparison.overview` (the condensed view the ``compare``
  command prints), both from the same rows.
- :data:`COMPARE_DEFAULTS` -- the defaults of :func:`compare`, read by the
  command's help and by study files.

Labels: drift, critical ratio and ρ are given as closed forms
(``drift_exact``... labelled ``exact``) beside their float values (labelled
``rounded``); the drift is the mean log change per step under the residue
Markov chain (:meth:`cyclewright.maps.Map.drift_exact`); ρ is the growth
rate of the realizable necklaces (:func:`~cyclewright.cycles.realizable.realizable_rho`:
all of them when every multiplier is prime to ``d``), None where that is not
computed, and ``rho_assumes`` says which; census lists
``certified`` (primitive and all cycles counted apart); scan counts ``exact``
and their shares as fractions (``exact``) and floats (``rounded``); the
largest peak ``exact``, or a lower bound (``> 2^k``, ``proved``) when a walk
was cut before ``2^62``; floors and candidate bounds ``proved``;
necklaces/|D| ``heuristic``.

References
----------
.. [1] J. C. Lagarias, "The 3x+1 problem and its generalizations", Amer.
   Math. Monthly 92 (1985) 3-23 (drift, heuristic counts of cycles).
.. [2] S. Eliahou, Discrete Mathematics 118 (1993) 45-56 (bounds, floors).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, field
from fractions import Fraction

from cyclewright.maps import Map, as_map

from .census import Census, census
from .counting import count
from .errors import InputError, Name
from .itinerary import OfContent
from .labels import CERTIFIED, EXACT, HEURISTIC, PROVED, ROUNDED, Label
from .limits import (
    DEFAULT_MAX_STEPS,
    EXCURSION_WHY,
    MAX_CENSUS_LENGTH,
    MAX_COMPARE_SCAN,
    MAX_COMPARE_TO,
    MAX_EXCURSION_START,
    MAX_RECORDS_MINUTES,
    MAX_RECORDS_STEP_CAP,
    check_range,
    check_step_cap,
    check_type_length,
    check_workers,
    limits_lifted,
    refuse_time,
)
from .minimum_bound import minimum_bound
from .necklaces import contents_of_length, lyndon_count, necklace_count
from .presentation import Parts, Presentable, Table
from .progress import ProgressCallback, report
from .realizable import realizable_rho
from .scan.result import StoreUse
from .sweep import critical_lengths, rho, rho_exact, sweep

__all__ = [
    "check_compare",
    "compare",
    "Comparison",
    "MapProfile",
    "predictions",
    "Predictions",
    "critical_ratio",
    "ROW_COLUMNS",
    "ROW_HEADINGS",
    "COMPARE_DEFAULTS",
    "overview_table",
]

#: The defaults of :func:`compare`: census length ``K``, scan ``1..N`` and
#: counting at ``x = X``, and the step cap (study files and ``--help`` read them).
COMPARE_DEFAULTS: dict[str, int] = {
    "max_length": 20,
    "to": 10**5,
    "odd": 20,
    "max_steps": DEFAULT_MAX_STEPS,
}

#: The columns of :meth:`Comparison.table` (and of the CLI's CSV).
ROW_COLUMNS = (
    "map",
    "definition",
    "divisor",
    "drift",
    "drift_exact",
    "critical_ratio",
    "critical_ratio_exact",
    "rho",
    "rho_exact",
    "census_length",
    "census_cycles",
    "census_primitive_cycles",
    "census_minima",
    "census_lengths",
    "census_primitive",
    "census_method",
    "scan_to",
    "drop_share",
    "drop_share_exact",
    "unresolved_share",
    "unresolved_share_exact",
    "cycles_met",
    "largest_peak",
    "largest_peak_start",
    "peak_walk_cut",
    "delay_record_start",
    "delay_record",
    "delay_record_unresolved",
    "floor_positive_length",
    "floor_negative_length",
    "x",
    "k",
    "necklaces_at_x",
    "realizable_necklaces_at_x",
    "candidates_at_x",
    "heuristic_at_x",
    "integer_cycles_at_x",
)

#: The words each column of :data:`ROW_COLUMNS` is shown under in tables
#: (:meth:`Comparison.table`, the study report); ``rows()`` keeps the short keys.
ROW_HEADINGS = {
    "map": "map",
    "definition": "definition",
    "divisor": "divisor d",
    "drift": "drift per step",
    "drift_exact": "drift per step, exact form",
    "critical_ratio": "critical ratio k/x",
    "critical_ratio_exact": "critical ratio, exact form",
    "rho": "necklace growth rate rho",
    "rho_exact": "growth rate, exact form",
    "census_length": "census length K",
    "census_cycles": "cycles of length <= K other than 0",
    "census_primitive_cycles": "of which primitive (Lagarias)",
    "census_minima": "cycle minima",
    "census_lengths": "cycle lengths",
    "census_primitive": "minima of the primitive cycles",
    "census_method": "census method",
    "scan_to": "starts scanned, 1..N",
    "drop_share": "share of starts dropping below themselves",
    "drop_share_exact": "share dropping, exact",
    "unresolved_share": "share of starts unresolved",
    "unresolved_share_exact": "share unresolved, exact",
    "cycles_met": "cycles met from 1..N",
    "largest_peak": "largest value reached",
    "largest_peak_start": "start reaching it",
    "peak_walk_cut": "a walk was cut (peak a lower bound)",
    "delay_record_start": "delay record holder",
    "delay_record": "delay record (steps to the cycle)",
    "delay_record_unresolved": "starts left unresolved by the delay walk",
    "floor_positive_length": "least length of a further positive cycle",
    "floor_negative_length": "least length of a further negative cycle",
    "x": "odd steps x",
    "k": "length k at x",
    "necklaces_at_x": "necklaces at x",
    "realizable_necklaces_at_x": "realizable necklaces at x",
    "candidates_at_x": "candidates at x",
    "heuristic_at_x": "necklaces/|D| at x (realizable ones where counted)",
    "integer_cycles_at_x": "integer cycles at x",
}


def critical_ratio(m: Map | str) -> tuple[float, str] | None:
    """``log_d a`` when every multiplier other than 1 equals one ``a > 0`` (else None).

    Cycles need ``d^k ≈ A``: with ``j`` steps through multiplier ``a``,
    ``k / j ≈ log_d a``.

    >>> from cyclewright import maps
    >>> critical_ratio(maps.get("3x+1"))
    (1.58496..., 'log_2 3')
    """
    m = as_map(m)
    others = {a for a in m.multipliers if a != 1}
    if len(others) != 1:
        return None
    a = others.pop()
    if a <= 0:
        return None
    return math.log(a) / math.log(m.divisor), f"log_{m.divisor} {a}"


def _rho_assumes(m: Map) -> str | None:
    """What the necklace growth rate counts (None where no rate is defined)."""
    if rho(m) is None:
        return None
    if m.multipliers_prime_to_divisor():
        return "every itinerary is realizable (every multiplier is prime to d): rho counts them all"
    r, _exact, note = realizable_rho(m)
    if r is not None:
        return f"realizable necklaces only ({note})"
    every = rho_exact(m).split(" (assumes")[0]
    return (
        f"realizable necklaces not counted in closed form ({note}); rho of every itinerary, "
        f"{every} = {rho(m):.6f}, is only an upper bound for their growth"
    )


@dataclass(frozen=True)
class TypeRow(OfContent):
    """One type of the predictions table (found against the counting figures)."""

    side: str
    content: tuple[int, ...]
    found: int
    necklaces: int
    primitive_necklaces: int
    denominator: int
    candidates: int | None
    candidates_label: str
    heuristic: Fraction | None

    def to_dict(self) -> dict:
        return {
            "side": self.side,
            "length": self.length,
            "content": list(self.content),
            "odd_steps": self.content[1] if len(self.content) == 2 else None,
            "found": self.found,
            "necklaces": self.necklaces,
            "primitive_necklaces": self.primitive_necklaces,
            "denominator": self.denominator,
            "candidates": self.candidates,
            "heuristic": self.heuristic,
            "labels": {
                "found": CERTIFIED.value,
                "necklaces": EXACT.value,
                "candidates": self.candidates_label,
                "heuristic": HEURISTIC.value,
            },
        }


@dataclass(frozen=True)
class Predictions(Presentable):
    """Predictions against findings for one map up to a length."""

    map: Map
    max_length: int
    rows: tuple[TypeRow, ...]
    totals: (
        dict  # side -> {"types", "necklaces", "candidates", "heuristic", "found", "bound_applies"}
    )

    def table(self) -> Table:
        """One row per type, then the totals per side."""
        body = [
            (
                t.side,
                t.length,
                tuple(t.content),
                t.found,
                t.necklaces,
                t.candidates,
                t.candidates_label,
                float(t.heuristic) if t.heuristic is not None else None,
            )
            for t in self.rows
        ]
        for side, tot in self.totals.items():
            body.append(
                (
                    side,
                    f"all <= {self.max_length}",
                    f"{tot['types']} types",
                    tot["found"],
                    tot["necklaces"],
                    tot["candidates"] if tot["bound_applies"] else None,
                    PROVED.value
                    if tot["bound_applies"]
                    else f"n/a ({tot['types_without_bound']} types without a bound)",
                    tot["heuristic"],
                )
            )
        return Table(
            f"{self.map.label}: predictions against findings",
            (
                "side",
                "length",
                "content",
                "found",
                "necklaces",
                "candidates",
                "candidates label",
                "heuristic",
            ),
            tuple(body),
            {"found": CERTIFIED.value, "necklaces": EXACT.value, "heuristic": HEURISTIC.value},
            "the heuristic (necklaces / |D|, a float) is an expectation, never a proof",
        )

    def to_dict(self) -> dict:
        return {
            "map": self.map.label,
            "max_length": self.max_length,
            "rows": [r.to_dict() for r in self.rows],
            "totals": self.totals,
            "labels": {
                "found": CERTIFIED.value,
                "necklaces": EXACT.value,
                "candidates": PROVED.value,
                "heuristic": HEURISTIC.value,
            },
        }


def predictions(
    m: Map | str, c: Census, *, limit: int = 10**5, max_types: int = 200_000
) -> Predictions:
    """Cycles found by a census, type by type, against what the counting argument allows.

    Parameters
    ----------
    m : Map
    c : Census
        Its cycles give ``found``; its length ``K`` bounds the types.
    limit : int
        Necklace enumeration limit for the exact candidates of the types
        with cycles (see :func:`cyclewright.cycles.counting.count`).
    max_types : int
        Refuse when the totals would need more types than this.

    Returns
    -------
    Predictions
        ``rows``: the types where cycles were found; ``totals`` per side over
        every type of length ``<= K`` whose denominator has the side's sign:
        necklaces (exact), candidates (the proved bound per type, summed),
        heuristic (sum of necklaces/|D|), found (certified).

    Examples
    --------
    >>> from cyclewright import maps
    >>> from .census import census
    >>> p = predictions(maps.get("3x+5"), census(maps.get("3x+5"), 12, side="positive", store=False, workers=1))
    >>> [(r.length, r.content[1], r.found, r.candidates) for r in p.rows if r.side == "positive"]
    [(2, 1, 1, 5), (3, 1, 1, 1), (5, 3, 2, 23)]
    """
    m = as_map(m)
    K = c.max_length
    d = m.divisor
    n_types = math.comb(K + d, d)
    if n_types > max_types:
        raise InputError(
            f"{m.label}: predictions up to length {K} would visit {n_types} types (limit {max_types})"
        )
    found: dict[tuple[str, tuple[int, ...]], int] = {}
    for cyc in c.cycles:
        if cyc.minimum == 0:
            continue
        side = "positive" if cyc.minimum > 0 else "negative"
        key = (side, tuple(cyc.content))
        found[key] = found.get(key, 0) + 1
    rows = []
    for (side, content), nfound in sorted(
        found.items(), key=lambda kv: (kv[0][0] != "positive", sum(kv[0][1]), kv[0][1])
    ):
        tc = count(m, content=dict(enumerate(content)), limit=limit)
        if tc.candidates is not None:
            cand, clabel = tc.candidates, (EXACT.value if tc.enumerated else PROVED.value)
        else:
            cand, clabel = None, "n/a"
        if cand is not None and nfound > cand:  # pragma: no cover - a theorem; a bug if it fires
            raise AssertionError(
                f"{m.label}: {nfound} cycles of type {content} but only {cand} candidates"
            )
        heur = Fraction(tc.necklaces, abs(tc.denominator)) if tc.denominator else None
        rows.append(
            TypeRow(
                side,
                content,
                nfound,
                tc.necklaces,
                tc.primitive_necklaces,
                tc.denominator,
                cand,
                clabel,
                heur,
            )
        )
    totals = {}
    for side in c.sides:
        heur: list[float] = []
        t = {
            "types": 0,
            "necklaces": 0,
            "primitive_necklaces": 0,
            "candidates": 0,
            "heuristic": 0.0,
            "found": 0,
            "bound_applies": True,
            "types_without_bound": 0,
            "necklaces_without_bound": 0,
        }
        for k in range(1, K + 1):
            dk = d**k
            for content in contents_of_length(d, k):
                A = 1
                for a, ci in zip(m.multipliers, content):
                    A *= a**ci
                D = dk - A
                if D == 0:
                    continue
                mb = minimum_bound(m, dict(enumerate(content)), side)
                if not mb.applies:
                    t["bound_applies"] = False
                    t["types_without_bound"] += 1
                    t["necklaces_without_bound"] += necklace_count(content)
                    continue
                if not mb.possible:
                    continue
                nk = necklace_count(content)
                t["types"] += 1
                t["necklaces"] += nk
                t["primitive_necklaces"] += lyndon_count(content)
                t["candidates"] += int(mb.integer or 0)
                heur.append(nk / abs(D))
        t["heuristic"] = math.fsum(heur)  # a model's expectation: a float is enough
        t["found"] = sum(v for (s, _), v in found.items() if s == side)
        t["labels"] = {
            "necklaces": EXACT.value,
            "candidates": PROVED.value,
            "heuristic": HEURISTIC.value,
            "found": CERTIFIED.value,
        }
        totals[side] = t
    return Predictions(m, K, tuple(rows), totals)


@dataclass(frozen=True)
class MapProfile:
    """Everything the comparison shows for one map."""

    map: Map
    census: Census | None
    census_note: str
    excursions: dict  # side -> Excursions
    scan_to: int
    floors: dict  # side -> Floor or None
    floor_notes: dict
    critical_count: object | None  # TypeCount at x = X
    critical_note: str
    predictions: Predictions | None
    extras: dict = field(default_factory=dict)

    def row(self) -> dict:
        from .excursions import peak_text  # compiled walks: loaded only when used

        m = self.map
        cr = critical_ratio(m)
        # the growth rate of the realizable necklaces (all of them for multipliers prime to d)
        r, r_exact, _note = realizable_rho(m) if rho(m) is not None else (None, None, "")
        c = self.census
        counts = self.extras.get("scan_counts", {}).get("positive")
        total = sum(counts.values()) if counts else 0
        top = max(self.excursions.values(), key=lambda e: abs(e.peak), default=None)
        cut = any(e.peak_overflowed for e in self.excursions.values())
        row = {
            "map": m.label,
            "definition": m.formula(),
            "divisor": m.divisor,
            "drift": m.drift(),
            "drift_exact": m.drift_formula(),
            "critical_ratio": cr[0] if cr else None,
            "critical_ratio_exact": cr[1] if cr else None,
            "rho": r,
            "rho_exact": r_exact,
            "rho_assumes": _rho_assumes(m),
            "census_length": c.max_length if c else None,
            "census_cycles": len([x for x in c.cycles if x.minimum != 0]) if c else None,
            "census_primitive_cycles": len(
                [x for x in c.cycles if x.minimum != 0 and x.lagarias_primitive]
            )
            if c
            else None,
            "census_minima": [x.minimum for x in c.cycles if x.minimum != 0] if c else None,
            "census_lengths": [x.length for x in c.cycles if x.minimum != 0] if c else None,
            "census_primitive": [
                x.minimum for x in c.cycles if x.minimum != 0 and x.lagarias_primitive
            ]
            if c
            else None,
            "census_method": c.method if c else self.census_note,
            "scan_to": self.scan_to,
            # shares of the positive starts 1..N as classified by the scan (exact counts; floats shown)
            "drop_share": counts["drops"] / total if total else None,
            "drop_share_exact": Fraction(counts["drops"], total) if total else None,
            "unresolved_share": counts["unresolved"] / total if total else None,
            "unresolved_share_exact": Fraction(counts["unresolved"], total) if total else None,
            "cycles_met": sorted(
                {
                    v
                    for e in self.excursions.values()
                    for v in self.extras.get("met", {}).get(e.side, [])
                }
            ),
            "largest_peak": peak_text(top.peak, cut) if top else None,
            "largest_peak_start": top.peak_start if top else None,
            "peak_walk_cut": cut,
        }
        rec = self.extras.get("records")
        holder = rec.sides["positive"].holder("delay") if rec is not None else None
        row["delay_record_start"] = holder.start if holder else None
        row["delay_record"] = holder.value if holder else None
        row["delay_record_unresolved"] = rec.sides["positive"].unresolved if rec else None
        for side in ("positive", "negative"):
            f = self.floors.get(side)
            row[f"floor_{side}_length"] = f.least_length if f is not None and f.possible else None
            row[f"floor_{side}_note"] = self.floor_notes.get(side, "")
        tc = self.critical_count
        row["x"] = tc.odd if tc is not None else None
        row["k"] = tc.length if tc is not None else None
        row["necklaces_at_x"] = tc.necklaces if tc is not None else None
        row["realizable_necklaces_at_x"] = tc.realizable_necklaces if tc is not None else None
        row["candidates_at_x"] = tc.candidates if tc is not None else None
        # realizable necklaces / |D| where they were counted (TypeCount.heuristic)
        heur = tc.heuristic if tc is not None and tc.denominator else None
        row["heuristic_at_x"] = float(heur) if heur is not None else None
        row["heuristic_at_x_exact"] = heur
        row["integer_cycles_at_x"] = (
            len(tc.integer_cycles) if tc is not None and tc.integer_cycles is not None else None
        )
        row["labels"] = {
            "drift": ROUNDED.value,
            "drift_exact": EXACT.value,
            "critical_ratio": ROUNDED.value,
            "critical_ratio_exact": EXACT.value,
            "rho": ROUNDED.value,
            "rho_exact": EXACT.value,
            "census_cycles": CERTIFIED.value,
            "census_primitive_cycles": CERTIFIED.value,
            "census_minima": CERTIFIED.value,
            "drop_share": ROUNDED.value,
            "drop_share_exact": EXACT.value,
            "unresolved_share": ROUNDED.value,
            "unresolved_share_exact": EXACT.value,
            "cycles_met": EXACT.value,
            # a cut walk leaves only a lower bound, established exactly
            "largest_peak": PROVED.value if cut else EXACT.value,
            "delay_record": EXACT.value,
            "floor_positive_length": PROVED.value,
            "floor_negative_length": PROVED.value,
            "necklaces_at_x": EXACT.value,
            "realizable_necklaces_at_x": EXACT.value,
            "candidates_at_x": (EXACT.value if tc is not None and tc.enumerated else PROVED.value),
            "heuristic_at_x": HEURISTIC.value,
            "heuristic_at_x_exact": HEURISTIC.value,
            "integer_cycles_at_x": EXACT.value,
        }
        return row

    def to_dict(self) -> dict:
        return {
            "row": self.row(),
            "census": self.census.to_dict() if self.census else None,
            "excursions": {s: e.to_dict() for s, e in self.excursions.items()},
            "scan_counts": self.extras.get("scan_counts", {}),
            "floors": {s: (f.to_dict() if f is not None else None) for s, f in self.floors.items()},
            "floor_notes": self.floor_notes,
            "critical_count": self.critical_count.to_dict()
            if self.critical_count is not None
            else None,
            "predictions": self.predictions.to_dict() if self.predictions else None,
            "store_use": self.store_use.to_dict(),
        }

    @property
    def store_use(self) -> StoreUse:
        """What the census and the scans of this map read back from the store and computed."""
        own = self.extras.get("store_use", StoreUse())
        return own + self.census.store_use if self.census is not None else own


_TABLE_NOTE = (
    "Floors are conditional on the scan having verified 1..N with no unresolved "
    "start; where starts stayed unresolved no floor is given. A peak whose walk was cut is a "
    "lower bound."
)


def overview_table(rows: Sequence[dict], max_length: int, to: int, odd: int) -> Table:
    """The condensed view of a comparison's rows (:meth:`MapProfile.row`, or their JSON).

    The same rows as :meth:`Comparison.table`, fewer columns, worded with
    their ``K``, ``N`` and ``x``: figures read together share a cell
    (:class:`~cyclewright.cycles.presentation.Parts`, e.g. primitive / all
    cycles, the floors on both sides). The ``compare`` command prints it;
    the demo shows some of its columns, from the study's data files.

    Parameters
    ----------
    rows : sequence of dict
        One row per map, keyed as :data:`ROW_COLUMNS` (with ``labels`` and
        ``rho_assumes`` when known).
    max_length, to, odd : int
        ``K``, ``N`` and ``X`` of the comparison.

    Returns
    -------
    Table
        One row per map. A column whose label differs between maps (the
        largest value: exact, or a proved lower bound when a walk was cut;
        the candidates: exact or proved) gets a label per row.

    Examples
    --------
    >>> row = {"map": "3x+1", "drift_exact": "(1/2) ln(3/4)", "drift": -0.1438,
    ...        "critical_ratio": 1.585, "rho": 1.89, "census_primitive_cycles": 4,
    ...        "census_cycles": 4, "census_minima": [1, -1, -5, -17],
    ...        "unresolved_share": 0.0, "largest_peak": 9232, "delay_record": 111,
    ...        "delay_record_start": 27, "delay_record_unresolved": 0,
    ...        "floor_positive_length": 100, "floor_negative_length": None,
    ...        "necklaces_at_x": 7, "candidates_at_x": 1, "heuristic_at_x": 0.2}
    >>> t = overview_table([row], 20, 10**5, 20)
    >>> floors = t.records()[0]["least length of a further cycle, + / -, given 1..100000 verified"]
    >>> floors, str(floors)
    ((100, None), '100 / -')

    References
    ----------
    See the module docstring.
    """
    K, N, X = max_length, to, odd
    columns = {  # heading -> (label, the row's figure)
        "map": (None, lambda r: r["map"]),
        "drift per step, exact form": (EXACT, lambda r: r["drift_exact"]),
        "drift per step": (ROUNDED, lambda r: r["drift"]),
        "critical ratio k/x": (ROUNDED, lambda r: r["critical_ratio"]),
        "necklace growth rate rho": (ROUNDED, lambda r: r["rho"]),
        f"cycles of length <= {K} other than 0: primitive / all": (
            CERTIFIED,
            lambda r: Parts((r["census_primitive_cycles"], r["census_cycles"])),
        ),
        "cycle minima": (
            CERTIFIED,
            lambda r: ", ".join(map(str, r["census_minima"] or [])) or None,
        ),
        f"share of 1..{N} unresolved": (ROUNDED, lambda r: r["unresolved_share"]),
        "largest value reached": ("largest_peak", lambda r: r["largest_peak"]),
        f"delay record over 1..{N}, at its start": (EXACT, _delay_text),
        f"least length of a further cycle, + / -, given 1..{N} verified": (
            PROVED,
            lambda r: Parts((r["floor_positive_length"], r["floor_negative_length"])),
        ),
        f"necklaces at x = {X}": (EXACT, lambda r: r["necklaces_at_x"]),
        f"candidates at x = {X}": ("candidates_at_x", lambda r: r["candidates_at_x"]),
        f"necklaces/|D| at x = {X}": (HEURISTIC, lambda r: r["heuristic_at_x"]),
    }
    note = _TABLE_NOTE
    for r in rows:  # a multiplier sharing a factor with d: what rho counts, or why it is absent
        if (r.get("rho_assumes") or "").startswith("realizable"):
            note += f" {r['map']}: rho counts {r['rho_assumes']}."
    title = (
        f"Maps side by side (census length K = {K}, starts 1..N with N = {N} on both sides, "
        f"counting at x = {X})"
    )

    def labels(r: dict) -> dict:
        out = {}
        for head, (label, _) in columns.items():
            if label is not None and not isinstance(label, Label):  # the row gives it
                label = (r.get("labels") or {}).get(label)
            if label is not None:
                out[head] = str(label)
        return out

    per_map = [
        Table(title, tuple(columns), (tuple(f(r) for _, f in columns.values()),), labels(r), note)
        for r in rows
    ]
    if not per_map:
        return Table(title, tuple(columns), (), {}, note)
    return Table.stack(per_map)  # a label that differs between maps goes per row


def _delay_text(r: dict) -> str | None:
    """``111 at 27`` (and the starts the walk left unresolved)."""
    if r["delay_record"] is None:
        return None
    text = f"{r['delay_record']} at {r['delay_record_start']}"
    if r["delay_record_unresolved"]:
        text += f" ({r['delay_record_unresolved']} unresolved)"
    return text


@dataclass(frozen=True)
class Comparison(Presentable):
    """Profiles of several maps with shared parameters."""

    profiles: tuple[MapProfile, ...]
    max_length: int
    to: int
    odd: int

    def rows(self) -> list[dict]:
        return [p.row() for p in self.profiles]

    def table(self) -> Table:
        """One row per map: the columns of :data:`ROW_COLUMNS` under their words
        (:data:`ROW_HEADINGS`), labelled; the title gives K, N and x."""
        note = _TABLE_NOTE
        title = (
            f"One row per map (census length K = {self.max_length}, "
            f"starts 1..N with N = {self.to}, counting at x = {self.odd})"
        )
        heads = tuple(ROW_HEADINGS[c] for c in ROW_COLUMNS)
        per_map = [
            Table(
                title,
                heads,
                (tuple(r.get(c) for c in ROW_COLUMNS),),
                {ROW_HEADINGS[c]: v for c, v in r["labels"].items() if c in ROW_COLUMNS},
                note,
            )
            for r in self.rows()
        ]
        if not per_map:
            return Table(title, heads, (), {}, note)
        return Table.stack(per_map)  # a label that differs between maps goes per row

    def overview(self) -> Table:
        """The condensed view of :meth:`table` (what the ``compare`` command prints).

        See :func:`overview_table`.

        Examples
        --------
        >>> cmp = compare(["3x+1"], max_length=8, to=100, odd=3, store=False, workers=1)
        >>> row = cmp.overview().records()[0]
        >>> row["cycles of length <= 8 other than 0: primitive / all"], row["cycle minima"]
        ((3, 3), '1, -1, -5')
        """
        return overview_table(self.rows(), self.max_length, self.to, self.odd)

    def sweeps(self, limit: int = 2000) -> dict:
        """The positive-side critical-line sweep of every map that has one (for plots)."""
        out = {}
        for p in self.profiles:
            try:
                out[p.map.label] = sweep(p.map, range(1, self.odd + 1), limit=limit)
            except InputError:
                continue
        return out

    @property
    def store_use(self) -> StoreUse:
        """What every census and scan of the comparison read back from the stores and computed."""
        return StoreUse.total(p.store_use for p in self.profiles)

    def to_dict(self) -> dict:
        return {
            "max_length": self.max_length,
            "to": self.to,
            "odd": self.odd,
            "maps": [p.to_dict() for p in self.profiles],
            "store_use": self.store_use.to_dict(),
        }

    def __repr__(self) -> str:
        return f"Comparison({', '.join(p.map.label for p in self.profiles)}; K={self.max_length}, N={self.to}, x={self.odd})"


def check_compare(
    *,
    max_length: int = COMPARE_DEFAULTS["max_length"],
    to: int = COMPARE_DEFAULTS["to"],
    odd: int = COMPARE_DEFAULTS["odd"],
    max_steps: int = COMPARE_DEFAULTS["max_steps"],
    workers: int | None = None,
) -> None:
    """Refuse :func:`compare` parameters beyond the limits (:class:`InputError`, one line).

    The census length is 1 .. :data:`~cyclewright.cycles.limits.MAX_CENSUS_LENGTH`,
    the scan end ``to`` 1 .. :data:`~cyclewright.cycles.limits.MAX_COMPARE_TO`
    (and never beyond 2^62, the compiled walk's range), the counting ``odd`` 1 ..
    :data:`~cyclewright.cycles.limits.MAX_TYPE_LENGTH`, ``max_steps`` 1 ..
    :data:`~cyclewright.cycles.limits.MAX_STEP_CAP`.

    >>> check_compare(to=10**6)
    >>> check_compare(odd=10**9)
    Traceback (most recent call last):
    ...
    cyclewright.cycles.errors.InputError: odd must be at most 100000, got 10^9 (the figures of a type have about k digits each)
    >>> check_compare(to=2**62)
    Traceback (most recent call last):
    ...
    cyclewright.cycles.errors.InputError: to must be at most 10^9, got 2^62 (compare walks every start of 1..to on both sides three times (excursions, scan, records): about a minute per 10^8 starts and map)
    """
    check_range(
        max_length,
        "max_length",
        minimum=1,
        maximum=MAX_CENSUS_LENGTH,
        why="planning alone grows with K; the scans it needs are far beyond any scan limit",
        liftable=True,
    )
    check_range(
        to,
        "to",
        minimum=1,
        maximum=MAX_COMPARE_TO,
        why="compare walks every start of 1..to on both sides three times (excursions, "
        "scan, records): about a minute per 10^8 starts and map",
        liftable=True,
    )
    check_range(to, "to", maximum=MAX_EXCURSION_START - 1, why=EXCURSION_WHY)
    check_type_length(odd, "odd")
    check_step_cap(max_steps)
    check_workers(workers)


def compare(
    maps_: Sequence[Map | str],
    *,
    max_length: int = COMPARE_DEFAULTS["max_length"],
    to: int = COMPARE_DEFAULTS["to"],
    odd: int = COMPARE_DEFAULTS["odd"],
    max_steps: int = COMPARE_DEFAULTS["max_steps"],
    store=None,
    records_store: bool | None = None,
    workers: int | None = None,
    executor: str = "local",
    scheduler: str | None = None,
    count_limit: int = 10**5,
    progress: ProgressCallback | None = None,
    max_scan: int = MAX_COMPARE_SCAN,
    max_minutes: float | None = MAX_RECORDS_MINUTES,
) -> Comparison:
    """Profiles of several maps with the same parameters.

    Parameters
    ----------
    maps_ : sequence of Map or str
        The maps, or their names, aliases or ``ax+b`` shorthands.
    max_length : int
        ``K`` for the census (both sides).
    to : int
        ``N`` for the scan of starts ``1..N`` on both sides and the floor.
    odd : int
        ``X``: the counting figures of the first critical type with ``x = X``.
    max_steps : int
        Step cap per start of the excursion walk and of the scan (default
        :data:`~cyclewright.cycles.limits.DEFAULT_MAX_STEPS`).
    store, workers, executor, scheduler
        Passed to the census' scan, the scan of ``1..N`` and the records;
        ``store`` may be a directory (one store per map), ``executor`` is
        ``"local"`` or ``"dask"`` (with a ``scheduler`` address). The records
        keep a store only when one is asked for: ``store`` names one, or
        ``records_store`` is True, or ``N`` is at least
        :data:`~cyclewright.cycles.records.RECORDS_STORE_ABOVE` (then the
        default store); see :func:`~cyclewright.cycles.records.store_for_part`.
    records_store : bool, optional
        True: the records keep a store (``store``) whatever ``N``; False:
        none; None (default): the rule above.
    count_limit : int
        Necklace enumeration limit.
    max_scan : int
        Largest scan a member's census may run (default
        :data:`~cyclewright.cycles.limits.MAX_COMPARE_SCAN`); a census
        beyond it is refused at once and its row says so (run ``census``
        for it).
    max_minutes : float or None
        Refuse (:class:`InputError`) a comparison whose whole run is
        estimated above this many minutes (default
        :data:`~cyclewright.cycles.limits.MAX_RECORDS_MINUTES`), before any
        map is worked on: the records (timed, as they are for their own
        limit) and the scan of ``1..N`` (:func:`~cyclewright.cycles.records_plan.plan_scan`)
        of every map, summed (heuristic; the census, counts and floor are
        not counted). None, or inside
        :func:`~cyclewright.cycles.limits.lift_limits`: never refused.
    progress : ProgressCallback, optional
        Called with a :class:`~cyclewright.cycles.progress.ProgressEvent`
        (phase ``"compare"``, unit ``"maps"``, the map and stage as detail)
        at each stage of each map.

    Returns
    -------
    Comparison

    Examples
    --------
    >>> from cyclewright import maps
    >>> cmp = compare([maps.get("3x+1"), maps.get("5x+1")], max_length=12, to=1000, odd=5, store=False, workers=1)
    >>> [r["census_minima"] for r in cmp.rows()]
    [[1, -1, -5, -17], [1, 13, 17, -1]]

    References
    ----------
    Lagarias 1985 (the heuristic, drift); Eliahou 1993 (bounds and floors);
    see the module docstring.
    """
    from .excursions import excursions
    from .floors import floor
    from .records import records, store_for_part
    from .scan.run import check_store_for_maps, scan

    if not maps_:
        raise InputError("compare needs at least one map")
    maps_ = [as_map(x) for x in maps_]
    # every part's limits up front: a part's refusal later becomes a note in its row
    check_compare(max_length=max_length, to=to, odd=odd, max_steps=max_steps, workers=workers)
    check_store_for_maps(store, maps_, "a comparison")
    # the records of each map are timed up front (records_plan) and refused before any
    # map is worked on; the runs then reuse the measured rate instead of timing again
    from .records_plan import check_minutes, check_plan, plan_records, plan_scan

    rates: dict = {}
    whole = 0.0
    for m in maps_ if max_steps <= MAX_RECORDS_STEP_CAP else ():
        plan = plan_records(
            m, to, side="positive", max_steps=max_steps, workers=workers, executor=executor
        )
        check_plan(
            plan,
            MAX_RECORDS_MINUTES,
            option="records' max_minutes",
            raise_it="a comparison keeps the records' default limit",
        )
        rates[m.key] = plan.rate if plan.seconds_per_start > 0 else None
        whole += plan.seconds
    if max_minutes is not None and not limits_lifted():
        check_minutes(max_minutes)
        for m in maps_:
            whole += plan_scan(
                m, to, side="both", max_steps=max_steps, workers=workers, executor=executor
            ).seconds
        if whole > max_minutes * 60:
            n = len(maps_)
            refuse_time(
                f"comparison of {n} map{'s' if n != 1 else ''} (to {to:,}, step cap {max_steps:,})",
                whole,
                "the records and the scan of every map timed now and summed; the census, "
                "counts and floors not counted",
                max_minutes,
                ways=("use more ", Name("workers"), ", use a smaller ", Name("to"), ", "),
                last="compare fewer maps",
            )
    profiles = []
    for i, m in enumerate(maps_):

        def say(stage: str, i: int = i, m: Map = m) -> None:
            report(progress, "compare", i, len(maps_), "maps", f"{m.label}: {stage}")

        say(f"census up to length {max_length}")
        try:
            c = census(
                m,
                max_length,
                side="both",
                store=store,
                workers=workers,
                executor=executor,
                scheduler=scheduler,
                max_scan=max_scan,
            )
            cnote = ""
        except InputError as exc:
            c, cnote = None, str(exc)
            if "beyond the limit of" in cnote:
                cnote += (
                    f" (compare's census scans at most {max_scan:,} starts: run census for more)"
                )
        say(f"excursions and scan to {to}")
        exc_ = {}
        met = {}
        scan_counts = {}
        use = StoreUse()
        floors, fnotes = {}, {}
        for side in ("positive", "negative"):
            try:
                exc_[side] = excursions(m, to, side=side, max_steps=max_steps)
            except InputError as e:
                fnotes[side] = str(e)
                continue
            sr = scan(
                m,
                to,
                side=side,
                max_steps=max_steps,
                store=store,
                workers=workers,
                executor=executor,
                scheduler=scheduler,
                max_minutes=None,  # bounded by MAX_COMPARE_TO, refused before the comparison
            )
            use = use + sr.store_use
            met[side] = list(sr.minima.get(side, ()))
            scan_counts[side] = {k: int(v) for k, v in sr.counts[side].items()}
            unresolved = sr.unresolved_count.get(side, 0)
            if unresolved:
                floors[side] = None
                fnotes[side] = f"not verified: {unresolved} starts up to {to} unresolved"
                continue
            try:
                floors[side] = floor(m, verified_to=to, side=side)
                fnotes[side] = f"given the scan verified 1..{to} (known cycles: {met[side]})"
            except InputError as e:
                floors[side] = None
                fnotes[side] = str(e)
        say(f"records over 1..{to}")
        recs = records(
            m,
            to,
            side="positive",
            max_steps=max_steps,
            store=store_for_part(getattr(store, "path", store), to, records_store),
            workers=workers,
            executor=executor,
            scheduler=scheduler,
            max_minutes=None,  # estimated and checked before the first map (above)
            rate=rates.get(m.key),
        )
        use = use + recs.store_use
        tc, tnote = None, ""
        try:
            if m.divisor == 2:
                ks = critical_lengths(m, (odd,), 0, "positive")
                if ks:
                    tc = count(m, ks[0], odd, limit=count_limit)
            else:
                tnote = "critical type at x is defined for two-branch maps"
        except InputError as e:
            tnote = str(e)
        preds = None
        if c is not None:
            try:
                preds = predictions(m, c, limit=count_limit)
            except InputError:
                preds = None
        profiles.append(
            MapProfile(
                m,
                c,
                cnote,
                exc_,
                to,
                floors,
                fnotes,
                tc,
                tnote,
                preds,
                {"met": met, "scan_counts": scan_counts, "records": recs, "store_use": use},
            )
        )
    report(progress, "compare", len(maps_), len(maps_), "maps")
    return Comparison(tuple(profiles), max_length, to, odd)
