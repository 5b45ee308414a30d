"""What a scan returns.

Inside
------
- :class:`ScanResult` -- the classification of a range, its cycles, the
  unresolved starts and how the run went.
- :class:`StoreUse` -- how much of a result was read from a results store
  and how much was computed by the run; added up over the scans of a census,
  a family census, a comparison or a study, and said in every output.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from cyclewright.maps import Map

from ..integer_cycle import IntegerCycle, cycles_table
from ..labels import CERTIFIED, EXACT
from ..presentation import Presentable, Table
from .store import code_version

_COLUMN = {
    "drops": "drops below its start",
    "cycles": "cycle minimum (returns to its start)",
    "other_cycle": "enters another cycle",
    "unresolved": "unresolved",
    "beyond_length": "beyond the length bound",
}

__all__ = [
    "ScanResult",
    "StoreUse",
]


@dataclass(frozen=True)
class StoreUse:
    """Chunks and starts read back from a results store versus computed by this run.

    ``stored`` says whether a store was kept at all (``store=False`` keeps
    none, so nothing can be reused). Instances add up with ``+``.

    Examples
    --------
    >>> a = StoreUse(3, 1, 300, 100, stored=True)
    >>> (a + StoreUse()).line()
    'stored results: 3 of 4 chunks reused from the store (300 starts), 1 computed in this run (100 starts)'
    >>> StoreUse().line()
    'stored results: none used (nothing was scanned)'
    """

    chunks_reused: int = 0
    chunks_computed: int = 0
    starts_reused: int = 0
    starts_computed: int = 0
    stored: bool = False

    def __add__(self, other: StoreUse) -> StoreUse:
        if not isinstance(other, StoreUse):
            return NotImplemented
        return StoreUse(
            self.chunks_reused + other.chunks_reused,
            self.chunks_computed + other.chunks_computed,
            self.starts_reused + other.starts_reused,
            self.starts_computed + other.starts_computed,
            self.stored or other.stored,
        )

    @classmethod
    def total(cls, uses) -> StoreUse:
        """The sum of several (an empty sum is nothing scanned)."""
        out = cls()
        for u in uses:
            out = out + u
        return out

    @property
    def chunks(self) -> int:
        return self.chunks_reused + self.chunks_computed

    @property
    def reused(self) -> bool:
        """Whether any stored result was reused."""
        return self.chunks_reused > 0

    def line(self) -> str:
        """One line for a terminal or a report."""
        if not self.chunks:
            return "stored results: none used (nothing was scanned)"
        if not self.stored:
            return (
                f"stored results: none (no store kept); {self.chunks:,} chunks "
                f"({self.starts_computed:,} starts) computed in this run"
            )
        return (
            f"stored results: {self.chunks_reused:,} of {self.chunks:,} chunks reused from the "
            f"store ({self.starts_reused:,} starts), {self.chunks_computed:,} computed in this "
            f"run ({self.starts_computed:,} starts)"
        )

    def to_dict(self) -> dict:
        return {
            "stored": self.stored,
            "reused": self.reused,
            "chunks_reused": self.chunks_reused,
            "chunks_computed": self.chunks_computed,
            "starts_reused": self.starts_reused,
            "starts_computed": self.starts_computed,
        }


# --------------------------------------------------------------------------- results
@dataclass(frozen=True)
class ScanResult(Presentable):
    """The outcome of :func:`scan`.

    Attributes
    ----------
    map : Map
    start, to : int
        The range of absolute values scanned.
    sides : tuple of str
    max_steps : int
    max_cycle_length : int or None
    counts : dict
        ``side -> {"drops", "cycles", "other_cycle", "unresolved", "beyond_length"}``.
    cycles : tuple of IntegerCycle
        Every cycle whose minimum lies in the range, by side then ``|minimum|``.
    unresolved_count, unresolved_escaped : dict
        Per side: unresolved starts, and how many of them passed 2^63.
    unresolved_first : dict
        Per side: the first unresolved starts (signed); all are in the store.
    sieved : dict
        Per side: starts decided by the residue sieve without iteration.
    sieve_depth : dict
        Per side: the sieve's depth ``K`` (classes mod ``d^K``).
    store_path : str or None
    chunk_size, chunks_total, chunks_reused : int
    seconds : float
        Wall time of this call (a measurement).
    computed : int
        Starts classified in this call (the rest came from the store).
    executor : str
    """

    map: Map
    start: int
    to: int
    sides: tuple[str, ...]
    max_steps: int
    max_cycle_length: int | None
    counts: dict
    cycles: tuple[IntegerCycle, ...]
    unresolved_count: dict
    unresolved_escaped: dict
    unresolved_first: dict
    sieved: dict
    sieve_depth: dict
    store_path: str | None
    chunk_size: int
    chunks_total: int
    chunks_reused: int
    seconds: float
    computed: int
    executor: str = "local"
    version: str = field(default_factory=code_version)

    # ----------------------------------------------------------------- derived
    @property
    def minima(self) -> dict[str, tuple[int, ...]]:
        """Per side, the cycle minima found, sorted by absolute value."""
        out = {s: [] for s in self.sides}
        for c in self.cycles:
            out.setdefault(c.side, []).append(c.minimum)
        return {s: tuple(sorted(v, key=abs)) for s, v in out.items()}

    @property
    def complete(self) -> bool:
        """True when no start is unresolved: the classification of the range is complete."""
        return not any(self.unresolved_count.values())

    @property
    def label(self) -> str:
        """``certified`` for a complete classification of the range, else ``exact``.

        With unresolved starts the cycles listed are exact but the list may
        miss cycles whose minimum is an unresolved start.
        """
        return CERTIFIED.value if self.complete else EXACT.value

    @property
    def labels(self) -> dict[str, str]:
        return {
            "counts": CERTIFIED.value,
            "cycles": EXACT.value,
            "minima": self.label,
            "unresolved": CERTIFIED.value,
        }

    @property
    def starts_per_side(self) -> int:
        return self.to - self.start + 1

    @property
    def store_use(self) -> StoreUse:
        """What this scan read back from its store and what it computed."""
        starts = self.starts_per_side * len(self.sides)
        return StoreUse(
            chunks_reused=self.chunks_reused,
            chunks_computed=self.chunks_total - self.chunks_reused,
            starts_reused=starts - self.computed,
            starts_computed=self.computed,
            stored=self.store_path is not None,
        )

    def method(self) -> str:
        cap = (
            f"cycle length <= {self.max_cycle_length}"
            if self.max_cycle_length
            else f"step cap {self.max_steps}"
        )
        depths = sorted(set(self.sieve_depth.values()))
        sieve = (
            f"residue sieve mod {self.map.divisor}^{'/'.join(map(str, depths))}"
            if any(depths)
            else "no sieve"
        )
        return (
            "every start classified exactly (drops below itself / returns to itself / "
            f"enters another cycle / undecided), {cap}, {sieve}, int64 with overflow "
            "checks and exact multi-limb continuation; cycles re-verified by exact "
            "iteration and the itinerary's rational cycle"
        )

    def tables(self) -> tuple[Table, Table]:
        """How every start was classified (one row per side), and the cycles found."""
        last = "beyond_length" if self.max_cycle_length else "unresolved"
        names = [_COLUMN[k] for k in ("drops", "cycles", "other_cycle", last)]
        rows = tuple(
            (
                s,
                self.starts_per_side,
                *(self.counts[s][k] for k in ("drops", "cycles", "other_cycle", last)),
                self.sieved[s],
                tuple(self.unresolved_first[s])[:5],
            )
            for s in self.sides
        )
        counts = Table(
            "How every start was classified",
            ("side", "starts", *names, "decided by the residue sieve", "first unresolved"),
            rows,
            {n: CERTIFIED.value for n in (*names, "decided by the residue sieve")},
            "Unresolved starts passed the step cap without an exact verdict: they are open "
            "cases, not evidence of divergence or of further cycles.",
        )
        cycles = cycles_table(
            self.cycles,
            self.map.divisor,
            title="Cycles whose minimum lies in the range",
            minimum_label=self.label,
        )
        return counts, cycles

    def table(self) -> Table:
        """The cycles found (see :meth:`tables` for the classification too)."""
        return self.tables()[1]

    def to_dict(self) -> dict:
        m = self.map
        unresolved = {
            s: {
                "count": self.unresolved_count[s],
                "escaped": self.unresolved_escaped[s],
                "first": list(self.unresolved_first[s]),
            }
            for s in self.sides
        }
        return {
            "map": m.label,
            "formula": m.formula(),
            "map_key": m.key,
            "range": {"from": self.start, "to": self.to},
            "sides": list(self.sides),
            "max_steps": self.max_steps,
            "max_cycle_length": self.max_cycle_length,
            "complete": self.complete,
            "label": self.label,
            "method": self.method(),
            "counts": {s: dict(self.counts[s]) for s in self.sides},
            "minima": {s: list(v) for s, v in self.minima.items()},
            "cycles": [c.to_record() for c in self.cycles],
            "unresolved": unresolved,
            "sieve": {
                s: {"depth": self.sieve_depth[s], "sieved": self.sieved[s]} for s in self.sides
            },
            "store": self.store_path,
            "chunks": {
                "chunk_size": self.chunk_size,
                "total": self.chunks_total,
                "reused": self.chunks_reused,
                "computed": self.chunks_total - self.chunks_reused,
            },
            "store_use": self.store_use.to_dict(),
            "run": {
                "seconds": self.seconds,
                "computed_starts": self.computed,
                "starts_per_second": self.computed / self.seconds if self.seconds > 0 else None,
                "executor": self.executor,
                "code_version": self.version,
                "note": "wall-clock measurement, not a result",
            },
            "labels": self.labels,
        }

    def __repr__(self) -> str:
        parts = []
        for s in self.sides:
            mins = self.minima.get(s, ())
            shown = ", ".join(map(str, mins[:8])) + (", ..." if len(mins) > 8 else "")
            un = self.unresolved_count[s]
            extra = f", {un} unresolved" if un else ""
            if self.max_cycle_length:
                extra += (
                    f", {self.counts[s]['beyond_length']} beyond length {self.max_cycle_length}"
                )
            parts.append(f"{s}: minima [{shown}]{extra}")
        return (
            f"ScanResult({self.map.label}, [{self.start}, {self.to}]; "
            + "; ".join(parts)
            + f"; {self.label})"
        )
