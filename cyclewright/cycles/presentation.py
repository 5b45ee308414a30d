"""How a result presents itself: one small table type, built once per result type.

Inside
------
- :class:`Table` -- a title, column names, rows of values (exact values, not
  text) and a label per column (``exact``, ``certified``, ``proved``,
  ``heuristic`` or a short mixed description), plus a note.

Every result type builds its own tables (``table()``, and ``tables()`` where
a result has several); the CLI commands print them and the study report
writes them, so a figure has one column name and one label wherever it is
shown. Rendering (rich tables, Markdown, CSV) belongs to :mod:`cyclewright.cli`.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field, replace

__all__ = ["Table"]


@dataclass(frozen=True)
class Table:
    """Rows of figures with their column names and labels.

    Attributes
    ----------
    title : str
    columns : tuple of str
    rows : tuple of tuple
        One tuple of values per row, in the order of ``columns``.
    labels : dict
        Column -> label, for the columns whose figures carry one.
    note : str
        What a reader must know to read the table right (a caution included).

    Examples
    --------
    >>> t = Table("Cycles", ("minimum", "length"), ((1, 2), (-5, 3)), {"minimum": "exact"})
    >>> t.header()
    ['minimum [exact]', 'length']
    >>> t.with_column("map", "3x+1").rows[0]
    ('3x+1', 1, 2)
    """

    title: str
    columns: tuple[str, ...]
    rows: tuple[tuple, ...]
    labels: dict[str, str] = field(default_factory=dict)
    note: str = ""

    def header(self) -> list[str]:
        """Column names with their labels in brackets."""
        return [f"{c} [{self.labels[c]}]" if c in self.labels else c for c in self.columns]

    def records(self) -> list[dict]:
        """The rows as dicts keyed by column."""
        return [dict(zip(self.columns, row, strict=True)) for row in self.rows]

    def with_column(self, name: str, value, label: str | None = None) -> Table:
        """The same table with a first column holding ``value`` in every row."""
        labels = dict(self.labels) if label is None else {name: label, **self.labels}
        return replace(
            self,
            columns=(name, *self.columns),
            rows=tuple((value, *row) for row in self.rows),
            labels=labels,
        )

    def select(self, columns: Sequence[str]) -> Table:
        """The same table with only ``columns`` (in that order).

        A per-row label column of a chosen column (``"<name> label"``, see
        :meth:`stack`) comes along with it.

        Examples
        --------
        >>> Table("t", ("a", "b"), ((1, 2),), {"b": "exact"}).select(["b"]).rows
        ((2,),)
        """
        columns = [x for c in columns for x in (c, f"{c} label") if x == c or x in self.columns]
        idx = [self.columns.index(c) for c in columns]
        return replace(
            self,
            columns=tuple(columns),
            rows=tuple(tuple(row[i] for i in idx) for row in self.rows),
            labels={c: v for c, v in self.labels.items() if c in columns},
        )

    def head(self, n: int) -> Table:
        """The first ``n`` rows."""
        return replace(self, rows=self.rows[: max(n, 0)])

    @staticmethod
    def stack(tables: Sequence[Table], title: str | None = None) -> Table:
        """One table with the rows of tables that share their columns (the first's title and note).

        A column labelled alike in every table keeps its label; a column
        labelled differently (a complete scan's minima are ``certified``, an
        incomplete one's ``exact``) loses its header label and gains a column
        ``"<name> label"`` with each row's own label, so no figure is shown
        as more than it is.

        Examples
        --------
        >>> a = Table("t", ("n",), ((1,),), {"n": "certified"})
        >>> b = Table("t", ("n",), ((2,),), {"n": "exact"})
        >>> s = Table.stack([a, b])
        >>> s.columns, s.rows, s.labels
        (('n', 'n label'), ((1, 'certified'), (2, 'exact')), {})
        """
        if not tables:
            raise ValueError("stack needs at least one table")
        first = tables[0]
        for t in tables[1:]:
            if t.columns != first.columns:
                raise ValueError(f"columns differ: {t.columns} vs {first.columns}")
        mixed = [c for c in first.columns if len({t.labels.get(c) for t in tables}) > 1]
        labels = {c: v for c, v in first.labels.items() if c not in mixed}
        columns = first.columns + tuple(f"{c} label" for c in mixed)
        rows: Iterable[tuple] = (
            row + tuple(t.labels.get(c) for c in mixed) for t in tables for row in t.rows
        )
        return replace(
            first, title=title or first.title, columns=columns, rows=tuple(rows), labels=labels
        )
